#!/usr/bin/python3
"""Measuring and reporting half of run_bench.sh (see README.md here).

Runs the three implementations of the shared cleaning job in rounds: one
untimed warm-up round, then --reps timed rounds, each running every command
once, so load from other jobs spreads over all of them. Wall time is
time.perf_counter around the process; peak RSS is GNU time's %M (KiB) for
the same process. Then compares the outputs record by record
(compare_records.py) and prints the issue-3 goal lines, for information.
"""
import argparse
import os
import statistics
import subprocess
import sys
import time

import compare_records

GOAL_SPEEDUP_VS_DUCKDB = 5.0   # issue 3: tamis run at least 5x faster than DuckDB
GOAL_RSS_MB = 100              # issue 3: peak memory under 100 MB on the 94 MB file
GOAL_BIG_RSS_MB = 300          # issue 3: under 300 MB on a 1 GB file
MB = 1e6


def run_once(argv, env, rss_file):
    started = time.perf_counter()
    done = subprocess.run(["/usr/bin/time", "-f", "%M", "-o", rss_file] + argv, stdin=subprocess.DEVNULL,
                          stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, env=env)
    seconds = time.perf_counter() - started
    with open(rss_file) as f:
        lines = [line for line in f.read().splitlines() if line.strip()]
    rss = int(lines[-1]) if lines and lines[-1].strip().isdigit() else None
    return seconds, rss, done.returncode, done.stderr.decode("utf-8", "replace")


def main():
    p = argparse.ArgumentParser()
    p.add_argument("--file", required=True)
    p.add_argument("--tamis", required=True)
    p.add_argument("--shared", required=True)
    p.add_argument("--node-path", required=True)
    p.add_argument("--reps", type=int, default=3)
    p.add_argument("--work", required=True)
    p.add_argument("--big")
    a = p.parse_args()
    bench = os.path.join(a.shared, "bench")
    out = {k: os.path.join(a.work, k + ".csv") for k in ("tamis", "duckdb", "pandas")}
    commands = [
        ("tamis", "tamis run (2 threads)", [a.tamis, "run", os.path.join(bench, "bench.recipe.json"), a.file,
                                            "-o", out["tamis"]], {}),
        ("duckdb", "DuckDB, 2 threads", ["node", os.path.join(bench, "duck_run.js"), "2",
                                        os.path.join(bench, "clean_duckdb_ordered.sql"), a.file, out["duckdb"]],
         {"NODE_PATH": a.node_path}),
        ("pandas", "pandas", ["/usr/bin/python3", os.path.join(bench, "clean_pandas.py"), a.file, out["pandas"]], {}),
    ]
    seconds = {k: [] for k, *_ in commands}
    rss = {k: [] for k, *_ in commands}
    rss_file = os.path.join(a.work, "rss.txt")
    for round_number in range(a.reps + 1):
        for key, label, argv, extra in commands:
            s, r, code, err = run_once(argv, dict(os.environ, **extra), rss_file)
            if code != 0:
                print("%s failed (exit %d): %s" % (label, code, err.strip()[-2000:]))
                return 1
            if round_number > 0:
                seconds[key].append(s)
                rss[key].append(r)
    size = os.path.getsize(a.file)
    print("input: %s (%.1f MB); %d timed rounds after one warm-up; median wall time, max peak RSS"
          % (a.file, size / MB, a.reps))
    print("%-24s %10s %10s %12s" % ("", "seconds", "MB/s", "peak RSS MB"))
    median = {k: statistics.median(v) for k, v in seconds.items()}
    for key, label, *_ in commands:
        print("%-24s %10.2f %10.1f %12.1f" % (label, median[key], size / MB / median[key], max(rss[key]) * 1024 / MB))
    speedup_duck = median["duckdb"] / median["tamis"]
    speedup_pandas = median["pandas"] / median["tamis"]
    print("ratios: DuckDB / tamis = %.2f, pandas / tamis = %.2f" % (speedup_duck, speedup_pandas))

    count, differences = compare_records.compare(("tamis", out["tamis"]), [("duckdb", out["duckdb"]),
                                                                          ("pandas", out["pandas"])])
    same = True
    for label, difference in differences.items():
        print(compare_records.describe("tamis", label, count, difference))
        same &= difference is None

    tamis_mb = max(rss["tamis"]) * 1024 / MB
    print("goal  tamis run >= %.0fx faster than DuckDB: %s (%.2fx)"
          % (GOAL_SPEEDUP_VS_DUCKDB, "PASS" if speedup_duck >= GOAL_SPEEDUP_VS_DUCKDB else "MISS", speedup_duck))
    print("goal  peak RSS < %d MB on the %.0f MB file: %s (%.1f MB)"
          % (GOAL_RSS_MB, size / MB, "PASS" if tamis_mb < GOAL_RSS_MB else "MISS", tamis_mb))
    print("check three outputs are the same rows in the same order: %s" % ("PASS" if same else "FAIL"))
    if a.big:
        big_out = os.path.join(a.work, "big.csv")
        s, r, code, err = run_once([a.tamis, "run", os.path.join(bench, "bench.recipe.json"), a.big, "-o", big_out],
                                   dict(os.environ), rss_file)
        big_size = os.path.getsize(a.big)
        if code != 0:
            print("tamis on the big file failed (exit %d): %s" % (code, err.strip()[-2000:]))
        else:
            big_mb = r * 1024 / MB
            print("big file %.0f MB: tamis run %.1f s, peak RSS %.1f MB" % (big_size / MB, s, big_mb))
            print("goal  peak RSS < %d MB on the big file: %s" % (GOAL_BIG_RSS_MB,
                                                                 "PASS" if big_mb < GOAL_BIG_RSS_MB else "MISS"))
        if os.path.exists(big_out):
            os.remove(big_out)
    return 0


if __name__ == "__main__":
    sys.exit(main())
