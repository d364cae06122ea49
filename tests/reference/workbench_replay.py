"""A recipe built in a scripted workbench session replays with `tamis run`
to the same bytes as the workbench's own cleaned-CSV export.

The session (tools/workbench_session.cpp) opens the demo file, adds the fixes
of three findings and merges one similar-values group of `district`, then
exports the recipe, the cleaned CSV and the run report. The batch runner is
the reference here: design §1 promises that the recipe replays in production
exactly as the workbench showed it. Python's csv module (RFC 4180) parses
both outputs, and the run reports' totals must agree.
"""
import json
import os
import shutil
import subprocess
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

tally = reflib.Tally("workbench_replay")
binary = reflib.require_binary(sys.argv)
session = sys.argv[2]
repo = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
demo = os.path.join(repo, "assets/demo/tree_survey.csv")
work = tempfile.mkdtemp(prefix="tamis-workbench-")

completed = subprocess.run([session, demo, "district", work], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                           timeout=reflib.RUN_TIMEOUT_SECONDS)
log = completed.stdout.decode("utf-8", "replace")
tally.check(completed.returncode == 0, "the scripted session runs",
            log + completed.stderr.decode("utf-8", "replace"))
lines = log.splitlines()
tally.check(sum(1 for l in lines if l.startswith("fix: ")) == 3, "three findings' fixes were added", log)
tally.check(sum(1 for l in lines if l.startswith("merge: ")) == 1, "one similar-values group was merged", log)

recipe_path = os.path.join(work, "recipe.json")
exported = open(os.path.join(work, "cleaned.csv"), "rb").read() if completed.returncode == 0 else b""
recipe = json.load(open(recipe_path, encoding="utf-8")) if completed.returncode == 0 else {"steps": []}
tally.check(len(recipe["steps"]) == 4, "the recipe has the four steps", reflib.show_value(recipe["steps"]))
tally.check(any(s["op"] == "map_values" and s.get("column") == "district" for s in recipe["steps"]),
            "the merge became a map_values step on district")

out = os.path.join(work, "run.csv")
report = os.path.join(work, "run_report.json")
code, _, stderr = reflib.run_tamis(binary, ["run", recipe_path, demo, "-o", out, "--report", report])
tally.check(code == 0, "tamis run accepts the exported recipe", stderr)
replayed = open(out, "rb").read() if code == 0 else b""
tally.check(replayed == exported and len(exported) > 0, "tamis run writes the workbench's export byte for byte",
            "workbench %s\ntamis run %s" % (reflib.show_bytes(exported[:300]), reflib.show_bytes(replayed[:300])))

rows_exported = reflib.parse_tamis_output(exported) if exported else []
source_rows = [r for r, _ in reflib.python_csv_records_with_lines(open(demo, encoding="utf-8", newline="").read())]
tally.check(len(rows_exported) > 1 and rows_exported[0] == source_rows[0],
            "the export keeps the header (Python csv)", reflib.show_value(rows_exported[:1]))
if code == 0 and completed.returncode == 0:
    ours = json.load(open(os.path.join(work, "report.json"), encoding="utf-8"))["totals"]
    theirs = json.load(open(report, encoding="utf-8"))["totals"]
    tally.check(ours == theirs, "the run reports' totals agree", "%s vs %s" % (ours, theirs))
    tally.check(ours["rows_written"] == len(rows_exported) - 1, "rows written = data records in the export")

if not tally.failed:
    shutil.rmtree(work)
tally.finish(["work folder: %s" % work])
