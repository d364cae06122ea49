#!/usr/bin/env bash
# Issue-3 benchmark for `tamis run`: the shared cleaning job
# (shared/bench/bench.recipe.json) on the 1,000,000-row messy file, measured
# in the same run as the same job in DuckDB and pandas, so the figures are
# ratios on this machine. Also checks that the three outputs are the same
# rows in the same order. Not a test (CTest never runs it): the goal lines
# are informational and the script exits 0 whatever they say.
#
# Environment (all optional):
#   TAMIS_SHARED          shared/ folder (default: <repo>/../shared)
#   TAMIS_BIN             tamis binary (default: <repo>/build/native/cli/tamis)
#   TAMIS_BENCH_CACHE     where generated files are kept between runs
#                         (default: ${XDG_CACHE_HOME:-~/.cache}/tamis-bench)
#   TAMIS_BENCH_ROWS      rows of the generated file (default 1000000, about 94 MB)
#   TAMIS_BENCH_REPS      timed rounds (default 3)
#   TAMIS_BENCH_BIG_ROWS  also run tamis alone on a file this many rows long
#                         (10000000 is about 1 GB) for the streaming memory goal
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
repo=$(git -C "$here" rev-parse --show-toplevel)
shared=${TAMIS_SHARED:-$repo/../shared}
tamis=${TAMIS_BIN:-$repo/build/native/cli/tamis}
cache=${TAMIS_BENCH_CACHE:-${XDG_CACHE_HOME:-$HOME/.cache}/tamis-bench}
rows=${TAMIS_BENCH_ROWS:-1000000}
reps=${TAMIS_BENCH_REPS:-3}
big_rows=${TAMIS_BENCH_BIG_ROWS:-}
python=/usr/bin/python3   # Debian's python: the only one that sees python3-pandas

fail() { echo "run_bench.sh: $*" >&2; exit 2; }

generator=$shared/bench/gen_dirty_csv.py
[ -f "$generator" ] && [ -f "$shared/bench/bench.recipe.json" ] || fail "no $shared/bench (set TAMIS_SHARED)"
[ -x "$tamis" ] || fail "no tamis binary at $tamis (build it or set TAMIS_BIN)"
[ -x /usr/bin/time ] || fail "needs GNU time for peak RSS: apt-get install -y time"
command -v node >/dev/null || fail "needs node (Debian package nodejs)"
"$python" -c 'import pandas' 2>/dev/null || fail "$python cannot import pandas (apt-get install -y python3-pandas)"
if [ ! -d "$here/node_modules/@duckdb/node-api" ]; then
  echo "installing @duckdb/node-api from package-lock.json into $here/node_modules" >&2
  (cd "$here" && npm ci --no-audit --no-fund >&2)
fi

# Same cache names as foundation.sh: the generator's hash is in the name, so
# a changed generator never reuses a stale file.
mkdir -p "$cache"
generator_hash=$(sha256sum "$generator" | cut -c1-12)
generate() {
  local n=$1 file=$cache/dirty_${1}_${generator_hash}.csv
  if [ ! -f "$file" ]; then
    echo "generating $n rows into $file" >&2
    "$python" "$generator" "$n" "$file.tmp"
    mv "$file.tmp" "$file"
  fi
  echo "$file"
}
data=$(generate "$rows")
big=()
if [ -n "$big_rows" ]; then big=(--big "$(generate "$big_rows")"); fi

work=$(mktemp -d "$cache/run.XXXXXX")
trap 'rm -rf "$work"' EXIT

"$python" "$here/run_bench.py" --file "$data" --tamis "$tamis" --shared "$shared" \
  --node-path "$here/node_modules" --reps "$reps" --work "$work" "${big[@]}"
