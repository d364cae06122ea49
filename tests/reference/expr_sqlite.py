"""The SQL expression engine against SQLite (Python's sqlite3, Debian's
/usr/bin/python3), differentially, on generated expressions over a generated
table with NULLs.

Reference: SQLite's own evaluation of the same expressions (three-valued
logic, NULL propagation, LIKE with ESCAPE, CASE, COALESCE, NULLIF, BETWEEN,
IN, TRIM, SUBSTRING, || and code-point text order under the BINARY
collation). Only constructs whose semantics SQLite shares with ours are
generated, and SQLite is steered where it differs by design:
- decimals are stored in SQLite as scaled integers (cents) and every numeric
  expression is translated into exact integer arithmetic at a tracked scale,
  so 0.1 + 0.2 compares as exactly 0.3 on both sides (SQLite's REAL would
  not); ROUND half away from zero is written out in integer arithmetic;
- division (never integer division in tamis, rounded to 6 places) is only
  compared against values of at most 2 decimals with divisors of at most 21,
  and SQLite evaluates the comparison cross-multiplied in integers: a
  quotient that differs from the compared value differs by more than
  1/210000, far above the 5e-7 of our rounding, so the truth values must
  agree exactly;
- LIKE is made case-sensitive with PRAGMA case_sensitive_like (ISO SQL LIKE
  is case-sensitive); UPPER/LOWER only see ASCII text (SQLite folds ASCII
  only); SUBSTRING starts are literals >= 1 (SQLite counts negative starts
  from the end).

Checks:
1. FILTER_EXPRESSIONS random conditions, each as a one-step keep_rows recipe
   run by `tamis run RECIPE IN -o OUT`: the kept rows (by id, in order) equal
   SQLite's `WHERE e`; every DROP_EVERY-th also as drop_rows, equal to
   SQLite's `WHERE (e) IS NOT TRUE` (rows where e is FALSE or NULL).
2. VALUE_BATCHES runs of VALUE_BATCH derive_column steps each: the value of
   every boolean, numeric and text expression on every row equals SQLite's,
   NULLs included (booleans as true/false/NULL, so FALSE and UNKNOWN are told
   apart; numbers compared exactly as decimals).
The input file is text; the recipe's first steps type it with
derive_column + CAST + NULLIF ('' or '~' mark NULL), which the checks thereby
also exercise.
"""
import csv
import decimal
import io
import json
import os
import random
import sqlite3
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

SEED = 90752016
ROWS = 240
FILTER_EXPRESSIONS = 2000
DROP_EVERY = 4
VALUE_BATCHES = 30
VALUE_BATCH = 50
NULL_MARKER = "<NULL>"

ASCII_LETTERS = ["a", "b", "A", "B", " ", "%", "_", "!"]
ANY_LETTERS = ["a", "Z", " ", "é", "ß", "\U0001D11E", "_", "%", "ő"]

SETUP_STEPS = [
    {"op": "derive_column", "name": "i1", "expr": "CAST(NULLIF(ri1, '') AS INTEGER)"},
    {"op": "derive_column", "name": "i2", "expr": "CAST(NULLIF(ri2, '') AS INTEGER)"},
    {"op": "derive_column", "name": "m1", "expr": "CAST(NULLIF(rm1, '') AS DECIMAL(8,2))"},
    {"op": "derive_column", "name": "m2", "expr": "CAST(NULLIF(rm2, '') AS DECIMAL(8,2))"},
    {"op": "derive_column", "name": "t1", "expr": "NULLIF(rt1, '~')"},
    {"op": "derive_column", "name": "t2", "expr": "NULLIF(rt2, '~')"},
    {"op": "derive_column", "name": "d1", "expr": "CAST(NULLIF(rd1, '') AS DATE)"},
    {"op": "derive_column", "name": "b1", "expr": "CAST(NULLIF(rb1, '') AS BOOLEAN)"},
]


# ---------------------------------------------------------------- the table

