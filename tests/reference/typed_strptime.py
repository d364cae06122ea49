"""parse_date against Python's datetime.strptime (Debian's /usr/bin/python3),
on 100,000 generated values, through `tamis run RECIPE IN -o OUT`.

Reference: datetime.datetime.strptime(value, format).date(), ISO 8601 text
out. The value sets are valid dates written with and without zero padding,
and subtly invalid ones: impossible calendar dates (30 February, 31 April,
29 February in years that are not leap years), month 0 or 13, day 0 or 32,
years of the wrong width (the trade's classic `%y` / `%Y` mistakes), a
character dropped, added or replaced, misspelt month names, day and month
swapped.

Where the two grammars agree, every value must give the same date or none:
%Y exactly four digits and %y exactly two (both: the regular expressions
in CPython's _strptime are \\d\\d\\d\\d and \\d\\d), %y 69-99 -> 19yy and
00-68 -> 20yy (POSIX, both), %m %d %H %M %S one or two digits, English month
names in any letter case, the whole value consumed, real calendar dates.
They differ, by design, in five places, which the generator never produces
at random and which are checked one by one below instead, both sides
asserted (DOCUMENTED_DIFFERENCES):
  1. Python's %d also reads a space and one digit (" 9"); tamis skips no
     white space.
  2. A space in a Python format matches any run of white space (tabs,
     several spaces); in tamis a character of the format matches itself.
  3. Python's \\d matches any Unicode decimal digit (ARABIC-INDIC DIGIT TWO
     U+0662 ...); tamis reads ASCII digits only.
  4. Python compiles the whole format case-insensitively, so a literal 'T'
     also matches 't'; tamis compares literals exactly.
  5. Python's datetime starts at year 1 (datetime.MINYEAR); tamis reads the
     year 0000 of the proleptic Gregorian calendar (ISO 8601 numbers it 0000
     = 1 BC, from memory), as Howard Hinnant's date library does.
The generator also never writes the year 0000 (difference 5) and never
puts a month name's letters in another script.

A second recipe lists three formats at once: the first that matches must
win (as trying Python's strptime format by format), and the report must
count the values that read as different dates month-first and day-first.
"""
import csv
import datetime
import json
import os
import random
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

SEED = 20240309
SINGLE_FORMAT_VALUES = 8000  # per format, 11 formats
MULTI_FORMAT_VALUES = 12000  # one recipe with three formats
NULL_MARKER = "<NULL>"

FORMATS = [
    "%Y-%m-%d",
    "%m/%d/%Y",
    "%d/%m/%Y",
    "%m/%d/%y",
    "%d.%m.%y",
    "%d %b %Y",
    "%B %d, %Y",
    "%d-%b-%y",
    "%Y-%m-%dT%H:%M:%S",
    "%Y/%m/%d %H:%M",
    "%d%%%m%%%Y",
]
MULTI_FORMATS = ["%m/%d/%Y", "%d/%m/%Y", "%Y-%m-%d"]

MONTH_NAMES = ["January", "February", "March", "April", "May", "June", "July",
               "August", "September", "October", "November", "December"]
# Characters a mutation may add: never white space, never a letter that
# changes case meaning, never a non-ASCII digit (the documented differences).
INSERTED = "0123456789/-.:,x%"

DOCUMENTED_DIFFERENCES = [
    # (value, format, Python's date or None, tamis's date or None, why)
    (" 9/03/2024", "%d/%m/%Y", "2024-03-09", None, "Python's %d reads ' 9'"),
    ("9  Mar 2024", "%d %b %Y", "2024-03-09", None, "a format space is any white space in Python"),
    ("9\tMar 2024", "%d %b %Y", "2024-03-09", None, "a format space is any white space in Python"),
    ("\u0662\u0660\u0662\u0664-03-09", "%Y-%m-%d", "2024-03-09", None, "Python's \\d is any Unicode digit"),
    ("2024-03-09t10:00:00", "%Y-%m-%dT%H:%M:%S", "2024-03-09", None, "Python's formats ignore case"),
    ("0000-01-01", "%Y-%m-%d", None, "0000-01-01", "Python's datetime has no year 0"),
]

# Where both grammars agree by name: the trade's classic pitfalls.
CLASSIC_PITFALLS = [
    ("12/16/2022", "%m/%d/%y", None),
    ("12/16/22", "%m/%d/%Y", None),
    ("12/16/22", "%m/%d/%y", "2022-12-16"),
    ("12/16/2022", "%m/%d/%Y", "2022-12-16"),
]


