#!/usr/bin/env bash
# Issue-2 performance benchmark for tamis: profile and convert on the shared
# 1,000,000-row messy file, measured in the same run as wc -l, DuckDB and
# pandas so the figures are ratios on this machine, not absolute seconds.
# Not a test (CTest never runs it); the goal lines are informational and the
# script exits 0 whatever they say.  See README.md beside it.
#
# Environment (all optional):
#   TAMIS_SHARED       shared/ folder (default: <repo>/../shared)
#   TAMIS_BIN          tamis binary (default: <repo>/build/native/cli/tamis)
#   TAMIS_BENCH_CACHE  where the generated file is kept between runs
#                      (default: ${XDG_CACHE_HOME:-~/.cache}/tamis-bench)
#   TAMIS_BENCH_ROWS   rows of the generated file (default 1000000)
#   TAMIS_BENCH_REPS   timed rounds (default 5)
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
repo=$(git -C "$here" rev-parse --show-toplevel)
shared=${TAMIS_SHARED:-$repo/../shared}
tamis=${TAMIS_BIN:-$repo/build/native/cli/tamis}
cache=${TAMIS_BENCH_CACHE:-${XDG_CACHE_HOME:-$HOME/.cache}/tamis-bench}
rows=${TAMIS_BENCH_ROWS:-1000000}
reps=${TAMIS_BENCH_REPS:-5}
python=/usr/bin/python3   # Debian's python: the only one that sees python3-pandas

fail() { echo "foundation.sh: $*" >&2; exit 2; }

generator=$shared/bench/gen_dirty_csv.py
duck_runner=$shared/bench/duck_run.js
[ -f "$generator" ] && [ -f "$duck_runner" ] || fail "no $shared/bench (set TAMIS_SHARED)"
[ -x /usr/bin/time ] || fail "needs GNU time for peak RSS: apt-get install -y time"
command -v node >/dev/null || fail "needs node (Debian package nodejs)"
[ -x "$python" ] || fail "needs $python"

if [ ! -d "$here/node_modules/@duckdb/node-api" ]; then
  echo "installing @duckdb/node-api from package-lock.json into $here/node_modules" >&2
  (cd "$here" && npm ci --no-audit --no-fund >&2)
fi

pandas=()
if "$python" -c 'import pandas' 2>/dev/null; then
  pandas=(--pandas)
else
  echo "pandas not importable by $python (apt-get install -y python3-pandas): pandas rows skipped" >&2
fi

tamis_args=(--tamis "$tamis")
if [ ! -x "$tamis" ]; then
  tamis_args=(--tamis "" --tamis-missing "no binary at $tamis (build it or set TAMIS_BIN)")
fi

# The cache name carries the generator's hash, so a changed generator never
# reuses a stale file.
mkdir -p "$cache"
generator_hash=$(sha256sum "$generator" | cut -c1-12)
data=$cache/dirty_${rows}_${generator_hash}.csv
if [ ! -f "$data" ]; then
  echo "generating $rows rows into $data" >&2
  "$python" "$generator" "$rows" "$data.tmp"
  mv "$data.tmp" "$data"
fi

work=$(mktemp -d "$cache/run.XXXXXX")
trap 'rm -rf "$work"' EXIT

"$python" "$here/foundation.py" --file "$data" --rows-note "$rows rows from gen_dirty_csv.py" \
  "${tamis_args[@]}" --duck-runner "$duck_runner" --node-path "$here/node_modules" \
  "${pandas[@]}" --reps "$reps" --work "$work" --results "$cache/last_results.json"
