// Distinct strings numbered 0, 1, 2, ... in the order they were first
// inserted, for counting the values of a column.
//
// An open-addressing table probed linearly (Knuth, TAOCP vol. 3, 6.4,
// algorithm L), kept at most half full. A slot is 8 bytes: the low 32 bits
// of the string's XXH3 hash above the string's number + 1 (0 = empty). A
// slot's home position is those same 32 bits masked (2^31 distinct strings
// would take 32 GiB of views alone, so the table stays within 2^32 slots):
// growing re-places slots without hashing any string again, and a probe
// compares bytes only when the 32 bits agree.
//
// The index keeps views: the caller keeps the bytes alive (a table's arenas).
#pragma once

#include <cstdint>
#include <string_view>
#include <utility>
#include <vector>

namespace tamis {

class StringIndex {
 public:
  // The string's number, and whether it was added by this call.
  std::pair<uint32_t, bool> insert(std::string_view s);
  size_t size() const { return strings_.size(); }

 private:
  using Slot = uint64_t;
  static uint32_t hash(std::string_view s);
  // The slot holding s, or the empty slot where it belongs.
  size_t position(std::string_view s, uint32_t h) const;
  void grow();

  std::vector<Slot> slots_;
  std::vector<std::string_view> strings_;
};

}  // namespace tamis