def python_date(value, fmt):
    try:
        return datetime.datetime.strptime(value, fmt).date().isoformat()
    except ValueError:
        return None


def render(fields, fmt, rng, pad):
    """Writes fields (y, m, d, H, M, S; possibly impossible) in fmt."""
    y, m, d, hh, mm, ss = fields
    out = []
    i = 0
    while i < len(fmt):
        c = fmt[i]
        if c != "%":
            out.append(c)
            i += 1
            continue
        k = fmt[i + 1]
        i += 2
        if k == "Y":
            out.append(y if isinstance(y, str) else "%04d" % y)
        elif k == "y":
            out.append(y if isinstance(y, str) else "%02d" % (y % 100))
        elif k in "mdHMS":
            v = {"m": m, "d": d, "H": hh, "M": mm, "S": ss}[k]
            out.append(("%02d" if pad else "%d") % v)
        elif k in "bB":
            name = MONTH_NAMES[m - 1] if 1 <= m <= 12 else rng.choice(["Smarch", "Foo", "Maz"])
            out.append(name[:3] if k == "b" else name)
        elif k == "%":
            out.append("%")
    return "".join(out)


def random_date(rng):
    start = datetime.date(1, 1, 1).toordinal()
    if rng.random() < 0.8:
        start = datetime.date(1900, 1, 1).toordinal()
        end = datetime.date(2099, 12, 31).toordinal()
    else:
        end = datetime.date(9999, 12, 31).toordinal()
    return datetime.date.fromordinal(rng.randint(start, end))


def generate_value(rng, fmt):
    day = random_date(rng)
    fields = [day.year, day.month, day.day, rng.randint(0, 23), rng.randint(0, 59), rng.randint(0, 59)]
    pad = rng.random() < 0.6
    roll = rng.random()
    if roll < 0.12:
        # Calendar traps: a day the month lacks, 29 February in a common year.
        fields[1] = rng.choice([2, 2, 4, 6, 9, 11])
        fields[2] = rng.choice([29, 30, 31])
        fields[0] = rng.choice([1900, 2000, 2023, 2024, 2100, day.year])
    elif roll < 0.18:
        fields[1] = rng.choice([0, 13, 19])
    elif roll < 0.22:
        fields[2] = rng.choice([0, 32, 39])
    elif roll < 0.30:
        # The classic width mistakes: a four-digit year where %y wants two,
        # two digits where %Y wants four, and other widths.
        fields[0] = rng.choice(["%d" % (day.year % 100), "%03d" % (day.year % 1000), "%05d" % day.year,
                                "%04d" % day.year, "%d" % (day.year % 10)])
    elif roll < 0.34:
        fields[1], fields[2] = fields[2], fields[1]
    elif roll < 0.37:
        fields[3] = rng.choice([24, 25, 99])
    value = render(fields, fmt, rng, pad)
    roll = rng.random()
    if roll < 0.08 and value:
        k = rng.randrange(len(value))
        value = value[:k] + value[k + 1:]
    elif roll < 0.16:
        k = rng.randrange(len(value) + 1)
        value = value[:k] + rng.choice(INSERTED) + value[k:]
    elif roll < 0.22 and value:
        k = rng.randrange(len(value))
        value = value[:k] + rng.choice(INSERTED) + value[k + 1:]
    elif roll < 0.26 and ("%b" in fmt or "%B" in fmt):
        # Month names in any case ("T" is the only literal letter of these
        # formats, and it never appears with a month name).
        value = rng.choice([value.upper(), value.lower(), value.swapcase()])
    elif roll < 0.27:
        value = ""
    return value


def agree_by_design(value, fmt):
    # Difference 5: the year 0000 (a %Y field of zeros).
    return not ("%Y" in fmt and "0000" in value)


