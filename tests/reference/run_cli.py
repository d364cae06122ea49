"""`tamis run`, `check` and `explain` against the CLI contract (design §5)
and independent computations in Python.

Sources:
- The CLI contract (design §5): exit codes 0 ok, 1 a require step failed,
  2 usage, 3 the input is malformed or does not match the recipe, 4 I/O;
  output written atomically (temporary file, then rename); the input never
  modified; rejected rows capped by --max-rejects N|P% / input.max_rejects
  (default 0); row accounting rows read = written + removed + rejected.
- RFC 4180 §2 rule 4 (every record has the same number of fields): what
  makes a record malformed here. Python's csv module reads the files and
  gives the physical line where each record starts.
- The expected cleaned rows are computed in Python: str.strip with the
  Unicode White_Space set (Python's str.isspace agrees with Unicode
  White_Space on every character these files use; from memory), SQL NULL
  as None.
"""
import hashlib
import json
import shutil
import os
import random
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

tally = reflib.Tally("run_cli")
binary = reflib.require_binary(sys.argv)
work = tempfile.mkdtemp(prefix="tamis-run-cli-")

HEADER = ["id", "site", "count", "note"]


def path(name):
    return os.path.join(work, name)


def write(name, text, mode="w"):
    with open(path(name), mode, newline="" if "b" not in mode else None, **({} if "b" in mode else {"encoding": "utf-8"})) as f:
        f.write(text)
    return path(name)


def write_recipe(name, steps, **sections):
    doc = {"tamis_recipe": 1, "title": name, "steps": steps}
    doc.update(sections)
    return write(name + ".recipe.json", json.dumps(doc, ensure_ascii=False))


def fingerprint(p):
    with open(p, "rb") as f:
        data = f.read()
    st = os.stat(p)
    return hashlib.sha256(data).hexdigest(), st.st_mtime_ns, st.st_size


def run(args, stdin=None):
    return reflib.run_tamis(binary, args, stdin)


def leftovers(directory):
    return [n for n in os.listdir(directory) if n.endswith(".tamis-partial")]


# ---------------------------------------------------------------- data
rng = random.Random(31337)
sites = ["Mill Lane", " Mill Lane", "Heron Walk  ", "\tKiln St", "Ropewalk", "NULL", "", "Wharf St\u00a0"]
rows = []
for i in range(1, 401):
    site = rng.choice(sites)
    count = rng.choice(["12", " 7", "", "NULL", "30 ", "4"])
    note = rng.choice(["ok", "two\nlines", "say \"hi\"", "a,b", ""])
    rows.append([str(i), site, count, note])
clean_text = reflib.serialize_minimal([HEADER] + rows)
input_csv = write("survey.csv", clean_text)
records = reflib.python_csv_records_with_lines(clean_text)  # header first


def expected_clean(records_with_lines):
    """trim every column, '' and 'NULL' -> NULL, drop rows whose count is NULL."""
    out, removed = [], []
    for record, line in records_with_lines[1:]:
        cells = [c.strip() for c in record]
        cells = [None if c in ("", "NULL") else c for c in cells]
        if cells[2] is None:
            removed.append(line)
            continue
        out.append(["" if c is None else c for c in cells])
    return out, removed


basic_steps = [
    {"op": "trim", "columns": "*", "note": "stray spaces"},
    {"op": "to_null", "columns": "*", "values": ["NULL"], "blank": True},
    {"op": "drop_rows", "where": "count IS NULL", "note": "no measure"},
]
basic = write_recipe("basic", basic_steps, input={"format": "csv", "header": True,
                                                   "columns": [{"name": h} for h in HEADER]})
want_rows, want_removed = expected_clean(records)

# ------------------------------------------------- run, report, accounting
out_csv, report_json = path("out.csv"), path("report.json")
code, stdout, stderr = run(["run", basic, input_csv, "-o", out_csv, "--report", report_json])
tally.check(code == 0, "basic run exits 0", stderr)
got = reflib.parse_tamis_output(open(out_csv, "rb").read())
tally.check(got == [HEADER] + want_rows, "basic run: output rows equal Python's trim / NULL / drop",
            "first rows: %s" % reflib.show_value(got[:4]))
