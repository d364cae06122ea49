#!/usr/bin/env bash
# Builds Dear ImGui for WebAssembly into DEST (lib/libimgui.a, include/imgui/
# with backends/) from Debian's `imgui` source package at IMGUI_DEBIAN_VERSION:
# the core, std::string input helpers, and the SDL2 and OpenGL 3 (WebGL 2)
# backends, compiled against the SDL2 built by sdl2.sh (SDL2_PREFIX). The same
# ImGui version as the native build's libimgui-dev.
# Usage: IMGUI_DEBIAN_VERSION=1.86+ds-1 SDL2_PREFIX=DIR imgui.sh DEST
set -euo pipefail

dest=$1
: "${IMGUI_DEBIAN_VERSION:?set IMGUI_DEBIAN_VERSION to the Debian version of the imgui source package}"
: "${SDL2_PREFIX:?set SDL2_PREFIX to the SDL2 built by sdl2.sh}"

work=$(mktemp -d "${TMPDIR:-/tmp}/tamis-imgui.XXXXXX")
trap 'rm -rf "$work"' EXIT
cd "$work"

if ! apt-get source --download-only -q "imgui=$IMGUI_DEBIAN_VERSION"; then
  echo "imgui.sh: apt-get source failed; it needs deb-src entries in the apt sources (./dev.sh install adds them)" >&2
  exit 1
fi
dpkg-source -x imgui_*.dsc imgui >/dev/null

sources=(imgui.cpp imgui_draw.cpp imgui_tables.cpp imgui_widgets.cpp misc/cpp/imgui_stdlib.cpp
         backends/imgui_impl_sdl.cpp backends/imgui_impl_opengl3.cpp)
objects=() compilers=()
for source in "${sources[@]}"; do
  object=$work/$(basename "$source" .cpp).o
  em++ -O2 -std=c++17 -fwasm-exceptions -DIMGUI_DISABLE_FILE_FUNCTIONS -Iimgui -Iimgui/backends \
    -I"$SDL2_PREFIX/include/SDL2" -c "imgui/$source" -o "$object" &
  compilers+=($!)
  objects+=("$object")
done
for compiler in "${compilers[@]}"; do wait "$compiler"; done
mkdir -p "$dest/lib" "$dest/include/imgui/backends"
emar rcs "$dest/lib/libimgui.a" "${objects[@]}"
cp imgui/imgui.h imgui/imconfig.h imgui/imgui_internal.h imgui/imstb_textedit.h imgui/misc/cpp/imgui_stdlib.h \
  "$dest/include/imgui/"
cp imgui/backends/imgui_impl_sdl.h imgui/backends/imgui_impl_opengl3.h imgui/backends/imgui_impl_opengl3_loader.h \
  "$dest/include/imgui/backends/"
