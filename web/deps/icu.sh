#!/usr/bin/env bash
# Builds ICU for WebAssembly into DEST (lib/, include/unicode/) from Debian's
# `icu` source package at ICU_DEBIAN_VERSION, then runs smoke_test.cpp under
# node against the result. Called by build.sh, which caches DEST.
# Usage: ICU_DEBIAN_VERSION=72.1-3+deb12u1 icu.sh DEST
set -euo pipefail

deps_dir=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
dest=$1
jobs=${TAMIS_JOBS:-2}
: "${ICU_DEBIAN_VERSION:?set ICU_DEBIAN_VERSION to the Debian version of the icu source package}"

work=$(mktemp -d "${TMPDIR:-/tmp}/tamis-icu.XXXXXX")
trap 'rm -rf "$work"' EXIT
cd "$work"

# The Debian source (orig tarball plus Debian's patches) is the one the native
# build's libicu-dev was made from.
if ! apt-get source --download-only -q "icu=$ICU_DEBIAN_VERSION"; then
  echo "icu.sh: apt-get source failed; it needs deb-src entries in the apt sources (./dev.sh install adds them)" >&2
  exit 1
fi
dpkg-source -x icu_*.dsc icu >/dev/null

make -f "$deps_dir/Makefile.icu" -j"$jobs" ICU="$work/icu/source" OBJ="$work/obj" OUT="$dest" \
  DATA_ITEMS="$deps_dir/icu-data.txt"

em++ -O2 -std=c++17 -fwasm-exceptions -DU_STATIC_IMPLEMENTATION -DU_USING_ICU_NAMESPACE=0 -I"$dest/include" \
  "$deps_dir/smoke_test.cpp" "$dest/lib/libicui18n.a" "$dest/lib/libicuuc.a" "$dest/lib/libicudata.a" \
  -sSINGLE_FILE=1 -sENVIRONMENT=node -o "$work/smoke_test.js"
node "$work/smoke_test.js"
