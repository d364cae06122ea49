# Turns a file into a C++ source file holding its bytes, so the program
# carries it: the UI font from a Debian package (no font file is committed),
# the demo table in the browser page.
# Run as: cmake -DINPUT_FILE=... -DOUTPUT=... -DSYMBOL=... -P embed_bytes.cmake
file(READ "${INPUT_FILE}" file_hex HEX)
string(LENGTH "${file_hex}" hex_length)
math(EXPR byte_count "${hex_length} / 2")
# Two hex digits per byte; one regex pass makes the initializer list.
string(REGEX REPLACE "([0-9a-f][0-9a-f])" "0x\\1," file_bytes "${file_hex}")
string(REGEX REPLACE "(0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,0x..,)" "\\1\n" file_bytes "${file_bytes}")
get_filename_component(file_name "${INPUT_FILE}" NAME)
file(WRITE "${OUTPUT}.tmp"
"// Generated at build time from ${file_name}; do not edit.
#include <cstddef>
#include <span>

namespace tamis::ui {
namespace {
const unsigned char file_bytes[${byte_count}] = {
${file_bytes}};
}  // namespace
std::span<const unsigned char> ${SYMBOL}() { return {file_bytes, sizeof file_bytes}; }
}  // namespace tamis::ui
")
file(RENAME "${OUTPUT}.tmp" "${OUTPUT}")
