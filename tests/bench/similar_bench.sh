#!/usr/bin/env bash
# Issue-4 similar-values benchmark: `tamis similar` on 10,000 and 100,000
# generated distinct values, every method, next to `sort -u` and an all-pairs
# estimate measured in the same run. Not a test (CTest never runs it); it
# prints figures and exits 0. See similar_bench.py for what is measured.
#
# Environment (optional):
#   TAMIS_BIN  tamis binary (default: <repo>/build/native/cli/tamis)
set -euo pipefail

here=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
repo=$(git -C "$here" rev-parse --show-toplevel)
tamis=${TAMIS_BIN:-$repo/build/native/cli/tamis}
python=/usr/bin/python3   # Debian's python: the only one that sees python3-levenshtein

[ -x "$tamis" ] || { echo "similar_bench.sh: no binary at $tamis (build it or set TAMIS_BIN)" >&2; exit 2; }
"$python" -c 'import Levenshtein' 2>/dev/null ||
  { echo "similar_bench.sh: needs python3-levenshtein (apt-get install -y python3-levenshtein)" >&2; exit 2; }

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
"$python" "$here/similar_bench.py" --tamis "$tamis" --work "$work"