report = json.load(open(report_json, encoding="utf-8"))
totals = report["totals"]
tally.check(totals["rows_read"] == len(rows) and totals["rows_written"] == len(want_rows)
            and totals["rows_removed"] == len(want_removed) and totals["rows_rejected"] == 0,
            "report totals equal Python's counts", reflib.show_value(totals))
tally.check(totals["rows_read"] == totals["rows_written"] + totals["rows_removed"] + totals["rows_rejected"]
            and totals["balanced"] is True, "row accounting balances (design §5)", reflib.show_value(totals))
drop = report["steps"][2]
tally.check(drop["op"] == "drop_rows" and drop["rows_removed"] == len(want_removed)
            and [r["line"] for r in drop["listed_rows"]] == want_removed[:100],
            "report lists the removed rows by the physical line Python's csv module gives",
            reflib.show_value(drop.get("listed_rows", [])[:5]))
tally.check(report["steps"][0]["note"] == "stray spaces" and report["steps"][0]["sentence"],
            "report carries each step's note and sentence", reflib.show_value(report["steps"][0]))
chain = all(report["steps"][j]["rows_in"] == report["steps"][j - 1]["rows_out"] for j in range(1, 3))
tally.check(chain and report["steps"][0]["rows_in"] == len(rows), "each step receives what the one before passed on")
tally.check(report["input"]["encoding"] == "utf-8" and report["input"]["delimiter"] == ",",
            "report names the encoding and delimiter used")
tally.check("rows read" in stderr and "1. trim" in stderr and "3. drop_rows" in stderr,
            "human summary on stderr: totals and one line per step", stderr)

code, stdout, stderr = run(["run", basic, input_csv])
tally.check(code == 0 and stdout == open(out_csv, "rb").read(), "without -o the output goes to standard output")

# --------------------------------------------- batch size never matters
for batch in (1, 2, 3, 17):
    code, stdout, stderr = run(["run", basic, input_csv, "--batch-rows", str(batch), "--report", path("r%d.json" % batch)])
    r = json.load(open(path("r%d.json" % batch), encoding="utf-8")) if code == 0 else {}
    same_steps = [s.get("cells_changed") for s in r.get("steps", [])] == [s["cells_changed"] for s in report["steps"]]
    tally.check(code == 0 and stdout == open(out_csv, "rb").read() and r.get("totals") == totals and same_steps,
                "--batch-rows %d gives the same output, totals and cell counts" % batch, stderr)

# ------------------------------------------------ standard input, spool
code, stdout, stderr = run(["run", basic, "-"], stdin=clean_text.encode("utf-8"))
tally.check(code == 0 and stdout == open(out_csv, "rb").read(), "reads standard input", stderr)
two_pass = write_recipe("two_pass", [{"op": "trim", "columns": "*"},
                                     {"op": "to_null", "columns": "*", "values": ["NULL"], "blank": True},
                                     {"op": "parse_number", "column": "count", "on_error": "null"}])
code_file, out_file, err_file = run(["run", two_pass, input_csv, "--report", path("two.json")])
passes = json.load(open(path("two.json"))).get("passes") if code_file == 0 else None
code_pipe, out_pipe, err_pipe = run(["run", two_pass, "-", "--batch-rows", "5"], stdin=clean_text.encode("utf-8"))
tally.check(code_file == 0 and passes == 2, "parse_number without scale makes the run read the input twice",
            err_file + " passes=%r" % passes)
tally.check(code_pipe == 0 and out_pipe == out_file, "a two-pass recipe on standard input (spooled) equals the file run",
            err_pipe)
tally.check(not [n for n in os.listdir(tempfile.gettempdir()) if n.startswith("tamis-stdin-")],
            "the spool file is removed after the run")

# ------------------------------------------------- the input is never touched
before = fingerprint(input_csv)
code, _, stderr = run(["run", basic, input_csv, "-o", input_csv])
tally.check(code == 2 and "never overwrites" in stderr, "-o naming the input is refused with exit 2", stderr)
os.link(input_csv, path("hardlink.csv"))
code, _, stderr = run(["run", basic, input_csv, "-o", path("hardlink.csv")])
tally.check(code == 2, "-o naming the input through a hard link is refused", stderr)
code, _, stderr = run(["run", basic, input_csv, "--report", input_csv])
tally.check(code == 2, "--report naming the input is refused", stderr)
tally.check(fingerprint(input_csv) == before, "the input's bytes and modification time are unchanged by every run")

