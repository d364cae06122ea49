#include "string_index.hpp"

#define XXH_INLINE_ALL
#include <xxhash.h>

namespace tamis {

uint32_t StringIndex::hash(std::string_view s) { return static_cast<uint32_t>(XXH3_64bits(s.data(), s.size())); }

size_t StringIndex::position(std::string_view s, uint32_t h) const {
  const size_t mask = slots_.size() - 1;
  for (size_t i = h & mask;; i = (i + 1) & mask) {
    const Slot slot = slots_[i];
    if (slot == 0) return i;
    if (static_cast<uint32_t>(slot >> 32) == h && strings_[static_cast<uint32_t>(slot) - 1] == s) return i;
  }
}

std::pair<uint32_t, bool> StringIndex::insert(std::string_view s) {
  if (2 * (strings_.size() + 1) > slots_.size()) grow();
  const uint32_t h = hash(s);
  Slot& slot = slots_[position(s, h)];
  if (slot != 0) return {static_cast<uint32_t>(slot) - 1, false};
  const auto number = static_cast<uint32_t>(strings_.size());
  strings_.push_back(s);
  slot = Slot{h} << 32 | (number + 1);
  return {number, true};
}

void StringIndex::grow() {
  std::vector<Slot> old(slots_.empty() ? 64 : 2 * slots_.size());
  old.swap(slots_);
  const size_t mask = slots_.size() - 1;
  for (const Slot slot : old) {
    if (slot == 0) continue;
    size_t i = (slot >> 32) & mask;
    while (slots_[i] != 0) i = (i + 1) & mask;
    slots_[i] = slot;
  }
}

}  // namespace tamis
