#!/usr/bin/env bash
# Builds the dependencies of the WebAssembly build and assembles them into one
# prefix for CMake's TAMIS_WASM_DEPS:
#   PREFIX/lib/      libicuuc.a libicui18n.a libicudata.a (ICU built by icu.sh),
#                    libSDL2.a (sdl2.sh) and libimgui.a (imgui.sh)
#   PREFIX/include/  ICU's, SDL2's and ImGui's headers, and links to the header-only libraries
#                    of Debian's -dev packages (date, nlohmann, fast_float,
#                    doctest, xxhash, CLI11)
#   PREFIX/cmake/    doctest.cmake and doctestAddTests.cmake from doctest-dev
# Usage: web/deps/build.sh [PREFIX]    prints the prefix on stdout, logs on stderr.
#
# Each component is built once into its own directory under TAMIS_WASM_CACHE
# (default /var/cache/tamis-wasm, or ~/.cache/tamis-wasm for a user who cannot
# write /var/cache; outside the repository), named after the
# Debian versions it is built from and a hash of its recipe files, so a new
# Debian version or a changed recipe rebuilds that component only. A component
# counts as built only when its .complete stamp exists (written last), so an
# interrupted build is redone. To add a component, write its NAME.sh builder
# and add a component_dir_NAME function and a line to main().
set -euo pipefail

deps_dir=$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)
default_cache_root=/var/cache/tamis-wasm
if [[ $(id -u) -ne 0 && ! -w /var/cache ]]; then
  default_cache_root=${XDG_CACHE_HOME:-$HOME/.cache}/tamis-wasm
fi
cache_root=${TAMIS_WASM_CACHE:-$default_cache_root}
export TAMIS_JOBS=${TAMIS_JOBS:-2}
# Debian's emscripten needs node modules (acorn) from Debian's node tree, and
# runs fastest on the system Python (a python3 shim earlier on PATH costs about
# a second per compiler call).
export NODE_PATH=/usr/share/nodejs
export EMSDK_PYTHON=${EMSDK_PYTHON:-/usr/bin/python3}

log() { echo "web/deps: $*" >&2; }

debian_version() {
  local version
  version=$(dpkg-query -W -f='${Version}' "$1" 2>/dev/null) || true
  if [[ -z $version ]]; then
    log "Debian package $1 is not installed (./dev.sh install installs it)"
    exit 1
  fi
  echo "$version"
}

# hash_of TEXT FILE... : a short hash of the given text and the files' contents.
hash_of() {
  local text=$1
  shift
  { echo "$text"; (cd "$deps_dir" && sha256sum "$@"); } | sha256sum | cut -c1-12
}

# ensure_component NAME DIR COMMAND... : runs COMMAND DIR unless DIR is complete.
ensure_component() {
  local name=$1 dir=$2 log_file
  shift 2
  if [[ -f $dir/.complete ]]; then
    log "$name: cached in $dir"
    return
  fi
  mkdir -p "$cache_root"
  # Concurrent runs (several checkouts on one machine) build a component once.
  exec {lock_fd}>"$cache_root/.lock-$name"
  flock "$lock_fd"
  if [[ ! -f $dir/.complete ]]; then
    log_file=$dir.log
    log "$name: building into $dir (log: $log_file)"
    local started_at=$SECONDS
    rm -rf "$dir"
    mkdir -p "$dir"
    if ! "$@" "$dir" >"$log_file" 2>&1; then
      tail -n 40 "$log_file" >&2
      log "$name: build FAILED, full log in $log_file"
      exit 1
    fi
    touch "$dir/.complete"
    log "$name: built in $((SECONDS - started_at)) s"
  fi
  flock -u "$lock_fd"
}

component_dir_icu() {
  local icu_version toolchain
  # The source version libicu-dev was built from, so native and wasm use the same ICU.
  icu_version=$(dpkg-query -W -f='${source:Version}' libicu-dev 2>/dev/null) || true
  [[ -n $icu_version ]] || { log "libicu-dev is not installed (./dev.sh install installs it)"; exit 1; }
  toolchain="emscripten $(debian_version emscripten) icu-devtools $(debian_version icu-devtools)"
  echo "$cache_root/icu-$icu_version-$(hash_of "$toolchain" icu.sh Makefile.icu icu-data.txt smoke_test.cpp)"
}

