"""`tamis similar` as a user meets it: its help, its errors, its JSON, and the
recipe it writes, run back through `tamis run` on the demo file.

Ground truth: assets/demo/tree_survey.defects.json, the manifest in which the
demo generator (our own, assets/demo/generate.py) records every variant
spelling it injected, with its line and the vocabulary value it stands for.
The CSV is read independently with Python's csv module (RFC 4180 reader).
"""
import csv
import io
import json
import os
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

ROOT = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
DEMO = os.path.join(ROOT, "assets", "demo", "tree_survey.csv")
MANIFEST = os.path.join(ROOT, "assets", "demo", "tree_survey.defects.json")
SPELLING_KINDS = {"case_variant", "accent_variant", "unicode_decomposed", "trailing_dot", "doubled_inner_space",
                  "typo", "edge_whitespace"}
METHODS = ["token_key", "qgram", "levenshtein", "osa", "jaro_winkler", "soundex"]


def demo_variants(column):
    """(value as written in the file, value meant) for the injected variants of one column."""
    with open(DEMO, encoding="utf-8", newline="") as f:
        records = reflib.python_csv_records_with_lines(f.read())
    by_line = {line: record for record, line in records[1:]}
    header = records[0][0]
    index = header.index(column)
    manifest = json.load(open(MANIFEST, encoding="utf-8"))
    variants = []
    for d in manifest["defects"]:
        if d["column"] == column and d["kind"] in SPELLING_KINDS:
            for line, meant in d["expected"]:
                variants.append((d["kind"], by_line[line][index], meant))
    return variants


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("similar_cli")

    code, out, err = reflib.run_tamis(binary, ["similar", "--help"])
    text = out.decode("utf-8")
    tally.check(code == 0, "--help exits 0", err)
    for word in METHODS + ["--column", "--method", "--threshold", "--json", "-o", "--delimiter", "Example"]:
        tally.check(word in text, "--help mentions %s" % word, text[:400])

    code, _, err = reflib.run_tamis(binary, ["similar", DEMO, "--column", "districts"])
    tally.check(code == 2 and '"district"' in err and '"species"' in err, "unknown column: exit 2, lists columns",
                "exit %d, %s" % (code, err))
    code, _, err = reflib.run_tamis(binary, ["similar", DEMO, "--column", "district", "--method", "metaphone"])
    tally.check(code == 2 and all(m in err for m in METHODS), "unknown method: exit 2, lists methods",
                "exit %d, %s" % (code, err))
    for bad in ["1.5", "-0.1", "nan"]:
        code, _, err = reflib.run_tamis(binary, ["similar", DEMO, "--column", "district", "--threshold", bad])
        tally.check(code == 2 and "threshold" in err, "threshold %s: exit 2" % bad, "exit %d, %s" % (code, err))
    code, _, err = reflib.run_tamis(binary, ["similar", os.path.join(ROOT, "no-such-file.csv"), "--column", "a"])
    tally.check(code == 4, "missing file: exit 4", "exit %d, %s" % (code, err))

    for column, method, threshold in [("district", "jaro_winkler", "0.85"), ("species", "jaro_winkler", "0.85"),
                                      ("status", "token_key", "0.85")]:
        label = "%s %s" % (column, method)
        code, out, err = reflib.run_tamis(binary, ["similar", DEMO, "--column", column, "--method", method,
                                                   "--threshold", threshold, "--json"])
        if not tally.check(code == 0, label + " --json exits 0", err):
            continue
        report = json.loads(out.decode("utf-8"))
        tally.check(report["method"] == method and report["column"] == column, label + " names method and column")
        canonical_of = {}
        for g in report["groups"]:
            tally.check(g["members"][0]["value"] == g["canonical"], label + " canonical first " + g["canonical"])
            counts = [m["count"] for m in g["members"][1:]]
            tally.check(counts == sorted(counts, reverse=True), label + " members by count " + g["canonical"])
            tally.check(g["rows"] == sum(counts), label + " rows = variant counts " + g["canonical"])
            tally.check(all(g["members"][0]["count"] >= c for c in counts), label + " canonical most frequent")
            for m in g["members"]:
                canonical_of[m["value"]] = g["canonical"]
        rows = [g["rows"] for g in report["groups"]]
        tally.check(rows == sorted(rows, reverse=True), label + " groups by rows affected")
        variants = demo_variants(column)
        tally.check(len(variants) > 20, label + " manifest has variants", str(len(variants)))
        for kind, value, meant in variants:
            tally.check(canonical_of.get(value) == meant, "%s finds %s %s" % (label, kind, reflib.show_value(value)),
                        "grouped with %s, manifest says %s" % (canonical_of.get(value), meant))

    with tempfile.TemporaryDirectory() as work:
        recipe_path = os.path.join(work, "merge.json")
        cleaned = os.path.join(work, "clean.csv")
        code, _, err = reflib.run_tamis(binary, ["similar", DEMO, "--column", "species", "--method", "jaro_winkler",
                                                 "-o", recipe_path])
        tally.check(code == 0 and os.path.exists(recipe_path), "-o writes the recipe", err)
        recipe = json.load(open(recipe_path, encoding="utf-8"))
        step = recipe["steps"][0]
        tally.check(recipe["tamis_recipe"] == 1 and step["op"] == "map_values" and step["column"] == "species",
                    "the recipe has one map_values step", json.dumps(recipe)[:300])
        code, _, err = reflib.run_tamis(binary, ["run", recipe_path, DEMO, "-o", cleaned])
        tally.check(code == 0, "tamis run accepts the recipe", err)
        if code == 0:
            with open(cleaned, encoding="utf-8", newline="") as f:
                after = [r for r in csv.reader(io.StringIO(f.read(), newline=""))]
            index = after[0].index("species")
            remaining = {r[index] for r in after[1:]}
            for kind, value, meant in demo_variants("species"):
                tally.check(value not in remaining, "run merged %s %s" % (kind, reflib.show_value(value)))
                tally.check(meant in remaining, "run kept %s" % meant)

    tally.finish(["tamis similar: help, errors, JSON and -o recipe against the demo manifest"])


if __name__ == "__main__":
    main()
