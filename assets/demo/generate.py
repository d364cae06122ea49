#!/usr/bin/python3
"""Generate the tamis demo file: a deliberately messy tree-planting survey.

Scenario (invented): the parks office of Larkhaven, a fictional city, pays
contractors to plant street and park trees at numbered sites and sends crews
back to count what survived.  Clerks in several districts typed the survey
into different spreadsheets, so the merged extract has every defect the
workbench is meant to find.  Every place, person and company here is made up.

Usage:
    generate.py [--rows N] [--seed S] [--out-dir DIR]

Writes DIR/tree_survey.csv and DIR/tree_survey.defects.json (DIR defaults to
the folder of this script).  Same arguments => byte-identical files.  The
manifest lists, per defect kind and column, the 1-based physical line where
each affected record starts (the header is line 1) and, where one exists, the
value a correct cleaning should produce.  See README.md beside this script.

Python 3 standard library only.
"""
import argparse
import csv
import datetime
import io
import json
import os
import random
import sys
import unicodedata

CSV_NAME = "tree_survey.csv"
MANIFEST_NAME = "tree_survey.defects.json"
DEFAULT_ROWS = 1200
DEFAULT_SEED = 73021

COLUMNS = ["site", "district", "species", "planted_on", "planted_count",
           "survival_pct", "crew", "contractor", "funding_k", "status"]

DISTRICTS = ["Rivière Quay", "Old Tannery", "Gorse Hill", "Northwick",
             "Saltpan", "Canal Basin", "Fenmoor", "Brindle Heights"]

# Each site lies in one district, except the conflict sites below.
SITE_DISTRICT = {
    "Ashgrove Verge": "Gorse Hill", "Mill Lane": "Old Tannery",
    "Quarry Park": "Fenmoor", "Heron Walk": "Rivière Quay",
    "Tanners Yard": "Old Tannery", "Lantern Sq": "Rivière Quay",
    "Pike Row": "Saltpan", "Gull Steps": "Saltpan",
    "Orchard Ct": "Northwick", "Wicker Green": "Northwick",
    "Slate Rd": "Brindle Heights", "Cobble Way": "Canal Basin",
    "Lock 7 Bank": "Canal Basin", "Fen Edge": "Fenmoor",
    "Bramble Rise": "Gorse Hill", "Kiln St": "Old Tannery",
    "Dune Path": "Saltpan", "Beacon Hill": "Brindle Heights",
    "School Ln": "Northwick", "Ferry Slip": "Rivière Quay",
    "Peat Moor": "Fenmoor", "Hatch End": "Brindle Heights",
    "Wharf St": "Canal Basin", "Furze Ct": "Gorse Hill",
    "Spire Close": "Northwick", "Ropewalk": "Rivière Quay",
    "Marsh Gate": "Saltpan", "Tollbar": "Brindle Heights",
}
# Sites whose district is sometimes left out although every other row of the
# site names the same district: a group fill can recover it.  These sites and
# their district cells carry no other defect, so the group is clean as read.
GAP_SITES = ["Mill Lane", "Heron Walk", "Pike Row", "Slate Rd", "Fen Edge"]
# A towpath on the border of two districts: its rows disagree, so a gap in it
# must be reported as a conflict and never filled.
CONFLICT_SITES = {"Towpath East": ("Canal Basin", "Old Tannery")}
SITES = list(SITE_DISTRICT) + list(CONFLICT_SITES)

SPECIES = ["Hornbeam", "Rowan", "Field maple", "Oak, sessile",
           "Lime, small-leaved", "Platanus × hispanica", "Wild cherry",
           "Downy birch", "Ginkgo", "Alder, grey", "Crab apple", "Sweet gum"]
STATUSES = ["Established", "Watering", "Replaced", "Lost", "Pending"]

CREWS_ASCII = ["Tom Ashby", "Priya Nair", "Sam Doyle", "Kofi Mensah",
               "Lena Ward", "Owen Price", "Maya Lund", "Ravi Shah",
               "Jude Kerr", "Nell Hart", "Ada Moss", "Ben Okoro"]
