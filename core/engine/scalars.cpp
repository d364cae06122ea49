#include "scalars.hpp"

#include <fast_float/fast_float.h>

namespace tamis {

namespace {
bool is_digit(char c) { return c >= '0' && c <= '9'; }

bool equals_ignoring_ascii_case(std::string_view a, std::string_view lower) {
  if (a.size() != lower.size()) return false;
  for (size_t i = 0; i < a.size(); ++i) {
    char c = a[i];
    if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
    if (c != lower[i]) return false;
  }
  return true;
}
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
  if (equals_ignoring_ascii_case(s, "true") || equals_ignoring_ascii_case(s, "yes")) return true;
  if (equals_ignoring_ascii_case(s, "false") || equals_ignoring_ascii_case(s, "no")) return false;
  return std::nullopt;
}

}  // namespace tamis
