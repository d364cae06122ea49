"""`tamis profile --json` statistics on generated numeric columns versus numpy.

Sources:
- numpy (Debian python3-numpy): mean, std with ddof=1 (the sample standard
  deviation the CLI contract asks for), min, max, and numpy.quantile with
  its default method 'linear', which is definition 7 of Hyndman & Fan
  (1996), "Sample quantiles in statistical packages", The American
  Statistician 50(4):361-365, as the CLI contract specifies.
- Python's own counting for rows, blanks and distinct values (distinct as
  SQL's COUNT(DISTINCT column): a blank string is a value, NULL is not).
Tolerance: 1e-9 relative (this issue's brief); for an expected value that is
tiny next to the column's magnitude the float64 cancellation floor, 1e-15 of
the largest |x|, is used instead (common practice).
"""
import os
import random
import re
import sys
import tempfile

import numpy

sys.dont_write_bytecode = True
import reflib  # noqa: E402

SEED = 20240607
SIZES = [1, 2, 5, 1000, 100000]
QUANTILE_POINTS = [0.05, 0.25, 0.5, 0.75, 0.95]
TEXT_WORDS = ["oak", "Linden", "plane tree", "érable", "ginkgo \U0001F333", "x", "Sakura 桜"]


def is_blank(value):
    # CLI contract: blanks are empty or only-white-space strings.
    return value.strip() == ""


def make_integer(rng, low, high):
    return str(rng.randint(low, high))


def make_decimal(rng, places):
    # A scaled integer printed at `places` decimals, then written without
    # trailing fraction zeros so each number has one textual form.
    scaled = rng.randint(-250000 * 10 ** places, 9000000 * 10 ** places)
    sign = "-" if scaled < 0 else ""
    whole, fraction = divmod(abs(scaled), 10 ** places)
    fraction_text = ("%0*d" % (places, fraction)).rstrip("0") if places else ""
    return sign + str(whole) + ("." + fraction_text if fraction_text else "")