def make_rows(rnd):
    rows = []
    for i in range(1, ROWS + 1):
        def maybe(value, share=0.15):
            return None if rnd.random() < share else value
        text1 = "".join(rnd.choice(ASCII_LETTERS) for _ in range(rnd.randint(0, 4)))
        text2 = "".join(rnd.choice(ANY_LETTERS) for _ in range(rnd.randint(0, 4)))
        rows.append({
            "id": i,
            "i1": maybe(rnd.randint(-20, 20)),
            "i2": maybe(rnd.randint(-20, 20)),
            "m1": maybe(rnd.randint(-5000, 5000)),  # cents: scale 2
            "m2": maybe(rnd.choice([rnd.randint(-5000, 5000), rnd.randint(-5, 5) * 100])),
            "t1": maybe(text1),
            "t2": maybe(text2),
            "d1": maybe("%04d-%02d-%02d" % (rnd.choice([1999, 2023, 2024]), rnd.randint(1, 12), rnd.randint(1, 28))),
            "b1": maybe(rnd.random() < 0.5),
        })
    return rows


def cents_text(cents):
    sign = "-" if cents < 0 else ""
    return "%s%d.%02d" % (sign, abs(cents) // 100, abs(cents) % 100)


def input_csv(rows):
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\n")
    writer.writerow(["id", "ri1", "ri2", "rm1", "rm2", "rt1", "rt2", "rd1", "rb1"])
    for r in rows:
        writer.writerow([
            r["id"],
            "" if r["i1"] is None else r["i1"],
            "" if r["i2"] is None else r["i2"],
            "" if r["m1"] is None else cents_text(r["m1"]),
            "" if r["m2"] is None else cents_text(r["m2"]),
            "~" if r["t1"] is None else r["t1"],
            "~" if r["t2"] is None else r["t2"],
            "" if r["d1"] is None else r["d1"],
            "" if r["b1"] is None else ("true" if r["b1"] else "false"),
        ])
    return out.getvalue()


def sqlite_table(rows):
    db = sqlite3.connect(":memory:")
    db.execute("PRAGMA case_sensitive_like = ON")
    db.execute("CREATE TABLE t (id INTEGER, i1 INTEGER, i2 INTEGER, m1 INTEGER, m2 INTEGER,"
               " t1 TEXT, t2 TEXT, d1 TEXT, b1 INTEGER)")
    db.executemany("INSERT INTO t VALUES (?,?,?,?,?,?,?,?,?)",
                   [(r["id"], r["i1"], r["i2"], r["m1"], r["m2"], r["t1"], r["t2"], r["d1"],
                     None if r["b1"] is None else int(r["b1"])) for r in rows])
    return db


# ----------------------------------------------------------- the generator

def quote(text):
    return "'" + text.replace("'", "''") + "'"


class Num:
    """ours: tamis SQL; lite: SQLite SQL whose value is ours * 10^scale, exactly."""

    def __init__(self, ours, lite, scale, is_integer):
        self.ours, self.lite, self.scale, self.is_integer = ours, lite, scale, is_integer

    def at(self, scale):
        return self.lite if scale == self.scale else "((%s) * %d)" % (self.lite, 10 ** (scale - self.scale))


class Text:
    def __init__(self, ours, lite, ascii_only):
        self.ours, self.lite, self.ascii_only = ours, lite, ascii_only


class Generator:
    def __init__(self, rnd):
        self.r = rnd

    # -- numbers
    def num_leaf(self, max_scale=2):
        k = self.r.randrange(6)
        if k == 0:
            c = self.r.choice(["i1", "i2"])
            return Num(c, c, 0, True)
        if k == 1 and max_scale >= 2:
            c = self.r.choice(["m1", "m2"])
            return Num(c, c, 2, False)
        if k == 2:
            v = self.r.randint(-20, 20)
            return Num(str(v), "(%d)" % v, 0, True)
        if k == 3 and max_scale >= 1:
            scale = self.r.randint(1, max_scale)
            v = self.r.randint(-3000, 3000)
            text = ("-" if v < 0 else "") + str(abs(v) // 10 ** scale) + "." + str(abs(v) % 10 ** scale).zfill(scale)
            return Num(text, "(%d)" % v, scale, False)
        if k == 4:
            t = self.text(0, True)
            return Num("CHAR_LENGTH(%s)" % t.ours, "length(%s)" % t.lite, 0, True)
        return self.num_leaf(max_scale) if max_scale < 2 else Num("i1", "i1", 0, True)

    def num(self, depth):
        if depth <= 0 or self.r.random() < 0.25:
            return self.num_leaf()
        k = self.r.randrange(11)
        if k in (0, 1):  # + -
            a, b = self.num(depth - 1), self.num(depth - 1)
            op = "+" if k == 0 else "-"
            s = max(a.scale, b.scale)
            return Num("(%s %s %s)" % (a.ours, op, b.ours), "(%s %s %s)" % (a.at(s), op, b.at(s)), s,
                       a.is_integer and b.is_integer)
        if k == 2:  # * on small operands only, so values stay far from 2^63
            a, b = self.num_leaf(), self.num_leaf()
            return Num("(%s * %s)" % (a.ours, b.ours), "(%s * %s)" % (a.lite, b.lite), a.scale + b.scale,
                       a.is_integer and b.is_integer)
        if k == 3:
            a = self.num(depth - 1)
            # "- -7", not "--7": two minus signs in a row would start an SQL comment.
            return Num("(- %s)" % a.ours, "(-(%s))" % a.lite, a.scale, a.is_integer)
        if k == 4:
            a = self.num(depth - 1)
            return Num("ABS(%s)" % a.ours, "abs(%s)" % a.lite, a.scale, a.is_integer)
        if k == 5:
            return self.rounded(self.num(depth - 1))
        if k == 6:
            a, b = self.num(depth - 1), self.num(depth - 1)
            s = max(a.scale, b.scale)
            return Num("COALESCE(%s, %s)" % (a.ours, b.ours), "coalesce(%s, %s)" % (a.at(s), b.at(s)), s,
                       a.is_integer and b.is_integer)
        if k == 7:
            a, b = self.num(depth - 1), self.num_leaf()
            s = max(a.scale, b.scale)
            return Num("NULLIF(%s, %s)" % (a.ours, b.ours), "nullif(%s, %s)" % (a.at(s), b.at(s)), s, a.is_integer)
        if k == 8:
            c = self.boolean(depth - 1)
            a, b = self.num(depth - 1), self.num(depth - 1)
            s = max(a.scale, b.scale)
            return Num("CASE WHEN %s THEN %s ELSE %s END" % (c[0], a.ours, b.ours),
                       "CASE WHEN %s THEN %s ELSE %s END" % (c[1], a.at(s), b.at(s)), s, a.is_integer and b.is_integer)
        if k == 9:
            a = self.num(depth - 1)
            if a.is_integer:
                return Num("CAST(%s AS DECIMAL(12,2))" % a.ours, a.at(2), 2, False)
            r = self.round_lite(a.lite, a.scale, 0)
            return Num("CAST(%s AS INTEGER)" % a.ours, r, 0, True)
        a = self.text(depth - 1, False)
        return Num("CHAR_LENGTH(%s)" % a.ours, "length(%s)" % a.lite, 0, True)

    @staticmethod
    def round_lite(lite, scale, digits):
        """ROUND half away from zero to `digits`, in SQLite integer arithmetic (truncating /)."""
        unit = 10 ** (scale - digits)
        half = unit // 2
        return "(CASE WHEN (%s) < 0 THEN -((-(%s) + %d) / %d) ELSE ((%s) + %d) / %d END)" % (
            lite, lite, half, unit, lite, half, unit)

    def rounded(self, a):
        digits = self.r.randint(-1, a.scale + 1)
        if digits >= a.scale:
            return Num("ROUND(%s, %d)" % (a.ours, digits), a.lite, a.scale, a.is_integer)
        lite = self.round_lite(a.lite, a.scale, digits)
        if digits < 0:
            lite = "(%s * %d)" % (lite, 10 ** (-digits))
        return Num("ROUND(%s, %d)" % (a.ours, digits), lite, max(digits, 0), a.is_integer)

    # -- texts
    def text_literal(self, ascii_only):
        letters = ASCII_LETTERS if ascii_only else ANY_LETTERS
        value = "".join(self.r.choice(letters) for _ in range(self.r.randint(0, 3)))
        return Text(quote(value), quote(value), ascii_only)

    def text(self, depth, ascii_only):
        if depth <= 0 or self.r.random() < 0.3:
            k = self.r.randrange(4)
            if k < 2:
                return Text("t1", "t1", True) if ascii_only or k == 0 else Text("t2", "t2", False)
            if k == 2 and ascii_only:
                n = self.num_leaf(0)
                return Text("CAST(%s AS TEXT)" % n.ours, "CAST(%s AS TEXT)" % n.lite, True)
            return self.text_literal(ascii_only)
        k = self.r.randrange(9)
        if k == 0:
            a, b = self.text(depth - 1, ascii_only), self.text(depth - 1, ascii_only)
            return Text("(%s || %s)" % (a.ours, b.ours), "(%s || %s)" % (a.lite, b.lite), a.ascii_only and b.ascii_only)
        if k in (1, 2):
            a = self.text(depth - 1, True)
            fn = "UPPER" if k == 1 else "LOWER"
            return Text("%s(%s)" % (fn, a.ours), "%s(%s)" % (fn.lower(), a.lite), True)
        if k == 3:
            a = self.text(depth - 1, ascii_only)
            side = self.r.choice(["", "BOTH", "LEADING", "TRAILING"])
            letters = ASCII_LETTERS if ascii_only else ANY_LETTERS
            chars = "".join(self.r.sample(letters, self.r.randint(1, 3)))
            use_chars = self.r.random() < 0.6
            function = {"": "trim", "BOTH": "trim", "LEADING": "ltrim", "TRAILING": "rtrim"}[side]
            if use_chars:
                ours = "TRIM(%s %s FROM %s)" % (side, quote(chars), a.ours)
                lite = "%s(%s, %s)" % (function, a.lite, quote(chars))
            elif side:
                ours = "TRIM(%s FROM %s)" % (side, a.ours)
                lite = "%s(%s)" % (function, a.lite)
            else:
                ours = "TRIM(%s)" % a.ours
                lite = "trim(%s)" % a.lite
            return Text(ours, lite, a.ascii_only)
        if k == 4:
            a = self.text(depth - 1, ascii_only)
            start = self.r.randint(1, 4)
            if self.r.random() < 0.5:
                length = self.r.randint(0, 3)
                form = self.r.random() < 0.5
                ours = ("SUBSTRING(%s FROM %d FOR %d)" if form else "SUBSTRING(%s, %d, %d)") % (a.ours, start, length)
                return Text(ours, "substr(%s, %d, %d)" % (a.lite, start, length), a.ascii_only)
            return Text("SUBSTRING(%s FROM %d)" % (a.ours, start), "substr(%s, %d)" % (a.lite, start), a.ascii_only)
        if k == 5:
            a, b = self.text(depth - 1, ascii_only), self.text(depth - 1, ascii_only)
            return Text("COALESCE(%s, %s)" % (a.ours, b.ours), "coalesce(%s, %s)" % (a.lite, b.lite),
                        a.ascii_only and b.ascii_only)
        if k == 6:
            a, b = self.text(depth - 1, ascii_only), self.text_literal(ascii_only)
            return Text("NULLIF(%s, %s)" % (a.ours, b.ours), "nullif(%s, %s)" % (a.lite, b.lite), a.ascii_only)
        if k == 7:
            c = self.boolean(depth - 1)
            a, b = self.text(depth - 1, ascii_only), self.text(depth - 1, ascii_only)
            return Text("CASE WHEN %s THEN %s ELSE %s END" % (c[0], a.ours, b.ours),
                        "CASE WHEN %s THEN %s ELSE %s END" % (c[1], a.lite, b.lite), a.ascii_only and b.ascii_only)
        n = self.num(depth - 1)
        if n.is_integer and n.scale == 0:
            return Text("CAST(%s AS TEXT)" % n.ours, "CAST(%s AS TEXT)" % n.lite, True)
        return self.text(depth - 1, ascii_only)

    def like_pattern(self, ascii_only):
        letters = [c for c in (ASCII_LETTERS if ascii_only else ANY_LETTERS) if c not in "%_!"]
        pieces = []
        for _ in range(self.r.randint(0, 4)):
            k = self.r.randrange(5)
            pieces.append("%" if k == 0 else "_" if k == 1 else self.r.choice(letters))
        return "".join(pieces)

    # -- conditions: (ours, lite)
    def date_literal(self):
        return "%04d-%02d-%02d" % (self.r.choice([1999, 2023, 2024]), self.r.randint(1, 12), self.r.randint(1, 28))

    def comparison_operator(self):
        return self.r.choice(["=", "<>", "<", "<=", ">", ">=", "!="])

    def boolean(self, depth):
        if depth <= 0 or self.r.random() < 0.3:
            return self.predicate(max(depth, 1) - 1)
        k = self.r.randrange(8)
        if k in (0, 1):
            a, b = self.boolean(depth - 1), self.boolean(depth - 1)
            op = "AND" if k == 0 else "OR"
            return ("(%s %s %s)" % (a[0], op, b[0]), "(%s %s %s)" % (a[1], op, b[1]))
        if k == 2:
            a = self.boolean(depth - 1)
            return ("(NOT %s)" % a[0], "(NOT %s)" % a[1])
        if k == 3:
            a = self.boolean(depth - 1)
            test = self.r.choice(["IS TRUE", "IS NOT TRUE", "IS FALSE", "IS NOT FALSE", "IS UNKNOWN", "IS NOT UNKNOWN"])
            lite_test = test.replace("UNKNOWN", "NULL")
            return ("(%s %s)" % (a[0], test), "(%s %s)" % (a[1], lite_test))
        if k == 4:
            a = self.boolean(depth - 1)
            return ("(%s AND NULL)" % a[0], "(%s AND NULL)" % a[1]) if self.r.random() < 0.5 else \
                ("(NULL OR %s)" % a[0], "(NULL OR %s)" % a[1])
        return self.predicate(depth - 1)

    def predicate(self, depth):
        k = self.r.randrange(14)
        if k in (0, 1, 2):  # numeric comparison
            a, b = self.num(depth + 1), self.num(depth)
            s = max(a.scale, b.scale)
            op = self.comparison_operator()
            return ("(%s %s %s)" % (a.ours, op, b.ours), "(%s %s %s)" % (a.at(s), op, b.at(s)))
        if k == 3:  # division, cross-multiplied on the SQLite side (see the module comment)
            a, c = self.simple_num(), self.simple_num()
            column = self.r.choice(["i1", "i2"])
            op = self.comparison_operator()
            divisor_ours = "(ABS(%s) + 1)" % column
            divisor_lite = "(abs(%s) + 1)" % column
            left = "((%s) * %d)" % (a.lite, 10 ** c.scale)
            right = "((%s) * %s * %d)" % (c.lite, divisor_lite, 10 ** a.scale)
            return ("((%s / %s) %s %s)" % (a.ours, divisor_ours, op, c.ours), "(%s %s %s)" % (left, op, right))
        if k == 4:
            a, low, high = self.num(depth), self.num_leaf(), self.num_leaf()
            s = max(a.scale, low.scale, high.scale)
            negated = "NOT " if self.r.random() < 0.3 else ""
            return ("(%s %sBETWEEN %s AND %s)" % (a.ours, negated, low.ours, high.ours),
                    "(%s %sBETWEEN %s AND %s)" % (a.at(s), negated, low.at(s), high.at(s)))
        if k == 5:
            a = self.num(depth)
            items = [self.num_leaf() for _ in range(self.r.randint(1, 4))]
            with_null = self.r.random() < 0.3
            s = max([a.scale] + [i.scale for i in items])
            negated = "NOT " if self.r.random() < 0.4 else ""
            ours_items = [i.ours for i in items] + (["NULL"] if with_null else [])
            lite_items = [i.at(s) for i in items] + (["NULL"] if with_null else [])
            return ("(%s %sIN (%s))" % (a.ours, negated, ", ".join(ours_items)),
                    "(%s %sIN (%s))" % (a.at(s), negated, ", ".join(lite_items)))
        if k in (6, 7):  # text comparison
            ascii_only = self.r.random() < 0.5
            a, b = self.text(depth + 1, ascii_only), self.text(depth, ascii_only)
            op = self.comparison_operator()
            return ("(%s %s %s)" % (a.ours, op, b.ours), "(%s %s %s)" % (a.lite, op, b.lite))
        if k == 8:  # LIKE
            ascii_only = self.r.random() < 0.5
            a = self.text(depth, ascii_only)
            negated = "NOT " if self.r.random() < 0.3 else ""
            if self.r.random() < 0.2:
                p = Text("t1", "t1", True) if ascii_only else Text("t2", "t2", False)
                return ("(%s %sLIKE %s)" % (a.ours, negated, p.ours), "(%s %sLIKE %s)" % (a.lite, negated, p.lite))
            pattern = self.like_pattern(ascii_only)
            if self.r.random() < 0.4:
                # Escaped wildcards and the escape character itself.
                extra = self.r.choice(["!%", "!_", "!!"])
                at = self.r.randint(0, len(pattern))
                pattern = pattern[:at] + extra + pattern[at:]
                clause = " ESCAPE '!'"
            else:
                clause = ""
            return ("(%s %sLIKE %s%s)" % (a.ours, negated, quote(pattern), clause),
                    "(%s %sLIKE %s%s)" % (a.lite, negated, quote(pattern), clause))
        if k == 9:  # IS [NOT] NULL on anything
            negated = "NOT " if self.r.random() < 0.5 else ""
            pick = self.r.randrange(3)
            x = self.num(depth) if pick == 0 else self.text(depth, pick == 1)
            return ("(%s IS %sNULL)" % (x.ours, negated), "(%s IS %sNULL)" % (x.lite, negated))
        if k == 10:  # dates
            literal = self.date_literal()
            op = self.comparison_operator()
            form = self.r.randrange(3)
            if form == 0:
                return ("(d1 %s DATE '%s')" % (op, literal), "(d1 %s '%s')" % (op, literal))
            if form == 1:
                return ("(d1 %s '%s')" % (op, literal), "(d1 %s '%s')" % (op, literal))
            other = self.date_literal()
            return ("(COALESCE(d1, DATE '%s') %s DATE '%s')" % (other, op, literal),
                    "(coalesce(d1, '%s') %s '%s')" % (other, op, literal))
        if k == 11:  # the boolean column
            form = self.r.randrange(4)
            if form == 0:
                return ("b1", "b1")
            if form == 1:
                return ("(b1 = TRUE)", "(b1 = 1)")
            if form == 2:
                return ("(b1 <> FALSE)", "(b1 <> 0)")
            return ("(b1 IS NOT FALSE)", "(b1 IS NOT FALSE)")
        if k == 12:  # simple CASE giving a text, compared
            x = self.num_leaf(0)
            a, b = self.text_literal(True), self.text_literal(True)
            value = self.r.randint(-3, 3)
            return ("(CASE %s WHEN %d THEN %s ELSE %s END = %s)" % (x.ours, value, a.ours, b.ours, a.ours),
                    "(CASE %s WHEN %d THEN %s ELSE %s END = %s)" % (x.lite, value, a.lite, b.lite, a.lite))
        literal = self.r.choice(["TRUE", "FALSE", "NULL"])
        return (literal, {"TRUE": "1", "FALSE": "0", "NULL": "NULL"}[literal])

    def simple_num(self):
        """A number of scale <= 2 without division, for the division comparisons."""
        if self.r.random() < 0.6:
            return self.num_leaf()
        a, b = self.num_leaf(), self.num_leaf()
        s = max(a.scale, b.scale)
        return Num("(%s + %s)" % (a.ours, b.ours), "(%s + %s)" % (a.at(s), b.at(s)), s, a.is_integer and b.is_integer)


# ---------------------------------------------------------------- running

def recipe_json(steps):
    return json.dumps({
        "tamis_recipe": 1,
        "title": "expression differential",
        "input": {"format": "csv", "delimiter": ",", "encoding": "utf-8", "header": True},
        "steps": SETUP_STEPS + steps,
        "output": {"format": "csv", "null": NULL_MARKER},
    }, ensure_ascii=False)


def run_recipe(binary, work, steps):
    """(records as dicts by column name, None) or (None, problem text)."""
    recipe = os.path.join(work, "recipe.json")
    with open(recipe, "w", encoding="utf-8") as f:
        f.write(recipe_json(steps))
    out = os.path.join(work, "out.csv")
    if os.path.exists(out):
        os.remove(out)
    code, stdout, stderr = reflib.run_tamis(binary, ["run", recipe, os.path.join(work, "in.csv"), "-o", out])
    if code != 0:
        return None, "exit %d\nstderr: %s\nstdout: %s" % (code, stderr.strip(), reflib.show_bytes(stdout, 300))
    with open(out, "rb") as f:
        records = reflib.parse_tamis_output(f.read())
    if not records:
        return None, "the output has no header row"
    header = records[0]
    return [dict(zip(header, r)) for r in records[1:]], None


def lite_truth(lite):
    return "CASE WHEN %s THEN 'true' WHEN NOT (%s) THEN 'false' ELSE NULL END" % (lite, lite)


def show_row(db, row_id):
    return repr(db.execute("SELECT * FROM t WHERE id = ?", (row_id,)).fetchone())


def main():
    binary = reflib.require_binary(sys.argv)
    rnd = random.Random(SEED)
    rows = make_rows(rnd)
    db = sqlite_table(rows)
    gen = Generator(rnd)
    tally = reflib.Tally("expr_sqlite")
    all_ids = [r["id"] for r in rows]
    with tempfile.TemporaryDirectory() as work:
        with open(os.path.join(work, "in.csv"), "w", encoding="utf-8", newline="") as f:
            f.write(input_csv(rows))

        # The CLI must run at all before thousands of runs are attempted.
        records, problem = run_recipe(binary, work, [])
        if problem:
            tally.check(False, "tamis run with the setup steps only", problem)
            tally.finish(["`tamis run RECIPE IN -o OUT` did not work; nothing else was checked"])
        tally.check([int(r["id"]) for r in records] == all_ids, "setup run keeps every row in order")

        # 1. keep_rows / drop_rows against WHERE.
        kept_counts = []
        for n in range(FILTER_EXPRESSIONS):
            ours, lite = gen.boolean(rnd.randint(1, 4))
            expected = [r[0] for r in db.execute("SELECT id FROM t WHERE %s ORDER BY id" % lite)]
            kept_counts.append(len(expected))
            records, problem = run_recipe(binary, work, [{"op": "keep_rows", "where": ours}])
            if problem:
                tally.check(False, "keep_rows #%d runs" % n, "ours: %s\n%s" % (ours, problem))
                continue
            got = [int(r["id"]) for r in records]
            detail = ""
            if got != expected:
                only_ours = sorted(set(got) - set(expected))[:3]
                only_lite = sorted(set(expected) - set(got))[:3]
                detail = "ours:   %s\nsqlite: %s\nkept only by tamis: %s\nkept only by SQLite: %s\n%s" % (
                    ours, lite, only_ours, only_lite,
                    "\n".join(show_row(db, i) for i in (only_ours + only_lite)[:3]))
            tally.check(got == expected, "keep_rows #%d" % n, detail)
            if n % DROP_EVERY == 0:
                expected_drop = [r[0] for r in db.execute(
                    "SELECT id FROM t WHERE (%s) IS NOT TRUE ORDER BY id" % lite)]
                records, problem = run_recipe(binary, work, [{"op": "drop_rows", "where": ours}])
                if problem:
                    tally.check(False, "drop_rows #%d runs" % n, "ours: %s\n%s" % (ours, problem))
                    continue
                got = [int(r["id"]) for r in records]
                tally.check(got == expected_drop, "drop_rows #%d" % n,
                            "ours:   %s\nsqlite: %s\ngot %d rows, SQLite %d" % (ours, lite, len(got), len(expected_drop)))

        # 2. Values of boolean, numeric and text expressions, NULLs included.
        values_checked = 0
        for batch in range(VALUE_BATCHES):
            generated = []
            for k in range(VALUE_BATCH):
                kind = k % 3
                if kind == 0:
                    ours, lite = gen.boolean(rnd.randint(1, 3))
                    generated.append(("boolean", ours, lite_truth(lite), 0))
                elif kind == 1:
                    num = gen.num(rnd.randint(1, 3))
                    generated.append(("number", num.ours, num.lite, num.scale))
                else:
                    text = gen.text(rnd.randint(1, 3), rnd.random() < 0.5)
                    generated.append(("text", text.ours, text.lite, 0))
            steps = [{"op": "derive_column", "name": "v%d" % k, "expr": g[1]} for k, g in enumerate(generated)]
            records, problem = run_recipe(binary, work, steps)
            if problem:
                tally.check(False, "value batch %d runs" % batch, problem)
                continue
            select = ", ".join("(%s)" % g[2] for g in generated)
            expected_rows = db.execute("SELECT id, %s FROM t ORDER BY id" % select).fetchall()
            tally.check(len(records) == len(expected_rows), "value batch %d keeps every row" % batch)
            for record, expected_row in zip(records, expected_rows):
                for k, (kind, ours, lite, scale) in enumerate(generated):
                    got = record.get("v%d" % k)
                    want = expected_row[k + 1]
                    if want is None:
                        same = got == NULL_MARKER
                    elif kind == "number":
                        same = got != NULL_MARKER and decimal.Decimal(got) * (10 ** scale) == decimal.Decimal(want)
                    else:
                        same = got == want
                    values_checked += 1
                    tally.check(same, "value batch %d v%d row %s" % (batch, k, record.get("id")),
                                "%s\nours:   %s\nsqlite: %s\ntamis gave %r, SQLite %r (scale %d)\nrow: %s" % (
                                    kind, ours, lite, got, want, scale, show_row(db, expected_row[0])))

    nontrivial = sum(1 for c in kept_counts if 0 < c < ROWS)
    tally.check(nontrivial >= FILTER_EXPRESSIONS // 2, "most generated conditions keep some rows and drop others",
                "%d of %d" % (nontrivial, FILTER_EXPRESSIONS))
    tally.finish([
        "seed %d, %d rows (ids 1..%d), SQLite %s" % (SEED, ROWS, ROWS, sqlite3.sqlite_version),
        "%d conditions as keep_rows, %d as drop_rows; %d keep some rows and drop others" % (
            FILTER_EXPRESSIONS, (FILTER_EXPRESSIONS + DROP_EVERY - 1) // DROP_EVERY, nontrivial),
        "%d expression values compared (booleans, numbers, texts)" % values_checked,
    ])


if __name__ == "__main__":
    main()
