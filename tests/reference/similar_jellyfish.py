"""The string metrics behind `tamis similar` against Debian's reference libraries.

Usage: similar_jellyfish.py SIMILAR_METRICS_BINARY
(the test driver tests/reference/tools/similar_metrics.cpp, which prints the
engine's metrics for pairs of strings read on standard input).

Sources (Debian packages, run by /usr/bin/python3):
- python3-levenshtein 0.12: Levenshtein.distance (Levenshtein distance).
- python3-jellyfish 0.8: jellyfish.jaro_similarity and
  jellyfish.jaro_winkler_similarity, which follow Winkler's reference code
  strcmp95 as tamis does: half the out-of-order matches rounded down, prefix
  scale 0.1, prefix at most 4, prefix bonus only when Jaro > 0.7;
  jellyfish.soundex (American Soundex); and
  jellyfish.damerau_levenshtein_distance, which is the UNRESTRICTED
  Damerau-Levenshtein distance (CA/ABC = 2), not optimal string alignment.
Conventions where the libraries differ: for two empty strings tamis gives
Jaro(-Winkler) 1 (identical), jellyfish 0, so that pair is left out of the
jellyfish comparison. python3-levenshtein 0.12's jaro/jaro_winkler are not
used: they apply the prefix bonus at every Jaro value and match characters
in a different window (for example jaro("中个这", "个这") = 0.889, where
the window of Jaro 1989, floor(3 / 2) - 1 = 0, allows no match), so they
disagree with jellyfish and with the definition on thousands of the pairs.
There is no reference library for the optimal-string-alignment distance here:
it is checked against the textbook dynamic programme written out below
(Wikipedia "Damerau-Levenshtein distance", OSA pseudo-code, from memory),
against a brute-force search over edit scripts on short strings, and against
the order unrestricted <= OSA <= Levenshtein that holds for every pair.
The trigram Dice coefficient is checked against its definition written out
below (multisets of trigrams padded with two markers on each side).

Samples (seed 40417): 10,000 pairs, NFC-normalized code points: random
strings over ASCII letters, Latin letters with accents, Greek, Cyrillic, CJK
and astral-plane symbols, most paired with a copy that has up to three random
edits (substitution, insertion, deletion, adjacent transposition) so the
distances are small as in real variant spellings; 2,000 ASCII surname-like
words for Soundex; 1,500 short pairs for the brute-force OSA check.
"""
import collections
import random
import subprocess
import sys
import unicodedata

sys.dont_write_bytecode = True
import reflib  # noqa: E402

import warnings  # noqa: E402

# python3-jellyfish 0.8 parses its arguments with a format Python 3.11 deprecates.
warnings.filterwarnings("ignore", category=DeprecationWarning)
import jellyfish  # noqa: E402
import Levenshtein  # noqa: E402

SEED = 40417
PAIRS = 10000
TOLERANCE = 1e-9

ALPHABETS = [
    "abcdefghijklmnopqrstuvwxyz",
    "ABCDEFGHIJ abcdefghij",
    "aeiouáéíóúàèìòùâêîôûäëïöüçñ",
    "αβγδεζηθικλμνξοπρστυφχψωάέήίόύώ",
    "абвгдеёжзийклмнопрстуфхцчшщъыьэюя",
    "的一是不了人我在有他这为之大来以个中上们",
    "\U0001F600\U0001F601\U0001F602\U0001F680\U00010348\U0001D11E",
]


def random_string(rng, alphabet, low=0, high=14):
    return "".join(rng.choice(alphabet) for _ in range(rng.randint(low, high)))


def edited(rng, s, alphabet, edits):
    chars = list(s)
    for _ in range(edits):
        kind = rng.randrange(4)
        if kind == 0 and chars:
            chars[rng.randrange(len(chars))] = rng.choice(alphabet)
        elif kind == 1:
            chars.insert(rng.randint(0, len(chars)), rng.choice(alphabet))
        elif kind == 2 and chars:
            del chars[rng.randrange(len(chars))]
        elif kind == 3 and len(chars) > 1:
            i = rng.randrange(len(chars) - 1)
            chars[i], chars[i + 1] = chars[i + 1], chars[i]
    return "".join(chars)


def nfc(s):
    return unicodedata.normalize("NFC", s)


