#!/usr/bin/python3
"""Measuring and reporting half of foundation.sh (see README.md here).

Runs every command in rounds (one untimed warm-up round, then --reps timed
rounds, each round running every command once) so that load from other jobs
on the machine spreads over all commands instead of hitting one.  Wall time is
taken with time.perf_counter around the process; peak RSS is the maximum
resident set size GNU time reports (%M, KiB) for the same process.
Prints the table, the record check and the issue-2 goal lines.  The goals are
informational: the exit status is 0 whatever the figures.
"""
import argparse
import json
import os
import re
import statistics
import subprocess
import sys
import time

import compare_records

GOAL_CONVERT_SPEEDUP = 3.0      # issue 2: convert >= 3x faster than DuckDB read-and-write
GOAL_TABLE_RATIO = 1.5          # issue 2: in-memory table <= 1.5x the file size
MB = 1e6
TABLE_STATS = re.compile(r"memory: table (\d+) bytes")


class Command:
    def __init__(self, key, label, argv, output=None, env=None):
        self.key, self.label, self.argv, self.output = key, label, argv, output
        self.env = env or {}
        self.seconds, self.rss_kib = [], []
        self.failure = None


def run_once(command, rss_file):
    env = dict(os.environ, **command.env)
    started = time.perf_counter()
    done = subprocess.run(["/usr/bin/time", "-f", "%M", "-o", rss_file] + command.argv,
                          stdin=subprocess.DEVNULL, stdout=subprocess.DEVNULL,
                          stderr=subprocess.PIPE, env=env)
    seconds = time.perf_counter() - started
    with open(rss_file) as f:
        lines = [line for line in f.read().splitlines() if line.strip()]
    rss = int(lines[-1]) if lines and lines[-1].strip().isdigit() else None
    return seconds, rss, done.returncode, done.stderr.decode("utf-8", "replace")


def first_line(argv):
    try:
        out = subprocess.run(argv, stdout=subprocess.PIPE, stderr=subprocess.STDOUT, timeout=60)
        text = out.stdout.decode("utf-8", "replace").strip()
        return text.splitlines()[0] if text and out.returncode == 0 else "unknown"
    except OSError:
        return "unknown"


def build_commands(args):
    node = ["node", args.duck_runner, "2"]
    here = os.path.dirname(os.path.abspath(__file__))
    duck_env = {"NODE_PATH": args.node_path}
    commands = [Command("wc", "wc -l", ["wc", "-l", args.file])]
    if args.tamis:
        commands += [
            Command("profile", "tamis profile --json", [args.tamis, "profile", args.file, "--json"]),
            Command("convert", "tamis convert (read+write)",
                    [args.tamis, "convert", args.file, "-o", os.path.join(args.work, "tamis.csv")],
                    output=os.path.join(args.work, "tamis.csv")),
        ]
    commands += [
        Command("duck_count", "DuckDB count(*) (read)",
                node + [os.path.join(here, "duck_count.sql"), args.file], env=duck_env),
        Command("duck_copy", "DuckDB COPY (read+write)",
                node + [os.path.join(here, "duck_copy.sql"), args.file, os.path.join(args.work, "duck.csv")],
                output=os.path.join(args.work, "duck.csv"), env=duck_env),
    ]
    if args.pandas:
        commands += [
            Command("pandas_read", "pandas read_csv (read)",
                    ["/usr/bin/python3", os.path.join(here, "pandas_read.py"), args.file]),
            Command("pandas_copy", "pandas read_csv+to_csv (read+write)",
                    ["/usr/bin/python3", os.path.join(here, "pandas_read.py"), args.file,
                     os.path.join(args.work, "pandas.csv")],
                    output=os.path.join(args.work, "pandas.csv")),
        ]
    return commands