# ------------------------------------------------------------- atomic output
existing = write("existing.csv", "keep me\n")
renamed_text = clean_text.replace("id,site,count,note", "id,place,count,note", 1)
renamed = write("renamed.csv", renamed_text)
code, _, stderr = run(["run", basic, renamed, "-o", existing])
tally.check(code == 3 and "'site'" in stderr and "'place'" in stderr,
            "a renamed column stops the run with exit 3, naming both names", stderr)
tally.check(open(existing, encoding="utf-8").read() == "keep me\n" and not leftovers(work),
            "a failing run leaves an existing output untouched and no partial file")
code, _, stderr = run(["run", basic, renamed, "-o", path("never.csv")])
tally.check(code == 3 and not os.path.exists(path("never.csv")), "a failing run creates no output file")
extra = write("extra.csv", reflib.serialize_minimal([HEADER + ["extra"]] + [r + ["x"] for r in rows]))
code, _, stderr = run(["run", basic, extra, "-o", path("extra_out.csv")])
tally.check(code == 3 and "'extra'" in stderr, "unknown_columns fail: an unexpected column stops the run", stderr)
ignoring = write_recipe("ignoring", basic_steps, input={"columns": [{"name": h} for h in HEADER],
                                                        "unknown_columns": "ignore"})
code, _, stderr = run(["run", ignoring, extra, "-o", path("extra_out.csv")])
got = reflib.parse_tamis_output(open(path("extra_out.csv"), "rb").read()) if code == 0 else None
tally.check(code == 0 and got == [HEADER] + want_rows, "unknown_columns ignore drops the extra column", stderr)

# ------------------------------------------------- malformed records, caps
bad_rows = [5, 77, 200, 333]  # data row numbers that get an extra field
for r in bad_rows:
    rows[r - 1] = rows[r - 1] + ["surplus"]
ragged_text = reflib.serialize_minimal([HEADER] + rows)
for r in bad_rows:
    rows[r - 1] = rows[r - 1][:-1]
ragged = write("ragged.csv", ragged_text)
ragged_records = reflib.python_csv_records_with_lines(ragged_text)
bad_lines = [line for record, line in ragged_records[1:] if len(record) != len(HEADER)]
good = [(record, line) for record, line in ragged_records if len(record) == len(HEADER)]
want_ragged, removed_ragged = expected_clean(good)
tally.check(len(bad_lines) == 4, "test setup: four malformed records")

code, _, stderr = run(["run", basic, ragged, "-o", path("capped.csv")])
tally.check(code == 3 and not os.path.exists(path("capped.csv")) and str(bad_lines[0]) in stderr,
            "default cap 0: a malformed record stops the run with exit 3, no output, first line named", stderr)
code, _, stderr = run(["run", basic, ragged, "-o", path("capped.csv"), "--max-rejects", "3", "--rejects",
                       path("rejects3.csv")])
tally.check(code == 3 and not os.path.exists(path("capped.csv")), "--max-rejects 3 with four rejects: exit 3, no output",
            stderr)
kept = reflib.parse_tamis_output(open(path("rejects3.csv"), "rb").read()) if os.path.exists(path("rejects3.csv")) else []
tally.check(len(kept) >= 2 and [int(r[0]) for r in kept[1:]] == bad_lines[:len(kept) - 1],
            "over the cap the rejects file keeps the rows found so far, in line order", reflib.show_value(kept))
code, _, stderr = run(["run", basic, ragged, "-o", path("capped.csv"), "--max-rejects", "4", "--rejects",
                       path("rejects.csv"), "--report", path("ragged.json")])
tally.check(code == 0, "--max-rejects 4 with four rejects: the run succeeds", stderr)
if code == 0:
    got = reflib.parse_tamis_output(open(path("capped.csv"), "rb").read())
    tally.check(got == [HEADER] + want_ragged, "malformed records are left out of the output, the rest cleaned")
    rej = reflib.parse_tamis_output(open(path("rejects.csv"), "rb").read())
    tally.check(rej[0] == ["line", "reason", "record"] and [int(r[0]) for r in rej[1:]] == bad_lines,
                "the rejects file lists each malformed record's physical line (Python csv line numbering)",
                reflib.show_value(rej))
    raw_records = [reflib.python_csv_records(r[2])[0] for r in rej[1:]]
    tally.check(raw_records == [rec for rec, line in ragged_records if line in bad_lines],
                "the rejects file keeps each record as the file had it", reflib.show_value(raw_records[:2]))
    t = json.load(open(path("ragged.json"), encoding="utf-8"))["totals"]
    tally.check(t["rows_read"] == len(rows) and t["rows_rejected"] == 4
                and t["rows_read"] == t["rows_written"] + t["rows_removed"] + t["rows_rejected"],
                "malformed records count as read and rejected; the totals balance", reflib.show_value(t))