def osa_reference(a, b):
    """Optimal string alignment, the textbook dynamic programme."""
    d = [[0] * (len(b) + 1) for _ in range(len(a) + 1)]
    for i in range(len(a) + 1):
        d[i][0] = i
    for j in range(len(b) + 1):
        d[0][j] = j
    for i in range(1, len(a) + 1):
        for j in range(1, len(b) + 1):
            cost = 0 if a[i - 1] == b[j - 1] else 1
            d[i][j] = min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost)
            if i > 1 and j > 1 and a[i - 1] == b[j - 2] and a[i - 2] == b[j - 1]:
                d[i][j] = min(d[i][j], d[i - 2][j - 2] + 1)
    return d[len(a)][len(b)]


def osa_brute_force(a, b):
    """OSA by search: a script reads a left to right, each step consuming
    a[i] (delete), b[j] (insert), both (match or substitute), or a transposed
    adjacent pair a[i]a[i+1] = b[j+1]b[j]; no later step touches characters a
    transposition produced, which is exactly the OSA restriction."""
    best = {}

    def go(i, j):
        if (i, j) in best:
            return best[(i, j)]
        if i == len(a):
            return len(b) - j
        if j == len(b):
            return len(a) - i
        options = [go(i + 1, j) + 1, go(i, j + 1) + 1, go(i + 1, j + 1) + (a[i] != b[j])]
        if i + 1 < len(a) and j + 1 < len(b) and a[i] == b[j + 1] and a[i + 1] == b[j]:
            options.append(go(i + 2, j + 2) + 1)
        best[(i, j)] = min(options)
        return best[(i, j)]

    return go(0, 0)


def trigram_dice(a, b):
    def grams(s):
        padded = ["\0pad"] * 2 + list(s) + ["\0pad"] * 2
        return collections.Counter(tuple(padded[k:k + 3]) for k in range(len(padded) - 2))

    ga, gb = grams(a), grams(b)
    total = sum(ga.values()) + sum(gb.values())
    return 1.0 if total == 0 else 2.0 * sum((ga & gb).values()) / total


def surname(rng):
    consonants, vowels = "bcdfghjklmnpqrstvwxz", "aeiouy"
    word = []
    for k in range(rng.randint(1, 10)):
        pool = consonants if rng.random() < 0.6 else vowels
        if rng.random() < 0.15:
            pool = "hw"
        word.append(rng.choice(pool))
    name = "".join(word)
    return name.capitalize() if rng.random() < 0.7 else name.upper()


def run_driver(binary, pairs):
    text = "".join("%s\t%s\n" % p for p in pairs).encode("utf-8")
    done = subprocess.run([binary], input=text, stdout=subprocess.PIPE, stderr=subprocess.PIPE, timeout=300)
    if done.returncode != 0:
        print("similar_metrics failed: %s" % done.stderr.decode("utf-8", "replace"))
        sys.exit(1)
    rows = [line.split("\t") for line in done.stdout.decode("utf-8").split("\n") if line]
    if len(rows) != len(pairs):
        print("similar_metrics printed %d rows for %d pairs" % (len(rows), len(pairs)))
        sys.exit(1)
    return [{"lev": int(r[0]), "osa": int(r[1]), "jaro": float(r[2]), "jw": float(r[3]), "qgram": float(r[4]),
             "soundex_a": r[5], "soundex_b": r[6]} for r in rows]


