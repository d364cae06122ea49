"""`tamis profile --findings` and `tamis suggest` on the demo file.

Sources:
- assets/demo/tree_survey.defects.json: the demo generator's manifest of the
  defects it injected. It is OUR OWN ground truth (written by our generator,
  checked against the file by assets/demo/check_generator.py), not an outside
  source; it says which findings must appear and with how many rows.
- pandas (Debian python3-pandas), an outside reference library:
  DataFrame.duplicated() for exact duplicate rows; Series.str methods for
  blanks, sentinels, white space at the ends; rows with every measure column
  missing; DataFrame.nunique() for constant columns.
- Python's datetime.strptime (an outside reference) for which values each
  inferred date format reads.
- assets/recipe.schema.json with python3-jsonschema (Draft 2020-12) for the
  written recipe; `tamis check` and `tamis run` for the rest, with the run
  report's row accounting (design §5: read = written + removed + rejected).
"""
import datetime
import json
import os
import re
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

tally = reflib.Tally("findings_demo")
binary = reflib.require_binary(sys.argv)
try:
    import pandas as pd
    import jsonschema
except ImportError as error:
    print("FAIL: /usr/bin/python3 needs python3-pandas and python3-jsonschema (Debian): %s" % error)
    sys.exit(1)

repo = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
demo_csv = os.path.join(repo, "assets/demo/tree_survey.csv")
manifest = json.load(open(os.path.join(repo, "assets/demo/tree_survey.defects.json"), encoding="utf-8"))
work = tempfile.mkdtemp(prefix="tamis-findings-")

totals = {}
lines = {}
for d in manifest["defects"]:
    key = (d["kind"], d.get("column"))
    totals[key] = totals.get(key, 0) + d["count"]
    lines.setdefault(key, set()).update(d.get("lines", []))


def manifest_count(kind, column=None):
    return totals.get((kind, column), 0)


code, stdout, stderr = reflib.run_tamis(binary, ["profile", demo_csv, "--findings", "--json"])
tally.check(code == 0, "profile --findings --json exits 0", stderr)
if code != 0:
    tally.finish([])
doc = json.loads(stdout.decode("utf-8"))
findings = doc["findings"]
tally.check(all(findings[i - 1]["rows_affected"] >= findings[i]["rows_affected"] for i in range(1, len(findings))),
            "findings are ranked by rows affected")


def find(kind, column=None):
    return [f for f in findings if f["kind"] == kind and (column is None or f["columns"][0] == column)]


def one(kind, column=None):
    found = find(kind, column)
    tally.check(len(found) == 1, "exactly one %s finding for %s" % (kind, column), [f["title"] for f in found])
    return found[0] if found else None


# pandas reads every cell as text, keeping empty cells as "" (no NA guessing).
frame = pd.read_csv(demo_csv, dtype=str, keep_default_na=False, na_filter=False)
columns = list(frame.columns)
tally.check(len(frame) == manifest["data_rows"], "test setup: pandas reads the manifest's row count")

# ------------------------------------------------------------ duplicate rows
dup = one("duplicate_rows")
if dup:
    pandas_dups = int(frame.duplicated(keep="first").sum())
    tally.check(dup["rows_affected"] == pandas_dups, "duplicate rows = pandas DataFrame.duplicated()",
                (dup["rows_affected"], pandas_dups))
    tally.check(dup["rows_affected"] == manifest_count("exact_duplicate_row"),
                "duplicate rows = the manifest's exact_duplicate_row count", dup["rows_affected"])
    fix = dup["fixes"][0]
    tally.check(fix["safe"] and fix["step"]["op"] == "deduplicate" and fix["preview"]["rows_removed"] == dup["rows_affected"],
                "deduplicate is safe and its preview removes those rows", fix)
    example_lines = {e["source_line"] for e in fix["preview"]["examples"]}
    tally.check(example_lines and example_lines <= lines[("exact_duplicate_row", None)],
                "the removed example rows are the manifest's later copies", sorted(example_lines))

# ------------------------------------------------- white space at the ends
# Python's str.isspace() and str.strip() use Unicode white space, as tamis does.
for column in columns:
    values = frame[column]
    pandas_edge = int(((values != values.str.strip()) & (values.str.strip() != "")).sum())
    found = find("edge_white_space", column)
    mine = found[0]["rows_affected"] if found else 0
    tally.check(mine == pandas_edge, "%s: values with white space at an end = pandas str.strip()" % column,
                (mine, pandas_edge))
    tally.check(mine >= manifest_count("edge_whitespace", column),
                "%s: every injected edge_whitespace value is found" % column,
                (mine, manifest_count("edge_whitespace", column)))

