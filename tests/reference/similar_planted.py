#!/usr/bin/python3
"""Planted variants: precision and recall of `tamis similar` (issue 4).

200 invented category names and 600 variant spellings of them (case,
spacing, one-edit typos, swapped letters, accents, trailing dots; see
planted_variants.py) are written as one column, names 3-12 times each and
variants once or twice, as a real extract would have them. The generator
knows which name each variant came from; that knowledge is the reference
(our own ground truth: the data is generated here, not an outside source).

Checked for the two edit-distance methods at the default threshold (0.85):
precision >= 0.95 (suggested variant -> canonical pairs that come from the
same name) and recall >= 0.9 (variants grouped with their own name) -- the
targets the issue sets; and the suggested canonical of each correct group
is the name itself (the most frequent spelling). Several seeds, so the
figures do not hinge on one lucky draw. The figures are printed.

Usage: similar_planted.py TAMIS
"""
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from planted_variants import generate, quality, write_data  # noqa: E402

NAMES = 200
SEEDS = (4242, 7, 2026)
METHODS = ("levenshtein", "osa")
MIN_PRECISION, MIN_RECALL = 0.95, 0.9


def main():
    tamis = sys.argv[1]
    failures = []
    with tempfile.TemporaryDirectory() as work:
        for seed in SEEDS:
            values, origin, counts = generate(NAMES * 4, seed)
            path = os.path.join(work, "planted_%d.csv" % seed)
            write_data(path, values, counts)
            for method in METHODS:
                done = subprocess.run([tamis, "similar", path, "--column", "place", "--method", method, "--json"],
                                      capture_output=True)
                if done.returncode != 0:
                    failures.append("%s seed %d: exit %d: %s" % (method, seed, done.returncode,
                                                                 done.stderr.decode("utf-8", "replace")))
                    continue
                report = json.loads(done.stdout.decode("utf-8"))
                precision, recall = quality(report, origin)
                wrong_canonical = [g["canonical"] for g in report["groups"] if origin.get(g["canonical"]) != g["canonical"]]
                print("%-12s seed %5d: %d groups, precision %.3f, recall %.3f, canonical not a planted name: %d" %
                      (method, seed, len(report["groups"]), precision, recall, len(wrong_canonical)))
                if precision < MIN_PRECISION:
                    failures.append("%s seed %d: precision %.3f < %.2f" % (method, seed, precision, MIN_PRECISION))
                if recall < MIN_RECALL:
                    failures.append("%s seed %d: recall %.3f < %.2f" % (method, seed, recall, MIN_RECALL))
                if wrong_canonical:
                    failures.append("%s seed %d: canonical values that are variants: %s" %
                                    (method, seed, wrong_canonical[:5]))
    for f in failures:
        print("FAIL:", f)
    print("similar_planted: %d seeds x %d methods, %d failures" % (len(SEEDS), len(METHODS), len(failures)))
    return 1 if failures else 0


if __name__ == "__main__":
    raise SystemExit(main())
