// Row keys and the index of seen keys, for the steps that compare whole
// rows or groups of rows: deduplicate, require (rule unique), fill_from_group
// and carry_forward.
//
// A key is the compared values of some columns, encoded as one byte string
// per row, so that two keys are equal exactly when the values are: text is
// compared code point by code point (optionally after trimming Unicode
// White_Space at both ends, or after Unicode full case folding), typed values
// by value, and NULL equals NULL (as SQL's GROUP BY, DISTINCT and PARTITION BY
// treat it).
//
// RowIndex remembers keys with bounded memory: an open-addressing table of
// 8-byte slots (32 bits of the key's 64-bit hash and where the key is
// stored), and the keys themselves in a store that moves to a temporary file
// (std::tmpfile) once it outgrows its memory budget. A hash is never trusted
// alone: every hash match is confirmed against the stored key byte for
// byte, so a collision can never make two distinct keys equal.
#pragma once

#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"
#include "steps/step.hpp"
#include "table.hpp"

namespace tamis {

enum class KeyCompare : uint8_t {
  exact,     // as written
  trimmed,   // without Unicode White_Space at either end
  casefold,  // after Unicode full case folding (CaseFolding.txt C + F), by ICU
};

// The keys of every row of a batch.
class RowKeys {
 public:
  RowKeys(const Table& batch, std::span<const size_t> columns, KeyCompare compare = KeyCompare::exact);
  size_t size() const { return has_null_.size(); }
  std::string_view key(size_t row) const {
    const size_t begin = row == 0 ? 0 : ends_[row - 1];
    return std::string_view(bytes_.get() + begin, ends_[row] - begin);
  }
  // Whether any of the row's compared values is NULL.
  bool has_null(size_t row) const { return has_null_[row] != 0; }

 private:
  void reserve(size_t bytes);

  std::unique_ptr<char[]> bytes_;
  size_t size_ = 0;
  size_t capacity_ = 0;
  std::vector<size_t> ends_;
  std::vector<uint8_t> has_null_;
};

// The value of a one-column key.
struct KeyCell {
  bool is_null = false;
  std::string_view text;  // text columns
  int64_t number = 0;     // typed columns
};
KeyCell single_key_cell(std::string_view key);

// The value of a one-column key for messages: 'Oak', 12.50 or NULL.
std::string describe_value(std::string_view key, Type type, int scale);

// The columns and values of a key, for messages: "district='North', street=NULL".
std::string describe_key(std::string_view key, const Schema& schema, std::span<const size_t> columns);

using KeyHash = uint64_t (*)(std::string_view key);
uint64_t default_key_hash(std::string_view key);  // XXH3, 64 bits

struct RowIndexTuning {
  // Bytes of stored keys kept in memory before the rest goes to a temporary
  // file. The table of slots (8 bytes each, at most 4 per 3 keys after
  // growth) is not counted: it is the "hash per row" the design allows.
  size_t memory_budget = size_t{8} << 20;
  KeyHash hash = default_key_hash;
};

// The default tuning; the environment variable TAMIS_DEDUPLICATE_MEMORY
// (a number of bytes) overrides the memory budget, so a run can be made to
// spill on purpose.
RowIndexTuning default_row_index_tuning();

class RowIndex {
 public:
  explicit RowIndex(RowIndexTuning tuning);
  ~RowIndex();
  RowIndex(const RowIndex&) = delete;
  RowIndex& operator=(const RowIndex&) = delete;

  struct Entry {
    uint64_t record = 0;  // where the key is stored
    uint64_t line = 0;    // the source line stored with it
  };
  // The hash of a key (the tuning's function); find and insert take it so a
  // caller can prefetch the slots of the keys it will look up next.
  uint64_t hash_of(std::string_view key) const { return tuning_.hash(key); }
  void prefetch(uint64_t hash) const;
  // The entry of an equal key, if any.
  Result<std::optional<Entry>> find(std::string_view key, uint64_t hash);
  // Stores the key with `line` unless an equal key is already there; either
  // way returns that key's entry, and whether it was stored now.
  Result<std::pair<Entry, bool>> insert(std::string_view key, uint64_t hash, uint64_t line);
  // Replaces the line stored with a key.
  Status set_line(uint64_t record, uint64_t line);

  size_t size() const { return count_; }
  bool spilled() const { return spill_ != nullptr; }
  // Hash matches whose keys turned out to differ.
  uint64_t hash_collisions() const { return collisions_; }

 private:
  // A slot is 0 when empty, else (upper 32 bits of the hash) << 32 | (record
  // offset / 8 + 1): records are 8-byte aligned, so 32 GiB of keys fit.
  using Slot = uint64_t;
  // Finds the key: its slot index, and its entry when present.
  Result<std::pair<size_t, std::optional<Entry>>> probe(std::string_view key, uint32_t hash);
  Result<bool> stored_key_equals(uint64_t record, std::string_view key, uint64_t& line);
  Result<uint64_t> store(std::string_view key, uint64_t line);
  Status seek(uint64_t offset);
  size_t spill_write_bytes() const;
  Status flush_spill();
  void grow();

  // Zeroed by calloc, which takes fresh pages from the system already zero
  // instead of writing every byte of a grown table.
  struct FreeSlots {
    void operator()(Slot* slots) const { std::free(slots); }
  };
  using SlotTable = std::unique_ptr<Slot[], FreeSlots>;
  static SlotTable empty_slots(size_t count);

  RowIndexTuning tuning_;
  SlotTable slots_;
  size_t slot_count_ = 0;  // a power of two
  size_t count_ = 0;
  uint64_t collisions_ = 0;
  std::string memory_;           // records [line u64][length u32][key][padding], while they fit the budget
  std::FILE* spill_ = nullptr;   // the records after them
  uint64_t spill_base_ = 0;      // record offsets from here on are in the file
  uint64_t flushed_ = 0;         // bytes written to the file
  std::string pending_;          // records not yet written, which follow the flushed ones
  std::string scratch_;
};

}  // namespace tamis
