#!/usr/bin/env bash
# Builds SDL2 for WebAssembly into DEST (lib/libSDL2.a, include/SDL2/) from
# Debian's `libsdl2` source package at SDL2_DEBIAN_VERSION, with SDL's own CMake
# build under emcmake (Emscripten's bundled SDL2 port would download its
# source). Called by build.sh, which caches DEST.
# Usage: SDL2_DEBIAN_VERSION=2.26.5+dfsg-1 sdl2.sh DEST
set -euo pipefail

dest=$1
jobs=${TAMIS_JOBS:-2}
: "${SDL2_DEBIAN_VERSION:?set SDL2_DEBIAN_VERSION to the Debian version of the libsdl2 source package}"

work=$(mktemp -d "${TMPDIR:-/tmp}/tamis-sdl2.XXXXXX")
trap 'rm -rf "$work"' EXIT
cd "$work"

if ! apt-get source --download-only -q "libsdl2=$SDL2_DEBIAN_VERSION"; then
  echo "sdl2.sh: apt-get source failed; it needs deb-src entries in the apt sources (./dev.sh install adds them)" >&2
  exit 1
fi
dpkg-source -x libsdl2_*.dsc sdl2 >/dev/null

# Configuring is the slow part (every check runs emcc): about 4 minutes on 2 cores.
# Threads stay off: a threaded wasm module needs cross-origin isolation, which
# a page opened from file:// cannot have.
emcmake cmake -S sdl2 -B build -G Ninja -DCMAKE_BUILD_TYPE=Release -DCMAKE_INSTALL_PREFIX="$dest" \
  -DSDL_SHARED=OFF -DSDL_STATIC=ON -DSDL_TEST=OFF -DSDL_PTHREADS=OFF
cmake --build build -j"$jobs"
cmake --install build
test -f "$dest/lib/libSDL2.a"
