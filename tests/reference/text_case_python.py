"""change_case (upper, lower) and map_values (ignore_case) through
`tamis run`, against Python's str methods.

Sources:
- Python's str.upper() and str.lower() (Debian /usr/bin/python3) implement
  the Unicode full case mappings: UnicodeData.txt plus the unconditional
  mappings of SpecialCasing.txt (ß -> SS, ŉ -> ʼN, ﬁ -> FI, İ -> i̇) and
  its Final_Sigma condition (Σ lowers to ς at the end of a word) -- the
  locale-independent mapping that change_case documents.
- Python's str.casefold() implements full case folding (CaseFolding.txt,
  statuses C and F), which map_values uses with ignore_case: true.
Python's Unicode version (unicodedata.unidata_version, 14.0 in Debian 12) is
older than ICU's (15.0), so samples use only code points assigned in
Python's version.

Samples (seed 7319): every code point that Python's upper() or lower()
changes, as a value of its own, and 3,000 random strings mixing those with
ASCII letters, digits, spaces, combining marks and Greek words that exercise
Final_Sigma.
"""
import csv
import io
import json
import os
import random
import sys
import tempfile
import unicodedata

sys.dont_write_bytecode = True
import reflib  # noqa: E402

SEED = 7319
RANDOM_STRINGS = 3000


def cased_code_points():
    points = []
    for cp in range(0x110000):
        if 0xD800 <= cp <= 0xDFFF:
            continue
        ch = chr(cp)
        if unicodedata.category(ch) == "Cn":
            continue
        if ch.upper() != ch or ch.lower() != ch:
            points.append(ch)
    return points


def random_strings(rng, cased):
    extras = list("abcXYZ019 -'.") + ["\u0301", "\u0307", "\u0345"]
    greek = ["ΟΔΟΣ", "Σ", "ΑΣ ΣΑ", "ΌΣΟΣ.", "ΣΑΣ'Σ", "Α\u0301Σ"]
    out = []
    for _ in range(RANDOM_STRINGS):
        parts = []
        for _ in range(rng.randint(1, 8)):
            pick = rng.random()
            if pick < 0.6:
                parts.append(rng.choice(cased))
            elif pick < 0.85:
                parts.append(rng.choice(extras))
            else:
                parts.append(rng.choice(greek))
        value = "".join(parts)
        # Keep values non-empty after the CSV round trip: the default null
        # marker is the empty string.
        out.append(value if value.strip() else value + "x")
    return out


def write_csv(path, values):
    with open(path, "w", encoding="utf-8", newline="") as f:
        writer = csv.writer(f, lineterminator="\n")
        writer.writerow(["v"])
        for value in values:
            writer.writerow([value])


def write_recipe(path, steps):
    recipe = {
        "tamis_recipe": 1,
        "input": {"header": True, "columns": [{"name": "v", "type": "text"}]},
        "steps": steps,
    }
    with open(path, "w", encoding="utf-8") as f:
        json.dump(recipe, f, ensure_ascii=False)


def run_step(binary, work, name, steps, values):
    recipe = os.path.join(work, name + ".recipe.json")
    source = os.path.join(work, name + ".csv")
    output = os.path.join(work, name + ".out.csv")
    write_recipe(recipe, steps)
    write_csv(source, values)
    code, _, stderr = reflib.run_tamis(binary, ["run", recipe, source, "-o", output])
    if code != 0:
        return None, "exit %d: %s" % (code, stderr.strip())
    with open(output, "rb") as f:
        records = reflib.parse_tamis_output(f.read())
    return [r[0] for r in records[1:]], ""


def main():
    binary = reflib.require_binary(sys.argv)
    tally = reflib.Tally("text_case_python")
    rng = random.Random(SEED)
    cased = cased_code_points()
    values = cased + random_strings(rng, cased)

    with tempfile.TemporaryDirectory() as work:
        for to, python_map in (("upper", str.upper), ("lower", str.lower)):
            got, problem = run_step(binary, work, to, [{"op": "change_case", "columns": ["v"], "to": to}], values)
            if not tally.check(got is not None and len(got) == len(values), "change_case %s ran" % to,
                               problem or "row count %d, want %d" % (len(got or []), len(values))):
                continue
            for value, result in zip(values, got):
                expected = python_map(value)
                tally.check(result == expected, "change_case %s %s" % (to, reflib.show_value(value)),
                            "tamis  %s\npython %s" % (reflib.show_value(result), reflib.show_value(expected)))

        # map_values, ignore_case: keys are random sample strings; values are
        # case variants of keys and unrelated strings. The target names the
        # folded key, so keys that fold alike agree on their target.
        keys = rng.sample(values, 400)
        targets = {}
        mapping = {}
        for key in keys:
            target = "<%s>" % key.casefold()
            mapping[key] = target
            targets[key.casefold()] = target
        probes = []
        for key in keys:
            probes += [key.upper(), key.lower(), key.swapcase(), key.casefold()]
        probes += rng.sample(values, 400)
        step = {"op": "map_values", "column": "v", "map": mapping, "ignore_case": True}
        got, problem = run_step(binary, work, "casefold", [step], probes)
        if tally.check(got is not None and len(got) == len(probes), "map_values ran",
                       problem or "row count %d, want %d" % (len(got or []), len(probes))):
            matched = 0
            for value, result in zip(probes, got):
                expected = targets.get(value.casefold(), value)
                matched += expected != value
                tally.check(result == expected, "map_values ignore_case %s" % reflib.show_value(value),
                            "tamis  %s\npython %s" % (reflib.show_value(result), reflib.show_value(expected)))
            # The probes must exercise both outcomes, or the check proves little.
            tally.check(matched >= 4 * len(keys) * 0.9, "map_values probes mostly match a key",
                        "%d of %d matched" % (matched, len(probes)))

    tally.finish([
        "%d cased code points (Python %s, Unicode %s), %d random strings" %
        (len(cased), sys.version.split()[0], unicodedata.unidata_version, RANDOM_STRINGS),
    ])


if __name__ == "__main__":
    main()
