// The columnar table (design §3).
//
// A Table is named Columns plus the source line of every row. A Column is a
// list of immutable chunks shared through shared_ptr, so a new version of a
// table that changes one column shares every other column (and every
// untouched chunk) with the old one: undo and "table as of step k" cost a few
// pointers, not a copy.
//
// Storage per chunk: a validity bitmap (bit set = value present; empty bitmap
// = no NULLs; NULL is never the empty string), then either UTF-8 text in one
// byte arena with 32-bit offsets (so a chunk holds at most 4 GiB of text), or
// one int64 per row for the typed columns.
//
// A text chunk may instead be a delta over another (design §3): a bitmap of
// the rows that changed, and the new values of those rows only; the other
// rows are read from the base chunk. A step that rewrites a few cells of a
// big column (trim, to_null, map_values, fill) then costs about 1.5 bits per
// row plus what changed, not a copy. TextDeltaBuilder keeps a delta while at
// most half of its rows changed (past that a whole chunk is smaller and reads
// faster), and never stacks a delta on a delta: it merges them over the
// first base, so a read looks through one level at most.
//
// A text chunk may also keep each distinct value once (a dictionary): one
// 16-bit code per row. The workbench stores the file it loads so
// (shared_repeated_values), because extracts repeat a few names, codes and
// dates over millions of rows; a streaming run does not, since its batches
// do not stay in memory. The steps that rewrite cells one by one keep a
// dictionary a dictionary (with_dictionary_values). A NULL row's code is
// that of the empty text as loaded; a cell made NULL later keeps its code.
#pragma once

#include <bit>
#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"

namespace tamis {

enum class Type : uint8_t { text, integer, decimal, date, boolean };

std::string_view type_name(Type type);
std::optional<Type> type_from_name(std::string_view name);

// Typed values in ColumnChunk::numbers:
//   integer  the value
//   decimal  the value times 10^scale (scale is per column)
//   date     days since 1970-01-01 (proleptic Gregorian)
//   boolean  0 or 1
//
// Code that reads offsets or bytes directly must first check is_plain(): in
// a delta they hold the changed rows only, in a dictionary the distinct
// values. validity is per row except in a delta.
enum class TextLayout : uint8_t { plain, delta, dictionary };

struct ColumnChunk {
  size_t rows = 0;
  std::vector<uint64_t> validity;
  std::string bytes;
  std::vector<uint32_t> offsets;  // text: rows + 1 entries, value i is bytes[offsets[i], offsets[i+1])
  std::vector<int64_t> numbers;
  // Delta only: rows with their bit set in `changed` are this chunk's own
  // values, numbered by their rank among the changed rows; the others are
  // base's. changed_before[w] counts the changed rows in words [0, w).
  std::shared_ptr<const ColumnChunk> base;
  std::vector<uint64_t> changed;
  std::vector<uint32_t> changed_before;
  // Dictionary only: row i's value is value code(i) of bytes and offsets. A
  // step that rewrites the values shares the codes with its input.
  std::shared_ptr<const std::vector<uint16_t>> codes;
  TextLayout layout = TextLayout::plain;

  bool is_plain() const { return layout == TextLayout::plain; }
  bool is_delta() const { return layout == TextLayout::delta; }
  bool has_nulls() const { return !validity.empty() || (base && base->has_nulls()); }
  // A delta's base is never a delta, so one look through it is enough.
  bool is_null(size_t i) const {
    if (is_delta()) [[unlikely]] return row_changed(i) ? own_is_null(changed_rank(i)) : base->own_is_null(i);
    return own_is_null(i);
  }
  std::string_view text(size_t i) const {
    if (is_delta()) [[unlikely]] return row_changed(i) ? own_text(changed_rank(i)) : base->stored_text(i);
    return stored_text(i);
  }
  // Value j of the chunk's own arrays (in a delta: its j-th changed row).
  bool own_is_null(size_t j) const { return !validity.empty() && !((validity[j >> 6] >> (j & 63)) & 1); }
  std::string_view own_text(size_t j) const {
    return std::string_view(bytes.data() + offsets[j], offsets[j + 1] - offsets[j]);
  }
  // Makes value j of the own arrays NULL. The bitmap grows with set (valid)
  // bits up to j only; a finished chunk's bitmap is empty or covers every row.
  void set_own_null(size_t j) {
    if ((j >> 6) >= validity.size()) validity.resize((j >> 6) + 1, ~uint64_t{0});
    validity[j >> 6] &= ~(uint64_t{1} << (j & 63));
  }
  bool row_changed(size_t i) const { return (changed[i >> 6] >> (i & 63)) & 1; }
  uint16_t code(size_t i) const { return (*codes)[i]; }
  // About the text bytes the chunk's values add up to (an estimate for builders).
  size_t text_bytes() const;
  size_t memory_bytes() const;

 private:
  // Row i of a plain or dictionary chunk.
  std::string_view stored_text(size_t i) const {
    return layout == TextLayout::dictionary ? own_text(code(i)) : own_text(i);
  }
  size_t changed_rank(size_t i) const {
    return changed_before[i >> 6] + static_cast<size_t>(std::popcount(changed[i >> 6] & ((uint64_t{1} << (i & 63)) - 1)));
  }
};

// Appends rows to one text chunk; reserve() with a good estimate avoids
// regrowth, finish() trims what was over-reserved.
class TextChunkBuilder {
 public:
  TextChunkBuilder();
  void reserve(size_t rows, size_t bytes);
  void append(std::string_view value) {
    chunk_->bytes.append(value);
    chunk_->offsets.push_back(static_cast<uint32_t>(chunk_->bytes.size()));
  }
  void append_null();
  // Appends rows [begin, end) of a text chunk, NULLs included, with one copy
  // of their bytes.
  void append_rows(const ColumnChunk& from, size_t begin, size_t end);
  size_t rows() const { return chunk_->offsets.size() - 1; }
  size_t bytes() const { return chunk_->bytes.size(); }
  std::shared_ptr<const ColumnChunk> finish();

