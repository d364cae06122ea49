#!/usr/bin/python3
"""Self-check of the demo data generator (Python 3 standard library only).

1. Regenerates the demo twice into temporary folders: both runs and the
   committed assets/demo files must be byte-identical.
2. Re-derives every defect kind from the CSV alone, read with Python's csv
   module (the reference reader for RFC 4180 here), using rules written
   independently of the generator, and requires the manifest to list exactly
   the same lines, expected values and first occurrences.
3. Requires every defect kind the demo promises to be present at least once,
   and the committed CSV to stay small enough to ship.
The same comparison runs on a second, smaller file with another seed, so the
manifest is right for any --rows/--seed, not just for the committed one.

Exit status 0 when every check passes, 1 otherwise.
"""
import csv
import datetime
import io
import json
import os
import re
import subprocess
import sys
import tempfile
import unicodedata

HERE = os.path.dirname(os.path.abspath(__file__))
GENERATOR = os.path.join(HERE, "generate.py")
CSV_NAME = "tree_survey.csv"
MANIFEST_NAME = "tree_survey.defects.json"
MAX_CSV_BYTES = 150 * 1024

TEXT_COLUMNS = ("site", "district", "species", "status", "crew", "contractor")
SENTINELS = ("N/A", "-")

# Kinds the demo must contain at least once, per column where it matters.
REQUIRED = [
    ("exact_duplicate_row", None), ("near_duplicate_row", None), ("both_measures_missing", None),
    ("edge_whitespace", "site"), ("edge_whitespace", "species"), ("doubled_inner_space", "species"),
    ("doubled_inner_space", "district"),
    ("case_variant", "species"), ("case_variant", "district"), ("typo", "species"), ("typo", "district"),
    ("accent_variant", "species"), ("accent_variant", "district"), ("unicode_decomposed", "district"),
    ("trailing_dot", "district"),
    ("empty", "district"), ("whitespace_only", "district"), ("null_text", "district"), ("sentinel", "district"),
    ("district_fillable", "district"), ("district_conflict", "district"),
    ("quoted_field", "species"), ("quoted_field", "contractor"), ("embedded_quote", "contractor"),
    ("embedded_line_break", "contractor"), ("non_ascii", "crew"),
    ("date_iso", "planted_on"), ("date_mdy", "planted_on"), ("date_dmy_dotted", "planted_on"),
    ("date_two_digit_year", "planted_on"), ("date_ambiguous_day_month", "planted_on"),
    ("date_invalid", "planted_on"),
    ("thousands_separator", "planted_count"), ("percent_sign", "survival_pct"), ("decimal_comma", "funding_k"),
]


class Failure(Exception):
    pass


def missing_kind(text):
    if text == "":
        return "empty"
    if text.strip() == "":
        return "whitespace_only"
    if text == "NULL":
        return "null_text"
    if text in SENTINELS:
        return "sentinel"
    return None


def edit_distance(a, b):
    previous = list(range(len(b) + 1))
    for i, ca in enumerate(a, 1):
        current = [i]
        for j, cb in enumerate(b, 1):
            current.append(min(previous[j] + 1, current[j - 1] + 1, previous[j - 1] + (ca != cb)))
        previous = current
    return previous[-1]


def without_accents(text):
    decomposed = unicodedata.normalize("NFD", text.replace("\u00d7", "x"))
    return "".join(ch for ch in decomposed if unicodedata.category(ch) != "Mn")


def only(matches, text, what):
    if len(matches) != 1:
        raise Failure("%r: %s matches %r" % (text, what, matches))
    return matches[0]


def classify_text(column, text, vocabulary):
    """(kind, expected) for one non-missing text cell; kind None = clean."""
    known = vocabulary[column]
    stripped = text.strip()
    if stripped != text:
        return "edge_whitespace", only([v for v in known if v == stripped], text, "trimmed")
    if "\n" in text:
        return "embedded_line_break", only([v for v in known if v == text.replace("\n", " ")], text, "unwrapped")
    if "  " in text:
        return "doubled_inner_space", only([v for v in known if v == re.sub(" {2,}", " ", text)], text, "collapsed")
    if column == "district" and text.endswith(".") and text[:-1] in known:
        return "trailing_dot", text[:-1]
    composed = unicodedata.normalize("NFC", text)
    if composed != text:
        return "unicode_decomposed", only([v for v in known if v == composed], text, "NFC")
    if text in known:
        return None, None
    folded = [v for v in known if v.casefold() == text.casefold()]
    if folded:
        return "case_variant", only(folded, text, "case-folded")
    plain = [v for v in known if without_accents(v) == without_accents(text)]
    if plain:
        return "accent_variant", only(plain, text, "accent-free")
    near = [v for v in known if edit_distance(v, text) <= 2]
    return "typo", only(near, text, "within two edits")


