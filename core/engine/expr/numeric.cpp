#include "expr/numeric.hpp"

#include <array>
#include <limits>

namespace tamis::expr {

Wide pow10_wide(int n) {
  static const std::array<Wide, 39> table = [] {
    std::array<Wide, 39> t{};
    t[0] = 1;
    for (size_t i = 1; i < t.size(); ++i) t[i] = t[i - 1] * 10;
    return t;
  }();
  return table[static_cast<size_t>(n)];
}

std::optional<int64_t> narrow(Wide value) {
  if (value < std::numeric_limits<int64_t>::min() || value > std::numeric_limits<int64_t>::max())
    return std::nullopt;
  return static_cast<int64_t>(value);
}

Wide divide_rounded(Wide value, Wide divisor) {
  Wide quotient = value / divisor;
  const Wide remainder = value % divisor;
  const Wide twice = remainder < 0 ? -2 * remainder : 2 * remainder;
  const Wide magnitude = divisor < 0 ? -divisor : divisor;
  if (twice >= magnitude) quotient += ((value < 0) != (divisor < 0)) ? -1 : 1;
  return quotient;
}

std::optional<int64_t> rescale(int64_t value, int from_scale, int to_scale) {
  if (to_scale == from_scale) return value;
  if (to_scale > from_scale) return narrow(Wide{value} * pow10_wide(to_scale - from_scale));
  return narrow(divide_rounded(value, pow10_wide(from_scale - to_scale)));
}

NumberRead read_scaled(std::string_view text, int scale, int64_t& out, bool allow_fraction_and_exponent) {
  size_t i = 0, end = text.size();
  while (i < end && text[i] == ' ') ++i;
  while (end > i && text[end - 1] == ' ') --end;
  bool negative = false;
  if (i < end && (text[i] == '+' || text[i] == '-')) negative = text[i++] == '-';
  std::string digits;  // significant digits, leading zeros dropped
  int fraction_digits = 0;
  size_t digit_count = 0;
  auto take_digits = [&](bool fraction) {
    while (i < end && text[i] >= '0' && text[i] <= '9') {
      ++digit_count;
      if (!(digits.empty() && text[i] == '0')) digits += text[i];
      if (fraction) ++fraction_digits;
      ++i;
    }
  };
  take_digits(false);
  if (allow_fraction_and_exponent && i < end && text[i] == '.') {
    ++i;
    take_digits(true);
  }
  if (digit_count == 0) return NumberRead::malformed;
  int64_t exponent = 0;
  if (allow_fraction_and_exponent && i < end && (text[i] == 'e' || text[i] == 'E')) {
    ++i;
    bool exponent_negative = false;
    if (i < end && (text[i] == '+' || text[i] == '-')) exponent_negative = text[i++] == '-';
    size_t exponent_digits = 0;
    while (i < end && text[i] >= '0' && text[i] <= '9') {
      if (exponent < 100000) exponent = exponent * 10 + (text[i] - '0');  // far beyond any int64 either way
      ++i, ++exponent_digits;
    }
    if (exponent_digits == 0) return NumberRead::malformed;
    if (exponent_negative) exponent = -exponent;
  }
  if (i != end) return NumberRead::malformed;
  if (digits.empty()) {
    out = 0;
    return NumberRead::ok;
  }
  // value = digits * 10^shift at the target scale.
  const int64_t shift = exponent - fraction_digits + scale;
  const int64_t kept_length = static_cast<int64_t>(digits.size()) + shift;
  if (kept_length > 19) return NumberRead::out_of_range;
  Wide magnitude = 0;
  char first_dropped = '0';
  if (shift >= 0) {
    for (const char d : digits) magnitude = magnitude * 10 + (d - '0');
    magnitude *= pow10_wide(static_cast<int>(shift));
  } else {
    for (int64_t k = 0; k < kept_length; ++k) magnitude = magnitude * 10 + (digits[static_cast<size_t>(k)] - '0');
    if (kept_length >= 0) first_dropped = digits[static_cast<size_t>(kept_length)];
  }
  if (first_dropped >= '5') magnitude += 1;
  const auto value = narrow(negative ? -magnitude : magnitude);
  if (!value) return NumberRead::out_of_range;
  out = *value;
  return NumberRead::ok;
}


}  // namespace tamis::expr
