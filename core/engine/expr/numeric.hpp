// Exact numbers for expressions: integers are int64, decimals are int64
// scaled by 10^scale (scale 0..18). Rounding is half away from zero.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

namespace tamis::expr {

using Wide = __int128;

constexpr int kMaxScale = 18;
constexpr int kMaxPrecision = 18;

// 10^n for 0 <= n <= 38.
Wide pow10_wide(int n);
inline int64_t pow10(int n) { return static_cast<int64_t>(pow10_wide(n)); }

std::optional<int64_t> narrow(Wide value);
// value / divisor rounded half away from zero (divisor != 0).
Wide divide_rounded(Wide value, Wide divisor);
// A scaled value at another scale: exact when growing (nullopt on overflow),
// rounded half away from zero when shrinking.
std::optional<int64_t> rescale(int64_t value, int from_scale, int to_scale);

// Reads an SQL numeric literal ([sign] digits [. digits] [E [sign] digits],
// or . digits) with surrounding spaces (U+0020, as ISO SQL's CAST strips)
// into a value at `scale`, rounding half away from zero.
enum class NumberRead : uint8_t { ok, malformed, out_of_range };
NumberRead read_scaled(std::string_view text, int scale, int64_t& out, bool allow_fraction_and_exponent = true);


}  // namespace tamis::expr