# Rows a step rejects join the malformed records in the rejects file, in line order.
rejecting = write_recipe("rejecting", [{"op": "parse_number", "column": "count", "scale": 0, "on_error": "reject"}])
code, _, stderr = run(["run", rejecting, ragged, "-o", path("rejecting.csv"), "--max-rejects", "100%",
                       "--rejects", path("rejecting_rejects.csv"), "--report", path("rejecting.json"), "--batch-rows", "7"])
tally.check(code == 0, "a step with on_error reject runs under --max-rejects 100%", stderr)
if code == 0:
    not_numbers = [line for record, line in good[1:] if not record[2].isdigit()]
    rej = reflib.parse_tamis_output(open(path("rejecting_rejects.csv"), "rb").read())[1:]
    tally.check([int(r[0]) for r in rej] == sorted(bad_lines + not_numbers),
                "rejects file: malformed records and rows the step rejected, in line order",
                reflib.show_value([r[0] for r in rej][:12]))
    by_line = {int(r[0]): r for r in rej}
    tally.check(all(by_line[l][1].startswith("step 1 (parse_number)") for l in not_numbers)
                and all(by_line[l][1].startswith("malformed record") for l in bad_lines),
                "each reason names where the row was rejected", reflib.show_value(rej[:3]))
    source = {line: record for record, line in ragged_records}
    tally.check(all(reflib.python_csv_records(by_line[l][2])[0] == source[l] for l in not_numbers),
                "a row a step rejected is kept as the file had it")
    t = json.load(open(path("rejecting.json"), encoding="utf-8"))["totals"]
    tally.check(t["rows_rejected"] == len(bad_lines) + len(not_numbers) and t["rows_written"] == len(good) - 1 - len(not_numbers)
                and t["balanced"], "totals count both kinds of rejects and balance", reflib.show_value(t))

# 4 of 400 rows = 1%.
for cap, want in (("1%", 0), ("0.99%", 3), ("2%", 0), ("0.5%", 3)):
    code, _, stderr = run(["run", basic, ragged, "-o", path("pct.csv"), "--max-rejects", cap])
    tally.check(code == want, "--max-rejects %s with 4 rejects in 400 rows exits %d" % (cap, want), stderr)
in_recipe = write_recipe("capped", basic_steps, input={"max_rejects": 4})
code, _, stderr = run(["run", in_recipe, ragged, "-o", path("pct.csv")])
tally.check(code == 0, "input.max_rejects in the recipe sets the cap", stderr)
code, _, stderr = run(["run", in_recipe, ragged, "-o", path("pct.csv"), "--max-rejects", "2"])
tally.check(code == 3, "--max-rejects overrides input.max_rejects", stderr)

# ------------------------------------------------ declared input types
typed = write_recipe("typed", [{"op": "trim", "columns": "*"}],
                     input={"columns": [{"name": "id", "type": "integer"}, {"name": "site"},
                                        {"name": "count"}, {"name": "note"}], "max_rejects": 10})
typed_text = clean_text.replace("\n17,", "\nseventeen,", 1)
typed_line = [line for record, line in reflib.python_csv_records_with_lines(typed_text) if record[0] == "seventeen"]
code, _, stderr = run(["run", typed, write("typed.csv", typed_text), "-o", path("typed_out.csv"),
                       "--rejects", path("typed_rejects.csv")])
rej = reflib.parse_tamis_output(open(path("typed_rejects.csv"), "rb").read()) if code == 0 else []
tally.check(code == 0 and len(rej) == 2 and int(rej[1][0]) == typed_line[0] and "integer" in rej[1][1],
            "a value that does not fit its input.columns type is rejected with its line", stderr + reflib.show_value(rej))