def measure(commands, reps, rss_file):
    for round_number in range(reps + 1):
        for command in commands:
            if command.failure:
                continue
            seconds, rss, code, stderr = run_once(command, rss_file)
            if code != 0:
                command.failure = "exit %d: %s" % (code, stderr.strip()[-400:])
                continue
            if round_number > 0:
                command.seconds.append(seconds)
                command.rss_kib.append(rss)
        print("  round %d/%d done%s" % (round_number, reps, " (warm-up)" if round_number == 0 else ""),
              file=sys.stderr, flush=True)


def table_bytes(args, rss_file):
    """Bytes of the in-memory table as tamis reports it, or None."""
    probe = Command("stats", "", [args.tamis, "profile", args.file, "--json"], env={"TAMIS_STATS": "1"})
    _, _, code, stderr = run_once(probe, rss_file)
    match = TABLE_STATS.search(stderr)
    return int(match.group(1)) if code == 0 and match else None


def fmt(value, pattern):
    return "-" if value is None else pattern % value


def report(args, commands, file_size, versions, load, table, checks):
    by_key = {c.key: c for c in commands}

    def median(key):
        c = by_key.get(key)
        return statistics.median(c.seconds) if c and c.seconds else None

    wc, duck_copy = median("wc"), median("duck_copy")
    print()
    print("tamis foundation benchmark (issue 2)")
    print("file: %s  (%d bytes = %.1f MB, %s)" % (args.file, file_size, file_size / MB, args.rows_note))
    print("machine: %d cores, load average %s at start, %s at end; %d timed rounds after one warm-up round"
          % (os.cpu_count(), load[0], load[1], args.reps))
    for name, version in versions:
        print("  %-8s %s" % (name, version))
    print("MB = 10^6 bytes; MB/s = file size / median; ratios = median / median of the reference"
          " (below 1 = faster)")
    print()
    header = "%-36s %9s %8s %8s %9s %12s %13s %9s" % (
        "command", "median s", "min s", "max s", "MB/s", "peak RSS MB", "x DuckDB r+w", "x wc -l")
    print(header)
    print("-" * len(header))
    for c in commands:
        if c.failure:
            print("%-36s FAILED %s" % (c.label, c.failure.replace("\n", " | ")))
            continue
        m = statistics.median(c.seconds)
        rss = max(c.rss_kib) * 1024 / MB if all(r is not None for r in c.rss_kib) else None
        print("%-36s %9.3f %8.3f %8.3f %9.1f %12s %13s %9s" % (
            c.label, m, min(c.seconds), max(c.seconds), file_size / MB / m, fmt(rss, "%.1f"),
            fmt(m / duck_copy if duck_copy else None, "%.2f"), fmt(m / wc if wc else None, "%.1f")))
    if not args.tamis:
        print("%-36s not measured: %s" % ("tamis profile / convert", args.tamis_missing))
    print()
    for line in checks:
        print(line)
    print()

    convert = median("convert")
    if convert and duck_copy:
        speedup = duck_copy / convert
        print("goal: tamis convert at least %.0fx faster than DuckDB read-and-write: "
              "DuckDB %.3f s / tamis %.3f s = %.2fx  %s"
              % (GOAL_CONVERT_SPEEDUP, duck_copy, convert, speedup,
                 "PASS" if speedup >= GOAL_CONVERT_SPEEDUP else "MISS"))
    else:
        print("goal: tamis convert at least %.0fx faster than DuckDB read-and-write: not measured  MISS"
              % GOAL_CONVERT_SPEEDUP)

    profile = by_key.get("profile")
    profile_rss = (max(profile.rss_kib) * 1024 if profile and profile.rss_kib
                   and all(r is not None for r in profile.rss_kib) else None)
    goal = "goal: in-memory table at most %.1fx the file size: " % GOAL_TABLE_RATIO
    if table is not None:
        ratio = table / file_size
        print(goal + "table %d bytes / file %d bytes = %.2fx  %s"
              % (table, file_size, ratio, "PASS" if ratio <= GOAL_TABLE_RATIO else "MISS"))
    elif profile_rss is not None:
        ratio = profile_rss / file_size
        print(goal + "no 'memory: table N bytes' line on stderr with TAMIS_STATS=1, so peak RSS of "
              "tamis profile stands in: %.1f MB / %.1f MB = %.2fx  %s (proxy)"
              % (profile_rss / MB, file_size / MB, ratio, "PASS" if ratio <= GOAL_TABLE_RATIO else "MISS"))
    else:
        print(goal + "not measured  MISS")
    if profile_rss is not None:
        print("info: tamis profile whole-process peak RSS %.1f MB = %.2fx the file size"
              % (profile_rss / MB, profile_rss / file_size))


