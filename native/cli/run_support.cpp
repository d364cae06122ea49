#include "run_support.hpp"

#include <algorithm>
#include <cmath>
#include <filesystem>

#include "scalars.hpp"

namespace tamis::cli {

Result<RejectCap> RejectCap::parse(const std::string& text) {
  RejectCap cap;
  cap.text = text;
  auto bad = [&] {
    return usage_error("the rejects cap must be a count such as 25 or a share such as 0.5% (got '" + text + "')");
  };
  if (text.empty()) return bad();
  const bool percent = text.back() == '%';
  const std::string number = percent ? text.substr(0, text.size() - 1) : text;
  if (percent) {
    if (number_shape(number) == NumberShape::not_a_number || number[0] == '-' || number[0] == '+') return bad();
    const auto value = parse_double(number);
    if (!value || !std::isfinite(*value) || *value > 100) return bad();
    cap.percent = *value;
    return cap;
  }
  if (number.size() > 18 || !std::all_of(number.begin(), number.end(), [](char c) { return c >= '0' && c <= '9'; }))
    return bad();
  cap.count = std::stoull(number);
  return cap;
}

bool RejectCap::exceeded(uint64_t rejected, uint64_t rows_read) const {
  if (count) return rejected > *count;
  // A share of the rows read: 1% of 250 rows allows 2 (2.5 rounded down).
  return static_cast<double>(rejected) > *percent / 100.0 * static_cast<double>(rows_read);
}

bool same_file(const std::string& a, const std::string& b) {
  std::error_code ec;
  return a != "-" && b != "-" && std::filesystem::exists(a, ec) && std::filesystem::exists(b, ec) &&
         std::filesystem::equivalent(a, b, ec);
}

}  // namespace tamis::cli