# --------------------------------------------------- inner white space
for column in columns:
    core = frame[column].str.strip()
    pandas_inner = int(core.str.contains(r"\s\s|[^\S ]", regex=True).sum())
    found = find("inner_white_space", column)
    mine = found[0]["rows_affected"] if found else 0
    tally.check(mine == pandas_inner, "%s: doubled or odd inner white space = pandas regex count" % column,
                (mine, pandas_inner))
    injected = manifest_count("doubled_inner_space", column) + manifest_count("embedded_line_break", column)
    tally.check(mine >= injected, "%s: every injected doubled space and line break is found" % column,
                (mine, injected))

# ------------------------------------------------ blanks and sentinels
sentinels = {"null", "n/a", "-", "none", "?"}
missing = sentinels | {""}
for column in columns:
    stripped = frame[column].str.strip()
    pandas_blank = int((stripped == "").sum())
    pandas_sentinel = int(stripped.str.casefold().isin(sentinels).sum())
    found = find("missing_as_text", column)
    facts = found[0]["facts"] if found else {"blanks": 0, "sentinels": 0}
    tally.check(facts["blanks"] == pandas_blank and facts["sentinels"] == pandas_sentinel,
                "%s: blanks and sentinels = pandas str.strip()/casefold() counts" % column,
                (facts, pandas_blank, pandas_sentinel))
    injected_blank = manifest_count("empty", column) + manifest_count("whitespace_only", column)
    injected_text = manifest_count("null_text", column) + manifest_count("sentinel", column)
    tally.check(facts["blanks"] == injected_blank and facts["sentinels"] == injected_text,
                "%s: blanks and sentinels = the manifest's counts" % column, (facts, injected_blank, injected_text))
    if found:
        tally.check(found[0]["fixes"][0]["safe"] and found[0]["fixes"][0]["step"]["op"] == "to_null",
                    "%s: to_null is offered as a safe fix" % column)

# ------------------------------------------------- variant spellings
# Every injected typo, accent variant and decomposed (NFD) spelling is a
# non-canonical member of a similar_values set, so the finding's rows are at
# least their count (case variants and trailing dots may join the same sets).
for column in ("district", "species"):
    found = find("similar_values", column)
    injected = sum(manifest_count(kind, column) for kind in ("typo", "accent_variant", "unicode_decomposed"))
    rows = found[0]["rows_affected"] if found else 0
    tally.check(rows >= injected, "%s: variant spellings cover the injected typos and accent variants" % column,
                (rows, injected))
    print("%s: similar_values rows %d, injected typos/accents/NFD %d" % (column, rows, injected))

# ------------------------------------------------------------ dates
dates = one("dates_as_text", "planted_on")
if dates:
    facts = dates["facts"]
    by_format = {f["format"]: f["values"] for f in facts["formats"]}
    expected_formats = {"%Y-%m-%d": manifest_count("date_iso", "planted_on"),
                        "%m/%d/%Y": manifest_count("date_mdy", "planted_on"),
                        "%m/%d/%y": manifest_count("date_two_digit_year", "planted_on"),
                        "%d.%m.%Y": manifest_count("date_dmy_dotted", "planted_on")}
    tally.check(by_format == expected_formats, "planted_on: inferred formats and counts = the manifest's",
                (by_format, expected_formats))
    tally.check(facts["unmatched"] == manifest_count("date_invalid", "planted_on"),
                "planted_on: values fitting no format = the manifest's date_invalid", facts["unmatched"])
    tally.check(facts["ambiguous_day_month"] == manifest_count("date_ambiguous_day_month", "planted_on"),
                "planted_on: day/month-ambiguous values = the manifest's", facts["ambiguous_day_month"])
    # datetime.strptime reads the same values with each inferred format. Its
    # %m/%d also take one or two digits; %Y and %y are held to four and two
    # digits here, as the tamis scanner documents.
    present = [v.strip() for v in frame["planted_on"] if v.strip().casefold() not in missing]
    width = {"%Y": r"\d{4}", "%y": r"\d{2}"}

    def strptime_count(fmt):
        shape = re.escape(fmt)
        for directive in ("%Y", "%y", "%m", "%d"):
            shape = shape.replace(re.escape(directive), width.get(directive, r"\d{1,2}"))
        n = 0
        for v in present:
            if not re.fullmatch(shape, v):
                continue
            try:
                datetime.datetime.strptime(v, fmt)
                n += 1
            except ValueError:
                pass
        return n

    python_counts = {fmt: strptime_count(fmt) for fmt in by_format}
    tally.check(python_counts == by_format, "planted_on: per-format counts = datetime.strptime",
                (python_counts, by_format))
    python_unmatched = 0
    for v in present:
        ok = False
        for fmt in by_format:
            try:
                datetime.datetime.strptime(v, fmt)
                ok = True
                break
            except ValueError:
                pass
        python_unmatched += not ok
    tally.check(python_unmatched == facts["unmatched"], "planted_on: values no format reads = datetime.strptime",
                (python_unmatched, facts["unmatched"]))