def generate_table(rng, rows):
    """Columns: wide integers with blanks, narrow integers with repeats,
    decimals with blanks, text without blanks."""
    max_places = rng.randint(1, 4)
    blank_count = max(1, rows // 100) if rows >= 5 else 0
    wide_blank_rows = set(rng.sample(range(rows), blank_count))
    measure_blank_rows = set(rng.sample(range(rows), blank_count))
    table = {"wide_int": [], "small_int": [], "measure": [], "label": []}
    for row in range(rows):
        table["wide_int"].append(rng.choice(["", "   "]) if row in wide_blank_rows else make_integer(rng, -5000, 2500000))
        table["small_int"].append(make_integer(rng, -20, 60))
        table["measure"].append(rng.choice(["", "   "]) if row in measure_blank_rows
                                else make_decimal(rng, rng.randint(0, max_places)))
        table["label"].append(rng.choice(TEXT_WORDS))
    # The column's scale is the most decimals any value shows; make sure one
    # value shows max_places so the column is decimal even for n=1.
    first_value_row = next(r for r in range(rows) if r not in measure_blank_rows)
    value = make_decimal(rng, max_places)
    while "." not in value or len(value.split(".")[1]) != max_places:
        value = make_decimal(rng, max_places)
    table["measure"][first_value_row] = value
    return table, max_places


def write_csv(path, table):
    names = list(table)
    rows = len(table[names[0]])
    lines = [",".join(names)]
    for row in range(rows):
        lines.append(",".join(table[name][row] for name in names))
    with open(path, "w", encoding="utf-8", newline="") as handle:
        handle.write("\n".join(lines) + "\n")


def close_enough(got, expected, magnitude):
    if not isinstance(got, (int, float)) or isinstance(got, bool):
        return False
    tolerance = max(1e-9 * abs(expected), 1e-15 * magnitude)
    return abs(got - expected) <= tolerance


def check_numeric_column(tally, label, column, values, expected_type, scale):
    numbers = numpy.array([float(v) for v in values if not is_blank(v)])
    magnitude = float(numpy.max(numpy.abs(numbers)))
    blanks = sum(1 for v in values if is_blank(v))
    # Distinct as SQL's COUNT(DISTINCT column): NULLs are left out, but a
    # blank string is a value (design §4: NULL and empty are distinct), and
    # texts are compared exactly (design §4: code point by code point).
    distinct = len(set(values))
    details = "column report: %s" % reflib.show_value(column, 1500)

    tally.check(column.get("type") == expected_type, "%s: type %s" % (label, expected_type), details)
    tally.check(column.get("rows") == len(values), "%s: rows %d" % (label, len(values)), details)
    # CLI contract: blanks = empty or only-white-space strings.
    tally.check(column.get("blanks") == blanks, "%s: blanks %d" % (label, blanks), details)
    tally.check(column.get("distinct") == distinct, "%s: distinct %d" % (label, distinct), details)

    # numpy.mean.
    expected_mean = float(numpy.mean(numbers))
    tally.check(close_enough(column.get("mean"), expected_mean, magnitude), "%s: mean = numpy %r" % (label, expected_mean), details)
    # numpy.std(ddof=1): the sample standard deviation; undefined for one value.
    if len(numbers) >= 2:
        expected_std = float(numpy.std(numbers, ddof=1))
        tally.check(close_enough(column.get("std"), expected_std, magnitude), "%s: std (ddof=1) = numpy %r" % (label, expected_std), details)
    else:
        tally.check(column.get("std") is None,
                    "%s: std of a single value is absent or null (numpy ddof=1 gives NaN, not a number)" % label, details)
    # numpy.quantile, default method 'linear' = Hyndman & Fan (1996) type 7.
    got_quantiles = {q.get("p"): q.get("value") for q in column.get("quantiles") or [] if isinstance(q, dict)}
    tally.check(sorted(got_quantiles) == QUANTILE_POINTS, "%s: quantiles at p = %s" % (label, QUANTILE_POINTS), details)
    for p in QUANTILE_POINTS:
        expected_quantile = float(numpy.quantile(numbers, p, method="linear"))
        tally.check(close_enough(got_quantiles.get(p), expected_quantile, magnitude),
                    "%s: quantile p=%s = numpy %r" % (label, p, expected_quantile),
                    "got %r\n%s" % (got_quantiles.get(p), details))
    # numpy.min / numpy.max, reported as strings in the canonical text form
    # (design §3: integers without leading zeros; decimals in plain notation
    # at the column's scale).
    for key, expected_value in (("min", float(numpy.min(numbers))), ("max", float(numpy.max(numbers)))):
        text = column.get(key)
        if expected_type == "integer":
            canonical_ok = isinstance(text, str) and text == str(int(expected_value))
        else:
            canonical_ok = isinstance(text, str) and re.fullmatch(r"-?[0-9]+\.[0-9]{%d}" % scale, text) is not None
        tally.check(canonical_ok and close_enough(float(text), expected_value, magnitude),
                    "%s: %s = numpy %r in canonical text form" % (label, key, expected_value),
                    "got %r\n%s" % (text, details))


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("ref.profile_numpy")
    rng = random.Random(SEED)
    summary = ["numeric columns vs numpy (mean, std ddof=1, H&F type 7 quantiles, min, max) and Python counts:"]
    with tempfile.TemporaryDirectory(prefix="tamis-profile-") as workdir:
        for rows in SIZES:
            table, scale = generate_table(rng, rows)
            path = os.path.join(workdir, "trees_%d.csv" % rows)
            write_csv(path, table)
            code, report, stderr = reflib.run_profile(binary, [path, "--delimiter", ",", "--header", "yes"])
            details = "file: %d rows\nexit: %d\nreport: %s\nstderr: %s" % (rows, code, reflib.show_value(report, 800), stderr.strip()[:300])
            if not tally.check(code == 0 and isinstance(report, dict), "n=%d: profile exits 0 with one JSON object" % rows, details):
                continue
            tally.check(report.get("rows") == rows and report.get("rejected") == 0,
                        "n=%d: rows %d, rejected 0" % (rows, rows), details)
            columns = {c.get("name"): c for c in report.get("columns", []) if isinstance(c, dict)}
            tally.check(list(columns) == list(table), "n=%d: columns %s" % (rows, list(table)), details)
            for name, expected_type in (("wide_int", "integer"), ("small_int", "integer"), ("measure", "decimal")):
                if name in columns:
                    check_numeric_column(tally, "n=%d %s" % (rows, name), columns[name], table[name], expected_type, scale)
            label_column = columns.get("label", {})
            values = table["label"]
            tally.check(label_column.get("type") == "text", "n=%d label: type text" % rows, reflib.show_value(label_column, 800))
            # CLI contract: mean/std only for integer/decimal columns.
            tally.check(label_column.get("mean") is None and label_column.get("std") is None,
                        "n=%d label: no mean/std for text" % rows, reflib.show_value(label_column, 800))
            tally.check(label_column.get("blanks") == 0 and label_column.get("distinct") == len(set(values)),
                        "n=%d label: blanks 0, distinct %d" % (rows, len(set(values))), reflib.show_value(label_column, 800))
            # Lengths in Unicode code points (Python's len() of a str counts code points).
            tally.check(label_column.get("length_min") == min(len(v) for v in values)
                        and label_column.get("length_max") == max(len(v) for v in values),
                        "n=%d label: length_min/length_max in code points" % rows, reflib.show_value(label_column, 800))
            summary.append("  n=%-6d decimal scale %d, blanks per numeric column: wide_int %d, measure %d" % (
                rows, scale, sum(1 for v in table["wide_int"] if is_blank(v)), sum(1 for v in table["measure"] if is_blank(v))))
    tally.finish(summary)


if __name__ == "__main__":
    main()