CREWS_NON_ASCII = ["Zoë Marsh", "Inês Araújo", "Łukasz Nowak", "Siân Pryce",
                   "Björn Falk", "Chloé Roux", "Νίκος Παππάς", "Ελένη Ρήγα",
                   "Ольга Ким", "Пётр Лебедев"]

CONTRACTORS = ["Greenrow Landscapes", "Ashcombe, Pell & Sons", "Tillwater Arbor",
               "Fennick & Rye", "Hollin, Marsh & Daughters",
               'Sapling "Seven" Co-op', "Quillfield Groundworks"]
# The wrapped spelling a letterhead copy-paste leaves behind.
CONTRACTOR_WRAPPED = {"Hollin, Marsh & Daughters": "Hollin, Marsh &\nDaughters"}

TYPOS = {
    "district": {"Old Tannery": "Old Tanery", "Gorse Hill": "Gorse Hil",
                 "Northwick": "Northwik", "Saltpan": "Saltpann",
                 "Canal Basin": "Canal Basen", "Fenmoor": "Fenmore",
                 "Brindle Heights": "Brindle Hieghts", "Rivière Quay": "Rivière Quai"},
    "species": {"Hornbeam": "Hornbean", "Rowan": "Rowen", "Field maple": "Feild maple",
                "Oak, sessile": "Oak, sesile", "Lime, small-leaved": "Lime, small-leafed",
                "Wild cherry": "Wild cherri", "Downy birch": "Downey birch",
                "Ginkgo": "Gingko", "Alder, grey": "Alder, gray",
                "Crab apple": "Crabapple", "Sweet gum": "Sweetgum",
                "Platanus × hispanica": "Platanus × hispanika"},
}
ACCENT_VARIANTS = {"Rivière Quay": "Riviere Quay",
                   "Platanus × hispanica": "Platanus x hispanica"}

MISSING_FORMS = [("", "empty")] * 8 + [(" ", "whitespace_only"), ("   ", "whitespace_only"),
                                       ("\t", "whitespace_only")] + \
                [("NULL", "null_text")] * 5 + [("N/A", "sentinel")] * 2 + [("-", "sentinel")] * 2

# Probability that a cell of the column is missing (one of MISSING_FORMS).
MISSING_RATE = {"species": 0.015, "planted_on": 0.02, "planted_count": 0.02,
                "survival_pct": 0.03, "crew": 0.02, "contractor": 0.02,
                "funding_k": 0.04, "status": 0.02}
GAP_SITE_MISSING_DISTRICT = 0.22
CONFLICT_SITE_MISSING_DISTRICT = 0.15
BOTH_MEASURES_MISSING = 0.015
EXACT_DUPLICATE = 0.02
NEAR_DUPLICATE = 0.005

# Text defects per column: (kind, probability).  A cell gets at most one.
TEXT_DEFECTS = {
    "site": [("edge_whitespace", 0.02), ("doubled_inner_space", 0.01)],
    "district": [("edge_whitespace", 0.02), ("doubled_inner_space", 0.01),
                 ("case_variant", 0.03), ("typo", 0.015), ("trailing_dot", 0.04),
                 ("accent_variant", 0.3), ("unicode_decomposed", 0.15)],
    "species": [("edge_whitespace", 0.02), ("doubled_inner_space", 0.01),
                ("case_variant", 0.05), ("typo", 0.03), ("accent_variant", 0.35)],
    "crew": [("edge_whitespace", 0.02)],
    "contractor": [("edge_whitespace", 0.015), ("doubled_inner_space", 0.005),
                   ("embedded_line_break", 0.02)],
    "status": [("edge_whitespace", 0.01), ("case_variant", 0.03)],
}