# ---------------------------------------------------------- numbers
count_finding = one("numbers_as_text", "planted_count")
if count_finding:
    tally.check(count_finding["facts"]["thousands_separator"] == manifest_count("thousands_separator", "planted_count"),
                "planted_count: thousands separators = the manifest's", count_finding["facts"])
pct = one("numbers_as_text", "survival_pct")
if pct:
    tally.check(pct["facts"]["percent_sign"] == manifest_count("percent_sign", "survival_pct"),
                "survival_pct: percent signs = the manifest's", pct["facts"])
comma = one("decimal_comma", "funding_k")
if comma:
    tally.check(comma["rows_affected"] == manifest_count("decimal_comma", "funding_k"),
                "funding_k: decimal commas = the manifest's", comma["rows_affected"])

# ------------------------------------------------------ fillable NULLs
fill = find("fillable_nulls", "district")
tally.check(len(fill) == 1, "district: a fillable_nulls finding", [f["title"] for f in findings])
if fill:
    facts = fill[0]["facts"]
    tally.check(facts["key"] == "site", "district: filled from site", facts)
    tally.check(facts["fillable"] == manifest_count("district_fillable", "district")
                and fill[0]["fixes"][0]["preview"]["cells_changed"] == facts["fillable"],
                "district: the fillable NULLs = the manifest's district_fillable, and the preview fills them", facts)
    tally.check(facts["conflicting_groups"] == len(manifest["conflict_sites"])
                and facts["nulls_in_conflicting_groups"] == manifest_count("district_conflict", "district"),
                "district: the conflicting site's NULLs are reported, not filled", facts)

# ------------------------------------------- rows without any measure
empty = one("empty_measure_rows")
if empty:
    measure = empty["columns"]
    stripped = frame[measure].apply(lambda s: s.str.strip().str.casefold())
    pandas_rows = int(stripped.isin(list(missing)).all(axis=1).sum())
    tally.check(empty["rows_affected"] == pandas_rows, "rows with every measure missing = pandas count",
                (measure, empty["rows_affected"], pandas_rows))
    tally.check(set(measure) == {"planted_count", "survival_pct"}
                and empty["rows_affected"] == manifest_count("both_measures_missing"),
                "the rows without both measures = the manifest's both_measures_missing", (measure, empty["rows_affected"]))
    example_lines = {e["source_line"] for e in empty["fixes"][0]["preview"]["examples"]}
    tally.check(example_lines <= lines[("both_measures_missing", None)],
                "those rows are among the manifest's both_measures_missing rows", sorted(example_lines))

# ---------------------------------------------------- useless columns
constant = [c for c in columns if frame[c].nunique(dropna=False) <= 1]
tally.check(len(find("useless_columns")) == len(constant), "constant columns = pandas DataFrame.nunique()",
            constant)

# -------------------------------------------------------------- suggest
recipe_path = os.path.join(work, "starter.recipe.json")
code, _, stderr = reflib.run_tamis(binary, ["suggest", demo_csv, "-o", recipe_path])
tally.check(code == 0, "suggest exits 0", stderr)
if code == 0:
    recipe = json.load(open(recipe_path, encoding="utf-8"))
    schema = json.load(open(os.path.join(repo, "assets/recipe.schema.json"), encoding="utf-8"))
    errors = [e.message for e in jsonschema.Draft202012Validator(schema).iter_errors(recipe)]
    tally.check(not errors, "the starter recipe validates against assets/recipe.schema.json", errors[:5])
    steps = recipe["steps"]
    enabled_ops = {s["op"] for s in steps if s.get("enabled", True)}
    tally.check(enabled_ops <= {"trim", "to_null", "deduplicate"}, "only safe fixes are enabled", enabled_ops)
    tally.check(all(s.get("note") for s in steps), "every step carries a note")
    tally.check(all("needs a decision" in s["note"] for s in steps if not s.get("enabled", True)),
                "every disabled step's note says what needs deciding")
    tally.check([c["name"] for c in recipe["input"]["columns"]] == columns and recipe["input"]["delimiter"] == ",",
                "the input section has the file's columns and delimiter")
    code, _, stderr = reflib.run_tamis(binary, ["check", recipe_path, demo_csv])
    tally.check(code == 0, "tamis check accepts the starter recipe", stderr)
    out = os.path.join(work, "clean.csv")
    report_path = os.path.join(work, "report.json")
    code, _, stderr = reflib.run_tamis(binary, ["run", recipe_path, demo_csv, "-o", out, "--report", report_path])
    tally.check(code == 0, "tamis run runs the starter recipe", stderr)
    if code == 0:
        t = json.load(open(report_path, encoding="utf-8"))["totals"]
        tally.check(t["rows_read"] == manifest["data_rows"]
                    and t["rows_read"] == t["rows_written"] + t["rows_removed"] + t["rows_rejected"]
                    and t["rows_removed"] == manifest_count("exact_duplicate_row"),
                    "row accounting balances; the duplicates are the rows removed", t)

tally.finish(["%d findings on the demo" % len(findings), "work folder: %s" % work])
