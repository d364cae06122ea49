"""Planted variants: invented category names and the variant spellings a
real cleaning job meets (upper or lower case, a trailing full stop, a doubled
space, one typo (substitution, insertion, deletion), two swapped neighbouring
letters, an accented vowel). The generator knows which name each variant
came from, so a grouping's precision and recall can be measured. Our own
fiction: the names are invented words plus a street or park word. Shared by
the similar-values test (tests/reference/similar_planted.py) and benchmark
(tests/bench/similar_bench.py).
"""
import csv
import random

SEED = 4242
SUFFIXES = ["Lane", "Street", "Road", "Park", "Green", "Close", "Way", "Hill", "Row", "Court", "Gardens",
            "Walk", "Rise", "Square", "Terrace", "Meadow", "Yard", "Bank", "Quay", "Gate"]
ACCENTED = {"a": "á", "e": "é", "i": "í", "o": "ö", "u": "ü"}


def invented_word(rng):
    onsets = ["b", "br", "c", "d", "dr", "f", "g", "gl", "h", "k", "l", "m", "n", "p", "qu", "r", "s", "st", "t",
              "th", "v", "w", "z"]
    vowels = ["a", "e", "i", "o", "u", "ai", "ea", "ou"]
    codas = ["", "n", "r", "l", "th", "ck", "m", "s", "nd", "ll"]
    word = "".join(rng.choice(onsets) + rng.choice(vowels) + rng.choice(codas) for _ in range(rng.randint(2, 3)))
    return word.capitalize()


def typo(rng, s):
    letters = "abcdefghijklmnopqrstuvwxyz"
    i = rng.randrange(1, len(s))
    kind = rng.randrange(4)
    if kind == 0:
        return s[:i] + rng.choice(letters) + s[i + 1:]
    if kind == 1:
        return s[:i] + rng.choice(letters) + s[i:]
    if kind == 2:
        return s[:i] + s[i + 1:]
    if i < len(s) - 1:
        return s[:i] + s[i + 1] + s[i] + s[i + 2:]
    return s + "e"


def variant(rng, base):
    kind = rng.randrange(7)
    if kind == 0:
        return base.upper()
    if kind == 1:
        return base.lower()
    if kind == 2:
        return base + "."
    if kind == 3:
        return base.replace(" ", "  ", 1)
    if kind == 4:
        vowels = [k for k, ch in enumerate(base) if ch in ACCENTED]
        if vowels:
            k = rng.choice(vowels)
            return base[:k] + ACCENTED[base[k]] + base[k + 1:]
    return typo(rng, base)


def generate(distinct, seed=SEED):
    """distinct // 4 names and variants of them, distinct values in all."""
    rng = random.Random(seed)
    bases, seen = [], set()
    while len(bases) < distinct // 4:
        name = invented_word(rng) + " " + rng.choice(SUFFIXES)
        if name not in seen:
            seen.add(name)
            bases.append(name)
    origin = {b: b for b in bases}
    values = list(bases)
    attempts = 0
    while len(values) < distinct and attempts < distinct * 20:
        attempts += 1
        base = bases[rng.randrange(len(bases))]
        v = variant(rng, base)
        if v not in origin:
            origin[v] = base
            values.append(v)
    counts = {v: (rng.randint(3, 12) if origin[v] == v else rng.randint(1, 2)) for v in values}
    return values, origin, counts


def write_data(path, values, counts):
    rows = [v for v in values for _ in range(counts[v])]
    random.Random(SEED + 1).shuffle(rows)
    with open(path, "w", encoding="utf-8", newline="") as f:
        w = csv.writer(f)
        w.writerow(["place"])
        for v in rows:
            w.writerow([v])
    with open(path + ".values", "w", encoding="utf-8") as f:
        for v in rows:
            f.write(v + "\n")
    return len(rows)


def quality(report, origin):
    """Precision: suggested variant -> canonical pairs from the same name, over all
    suggested pairs. Recall: variants grouped with their own name, over all variants."""
    suggested = correct = 0
    for g in report["groups"]:
        for m in g["members"][1:]:
            suggested += 1
            correct += origin.get(m["value"]) == origin.get(g["canonical"])
    variants = sum(1 for v, b in origin.items() if v != b)
    precision = correct / suggested if suggested else 1.0
    return precision, correct / variants if variants else 1.0


