// Recognising typed values in text, used by profiling and type inference.
// Grammar (the SQL numeric literal, ISO/IEC 9075 <signed numeric literal>,
// without inner spaces): [+-]? ( digits [. digits?] | . digits ) ([eE][+-]?digits)?
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace tamis {

enum class NumberShape : uint8_t { not_a_number, integer, decimal };

NumberShape number_shape(std::string_view text);
// The value of text if number_shape(text) != not_a_number.
std::optional<double> parse_double(std::string_view text);
// true/false/yes/no in any case.
std::optional<bool> parse_boolean(std::string_view text);

// A scaled decimal in plain notation at its scale: -12.50 for -1250 at scale 2.
void append_scaled_decimal(int64_t scaled, int scale, std::string& out);
// text without U+0020 spaces at both ends (what SQL CAST ignores).
std::string_view trim_ascii_spaces(std::string_view text);

}  // namespace tamis
