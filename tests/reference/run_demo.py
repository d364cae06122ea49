"""The demo recipe cleans the demo file completely: every defect injected by
assets/demo/generate.py and listed in tree_survey.defects.json is repaired,
removed or reported, and nothing else changes.

Sources:
- assets/demo/tree_survey.defects.json, the generator's manifest, checked
  against the file by assets/demo/check_generator.py: per defect kind and
  column, the physical lines and the correct values.
- Python's csv module gives each record's physical start line, Python's
  unicodedata the NFC form, datetime.date the calendar, decimal.Decimal the
  numeric values.
"""
import csv
import datetime
import decimal
import io
import json
import shutil
import os
import sys
import tempfile
import unicodedata

sys.dont_write_bytecode = True
import reflib  # noqa: E402

tally = reflib.Tally("run_demo")
binary = reflib.require_binary(sys.argv)
repo = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
demo = os.path.join(repo, "assets/demo")
work = tempfile.mkdtemp(prefix="tamis-demo-")
manifest = json.load(open(os.path.join(demo, "tree_survey.defects.json"), encoding="utf-8"))
source_text = open(os.path.join(demo, "tree_survey.csv"), encoding="utf-8", newline="").read()
records = reflib.python_csv_records_with_lines(source_text)
columns = records[0][0]
data_lines = [line for _, line in records[1:]]
tally.check(len(data_lines) == manifest["data_rows"], "test setup: the manifest's row count")

out = os.path.join(work, "clean.csv")
report_path = os.path.join(work, "report.json")
code, _, stderr = reflib.run_tamis(binary, ["run", os.path.join(demo, "tree_survey.recipe.json"),
                                            os.path.join(demo, "tree_survey.csv"), "-o", out, "--report", report_path])
tally.check(code == 0, "the demo recipe runs (exit 0)", stderr)
if code != 0:
    tally.finish(["work folder: %s" % work])

report = json.load(open(report_path, encoding="utf-8"))
rows = reflib.parse_tamis_output(open(out, "rb").read())
tally.check(rows[0] == columns, "the output keeps the ten columns in order")
defects = {}
for d in manifest["defects"]:
    defects.setdefault(d["kind"], []).append(d)


def lines_of(kind, column=None):
    return {line for d in defects.get(kind, []) if column is None or d["column"] == column for line in d["lines"]}


removed = lines_of("exact_duplicate_row") | lines_of("near_duplicate_row") | lines_of("both_measures_missing")
kept_lines = [line for line in data_lines if line not in removed]
tally.check(len(rows) - 1 == len(kept_lines),
            "output rows = data rows - duplicates - rows without either measure (%d)" % len(kept_lines),
            "got %d" % (len(rows) - 1))
by_line = dict(zip(kept_lines, rows[1:])) if len(rows) - 1 == len(kept_lines) else {}
totals = report["totals"]
tally.check(totals["rows_read"] == manifest["data_rows"] and totals["rows_rejected"] == 0
            and totals["rows_read"] == totals["rows_written"] + totals["rows_removed"],
            "report totals balance with nothing rejected", reflib.show_value(totals))
listed = set()
for step in report["steps"]:
    listed |= {r["line"] for r in step.get("listed_rows", [])}
tally.check(listed == removed, "the report lists exactly the removed lines",
            "missing %s, extra %s" % (sorted(removed - listed)[:10], sorted(listed - removed)[:10]))

col = {name: i for i, name in enumerate(columns)}
vocabulary = manifest["vocabulary"]


def same_value(column, got, want):
    if column in ("planted_count", "survival_pct", "funding_k"):
        try:
            return decimal.Decimal(got) == decimal.Decimal(want)
        except decimal.InvalidOperation:
            return False
    return got == want


# Every listed correct value is in the output at its line.
checked = 0
for kind, entries in defects.items():
    for d in entries:
        if d["column"] is None or not d.get("expected"):
            continue
        wrong = [(line, by_line[line][col[d["column"]]], want) for line, want in d["expected"]
                 if line in by_line and not same_value(d["column"], by_line[line][col[d["column"]]], want)]
        checked += len(d["expected"])
        tally.check(not wrong, "%s in %s: every line has the correct value" % (kind, d["column"]),
                    reflib.show_value(wrong[:5]))
tally.check(checked > 1000, "test setup: over a thousand expected values checked (%d)" % checked)

# Missing values are NULL (written empty), except district gaps the group fills.
fillable = {line for d in defects.get("district_fillable", []) for line, _ in d["expected"]}
for kind in ("empty", "whitespace_only", "null_text", "sentinel", "date_invalid", "district_conflict"):
    for d in defects.get(kind, []):
        not_null = [line for line in d["lines"] if line in by_line and line not in fillable
                    and by_line[line][col[d["column"]]] != ""]
        tally.check(not not_null, "%s in %s: NULL in the output" % (kind, d["column"]), reflib.show_value(not_null[:5]))
conflicts = [c for s in report["steps"] if s.get("op") == "fill_from_group" for c in s.get("conflicts", [])]
conflict_site = list(manifest["conflict_sites"])[0]
tally.check(any(conflict_site in c for c in conflicts), "the conflicting site is reported, not guessed",
            reflib.show_value(conflicts))

# Every output cell is clean.
for name in ("site", "district", "species", "status", "crew", "contractor"):
    outside = sorted({r[col[name]] for r in rows[1:] if r[col[name]] and r[col[name]] not in vocabulary[name]})
    tally.check(not outside, "every %s is a vocabulary spelling" % name, reflib.show_value(outside[:8]))
untidy = [(i, c) for i, r in enumerate(rows[1:]) for c in r
          if c != c.strip() or "  " in c or "\n" in c or unicodedata.normalize("NFC", c) != c]
tally.check(not untidy, "no cell has edge or doubled white space, a line break, or a non-NFC form",
            reflib.show_value(untidy[:5]))
bad_dates = []
for r in rows[1:]:
    v = r[col["planted_on"]]
    if v:
        try:
            datetime.date.fromisoformat(v)
        except ValueError:
            bad_dates.append(v)
tally.check(not bad_dates, "planted_on is ISO 8601 or NULL", reflib.show_value(bad_dates[:5]))
# Cells without any defect come through unchanged.
touched = {(line, d["column"]) for ds in defects.values() for d in ds if d["column"] for line in d["lines"]}
changed = [(line, name, records_value, by_line[line][col[name]])
           for (record, line) in records[1:] if line in by_line
           for name, records_value in zip(columns, record)
           if (line, name) not in touched and name not in ("planted_on", "planted_count", "survival_pct", "funding_k")
           and by_line[line][col[name]] != records_value]
tally.check(not changed, "text cells without a defect are unchanged", reflib.show_value(changed[:5]))

if not tally.failed:
    shutil.rmtree(work)
tally.finish(["%d expected values checked" % checked, "work folder: %s" % work])
