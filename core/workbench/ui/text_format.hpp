// Small text helpers shared by the screens: counts and sizes for people,
// case-blind search.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

namespace tamis::ui {

// 1234567 -> "1,234,567".
std::string count_text(uint64_t count);
// 1536 -> "1.5 KB".
std::string byte_size_text(uint64_t bytes);
// "3 rows" / "1 row".
std::string plural(uint64_t count, std::string_view one, std::string_view many);
bool contains_ignoring_ascii_case(std::string_view haystack, std::string_view needle);

}  // namespace tamis::ui