build_icu() {
  ICU_DEBIAN_VERSION=$(dpkg-query -W -f='${source:Version}' libicu-dev) "$deps_dir/icu.sh" "$1"
}

component_dir_sdl2() {
  local version
  version=$(debian_version libsdl2-dev)
  echo "$cache_root/sdl2-$version-$(hash_of "emscripten $(debian_version emscripten)" sdl2.sh)"
}

build_sdl2() {
  SDL2_DEBIAN_VERSION=$(dpkg-query -W -f='${source:Version}' libsdl2-dev) "$deps_dir/sdl2.sh" "$1"
}

# ImGui is compiled against SDL2's headers, so the SDL2 directory is part of its key.
component_dir_imgui() {
  local version
  version=$(dpkg-query -W -f='${source:Version}' libimgui-dev 2>/dev/null) || true
  [[ -n $version ]] || { log "libimgui-dev is not installed (./dev.sh install installs it)"; exit 1; }
  echo "$cache_root/imgui-$version-$(hash_of "emscripten $(debian_version emscripten) $1" imgui.sh)"
}

build_imgui() {
  IMGUI_DEBIAN_VERSION=$(dpkg-query -W -f='${source:Version}' libimgui-dev) SDL2_PREFIX=$sdl2_dir \
    "$deps_dir/imgui.sh" "$1"
}

# Header-only libraries come straight from Debian's -dev packages.
header_links=(
  /usr/include/date:libhowardhinnant-date-dev
  /usr/include/nlohmann:nlohmann-json3-dev
  /usr/include/fast_float:libfast-float-dev
  /usr/include/doctest:doctest-dev
  /usr/include/xxhash.h:libxxhash-dev
  /usr/include/xxh3.h:libxxhash-dev
  /usr/include/CLI:libcli11-dev
)
doctest_cmake_dir=/usr/lib/cmake/doctest

assemble_prefix() {
  local prefix=$1 icu_dir=$2 sdl2_dir=$3 imgui_dir=$4 entry path package
  rm -rf "${prefix:?}/include" "${prefix:?}/lib" "${prefix:?}/cmake" "${prefix:?}/.complete"
  mkdir -p "$prefix/include" "$prefix/lib" "$prefix/cmake"
  ln -s "$icu_dir/include/unicode" "$prefix/include/unicode"
  ln -s "$icu_dir"/lib/*.a "$sdl2_dir/lib/libSDL2.a" "$imgui_dir/lib/libimgui.a" "$prefix/lib/"
  ln -s "$sdl2_dir/include/SDL2" "$imgui_dir/include/imgui" "$prefix/include/"
  for entry in "${header_links[@]}"; do
    path=${entry%%:*}
    package=${entry#*:}
    if [[ ! -e $path ]]; then
      log "$path is missing: install the Debian package $package"
      exit 1
    fi
    ln -s "$path" "$prefix/include/"
  done
  cp "$doctest_cmake_dir/doctest.cmake" "$doctest_cmake_dir/doctestAddTests.cmake" "$prefix/cmake/"
  touch "$prefix/.complete"
}

main() {
  local icu_dir imgui_dir prefix
  icu_dir=$(component_dir_icu)
  ensure_component icu "$icu_dir" build_icu
  sdl2_dir=$(component_dir_sdl2)
  ensure_component sdl2 "$sdl2_dir" build_sdl2
  imgui_dir=$(component_dir_imgui "$sdl2_dir")
  ensure_component imgui "$imgui_dir" build_imgui

  # doctest-dev's version is in the key because its CMake files are copied, not linked.
  prefix=${1:-$cache_root/prefix-$(hash_of "$icu_dir $sdl2_dir $imgui_dir doctest-dev $(debian_version doctest-dev)" build.sh)}
  if [[ $# -gt 0 || ! -f $prefix/.complete ]]; then
    assemble_prefix "$prefix" "$icu_dir" "$sdl2_dir" "$imgui_dir"
  fi
  echo "$prefix"
}

main "$@"
