"""deduplicate against SQLite (Python's sqlite3, Debian's /usr/bin/python3),
through `tamis run RECIPE IN -o OUT --report REPORT`.

Reference: for keep first, the rows with
    ROW_NUMBER() OVER (PARTITION BY <compared columns> ORDER BY line) = 1
in source order (ORDER BY line DESC for keep last); SQL's PARTITION BY puts
NULLs together, as deduplicate does. A removed row's reason names the kept
row of its partition: FIRST_VALUE(line) OVER the same window.

The generated tables are full of near-duplicates: values one letter apart,
differing only in case, in a leading or trailing space, a NO-BREAK SPACE
(U+00A0) or a ZERO WIDTH SPACE (U+200B, which is not white space), NULL
against the empty text, composed against decomposed letters; and exact
repeats. NULLs are written as "~" and turned into NULL first (NULLIF in
derive_column steps).

compare: trimmed and casefold are compared against keys computed outside
tamis and partitioned by SQLite: trimming the Unicode White_Space set read
from Debian's unicode-data PropList.txt, and Python's str.casefold (Unicode
full case folding, CaseFolding.txt statuses C and F). The data stays within
characters whose folding did not change between Python's Unicode 14 and
ICU's Unicode 15.

Every configuration also runs with TAMIS_DEDUPLICATE_MEMORY=64, so the kept
keys spill to a temporary file after 64 bytes: the output must not change.
"""
import csv
import json
import os
import random
import sqlite3
import subprocess
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

SEED = 4180
ROWS = 3000
NULL_TEXT = "~"
PROPLIST = "/usr/share/unicode/PropList.txt"

VALUES_A = ["Oak", "oak", "OAK", "Oak ", " Oak", "Oak\u00a0", "Oak\u200b", "Oal", "", NULL_TEXT,
            "Zo\u00eb", "Zoe\u0308", "ZO\u00cb", "Stra\u00dfe", "STRASSE", "strasse", "\u3000Oak"]
VALUES_B = ["1", "01", "10", "", NULL_TEXT, " 1", "1\t"]
VALUES_C = ["x", "X", "y", NULL_TEXT, "\u03a3", "\u03c3", "\u03c2"]  # capital, small and final sigma

CONFIGURATIONS = [
    # (columns, keep, compare)
    ("*", "first", "exact"),
    ("*", "last", "exact"),
    (["a", "c"], "first", "exact"),
    (["b"], "last", "exact"),
    ("*", "first", "trimmed"),
    (["a"], "last", "trimmed"),
    ("*", "first", "casefold"),
    (["a", "c"], "last", "casefold"),
]


def white_space_set():
    """The code points with the White_Space property (PropList.txt)."""
    chars = []
    with open(PROPLIST, encoding="utf-8") as f:
        for line in f:
            line = line.split("#", 1)[0].strip()
            if not line:
                continue
            codes, prop = [part.strip() for part in line.split(";")]
            if prop != "White_Space":
                continue
            first, _, last = codes.partition("..")
            for cp in range(int(first, 16), int(last or first, 16) + 1):
                chars.append(chr(cp))
    if len(chars) != 25:  # Unicode 15.0 lists 25 White_Space code points
        raise SystemExit("unexpected White_Space list in %s: %d code points" % (PROPLIST, len(chars)))
    return "".join(chars)


def generate(rng):
    rows = []
    for _ in range(ROWS):
        if rows and rng.random() < 0.25:
            rows.append(list(rng.choice(rows[-50:])))
        else:
            rows.append([rng.choice(VALUES_A), rng.choice(VALUES_B), rng.choice(VALUES_C)])
    return rows


def compared(value, how, white_space):
    if value is None:
        return None
    if how == "trimmed":
        return value.strip(white_space)
    if how == "casefold":
        return value.casefold()
    return value


def sqlite_reference(rows, columns, keep, how, white_space):
    """(kept lines in order, {removed line: kept line}); line 1 is the header."""
    db = sqlite3.connect(":memory:")
    names = ["a", "b", "c"]
    db.execute("CREATE TABLE t (line INTEGER, a TEXT, b TEXT, c TEXT, ka TEXT, kb TEXT, kc TEXT)")
    for i, row in enumerate(rows):
        cells = [None if v == NULL_TEXT else v for v in row]
        keys = [compared(v, how, white_space) for v in cells]
        db.execute("INSERT INTO t VALUES (?, ?, ?, ?, ?, ?, ?)", [i + 2] + cells + keys)
    listed = names if columns == "*" else columns
    partition = ", ".join("k" + c for c in listed)
    order = "line DESC" if keep == "last" else "line"
    query = ("SELECT line, ROW_NUMBER() OVER w, FIRST_VALUE(line) OVER w FROM t "
             "WINDOW w AS (PARTITION BY %s ORDER BY %s) ORDER BY line" % (partition, order))
    kept, removed = [], {}
    for line, number, first in db.execute(query):
        if number == 1:
            kept.append(line)
        else:
            removed[line] = first
    return kept, removed