def run_parse_date(binary, formats, values, workdir, name):
    """Runs parse_date over the values; returns (dates by row, report)."""
    recipe = {
        "tamis_recipe": 1,
        "input": {"format": "csv", "delimiter": ",", "header": True, "encoding": "utf-8"},
        "steps": [{"op": "parse_date", "column": "v", "formats": formats, "on_error": "null"}],
        "output": {"format": "csv", "null": NULL_MARKER},
    }
    recipe_path = os.path.join(workdir, name + ".recipe.json")
    in_path = os.path.join(workdir, name + ".csv")
    out_path = os.path.join(workdir, name + ".out.csv")
    report_path = os.path.join(workdir, name + ".report.json")
    with open(recipe_path, "w", encoding="utf-8") as f:
        json.dump(recipe, f)
    with open(in_path, "w", encoding="utf-8", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["id", "v"])
        for i, v in enumerate(values):
            w.writerow([i, v])
    code, _, stderr = reflib.run_tamis(binary, ["run", recipe_path, in_path, "-o", out_path,
                                                "--report", report_path])
    if code != 0:
        raise SystemExit("tamis run failed (exit %d) for %s: %s" % (code, name, stderr))
    with open(out_path, encoding="utf-8", newline="") as f:
        rows = list(csv.reader(f))
    if rows[0] != ["id", "v"] or len(rows) != len(values) + 1:
        raise SystemExit("%s: unexpected output shape: header %r, %d rows for %d values"
                         % (name, rows[0], len(rows) - 1, len(values)))
    dates = [None] * len(values)
    for row in rows[1:]:
        dates[int(row[0])] = None if row[1] == NULL_MARKER else row[1]
    with open(report_path, encoding="utf-8") as f:
        report = json.load(f)
    return dates, report


def main():
    if len(sys.argv) != 2:
        raise SystemExit("usage: typed_strptime.py TAMIS_BINARY")
    binary = sys.argv[1]
    rng = random.Random(SEED)
    failures = []
    compared = 0
    skipped = 0
    with tempfile.TemporaryDirectory() as workdir:
        for n, fmt in enumerate(FORMATS):
            values = []
            while len(values) < SINGLE_FORMAT_VALUES:
                v = generate_value(rng, fmt)
                if agree_by_design(v, fmt):
                    values.append(v)
                else:
                    skipped += 1
            values += [v for v, f, _ in CLASSIC_PITFALLS if f == fmt]
            dates, _ = run_parse_date(binary, [fmt], values, workdir, "format%d" % n)
            matched = 0
            for v, got in zip(values, dates):
                want = python_date(v, fmt)
                compared += 1
                matched += want is not None
                if got != want:
                    failures.append("%r with %s: tamis %s, Python %s" % (v, fmt, got, want))
            # A generator that produced only failures (or only successes)
            # would compare little.
            if not (0.3 * len(values) < matched < 0.95 * len(values)):
                failures.append("%s: %d of %d values are dates; the generator is off" % (fmt, matched, len(values)))

        for v, fmt, want in CLASSIC_PITFALLS:
            if python_date(v, fmt) != want:
                failures.append("classic pitfall %r with %s: Python gives %s, expected %s"
                                % (v, fmt, python_date(v, fmt), want))

        # First match wins, and ambiguity is counted.
        values = []
        while len(values) < MULTI_FORMAT_VALUES:
            v = generate_value(rng, rng.choice(MULTI_FORMATS))
            if agree_by_design(v, "%Y"):
                values.append(v)
        dates, report = run_parse_date(binary, MULTI_FORMATS, values, workdir, "multi")
        ambiguous = 0
        for v, got in zip(values, dates):
            candidates = [python_date(v, f) for f in MULTI_FORMATS]
            want = next((c for c in candidates if c is not None), None)
            compared += 1
            if got != want:
                failures.append("%r with %s: tamis %s, Python's first match %s" % (v, MULTI_FORMATS, got, want))
            if candidates[0] is not None and candidates[1] is not None and candidates[0] != candidates[1]:
                ambiguous += 1
        warnings = report["steps"][0]["warnings"]
        expected = "v: %d values read as different dates month-first and day-first" % ambiguous
        if ambiguous < 100 or not any(w.startswith(expected) for w in warnings):
            failures.append("ambiguity: Python counts %d ambiguous values; tamis warnings: %r" % (ambiguous, warnings))

        # The documented differences, both sides asserted.
        for k, (v, fmt, py_want, tamis_want, why) in enumerate(DOCUMENTED_DIFFERENCES):
            py = python_date(v, fmt)
            got, _ = run_parse_date(binary, [fmt], [v], workdir, "difference%d" % k)
            if py != py_want:
                failures.append("difference %r with %s (%s): Python now gives %s" % (v, fmt, why, py))
            if got[0] != tamis_want:
                failures.append("difference %r with %s (%s): tamis gives %s, documented %s"
                                % (v, fmt, why, got[0], tamis_want))

    print("typed_strptime: %d values compared with Python's strptime (%d generated values skipped as "
          "documented differences), %d documented differences checked" % (compared, skipped, len(DOCUMENTED_DIFFERENCES)))
    if failures:
        for f in failures[:40]:
            print("FAIL:", f)
        print("%d failures" % len(failures))
        sys.exit(1)
    print("all agree")


if __name__ == "__main__":
    main()