def record_checks(args, commands):
    """Lines saying whether the written files hold the input's records."""
    written = {c.key: c.output for c in commands if c.output and not c.failure and os.path.exists(c.output)}
    lines = []
    if "convert" not in written:
        lines.append("records: tamis convert produced no output, nothing to compare with DuckDB")
    elif "duck_copy" in written:
        count, diff = compare_records.compare(("duckdb", written["duck_copy"]), [("tamis", written["convert"])])
        lines.append("records: " + compare_records.describe("DuckDB COPY", "tamis convert", count, diff["tamis"]))
    labels = {"convert": "tamis convert", "duck_copy": "DuckDB COPY", "pandas_copy": "pandas to_csv"}
    labelled = [(label, written[key]) for key, label in labels.items() if key in written]
    if labelled:
        count, diff = compare_records.compare(("input", args.file), labelled)
        for label, _ in labelled:
            lines.append("records: " + compare_records.describe("input (Python csv)", label, count, diff[label]))
    return lines


def main(argv):
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--file", required=True)
    parser.add_argument("--rows-note", default="")
    parser.add_argument("--tamis", default="", help="tamis binary; empty = not available")
    parser.add_argument("--tamis-missing", default="")
    parser.add_argument("--duck-runner", required=True, help="duck_run.js from shared/bench")
    parser.add_argument("--node-path", required=True, help="node_modules holding @duckdb/node-api")
    parser.add_argument("--pandas", action="store_true", help="pandas is importable by /usr/bin/python3")
    parser.add_argument("--reps", type=int, default=5)
    parser.add_argument("--work", required=True, help="folder for output files")
    parser.add_argument("--results", help="also write the raw timings here as JSON")
    args = parser.parse_args(argv[1:])

    rss_file = os.path.join(args.work, "rss.txt")
    file_size = os.path.getsize(args.file)
    here = os.path.dirname(os.path.abspath(__file__))
    version_sql = os.path.join(here, "duck_version.sql")
    versions = [
        ("tamis", first_line([args.tamis, "--version"]) if args.tamis else "not built"),
        ("duckdb", first_line(["env", "NODE_PATH=" + args.node_path, "node", args.duck_runner, "1",
                               version_sql, args.file]) + " (@duckdb/node-api, node " +
         first_line(["node", "--version"]) + ")"),
        ("pandas", first_line(["/usr/bin/python3", "-c", "import pandas; print(pandas.__version__)"])
         if args.pandas else "not installed"),
        ("wc", first_line(["wc", "--version"])),
    ]
    commands = build_commands(args)
    load_start = "%.2f" % os.getloadavg()[0]
    measure(commands, args.reps, rss_file)
    table = table_bytes(args, rss_file) if args.tamis else None
    load_end = "%.2f" % os.getloadavg()[0]
    checks = record_checks(args, commands)
    report(args, commands, file_size, versions, (load_start, load_end), table, checks)
    if args.results:
        with open(args.results, "w") as f:
            json.dump({"file": args.file, "bytes": file_size, "table_bytes": table,
                       "commands": [{"key": c.key, "label": c.label, "seconds": c.seconds,
                                     "peak_rss_kib": c.rss_kib, "failure": c.failure} for c in commands]},
                      f, indent=1)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