def run(binary, workdir, name, rows, columns, keep, how, spill):
    recipe = {
        "tamis_recipe": 1,
        "input": {"format": "csv", "delimiter": ",", "header": True, "encoding": "utf-8"},
        # NULLIF(x, '~') in place of each column (derive, drop, rename), then
        # the step under test.
        "steps": [{"op": "derive_column", "name": c + "_", "expr": "NULLIF(%s, '%s')" % (c, NULL_TEXT)}
                  for c in ("a", "b", "c")] + [
            {"op": "drop_columns", "columns": ["a", "b", "c"]},
            {"op": "rename_columns", "map": {"a_": "a", "b_": "b", "c_": "c"}},
            {"op": "deduplicate", "columns": columns, "keep": keep, "compare": how},
        ],
        "output": {"format": "csv", "null": "<NULL>"},
    }
    recipe_path = os.path.join(workdir, name + ".recipe.json")
    in_path = os.path.join(workdir, name + ".csv")
    out_path = os.path.join(workdir, name + ".out.csv")
    report_path = os.path.join(workdir, name + ".report.json")
    with open(recipe_path, "w", encoding="utf-8") as f:
        json.dump(recipe, f)
    with open(in_path, "w", encoding="utf-8", newline="") as f:
        w = csv.writer(f, lineterminator="\n")
        w.writerow(["a", "b", "c"])
        for row in rows:
            w.writerow(row)
    env = dict(os.environ)
    if spill:
        env["TAMIS_DEDUPLICATE_MEMORY"] = "64"
    # Small batches make the index live across many batches.
    completed = subprocess.run([binary, "run", recipe_path, in_path, "-o", out_path, "--report", report_path,
                                "--batch-rows", "97"],
                               stdout=subprocess.PIPE, stderr=subprocess.PIPE, env=env,
                               timeout=reflib.RUN_TIMEOUT_SECONDS)
    if completed.returncode != 0:
        raise SystemExit("tamis run failed (exit %d) for %s: %s"
                         % (completed.returncode, name, completed.stderr.decode("utf-8", "replace")))
    with open(out_path, encoding="utf-8", newline="") as f:
        out = list(csv.reader(f))
    with open(report_path, encoding="utf-8") as f:
        report = json.load(f)
    return out, report


def main():
    if len(sys.argv) != 2:
        raise SystemExit("usage: rows_sqlite.py TAMIS_BINARY")
    binary = sys.argv[1]
    white_space = white_space_set()
    rng = random.Random(SEED)
    failures = []
    runs = 0
    with tempfile.TemporaryDirectory() as workdir:
        for n, (columns, keep, how) in enumerate(CONFIGURATIONS):
            rows = generate(rng)
            kept, removed = sqlite_reference(rows, columns, keep, how, white_space)
            label = "columns=%s keep=%s compare=%s" % (columns, keep, how)
            # Enough duplicates and enough distinct rows to compare, or the
            # generator is off.
            if len(removed) < ROWS * 0.2 or len(kept) < 5:
                failures.append("%s: %d of %d rows are duplicates; the generator is off" % (label, len(removed), ROWS))
            outputs = []
            for spill in (False, True):
                out, report = run(binary, workdir, "config%d%s" % (n, "_spill" if spill else ""), rows, columns,
                                  keep, how, spill)
                runs += 1
                outputs.append(out)
                # The kept rows, as they were read (NULL as the marker), in
                # source order: within a partition the rows differ (trimmed,
                # casefold) or are identical, so the text shows which was kept.
                want = [[("<NULL>" if v == NULL_TEXT else v) for v in rows[line - 2]] for line in kept]
                if out[0] != ["a", "b", "c"] or out[1:] != want:
                    first = next((i for i, (x, y) in enumerate(zip(out[1:], want)) if x != y),
                                 min(len(out) - 1, len(want)))
                    failures.append("%s%s: kept rows differ from SQLite's at position %d (%d vs %d rows)"
                                    % (label, " spilled" if spill else "", first, len(out) - 1, len(want)))
                step = report["steps"][-1]
                if step["rows_removed"] != len(removed):
                    failures.append("%s: the report removes %d rows, SQLite %d" % (label, step["rows_removed"],
                                                                                    len(removed)))
                for listed in step["listed_rows"]:
                    want = "duplicate of line %d" % removed.get(listed["line"], -1)
                    if listed["reason"] != want:
                        failures.append("%s: line %d: reason %r, SQLite's window says %r"
                                        % (label, listed["line"], listed["reason"], want))
                        break
                if len(step["listed_rows"]) != min(100, len(removed)):
                    failures.append("%s: %d removed rows listed" % (label, len(step["listed_rows"])))
            if outputs[0] != outputs[1]:
                failures.append("%s: the output changes when the kept keys spill to disk" % label)

    print("rows_sqlite: %d configurations of %d rows, %d tamis runs compared with SQLite %s"
          % (len(CONFIGURATIONS), ROWS, runs, sqlite3.sqlite_version))
    if failures:
        for f in failures[:40]:
            print("FAIL:", f)
        sys.exit(1)
    print("all agree")


if __name__ == "__main__":
    main()