# ----------------------------------------------------------- exit codes
cases = [
    ("bad JSON", write("bad.recipe.json", "{\"tamis_recipe\": 1,"), input_csv, [], 2),
    ("unknown op", write_recipe("unknown_op", [{"op": "polish"}]), input_csv, [], 2),
    ("unknown step key", write_recipe("unknown_key", [{"op": "trim", "columns": "*", "sides": "both"}]), input_csv, [], 2),
    ("unknown column in a step", write_recipe("unknown_col", [{"op": "trim", "columns": ["nope"]}]), input_csv, [], 2),
    ("bad --max-rejects", basic, input_csv, ["--max-rejects", "lots"], 2),
    ("unknown option", basic, input_csv, ["--colour"], 2),
    ("--metadata to stdout", basic, input_csv, ["--metadata", path("m.json")], 2),
    ("missing input", basic, path("absent.csv"), ["-o", path("x.csv")], 4),
    ("missing recipe", path("absent.recipe.json"), input_csv, ["-o", path("x.csv")], 4),
    ("output folder missing", basic, input_csv, ["-o", path("no/such/dir/out.csv")], 4),
]
for label, recipe, data, extra_args, want in cases:
    code, _, stderr = run(["run", recipe, data] + extra_args)
    tally.check(code == want, "exit %d: %s" % (want, label), "got %d: %s" % (code, stderr))
    tally.check("Traceback" not in stderr and (want == 0 or stderr.strip()), "%s: a message on stderr" % label)
require_stop = write_recipe("require", [{"op": "to_null", "columns": "*", "values": ["NULL"], "blank": True},
                                        {"op": "require", "rule": "not_null", "columns": ["site"], "on_fail": "stop"}])
code, _, stderr = run(["run", require_stop, input_csv, "-o", path("req.csv")])
tally.check(code == 1 and "step 2" in stderr and not os.path.exists(path("req.csv")),
            "a require step with on_fail stop exits 1, names the step and writes no output", stderr)

# ----------------------------------------------------------- check
code, stdout, stderr = run(["check", basic])
tally.check(code == 0, "check RECIPE: valid recipe exits 0", stderr)
code, stdout, stderr = run(["check", basic, input_csv])
tally.check(code == 0 and b"400 rows" in stdout, "check RECIPE IN: a fitting file exits 0 and counts its rows",
            stderr + stdout.decode())
code, _, stderr = run(["check", basic, renamed])
tally.check(code == 3, "check: a renamed column exits 3", stderr)
code, _, stderr = run(["check", basic, ragged])
tally.check(code == 3 and str(bad_lines[0]) in stderr, "check: malformed records over the cap exit 3", stderr)
code, _, stderr = run(["check", write_recipe("bad_param", [{"op": "trim", "columns": "*", "side": "middle"}],
                                             input={"columns": [{"name": h} for h in HEADER]})])
tally.check(code == 2 and "step 1" in stderr and "side" in stderr,
            "check: a bad parameter exits 2 naming the step and the key", stderr)
listed = sorted(os.listdir(work))
run(["check", basic, input_csv])
tally.check(sorted(os.listdir(work)) == listed, "check writes nothing")

# ----------------------------------------------------------- explain
explained = write_recipe("explained", [{"op": "trim", "columns": ["site"], "note": "stray spaces"},
                                       {"op": "to_null", "columns": "*", "blank": True, "enabled": False},
                                       {"op": "drop_rows", "where": "count IS NULL"}],
                         input={"columns": [{"name": h} for h in HEADER]})
code, stdout, stderr = run(["explain", explained])
text = stdout.decode("utf-8")
out_lines = [l for l in text.splitlines() if l[:1].isdigit()]
tally.check(code == 0 and [l.split(".")[0] for l in out_lines] == ["1", "2", "3"], "explain numbers every step", text)
tally.check(len(out_lines) == 3 and "site" in out_lines[0] and "skipped" in out_lines[1] and "note: stray spaces" in text,
            "explain: sentences naming the columns, the note, the disabled step as skipped", text)
code, stdout2, _ = run(["explain", explained, input_csv])
tally.check(code == 0 and stdout2 == stdout, "explain with IN gives the same sentences (columns from the header)")
no_columns = write_recipe("no_columns", basic_steps)
code, stdout, stderr = run(["explain", no_columns])
tally.check(code == 0 and b"columns are unknown" in stdout and stdout.count(b"\n3. ") == 1,
            "explain without columns shows the steps as written", stdout.decode() + stderr)

if not tally.failed:
    shutil.rmtree(work)
tally.finish(["work folder: %s" % work])
