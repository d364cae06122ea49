# Turns a font file from a Debian package into a C++ source file holding its
# bytes, so the program carries its own font and no font file is committed.
# Run as: cmake -DFONT_FILE=... -DOUTPUT=... -DSYMBOL=... -P embed_font.cmake
file(READ "${FONT_FILE}" font_hex HEX)
string(LENGTH "${font_hex}" hex_length)
math(EXPR byte_count "${hex_length} / 2")
# Two hex digits per byte; one regex pass makes the initializer list.
string(REGEX REPLACE "([0-9a-f][0-9a-f])" "0x\\1," font_bytes "${font_hex}")
string(REGEX REPLACE "(0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,)" "\\1\n" font_bytes "${font_bytes}")
get_filename_component(font_name "${FONT_FILE}" NAME)
file(WRITE "${OUTPUT}.tmp"
"// Generated at build time from ${font_name}; do not edit.
#include <cstddef>
#include <span>

namespace tamis::ui {
namespace {
const unsigned char font_bytes[${byte_count}] = {
${font_bytes}};
}  // namespace
std::span<const unsigned char> ${SYMBOL}() { return {font_bytes, sizeof font_bytes}; }
}  // namespace tamis::ui
")
file(RENAME "${OUTPUT}.tmp" "${OUTPUT}")