 private:
  friend class TextDeltaBuilder;
  friend std::shared_ptr<const ColumnChunk> shared_repeated_values(std::shared_ptr<const ColumnChunk> chunk);
  friend std::shared_ptr<const ColumnChunk> with_dictionary_values(const ColumnChunk&, TextChunkBuilder&,
                                                                   const std::vector<uint8_t>&);
  std::shared_ptr<ColumnChunk> finish_mutable();
  void mark_null(size_t row);

  std::shared_ptr<ColumnChunk> chunk_;
  size_t nulls_ = 0;
};

// Rewrites some cells of one text chunk, in increasing row order, and
// returns the smaller of a delta and a whole chunk (see above).
// The chunk with its distinct values kept once, when that is smaller; else
// the chunk itself. Plain text chunks only.
std::shared_ptr<const ColumnChunk> shared_repeated_values(std::shared_ptr<const ColumnChunk> chunk);

// A dictionary chunk whose rows keep their codes while the values change:
// value j becomes `values`' row j, and the rows holding a code j with
// to_null[j] set become NULL. `values` has one row per value of the input.
std::shared_ptr<const ColumnChunk> with_dictionary_values(const ColumnChunk& dictionary, TextChunkBuilder& values,
                                                          const std::vector<uint8_t>& to_null);

// How often each value of a dictionary chunk occurs in its non-NULL rows, in
// the order of their first such row: counting codes, not hashing text.
struct DictionaryCount {
  uint32_t code = 0;       // value `code` of the chunk's own arrays (own_text)
  uint32_t count = 0;
  uint32_t first_row = 0;  // in the chunk
};
std::vector<DictionaryCount> count_dictionary_values(const ColumnChunk& chunk);

class TextDeltaBuilder {
 public:
  explicit TextDeltaBuilder(std::shared_ptr<const ColumnChunk> input);
  void replace(size_t row, std::string_view value);
  void replace_with_null(size_t row);
  size_t replaced_rows() const { return rows_.size(); }
  // The input itself when no cell was replaced.
  std::shared_ptr<const ColumnChunk> finish();

 private:
  std::shared_ptr<ColumnChunk> merged_values(std::shared_ptr<ColumnChunk> replaced,
                                             std::vector<uint64_t>& changed) const;

  std::shared_ptr<const ColumnChunk> input_;
  std::vector<uint32_t> rows_;  // the replaced rows, with their new values in values_
  TextChunkBuilder values_;
};

class Column {
 public:
  explicit Column(Type type = Type::text, int scale = 0) : type_(type), scale_(scale) {}

  Type type() const { return type_; }
  int scale() const { return scale_; }
  size_t size() const { return starts_.back(); }

  size_t chunk_count() const { return chunks_.size(); }
  const ColumnChunk& chunk(size_t k) const { return *chunks_[k]; }
  const std::shared_ptr<const ColumnChunk>& chunk_ptr(size_t k) const { return chunks_[k]; }
  size_t chunk_start(size_t k) const { return starts_[k]; }
  void append_chunk(std::shared_ptr<const ColumnChunk> chunk);

  // Random access (binary search over chunk starts); loops should walk chunks.
  bool is_null(size_t row) const;
  std::string_view text(size_t row) const;
  int64_t number(size_t row) const;

  // Bytes of its chunks, with the bases of its deltas.
  size_t memory_bytes() const;

 private:
  std::pair<size_t, size_t> locate(size_t row) const;

  Type type_;
  int scale_;
  std::vector<std::shared_ptr<const ColumnChunk>> chunks_;
  std::vector<size_t> starts_{0};  // starts_[k] = first row of chunk k; back() = size
};

using ColumnPtr = std::shared_ptr<const Column>;

class Table {
 public:
  Table() : lines_(std::make_shared<Column>(Type::integer)) {}

  // All columns and the source-line column must have the same length.
  static Result<Table> make(std::vector<std::string> names, std::vector<ColumnPtr> columns,
                            ColumnPtr source_lines);

  size_t row_count() const { return lines_->size(); }
  size_t column_count() const { return columns_.size(); }
  const std::vector<std::string>& names() const { return names_; }
  const std::string& name(size_t c) const { return names_[c]; }
  const Column& column(size_t c) const { return *columns_[c]; }
  const ColumnPtr& column_ptr(size_t c) const { return columns_[c]; }
  std::optional<size_t> find(std::string_view name) const;

  // 1-based physical line in the source file where the row's record starts.
  const Column& source_lines() const { return *lines_; }
  const ColumnPtr& source_lines_ptr() const { return lines_; }
  uint64_t source_line(size_t row) const { return static_cast<uint64_t>(lines_->number(row)); }

  // Copy-on-write: the returned table shares every other column with this one.
  Table with_column(size_t c, ColumnPtr column) const;
  // The given columns (by position, in that order), shared, with the same rows.
  Table with_columns(const std::vector<size_t>& columns) const;

  // Appends the chunks of a batch with the same column names (no copy of data).
  Status append(const Table& batch);

  // Bytes held by the data, each shared chunk counted once.
  size_t memory_bytes() const;

 private:
  std::vector<std::string> names_;
  std::vector<ColumnPtr> columns_;
  ColumnPtr lines_;
};

// The table with shared_repeated_values applied to every text chunk.
Table with_repeated_values_shared(const Table& table);

}  // namespace tamis