def main():
    binary = reflib.require_binary(sys.argv)
    rng = random.Random(SEED)
    tally = reflib.Tally("similar_jellyfish")

    pairs = []
    for _ in range(PAIRS):
        alphabet = rng.choice(ALPHABETS)
        a = random_string(rng, alphabet)
        b = edited(rng, a, alphabet, rng.randint(0, 3)) if rng.random() < 0.8 else random_string(rng, alphabet)
        pairs.append((nfc(a), nfc(b)))
    pairs += [("kitten", "sitting"), ("CA", "ABC"), ("MARTHA", "MARHTA"), ("DWAYNE", "DUANE"),
              ("DIXON", "DICKSONX"), ("", ""), ("", "abc")]
    got = run_driver(binary, pairs)
    non_ascii = sum(1 for a, b in pairs if not (a + b).isascii())
    boosted = 0
    for (a, b), m in zip(pairs, got):
        label = "%s / %s" % (reflib.show_value(a, 60), reflib.show_value(b, 60))
        lev = Levenshtein.distance(a, b)
        tally.check(m["lev"] == lev, "levenshtein " + label, "tamis %d, python3-levenshtein %d" % (m["lev"], lev))
        osa = osa_reference(a, b)
        tally.check(m["osa"] == osa, "osa " + label, "tamis %d, textbook programme %d" % (m["osa"], osa))
        unrestricted = jellyfish.damerau_levenshtein_distance(a, b)
        tally.check(unrestricted <= m["osa"] <= m["lev"], "unrestricted <= osa <= levenshtein " + label,
                    "jellyfish %d, osa %d, levenshtein %d" % (unrestricted, m["osa"], m["lev"]))
        if a or b:
            jf_jaro = jellyfish.jaro_similarity(a, b)
            tally.check(abs(m["jaro"] - jf_jaro) <= TOLERANCE, "jaro " + label,
                        "tamis %r, jellyfish %r" % (m["jaro"], jf_jaro))
            jf_jw = jellyfish.jaro_winkler_similarity(a, b)
            tally.check(abs(m["jw"] - jf_jw) <= TOLERANCE, "jaro_winkler " + label,
                        "tamis %r, jellyfish %r" % (m["jw"], jf_jw))
            boosted += jf_jaro > 0.7
        dice = trigram_dice(a, b)
        tally.check(abs(m["qgram"] - dice) <= TOLERANCE, "trigram dice " + label,
                    "tamis %r, definition %r" % (m["qgram"], dice))
    # The worked examples ride along (Levenshtein 1966, Wikipedia OSA example
    # from memory, Winkler 1990).
    worked = dict(zip(pairs[-7:], got[-7:]))
    tally.check(worked[("kitten", "sitting")]["lev"] == 3, "kitten/sitting = 3")
    tally.check(worked[("CA", "ABC")]["osa"] == 3 and jellyfish.damerau_levenshtein_distance("CA", "ABC") == 2,
                "OSA(CA, ABC) = 3, unrestricted 2")
    tally.check(round(worked[("MARTHA", "MARHTA")]["jw"], 3) == 0.961, "MARTHA/MARHTA 0.961")
    tally.check(round(worked[("DWAYNE", "DUANE")]["jw"], 3) == 0.840, "DWAYNE/DUANE 0.840")
    tally.check(round(worked[("DIXON", "DICKSONX")]["jw"], 3) == 0.813, "DIXON/DICKSONX 0.813")
    # The samples must cover both sides of the 0.7 boost rule and real edits.
    tally.check(boosted > PAIRS // 4 and PAIRS - boosted > PAIRS // 10, "samples cover both sides of Jaro 0.7",
                "%d of %d above 0.7" % (boosted, PAIRS))
    tally.check(non_ascii > PAIRS // 2, "most samples are not ASCII", "%d of %d" % (non_ascii, PAIRS))

    short_pairs = []
    for _ in range(1500):
        alphabet = rng.choice(["abc", "ab", "αβγ", "abcd"])
        short_pairs.append((random_string(rng, alphabet, 0, 7), random_string(rng, alphabet, 0, 7)))
    short_got = run_driver(binary, short_pairs)
    for (a, b), m in zip(short_pairs, short_got):
        brute = osa_brute_force(a, b)
        tally.check(m["osa"] == brute, "osa brute force %r / %r" % (a, b), "tamis %d, search %d" % (m["osa"], brute))

    names = [surname(rng) for _ in range(2000)] + ["Robert", "Rupert", "Ashcraft", "Tymczak", "Pfister"]
    name_pairs = [(names[k], names[(k + 1) % len(names)]) for k in range(len(names))]
    codes = run_driver(binary, name_pairs)
    for (a, _), m in zip(name_pairs, codes):
        expected = jellyfish.soundex(a)
        tally.check(m["soundex_a"] == expected, "soundex %s" % a, "tamis %s, jellyfish %s" % (m["soundex_a"], expected))
    by_name = {a: m["soundex_a"] for (a, _), m in zip(name_pairs, codes)}
    # US National Archives / Knuth TAOCP vol. 3 handbook examples.
    for name, code in [("Robert", "R163"), ("Rupert", "R163"), ("Ashcraft", "A261"), ("Tymczak", "T522"),
                       ("Pfister", "P236")]:
        tally.check(by_name[name] == code, "soundex %s = %s" % (name, code), "tamis %s" % by_name[name])

    tally.finish([
        "%d random pairs (%d not ASCII, %d with Jaro > 0.7), %d short pairs for the brute-force OSA check, "
        "%d words for Soundex; jellyfish %s, python3-levenshtein %s" %
        (PAIRS, non_ascii, boosted, len(short_pairs), len(names), jellyfish.__version__ if hasattr(
            jellyfish, "__version__") else "0.8", getattr(Levenshtein, "__version__", "0.12")),
    ])


if __name__ == "__main__":
    main()
