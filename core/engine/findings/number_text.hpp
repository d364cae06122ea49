// How a text value writes a number, shared by decimal_comma, numbers_as_text
// and empty_measure_rows.
#pragma once

#include <string>
#include <string_view>

namespace tamis {

struct NumberText {
  enum class Body : unsigned char {
    none,           // not a number
    plain,          // [+-]digits or [+-]digits.digits
    decimal_comma,  // [+-]digits,digits where the comma cannot be a thousands separator (not exactly 3 digits after)
    comma_groups,   // 1,234 or 1,234,567.89
    point_groups,   // 1.234.567 or 1.234,5 (a point every three digits, optional decimal comma)
  };
  Body body = Body::none;
  bool percent = false;      // a % sign at the end
  std::string currency;      // currency signs written before or after the number ($ € £ ¥)
  bool inner_space = false;  // a space between the sign and the number
};

NumberText read_number_text(std::string_view value);

}  // namespace tamis