def classify_date(text):
    """List of (kind, expected ISO date or None)."""
    patterns = [
        ("date_iso", r"(\d{4})-(\d{2})-(\d{2})", lambda g: (g[0], g[1], g[2])),
        ("date_mdy", r"(\d{1,2})/(\d{1,2})/(\d{4})", lambda g: (g[2], g[0], g[1])),
        ("date_dmy_dotted", r"(\d{1,2})\.(\d{1,2})\.(\d{4})", lambda g: (g[2], g[1], g[0])),
        ("date_two_digit_year", r"(\d{1,2})/(\d{1,2})/(\d{2})", lambda g: ("20" + g[2], g[0], g[1])),
    ]
    for kind, pattern, ymd in patterns:
        match = re.fullmatch(pattern, text)
        if not match:
            continue
        groups = match.groups()
        year, month, day = (int(x) for x in ymd(groups))
        try:
            iso = datetime.date(year, month, day).isoformat()
        except ValueError:
            return [("date_invalid", None)]
        kinds = [(kind, iso)]
        if kind != "date_iso":
            first, second = int(groups[0]), int(groups[1])
            if first <= 12 and second <= 12 and first != second:
                kinds.append(("date_ambiguous_day_month", iso))
        return kinds
    raise Failure("planted_on %r has no known shape" % text)


def classify_number(column, text):
    stripped = text.strip()
    if stripped != text:
        if not re.fullmatch(r"\d+", stripped):
            raise Failure("%s %r" % (column, text))
        return "edge_whitespace", stripped
    rules = {
        "planted_count": [(r"\d+", None), (r"\d{1,3}(,\d{3})+", "thousands_separator")],
        "survival_pct": [(r"\d+(\.\d)?", None), (r"\d+(\.\d)?%", "percent_sign")],
        "funding_k": [(r"\d+\.\d", None), (r"\d+,\d", "decimal_comma")],
    }[column]
    for pattern, kind in rules:
        if re.fullmatch(pattern, text):
            if kind == "thousands_separator":
                return kind, text.replace(",", "")
            if kind == "percent_sign":
                return kind, text[:-1]
            if kind == "decimal_comma":
                return kind, text.replace(",", ".")
            return None, None
    raise Failure("%s %r has no known shape" % (column, text))


def read_records(path):
    """(header, [(start line, record)]) with Python's csv module."""
    with open(path, newline="", encoding="utf-8") as f:
        reader = csv.reader(f)
        header = next(reader)
        records = []
        start = reader.line_num + 1
        for record in reader:
            records.append((start, record))
            start = reader.line_num + 1
    return header, records, reader.line_num


def derive(path, manifest):
    """The manifest's defect entries as re-derived from the CSV alone."""
    header, records, last_line = read_records(path)
    if header != manifest["columns"]:
        raise Failure("header %r" % header)
    vocabulary = manifest["vocabulary"]
    entries = {}

    def add(kind, column, line, expected=None, first=None):
        entry = entries.setdefault((kind, column), {"lines": [], "expected": [], "first_occurrence": []})
        entry["lines"].append(line)
        if expected is not None:
            entry["expected"].append([line, expected])
        if first is not None:
            entry["first_occurrence"].append([line, first])

    exact_seen, near_seen, by_site = {}, {}, {}
    for line, record in records:
        if len(record) != len(header):
            raise Failure("line %d has %d fields" % (line, len(record)))
        cells = dict(zip(header, record))
        key = tuple(record)
        near_key = tuple(" ".join(v.split()).casefold() for v in record)
        if key in exact_seen:
            add("exact_duplicate_row", None, line, first=exact_seen[key])
        elif near_key in near_seen:
            add("near_duplicate_row", None, line, first=near_seen[near_key])
        exact_seen.setdefault(key, line)
        near_seen.setdefault(near_key, line)
        if missing_kind(cells["planted_count"]) and missing_kind(cells["survival_pct"]):
            add("both_measures_missing", None, line)
        by_site.setdefault(cells["site"], []).append((line, cells["district"]))
        for column, text in cells.items():
            if not text.isascii():
                add("non_ascii", column, line)
            if any(ch in text for ch in ',"\n'):
                add("quoted_field", column, line)
            if '"' in text:
                add("embedded_quote", column, line)
            kind = missing_kind(text)
            if kind:
                add(kind, column, line)
                continue
            if column in TEXT_COLUMNS:
                kinds = [classify_text(column, text, vocabulary)]
            elif column == "planted_on":
                kinds = classify_date(text)
            else:
                kinds = [classify_number(column, text)]
            for kind, expected in kinds:
                if kind:
                    add(kind, column, line, expected)

    for site, members in by_site.items():
        named = sorted({d for _, d in members if not missing_kind(d)})
        for line, district in members:
            if missing_kind(district) and len(named) == 1:
                add("district_fillable", "district", line, named[0])
            elif missing_kind(district) and len(named) > 1:
                add("district_conflict", "district", line)

    rewritten = io.StringIO()
    writer = csv.writer(rewritten, lineterminator="\n")
    writer.writerow(header)
    writer.writerows(record for _, record in records)
    with open(path, "rb") as f:
        if rewritten.getvalue().encode("utf-8") != f.read():
            raise Failure("file is not minimally quoted RFC 4180 with LF endings, so quoted_field would be wrong")
    return entries, len(records), last_line, by_site


