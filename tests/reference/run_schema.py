"""assets/recipe.schema.json against the JSON Schema specification and the
recipes in the repository.

Sources:
- JSON Schema draft 2020-12 (json-schema.org), applied by Debian's
  python3-jsonschema (Draft202012Validator), which also checks the schema
  itself against the draft's meta-schema.
- The recipe loader: every recipe the schema accepts must load with
  `tamis check` (exit 0), and the negative controls the schema rejects must
  be rejected by the loader too (exit 2), so schema and loader agree.
"""
import copy
import json
import shutil
import os
import sys
import tempfile

sys.dont_write_bytecode = True
import reflib  # noqa: E402

try:
    import jsonschema
except ImportError:
    print("FAIL: /usr/bin/python3 cannot import jsonschema (Debian package python3-jsonschema)")
    sys.exit(1)

tally = reflib.Tally("run_schema")
binary = reflib.require_binary(sys.argv)
repo = os.path.dirname(os.path.dirname(os.path.dirname(os.path.abspath(__file__))))
work = tempfile.mkdtemp(prefix="tamis-schema-")
schema = json.load(open(os.path.join(repo, "assets/recipe.schema.json"), encoding="utf-8"))

try:
    jsonschema.Draft202012Validator.check_schema(schema)
    tally.check(True, "the schema is valid under the draft 2020-12 meta-schema")
except jsonschema.SchemaError as error:
    tally.check(False, "the schema is valid under the draft 2020-12 meta-schema", str(error))
tally.check(schema.get("$schema") == "https://json-schema.org/draft/2020-12/schema", "the schema declares draft 2020-12")
validator = jsonschema.Draft202012Validator(schema)


def recipes_in_repo():
    found = []
    for top in ("assets", "tests"):
        for folder, dirs, files in os.walk(os.path.join(repo, top)):
            dirs[:] = [d for d in dirs if d != "node_modules"]
            found += [os.path.join(folder, f) for f in files if f.endswith(".recipe.json")]
    return sorted(found)


def loads(doc, name):
    p = os.path.join(work, name + ".recipe.json")
    with open(p, "w", encoding="utf-8") as f:
        json.dump(doc, f, ensure_ascii=False)
    code, _, stderr = reflib.run_tamis(binary, ["check", p])
    return code, stderr


recipes = recipes_in_repo()
tally.check(any(p.endswith("assets/demo/tree_survey.recipe.json") for p in recipes), "the demo recipe is found")
for p in recipes:
    doc = json.load(open(p, encoding="utf-8"))
    errors = sorted(validator.iter_errors(doc), key=lambda e: list(e.path))
    rel = os.path.relpath(p, repo)
    tally.check(not errors, "%s validates against the schema" % rel,
                "\n".join("%s: %s" % (list(e.path), e.message) for e in errors[:5]))
    code, stderr = loads(doc, "copy")
    tally.check(code == 0, "%s loads (tamis check exits 0)" % rel, stderr)

# Negative controls: each must fail the schema AND the loader.
demo = json.load(open(os.path.join(repo, "assets/demo/tree_survey.recipe.json"), encoding="utf-8"))
mutations = {
    "unknown top-level key": lambda d: d.update(extra=1),
    "wrong version": lambda d: d.update(tamis_recipe=2),
    "steps missing": lambda d: d.pop("steps"),
    "unknown op": lambda d: d["steps"][0].update(op="polish"),
    "unknown step key": lambda d: d["steps"][0].update(sides="both"),
    "bad enum value": lambda d: d["steps"][0].update(side="middle"),
    "enabled not boolean": lambda d: d["steps"][0].update(enabled="no"),
    "note not text": lambda d: d["steps"][0].update(note=3),
    "unknown input key": lambda d: d["input"].update(delim=","),
    "two-character delimiter": lambda d: d["input"].update(delimiter=";;"),
    "unknown_columns not fail/ignore": lambda d: d["input"].update(unknown_columns="warn"),
    "bad output format": lambda d: d["output"].update(format="xlsx"),
    "bad column type": lambda d: d["input"]["columns"][0].update(type="number"),
}
for label, mutate in mutations.items():
    doc = copy.deepcopy(demo)
    mutate(doc)
    tally.check(not validator.is_valid(doc), "schema rejects: %s" % label)
    code, stderr = loads(doc, "mutated")
    tally.check(code == 2, "loader rejects: %s (exit 2)" % label, "exit %d: %s" % (code, stderr))

if not tally.failed:
    shutil.rmtree(work)
tally.finish(["%d recipes checked" % len(recipes)])
