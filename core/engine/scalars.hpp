// Recognising typed values in text, used by profiling and type inference.
// Grammar (the SQL numeric literal, ISO/IEC 9075 <signed numeric literal>,
// without inner spaces): [+-]? ( digits [. digits?] | . digits ) ([eE][+-]?digits)?
#pragma once

#include <cstdint>
#include <optional>
#include <string_view>

namespace tamis {

enum class NumberShape : uint8_t { not_a_number, integer, decimal };

NumberShape number_shape(std::string_view text);
// The value of text if number_shape(text) != not_a_number.
std::optional<double> parse_double(std::string_view text);
// true/false/yes/no in any case.
std::optional<bool> parse_boolean(std::string_view text);

}  // namespace tamis
