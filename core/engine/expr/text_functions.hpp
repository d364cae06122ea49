// The text functions of expressions, one value at a time (the evaluator
// calls them in its loops). Text is valid UTF-8; positions and lengths count
// Unicode code points.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

namespace tamis::expr {

// Unicode full case mapping (SpecialCasing.txt included, so 'ß' upper-cases
// to "SS"), root locale, by ICU; ASCII takes a fast path. Returns false if
// ICU fails.
bool append_upper(std::string_view value, std::string& out);
bool append_lower(std::string_view value, std::string& out);

// SQL TRIM: removes from the chosen ends every code point found in
// characters (a set, as in PostgreSQL and SQLite; ISO SQL allows only one).
std::string_view trim_characters(std::string_view value, std::u32string_view characters, bool leading,
                                 bool trailing);

// ISO SQL SUBSTRING(value FROM start [FOR length]) on code points: the
// characters at positions start .. start+length-1 that exist (positions
// before 1 are simply absent), so SUBSTRING('abc' FROM 0 FOR 2) is 'a'.
// has_length false means to the end. length must be >= 0.
std::string_view substring(std::string_view value, int64_t start, bool has_length, int64_t length);

}  // namespace tamis::expr
