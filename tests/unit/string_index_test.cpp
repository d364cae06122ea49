// StringIndex against the C++ standard library's std::unordered_map (the
// reference: libstdc++ natively, libc++ in the WebAssembly build): the same
// strings get the same numbers, in order of first insertion, through every
// growth of the table.
#include <doctest/doctest.h>

#include <string>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include "string_index.hpp"

using tamis::StringIndex;

TEST_CASE("StringIndex numbers strings as a standard map would, through every growth") {
  // 200,000 strings with many repeats: a 64-bit linear congruential generator
  // (Knuth's MMIX constants, TAOCP vol. 2, 3.3.4) picks among 50,000 shapes,
  // including the empty string and strings that differ only after a NUL.
  std::vector<std::string> strings;
  uint64_t state = 1;
  for (int i = 0; i < 200000; ++i) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    const uint64_t pick = (state >> 33) % 50000;
    std::string s;
    if (pick != 0) s.append("v").append(std::to_string(pick));
    if (pick % 7 == 0) s += std::string("\0x", 2) + std::to_string(pick % 3);
    strings.push_back(std::move(s));
  }
  StringIndex index;
  std::unordered_map<std::string_view, uint32_t> reference;
  for (const std::string& s : strings) {
    const auto [number, added] = index.insert(s);
    const auto [it, reference_added] = reference.try_emplace(s, static_cast<uint32_t>(reference.size()));
    REQUIRE(added == reference_added);
    REQUIRE(number == it->second);
  }
  CHECK(index.size() == reference.size());
  // Once grown to its final size, every string still has its number, and a
  // string never inserted gets the next one.
  for (const auto& [s, number] : reference) REQUIRE(index.insert(s) == std::pair<uint32_t, bool>{number, false});
  const auto next = static_cast<uint32_t>(reference.size());
  CHECK(index.insert("not inserted") == std::pair<uint32_t, bool>{next, true});
  CHECK(index.insert(std::string_view("v7\0x2", 5)) == std::pair<uint32_t, bool>{next + 1, true});  // 7 % 3 is 1
}

TEST_CASE("an empty StringIndex gives its first string the number 0") {
  StringIndex index;
  CHECK(index.size() == 0);
  CHECK(index.insert("") == std::pair<uint32_t, bool>{0, true});
  CHECK(index.insert("") == std::pair<uint32_t, bool>{0, false});
  CHECK(index.size() == 1);
}