DESCRIPTIONS = {
    "exact_duplicate_row": "record identical, byte for byte, to an earlier record; lists the later copies",
    "near_duplicate_row": "record equal to an earlier one once every cell is trimmed, inner spaces collapsed and case folded, but not byte-identical",
    "both_measures_missing": "planted_count and survival_pct are both missing (any missing form)",
    "empty": "empty field",
    "whitespace_only": "field made only of white space (space or tab)",
    "null_text": "the text NULL",
    "sentinel": "a placeholder meaning missing: N/A or -",
    "edge_whitespace": "leading and/or trailing white space (space, tab or U+00A0) around a non-blank value",
    "doubled_inner_space": "two spaces where the value has one",
    "case_variant": "known value in other letter case",
    "typo": "known value misspelt (one or two edits)",
    "accent_variant": "known value with an accent or look-alike letter replaced (e.g. è as e, × as x)",
    "unicode_decomposed": "known value in Unicode NFD (decomposed) form: looks identical, differs in bytes from the NFC spelling",
    "trailing_dot": "known value followed by a full stop",
    "embedded_line_break": "a line break inside a quoted field where the value has a space; the record spans two physical lines",
    "non_ascii": "value contains characters outside ASCII",
    "quoted_field": "field that RFC 4180 requires to be quoted (contains a comma, double quote or line break)",
    "embedded_quote": "field containing a double quote, written doubled inside a quoted field",
    "date_iso": "planted_on as YYYY-MM-DD (ISO 8601)",
    "date_mdy": "planted_on as M/D/YYYY (month and day with one or two digits)",
    "date_dmy_dotted": "planted_on as D.M.YYYY",
    "date_two_digit_year": "planted_on as M/D/YY (year 20YY)",
    "date_ambiguous_day_month": "slash or dotted date whose first two numbers are both 1-12 and differ, so swapping day and month gives another valid date; expected is the reading of its format (M/D for slashes, D.M for dots)",
    "date_invalid": "shaped like a date but no such calendar day in any reading",
    "thousands_separator": "planted_count written with a comma every three digits",
    "percent_sign": "survival_pct followed by %",
    "decimal_comma": "funding_k written with a decimal comma",
    "district_fillable": "district missing while every other row of the same site names one and the same district; expected is that district",
    "district_conflict": "district missing in a site whose rows name two or more districts: must be reported, not filled",
}


class Row:
    """Cells plus what was injected into each, so the manifest is a record of
    the generator's own decisions rather than a re-reading of its output."""

    def __init__(self):
        self.cells = {}
        self.tags = []          # (kind, column or None, expected or None)

    def set(self, column, text, kind=None, expected=None):
        self.cells[column] = text
        if kind:
            self.tags.append((kind, column, expected))

    def values(self):
        return tuple(self.cells[c] for c in COLUMNS)

    def clean_cell(self, column):
        return not any(col == column for _, col, _ in self.tags)

    def copy(self):
        other = Row()
        other.cells = dict(self.cells)
        other.tags = list(self.tags)
        return other


def near_duplicate_key(values):
    return tuple(" ".join(v.split()).casefold() for v in values)


