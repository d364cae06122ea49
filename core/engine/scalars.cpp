#include "scalars.hpp"

#include <fast_float/fast_float.h>

#include "utf8.hpp"

namespace tamis {

namespace {
bool is_digit(char c) { return c >= '0' && c <= '9'; }

}  // namespace

NumberShape number_shape(std::string_view s) {
  size_t i = 0;
  if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
  size_t int_digits = 0, frac_digits = 0;
  while (i < s.size() && is_digit(s[i])) ++i, ++int_digits;
  bool decimal = false;
  if (i < s.size() && s[i] == '.') {
    decimal = true;
    ++i;
    while (i < s.size() && is_digit(s[i])) ++i, ++frac_digits;
  }
  if (int_digits + frac_digits == 0) return NumberShape::not_a_number;
  if (i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
    decimal = true;
    ++i;
    if (i < s.size() && (s[i] == '+' || s[i] == '-')) ++i;
    size_t exp_digits = 0;
    while (i < s.size() && is_digit(s[i])) ++i, ++exp_digits;
    if (exp_digits == 0) return NumberShape::not_a_number;
  }
  if (i != s.size()) return NumberShape::not_a_number;
  return decimal ? NumberShape::decimal : NumberShape::integer;
}

std::optional<double> parse_double(std::string_view s) {
  if (number_shape(s) == NumberShape::not_a_number) return std::nullopt;
  // fast_float (Lemire, "Number Parsing at a Gigabyte per Second", 2021)
  // rounds correctly; it rejects a leading '+', which SQL allows.
  if (!s.empty() && s[0] == '+') s.remove_prefix(1);
  double value = 0;
  const auto r = fast_float::from_chars(s.data(), s.data() + s.size(), value);
  if (r.ec != std::errc() || r.ptr != s.data() + s.size()) return std::nullopt;
  return value;
}

std::optional<bool> parse_boolean(std::string_view s) {
  if (utf8::equals_ascii_ignoring_case(s, "true") || utf8::equals_ascii_ignoring_case(s, "yes")) return true;
  if (utf8::equals_ascii_ignoring_case(s, "false") || utf8::equals_ascii_ignoring_case(s, "no")) return false;
  return std::nullopt;
}

void append_scaled_decimal(int64_t scaled, int scale, std::string& out) {
  const bool negative = scaled < 0;
  const uint64_t magnitude = negative ? 0 - static_cast<uint64_t>(scaled) : static_cast<uint64_t>(scaled);
  std::string digits = std::to_string(magnitude);
  if (scale > 0 && digits.size() <= static_cast<size_t>(scale))
    digits.insert(0, static_cast<size_t>(scale) + 1 - digits.size(), '0');
  if (negative) out += '-';
  if (scale <= 0) {
    out += digits;
    return;
  }
  out.append(digits, 0, digits.size() - static_cast<size_t>(scale));
  out += '.';
  out.append(digits, digits.size() - static_cast<size_t>(scale));
}

std::string_view trim_ascii_spaces(std::string_view text) {
  while (!text.empty() && text.front() == ' ') text.remove_prefix(1);
  while (!text.empty() && text.back() == ' ') text.remove_suffix(1);
  return text;
}

}  // namespace tamis
