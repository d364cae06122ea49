#!/usr/bin/python3
"""Similar-values benchmark (issue 4): `tamis similar` on 10,000 and 100,000
distinct values, every method, measured in the same run as two references.
Not a test: CTest never runs it; it prints figures and exits 0.

Data (generated here, seed 4242, our own fiction): base names of streets and
parks made of invented words ("Varoneth Lane", "Quellmore Green") and, for
each, variants such as a real cleaning job meets: upper or lower case, a
trailing full stop, a doubled space, one typo (substitution, insertion,
deletion), two swapped neighbouring letters, an accented vowel. A quarter of
the distinct values are bases, three quarters variants. Bases appear 3-12
times, variants once or twice, so the file has about 300,000 rows for
100,000 distinct values. The generator knows which base each variant came
from, so the run also prints precision and recall of each method (pairs
variant -> suggested canonical that come from the same base, over all
suggested pairs; variants mapped to their own base, over all variants).

References, measured in the same run because the machine is shared:
- `sort -u` over the same values: what merely deduplicating them costs,
  the floor for any grouping (token_key and soundex are hash groupings and
  should stay within a small factor of it).
- All pairs without blocking: python3-levenshtein's C Levenshtein.distance
  over every pair of a 2,000-value sample, timed, then scaled by the number of
  pairs (n(n-1)/2 grows with the square of n) to 10,000 and 100,000 values.
  This is what the distance methods would cost without blocking; the ratio
  shows what prefix filtering buys. (Scaling the pair count is exact; the
  time per pair is the sample's average.)

Wall and CPU seconds are both printed: on a shared machine the wall time
of one run depends on what else runs; CPU time (user + system) much less.
The ratios use wall time of commands run one after the other.

Usage: similar_bench.py --tamis BINARY --work DIR
"""
import argparse
import json
import os
import random
import resource
import subprocess
import sys
import time

import Levenshtein

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "reference"))
from planted_variants import SEED, generate, quality, write_data  # noqa: E402

METHODS = [("token_key", None), ("soundex", None), ("levenshtein", 0.85), ("osa", 0.85),
           ("jaro_winkler", 0.85), ("qgram", 0.85)]
def timed(argv, stdout=subprocess.PIPE):
    """Wall seconds, CPU seconds (user + system of the child) and the result."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    started = time.perf_counter()
    done = subprocess.run(argv, stdout=stdout, stderr=subprocess.PIPE)
    wall = time.perf_counter() - started
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    cpu = (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)
    return wall, cpu, done


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--tamis", required=True)
    parser.add_argument("--work", required=True)
    args = parser.parse_args()

    print("similar-values benchmark: one timed run per command (shared 2-core machine; compare ratios)")
    all_pairs_seconds_per_pair = None
    for distinct in (10000, 100000):
        values, origin, counts = generate(distinct)
        path = "%s/places_%d.csv" % (args.work, distinct)
        rows = write_data(path, values, counts)
        sort_seconds, sort_cpu, _ = timed(["sort", "-u", "-o", path + ".sorted", path + ".values"])
        print("\n%d distinct values (%d rows); sort -u over the values: %.3f s wall, %.3f s CPU" %
              (len(values), rows, sort_seconds, sort_cpu))
        if all_pairs_seconds_per_pair is None:
            sample = random.Random(SEED + 2).sample(values, 2000)
            started = time.perf_counter()
            for i in range(len(sample)):
                a = sample[i]
                for j in range(i + 1, len(sample)):
                    Levenshtein.distance(a, sample[j])
            sample_pairs = len(sample) * (len(sample) - 1) // 2
            all_pairs_seconds_per_pair = (time.perf_counter() - started) / sample_pairs
            print("all pairs, python3-levenshtein, 2,000-value sample: %.2f us per pair" %
                  (all_pairs_seconds_per_pair * 1e6))
        all_pairs = all_pairs_seconds_per_pair * len(values) * (len(values) - 1) / 2
        print("all pairs without blocking, scaled to %d values: %.0f s (%.1f min)" %
              (len(values), all_pairs, all_pairs / 60))
        print("%-13s %9s %9s %9s %11s %13s %12s %10s %9s %7s" % ("method", "wall s", "CPU s", "x sort", "all pairs/x",
                                                             "candidates", "compared", "groups", "precision",
                                                             "recall"))
        for method, threshold in METHODS:
            argv = [args.tamis, "similar", path, "--column", "place", "--method", method, "--json"]
            if threshold is not None:
                argv += ["--threshold", str(threshold)]
            seconds, cpu, done = timed(argv)
            if done.returncode != 0:
                print("%-13s failed: %s" % (method, done.stderr.decode("utf-8", "replace")[:300]))
                continue
            report = json.loads(done.stdout.decode("utf-8"))
            precision, recall = quality(report, origin)
            s = report["stats"]
            speedup = "%.0f" % (all_pairs / seconds) if threshold is not None else "-"
            print("%-13s %9.3f %9.3f %9.1f %11s %13d %12d %10d %9.3f %7.3f" % (
                method, seconds, cpu, seconds / sort_seconds if sort_seconds > 0 else 0, speedup,
                s["candidate_pairs"], s["compared_pairs"], len(report["groups"]), precision, recall))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