class Generator:
    def __init__(self, seed):
        self.rng = random.Random(seed)

    def chance(self, p):
        return self.rng.random() < p

    def pick(self, seq):
        return seq[self.rng.randrange(len(seq))]

    def missing(self, row, column):
        text, kind = self.pick(MISSING_FORMS)
        row.set(column, text, kind)

    def text_defect(self, row, column, value, allowed=None):
        """Write value into the cell, perhaps with one defect of its column."""
        x = self.rng.random()
        for kind, p in TEXT_DEFECTS[column]:
            if allowed is not None and kind not in allowed:
                continue
            if x < p:
                variant = self.variant(kind, column, value)
                if variant is not None and variant != value:
                    row.set(column, variant, kind, value)
                    return
                break
            x -= p
        row.set(column, value)

    def variant(self, kind, column, value):
        if kind == "edge_whitespace":
            return self.pick([" " + value, value + " ", value + "  ", " " + value + " ",
                              "\t" + value, value + "\u00a0"])
        if kind == "doubled_inner_space":
            spaces = [i for i, ch in enumerate(value) if ch == " "]
            if not spaces:
                return None
            i = self.pick(spaces)
            return value[:i] + "  " + value[i + 1:]
        if kind == "case_variant":
            forms = [f for f in (value.lower(), value.upper(), value.title()) if f != value]
            return self.pick(forms)
        if kind == "typo":
            return TYPOS[column].get(value)
        if kind == "trailing_dot":
            return value + "."
        if kind == "accent_variant":
            return ACCENT_VARIANTS.get(value)
        if kind == "unicode_decomposed":
            return unicodedata.normalize("NFD", value)
        if kind == "embedded_line_break":
            return CONTRACTOR_WRAPPED.get(value)
        raise ValueError(kind)

    def planting_day(self):
        start = datetime.date(2021, 10, 1).toordinal()
        end = datetime.date(2024, 4, 30).toordinal()
        while True:
            day = datetime.date.fromordinal(self.rng.randrange(start, end + 1))
            if day.month in (10, 11, 12, 1, 2, 3, 4):
                return day

    def planted_on(self, row):
        x = self.rng.random()
        if x < 0.006:
            year = self.pick([2022, 2023])
            month, day = self.pick([(2, 29), (2, 30), (2, 31), (4, 31), (11, 31), (9, 31)])
            form = self.pick(["iso", "mdy", "dmy"])
            text = {"iso": "%d-%02d-%02d" % (year, month, day),
                    "mdy": "%d/%d/%d" % (month, day, year),
                    "dmy": "%d.%d.%d" % (day, month, year)}[form]
            row.set("planted_on", text, "date_invalid")
            return
        if x < 0.006 + MISSING_RATE["planted_on"]:
            self.missing(row, "planted_on")
            return
        d = self.planting_day()
        y = self.rng.random()
        if y < 0.36:
            row.set("planted_on", d.isoformat(), "date_iso", d.isoformat())
            return
        if y < 0.70:
            text = ("%02d/%02d/%d" if self.chance(0.2) else "%d/%d/%d") % (d.month, d.day, d.year)
            row.set("planted_on", text, "date_mdy", d.isoformat())
            first, second = d.month, d.day
        elif y < 0.85:
            text = "%d.%d.%d" % (d.day, d.month, d.year)
            row.set("planted_on", text, "date_dmy_dotted", d.isoformat())
            first, second = d.day, d.month
        else:
            text = "%d/%d/%02d" % (d.month, d.day, d.year % 100)
            row.set("planted_on", text, "date_two_digit_year", d.isoformat())
            first, second = d.month, d.day
        if first <= 12 and second <= 12 and first != second:
            row.tags.append(("date_ambiguous_day_month", "planted_on", d.isoformat()))

    def measures(self, row):
        both_missing = self.chance(BOTH_MEASURES_MISSING)
        if both_missing:
            row.tags.append(("both_measures_missing", None, None))
        if both_missing or self.chance(MISSING_RATE["planted_count"]):
            self.missing(row, "planted_count")
        elif self.chance(0.03):
            n = self.rng.randrange(1000, 3300)
            if self.chance(0.65):
                row.set("planted_count", "{:,}".format(n), "thousands_separator", str(n))
            else:
                row.set("planted_count", str(n))
        else:
            n = str(self.rng.randrange(4, 481))
            if self.chance(0.006):
                row.set("planted_count", self.pick([" " + n, n + " "]), "edge_whitespace", n)
            else:
                row.set("planted_count", n)
        if both_missing or self.chance(MISSING_RATE["survival_pct"]):
            self.missing(row, "survival_pct")
        else:
            pct = self.rng.randrange(350, 1001)
            text = str(pct // 10) if pct % 10 == 0 or self.chance(0.5) else "%d.%d" % (pct // 10, pct % 10)
            if self.chance(0.12):
                row.set("survival_pct", text + "%", "percent_sign", text)
            else:
                row.set("survival_pct", text)

    def funding(self, row):
        if self.chance(MISSING_RATE["funding_k"]):
            self.missing(row, "funding_k")
            return
        tenths = self.rng.randrange(5, 900)
        text = "%d.%d" % (tenths // 10, tenths % 10)
        if self.chance(0.02):
            row.set("funding_k", text.replace(".", ","), "decimal_comma", text)
        else:
            row.set("funding_k", text)

    def fresh_row(self):
        row = Row()
        site = self.pick(SITES)
        grouped = site in GAP_SITES or site in CONFLICT_SITES
        if grouped:
            row.set("site", site)
        else:
            self.text_defect(row, "site", site)
        if site in CONFLICT_SITES:
            if self.chance(CONFLICT_SITE_MISSING_DISTRICT):
                self.missing(row, "district")
            else:
                row.set("district", self.pick(CONFLICT_SITES[site]))
        elif site in GAP_SITES:
            if self.chance(GAP_SITE_MISSING_DISTRICT):
                self.missing(row, "district")
            else:
                row.set("district", SITE_DISTRICT[site])
        else:
            self.text_defect(row, "district", SITE_DISTRICT[site])
        if self.chance(MISSING_RATE["species"]):
            self.missing(row, "species")
        else:
            self.text_defect(row, "species", self.pick(SPECIES))
        self.planted_on(row)
        self.measures(row)
        for column in ("crew", "contractor"):
            if self.chance(MISSING_RATE[column]):
                self.missing(row, column)
            elif column == "crew":
                pool = CREWS_NON_ASCII if self.chance(0.2) else CREWS_ASCII
                self.text_defect(row, "crew", self.pick(pool))
            else:
                self.text_defect(row, "contractor", self.pick(CONTRACTORS))
        self.funding(row)
        if self.chance(MISSING_RATE["status"]):
            self.missing(row, "status")
        else:
            self.text_defect(row, "status", self.pick(STATUSES))
        return row

    def near_duplicate(self, original):
        row = original.copy()
        candidates = [c for c in ("crew", "contractor", "status")
                      if row.clean_cell(c) and row.cells[c].strip()]
        if not candidates:
            return None
        column = self.pick(candidates)
        value = row.cells[column]
        if column == "status":
            row.set(column, value.upper(), "case_variant", value)
        else:
            row.set(column, value + " ", "edge_whitespace", value)
        return row

    def rows(self, count):
        """Fresh rows are unique even after trimming and case folding, so every
        duplicate in the file is one this generator put there on purpose."""
        out = []            # (row, kind of duplicate or None, index of first occurrence)
        exact_first = {}    # values -> index of first occurrence
        near_first = {}     # near-duplicate key -> index of first occurrence
        while len(out) < count:
            x = self.rng.random()
            if out and x < EXACT_DUPLICATE:
                source, _, _ = out[self.rng.randrange(len(out))]
                row = source.copy()
                out.append((row, "exact_duplicate_row", exact_first[row.values()]))
                continue
            if out and x < EXACT_DUPLICATE + NEAR_DUPLICATE:
                source, _, _ = out[self.rng.randrange(len(out))]
                row = self.near_duplicate(source)
                if row is None or row.values() in exact_first:
                    continue
                first = near_first[near_duplicate_key(row.values())]
                exact_first[row.values()] = len(out)
                out.append((row, "near_duplicate_row", first))
                continue
            row = self.fresh_row()
            key = near_duplicate_key(row.values())
            if key in near_first:
                continue
            near_first[key] = len(out)
            exact_first[row.values()] = len(out)
            out.append((row, None, None))
        return out


def physical_lines(rows):
    """Line where each record starts: the header is line 1 and a quoted line
    break inside a record pushes every later record down by one."""
    starts = []
    line = 2
    for row in rows:
        starts.append(line)
        line += 1 + sum(v.count("\n") for v in row.values())
    return starts, line - 1


def is_missing_kind(kind):
    return kind in ("empty", "whitespace_only", "null_text", "sentinel")


def build_manifest(generated, starts, last_line, rows_requested, seed):
    entries = {}

    def add(kind, column, line, expected=None, first=None):
        entry = entries.setdefault((kind, column or ""), {"lines": [], "expected": [], "first": []})
        entry["lines"].append(line)
        if expected is not None:
            entry["expected"].append([line, expected])
        if first is not None:
            entry["first"].append([line, first])

    for (row, dup_kind, first), line in zip(generated, starts):
        for kind, column, expected in row.tags:
            add(kind, column, line, expected)
        if dup_kind:
            add(dup_kind, None, line, first=starts[first])
        for column, text in row.cells.items():
            if not text.isascii():
                add("non_ascii", column, line)
            if any(ch in text for ch in ',"\n'):
                add("quoted_field", column, line)
            if '"' in text:
                add("embedded_quote", column, line)

    site_rows = {}
    for (row, _, _), line in zip(generated, starts):
        if row.cells["site"] in GAP_SITES or row.cells["site"] in CONFLICT_SITES:
            site_rows.setdefault(row.cells["site"], []).append((row, line))
    for site, members in site_rows.items():
        named = sorted({r.cells["district"] for r, _ in members
                        if not any(is_missing_kind(k) for k, c, _ in r.tags if c == "district")})
        for row, line in members:
            if not any(is_missing_kind(k) for k, c, _ in row.tags if c == "district"):
                continue
            if len(named) == 1:
                add("district_fillable", "district", line, named[0])
            elif len(named) > 1:
                add("district_conflict", "district", line)

    defects = []
    for (kind, column), entry in sorted(entries.items()):
        item = {"kind": kind, "column": column or None, "count": len(entry["lines"]),
                "lines": entry["lines"]}
        if entry["expected"]:
            item["expected"] = entry["expected"]
        if entry["first"]:
            item["first_occurrence"] = entry["first"]
        defects.append(item)
    totals = {}
    for item in defects:
        totals[item["kind"]] = totals.get(item["kind"], 0) + item["count"]

    return {
        "tamis_demo_manifest": 1,
        "file": CSV_NAME,
        "generator": {"script": "assets/demo/generate.py", "rows": rows_requested, "seed": seed},
        "encoding": "utf-8", "delimiter": ",", "line_terminator": "\n",
        "columns": COLUMNS,
        "data_rows": len(generated),
        "physical_lines": last_line,
        "line_numbers": "1-based physical line where the record starts; the header is line 1",
        "vocabulary": {
            "site": SITES, "district": DISTRICTS, "species": SPECIES, "status": STATUSES,
            "crew": CREWS_ASCII + CREWS_NON_ASCII, "contractor": CONTRACTORS,
        },
        "site_district": SITE_DISTRICT,
        "gap_sites": GAP_SITES,
        "conflict_sites": {site: list(ds) for site, ds in CONFLICT_SITES.items()},
        "missing_forms": sorted({text for text, _ in MISSING_FORMS}),
        "kinds": DESCRIPTIONS,
        "totals": dict(sorted(totals.items())),
        "defects": defects,
    }


def to_json(value, indent=0):
    """JSON with one key per line but every list of scalars on one line, so
    the manifest stays small and a diff shows which kind changed."""
    pad = "  " * (indent + 1)
    if isinstance(value, dict):
        if not value:
            return "{}"
        items = [pad + json.dumps(k) + ": " + to_json(v, indent + 1) for k, v in value.items()]
        return "{\n" + ",\n".join(items) + "\n" + "  " * indent + "}"
    if isinstance(value, list) and any(isinstance(v, dict) for v in value):
        return "[\n" + ",\n".join(pad + to_json(v, indent + 1) for v in value) + "\n" + "  " * indent + "]"
    return json.dumps(value, separators=(", ", ": "))


def generate(rows, seed):
    generated = Generator(seed).rows(rows)
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(COLUMNS)
    writer.writerows(row.values() for row, _, _ in generated)
    starts, last_line = physical_lines([row for row, _, _ in generated])
    manifest = build_manifest(generated, starts, last_line, rows, seed)
    return buffer.getvalue().encode("utf-8"), (to_json(manifest) + "\n").encode("utf-8")


def main(argv):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--rows", type=int, default=DEFAULT_ROWS, help="data rows (default %(default)s)")
    parser.add_argument("--seed", type=int, default=DEFAULT_SEED, help="random seed (default %(default)s)")
    parser.add_argument("--out-dir", default=os.path.dirname(os.path.abspath(__file__)),
                        help="where to write the two files (default: beside this script)")
    args = parser.parse_args(argv[1:])
    if args.rows < 1:
        parser.error("--rows must be at least 1")
    csv_bytes, manifest_bytes = generate(args.rows, args.seed)
    os.makedirs(args.out_dir, exist_ok=True)
    for name, data in ((CSV_NAME, csv_bytes), (MANIFEST_NAME, manifest_bytes)):
        with open(os.path.join(args.out_dir, name), "wb") as f:
            f.write(data)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