def compare(path, manifest):
    derived, rows, last_line, by_site = derive(path, manifest)
    if manifest["data_rows"] != rows or manifest["physical_lines"] != last_line:
        raise Failure("manifest says %d rows / %d lines, file has %d / %d"
                      % (manifest["data_rows"], manifest["physical_lines"], rows, last_line))
    listed = {}
    for item in manifest["defects"]:
        key = (item["kind"], item["column"])
        if key in listed:
            raise Failure("manifest lists %r twice" % (key,))
        if item["count"] != len(item["lines"]) or len(set(item["lines"])) != len(item["lines"]):
            raise Failure("%r: count %d but %d distinct lines" % (key, item["count"], len(set(item["lines"]))))
        listed[key] = {"lines": item["lines"], "expected": item.get("expected", []),
                       "first_occurrence": item.get("first_occurrence", [])}
    for key in sorted(set(listed) | set(derived), key=lambda k: (k[0], k[1] or "")):
        if key not in listed:
            raise Failure("%r is in the file (lines %s...) but not in the manifest" % (key, derived[key]["lines"][:5]))
        if key not in derived:
            raise Failure("%r is in the manifest but not in the file" % (key,))
        for part in ("lines", "expected", "first_occurrence"):
            if listed[key][part] != derived[key][part]:
                only_listed = [x for x in listed[key][part] if x not in derived[key][part]][:5]
                only_found = [x for x in derived[key][part] if x not in listed[key][part]][:5]
                raise Failure("%r %s differ: manifest only %s, file only %s" % (key, part, only_listed, only_found))
    totals = {}
    for (kind, _), entry in listed.items():
        totals[kind] = totals.get(kind, 0) + len(entry["lines"])
    if totals != manifest["totals"]:
        raise Failure("totals do not add up")
    fill_sites = {s for s, m in by_site.items() for line, _ in m
                  if line in listed.get(("district_fillable", "district"), {"lines": []})["lines"]}
    conflict_sites = {s for s, m in by_site.items() for line, _ in m
                      if line in listed.get(("district_conflict", "district"), {"lines": []})["lines"]}
    if not fill_sites <= set(manifest["gap_sites"]) or not conflict_sites <= set(manifest["conflict_sites"]):
        raise Failure("group defects outside the declared gap/conflict sites")
    return listed


def generate(out_dir, *extra):
    subprocess.run([sys.executable, GENERATOR, "--out-dir", out_dir, *extra], check=True)


def read_bytes(path):
    with open(path, "rb") as f:
        return f.read()


def main():
    results = []

    def check(name, fn):
        try:
            fn()
            results.append(True)
            print("ok   " + name)
        except (Failure, AssertionError, OSError, subprocess.CalledProcessError, json.JSONDecodeError) as e:
            results.append(False)
            print("FAIL " + name + ": " + str(e))

    with tempfile.TemporaryDirectory() as first, tempfile.TemporaryDirectory() as second, \
            tempfile.TemporaryDirectory() as other:
        generate(first)
        generate(second)
        generate(other, "--rows", "400", "--seed", "5")

        def same_bytes():
            for name in (CSV_NAME, MANIFEST_NAME):
                if read_bytes(os.path.join(first, name)) != read_bytes(os.path.join(second, name)):
                    raise Failure("two runs differ in " + name)

        def matches_committed():
            for name in (CSV_NAME, MANIFEST_NAME):
                if read_bytes(os.path.join(first, name)) != read_bytes(os.path.join(HERE, name)):
                    raise Failure("committed %s is not what generate.py writes; rerun it" % name)

        def manifest_matches(folder):
            def run():
                with open(os.path.join(folder, MANIFEST_NAME), encoding="utf-8") as f:
                    compare(os.path.join(folder, CSV_NAME), json.load(f))
            return run

        def required_present():
            with open(os.path.join(first, MANIFEST_NAME), encoding="utf-8") as f:
                manifest = json.load(f)
            present = {(d["kind"], d["column"]) for d in manifest["defects"] if d["count"] > 0}
            absent = [k for k in REQUIRED if k not in present]
            if absent:
                raise Failure("missing defect kinds %s" % absent)
            if manifest["physical_lines"] <= manifest["data_rows"] + 1:
                raise Failure("no record spans two physical lines")

        def small_enough():
            size = os.path.getsize(os.path.join(HERE, CSV_NAME))
            if size > MAX_CSV_BYTES:
                raise Failure("%d bytes, more than %d" % (size, MAX_CSV_BYTES))

        check("two runs are byte-identical", same_bytes)
        check("committed files equal a fresh run", matches_committed)
        check("manifest equals defects re-derived from the CSV (default rows and seed)", manifest_matches(first))
        check("manifest equals defects re-derived from the CSV (--rows 400 --seed 5)", manifest_matches(other))
        check("every promised defect kind is present", required_present)
        check("committed CSV is at most %d bytes" % MAX_CSV_BYTES, small_enough)

    passed = sum(results)
    print("%d passed, %d failed" % (passed, len(results) - passed))
    return 0 if all(results) else 1


if __name__ == "__main__":
    sys.exit(main())
