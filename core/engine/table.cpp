#include "table.hpp"

#include <algorithm>
#include <unordered_set>

namespace tamis {

namespace {
constexpr std::string_view kTypeNames[] = {"text", "integer", "decimal", "date", "boolean"};
}

std::string_view type_name(Type type) { return kTypeNames[static_cast<size_t>(type)]; }

std::optional<Type> type_from_name(std::string_view name) {
  for (size_t i = 0; i < std::size(kTypeNames); ++i)
    if (kTypeNames[i] == name) return static_cast<Type>(i);
  return std::nullopt;
}

size_t ColumnChunk::memory_bytes() const {
  return validity.capacity() * sizeof(uint64_t) + bytes.capacity() +
         offsets.capacity() * sizeof(uint32_t) + numbers.capacity() * sizeof(int64_t);
}

TextChunkBuilder::TextChunkBuilder() : chunk_(std::make_shared<ColumnChunk>()) {
  chunk_->offsets.push_back(0);
}

void TextChunkBuilder::reserve(size_t rows, size_t bytes) {
  chunk_->offsets.reserve(rows + 1);
  chunk_->bytes.reserve(bytes);
}

void TextChunkBuilder::mark_null(size_t row) {
  auto& validity = chunk_->validity;
  if ((row >> 6) >= validity.size()) validity.resize((row >> 6) + 1, ~uint64_t{0});
  validity[row >> 6] &= ~(uint64_t{1} << (row & 63));
  ++nulls_;
}

void TextChunkBuilder::append_null() {
  mark_null(rows());
  chunk_->offsets.push_back(static_cast<uint32_t>(chunk_->bytes.size()));
}

void TextChunkBuilder::append_rows(const ColumnChunk& from, size_t begin, size_t end) {
  if (begin >= end) return;
  auto& c = *chunk_;
  const size_t first_row = rows();
  const uint32_t start = from.offsets[begin];
  // Unsigned arithmetic modulo 2^32: the offsets move by the difference
  // between where the run starts here and where it started there.
  const uint32_t shift = static_cast<uint32_t>(c.bytes.size()) - start;
  c.bytes.append(from.bytes, start, from.offsets[end] - start);
  const size_t at = c.offsets.size();
  c.offsets.resize(at + (end - begin));
  uint32_t* out = c.offsets.data() + at;
  const uint32_t* in = from.offsets.data() + begin + 1;
  for (size_t i = 0; i < end - begin; ++i) out[i] = in[i] + shift;
  if (from.has_nulls())
    for (size_t i = begin; i < end; ++i)
      if (from.is_null(i)) mark_null(first_row + (i - begin));
}

std::shared_ptr<const ColumnChunk> TextChunkBuilder::finish() {
  auto& c = *chunk_;
  c.rows = c.offsets.size() - 1;
  if (nulls_ > 0) c.validity.resize((c.rows + 63) / 64, ~uint64_t{0});
  // Over-reservation beyond 10% is returned to the allocator: the table's
  // memory budget (1.5x the file) has no room for doubling slack.
  if (c.bytes.capacity() > c.bytes.size() + c.bytes.size() / 10 + 64) c.bytes.shrink_to_fit();
  if (c.offsets.capacity() > c.offsets.size() + c.offsets.size() / 10 + 16) c.offsets.shrink_to_fit();
  std::shared_ptr<const ColumnChunk> out = std::move(chunk_);
  chunk_ = std::make_shared<ColumnChunk>();
  chunk_->offsets.push_back(0);
  nulls_ = 0;
  return out;
}

void Column::append_chunk(std::shared_ptr<const ColumnChunk> chunk) {
  starts_.push_back(starts_.back() + chunk->rows);
  chunks_.push_back(std::move(chunk));
}

std::pair<size_t, size_t> Column::locate(size_t row) const {
  const auto it = std::upper_bound(starts_.begin(), starts_.end(), row);
  const size_t k = static_cast<size_t>(it - starts_.begin()) - 1;
  return {k, row - starts_[k]};
}

bool Column::is_null(size_t row) const {
  const auto [k, i] = locate(row);
  return chunks_[k]->is_null(i);
}

std::string_view Column::text(size_t row) const {
  const auto [k, i] = locate(row);
  return chunks_[k]->text(i);
}

int64_t Column::number(size_t row) const {
  const auto [k, i] = locate(row);
  return chunks_[k]->numbers[i];
}

size_t Column::memory_bytes() const {
  size_t total = 0;
  for (const auto& c : chunks_) total += c->memory_bytes();
  return total;
}

Result<Table> Table::make(std::vector<std::string> names, std::vector<ColumnPtr> columns,
                          ColumnPtr source_lines) {
  if (names.size() != columns.size())
    return usage_error("a table needs one name per column");
  for (const auto& c : columns)
    if (c->size() != source_lines->size())
      return usage_error("all columns of a table must have the same number of rows");
  Table t;
  t.names_ = std::move(names);
  t.columns_ = std::move(columns);
  t.lines_ = std::move(source_lines);
  return t;
}

std::optional<size_t> Table::find(std::string_view name) const {
  for (size_t c = 0; c < names_.size(); ++c)
    if (names_[c] == name) return c;
  return std::nullopt;
}

Table Table::with_column(size_t c, ColumnPtr column) const {
  Table t = *this;
  t.columns_[c] = std::move(column);
  return t;
}

Table Table::with_columns(const std::vector<size_t>& columns) const {
  Table t;
  t.lines_ = lines_;
  for (const size_t c : columns) {
    t.names_.push_back(names_[c]);
    t.columns_.push_back(columns_[c]);
  }
  return t;
}

Status Table::append(const Table& batch) {
  if (columns_.empty() && row_count() == 0) {
    *this = batch;
    return Ok{};
  }
  if (batch.names_ != names_)
    return usage_error("cannot append a batch with different columns");
  auto extend = [](const ColumnPtr& base, const Column& more) {
    auto grown = std::make_shared<Column>(*base);
    for (size_t k = 0; k < more.chunk_count(); ++k) grown->append_chunk(more.chunk_ptr(k));
    return grown;
  };
  for (size_t c = 0; c < columns_.size(); ++c) columns_[c] = extend(columns_[c], *batch.columns_[c]);
  lines_ = extend(lines_, *batch.lines_);
  return Ok{};
}

size_t Table::memory_bytes() const {
  std::unordered_set<const ColumnChunk*> seen;
  size_t total = 0;
  auto count = [&](const Column& col) {
    for (size_t k = 0; k < col.chunk_count(); ++k)
      if (seen.insert(&col.chunk(k)).second) total += col.chunk(k).memory_bytes();
  };
  for (const auto& c : columns_) count(*c);
  count(*lines_);
  return total;
}

}  // namespace tamis
