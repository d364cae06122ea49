#include "table.hpp"

#include <algorithm>
#include <functional>
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
  return validity.capacity() * sizeof(uint64_t) + bytes.capacity() + offsets.capacity() * sizeof(uint32_t) +
         numbers.capacity() * sizeof(int64_t) + changed.capacity() * sizeof(uint64_t) +
         changed_before.capacity() * sizeof(uint32_t) + (codes ? codes->capacity() * sizeof(uint16_t) : 0);
}

size_t ColumnChunk::text_bytes() const {
  switch (layout) {
    case TextLayout::plain: return bytes.size();
    case TextLayout::delta: return bytes.size() + base->text_bytes();
    case TextLayout::dictionary: return offsets.size() > 1 ? bytes.size() / (offsets.size() - 1) * rows : 0;
  }
  return bytes.size();
}

TextChunkBuilder::TextChunkBuilder() : chunk_(std::make_shared<ColumnChunk>()) {
  chunk_->offsets.push_back(0);
}

void TextChunkBuilder::reserve(size_t rows, size_t bytes) {
  chunk_->offsets.reserve(rows + 1);
  chunk_->bytes.reserve(bytes);
}

void TextChunkBuilder::mark_null(size_t row) {
  chunk_->set_own_null(row);
  ++nulls_;
}

void TextChunkBuilder::append_null() {
  mark_null(rows());
  chunk_->offsets.push_back(static_cast<uint32_t>(chunk_->bytes.size()));
}

void TextChunkBuilder::append_rows(const ColumnChunk& from, size_t begin, size_t end) {
  if (begin >= end) return;
  if (!from.is_plain()) {
    for (size_t i = begin; i < end; ++i) {
      if (from.is_null(i)) append_null();
      else append(from.text(i));
    }
    return;
  }
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

std::shared_ptr<const ColumnChunk> TextChunkBuilder::finish() { return finish_mutable(); }

std::shared_ptr<ColumnChunk> TextChunkBuilder::finish_mutable() {
  auto& c = *chunk_;
  c.rows = c.offsets.size() - 1;
  if (nulls_ > 0) c.validity.resize((c.rows + 63) / 64, ~uint64_t{0});
  // Over-reservation beyond 10% is returned to the allocator: the table's
  // memory budget (1.5x the file) has no room for doubling slack.
  if (c.bytes.capacity() > c.bytes.size() + c.bytes.size() / 10 + 64) c.bytes.shrink_to_fit();
  if (c.offsets.capacity() > c.offsets.size() + c.offsets.size() / 10 + 16) c.offsets.shrink_to_fit();
  std::shared_ptr<ColumnChunk> out = std::move(chunk_);
  chunk_ = std::make_shared<ColumnChunk>();
  chunk_->offsets.push_back(0);
  nulls_ = 0;
  return out;
}

// Distinct values are found with a small open-addressing hash table of
// codes; the search stops once the dictionary could no longer be smaller
// than the plain chunk (half as many distinct values as rows).
std::shared_ptr<const ColumnChunk> shared_repeated_values(std::shared_ptr<const ColumnChunk> chunk) {
  const ColumnChunk& in = *chunk;
  const size_t limit = std::min<size_t>(in.rows / 2, UINT16_MAX);
  if (!in.is_plain() || limit == 0) return chunk;
  size_t slots = 16;
  while (slots < 2 * limit) slots *= 2;
  constexpr uint16_t kEmpty = UINT16_MAX;
  std::vector<uint16_t> table(slots, kEmpty);
  TextChunkBuilder dictionary;
  std::vector<uint16_t> codes(in.rows);
  const std::hash<std::string_view> hash;
  for (size_t i = 0; i < in.rows; ++i) {
    const std::string_view value = in.own_text(i);  // "" for NULL rows
    size_t slot = hash(value) & (slots - 1);
    while (table[slot] != kEmpty && dictionary.chunk_->own_text(table[slot]) != value) slot = (slot + 1) & (slots - 1);
    if (table[slot] == kEmpty) {
      if (dictionary.rows() == limit) return chunk;
      table[slot] = static_cast<uint16_t>(dictionary.rows());
      dictionary.append(value);
    }
    codes[i] = table[slot];
  }
  const size_t dictionary_bytes = dictionary.bytes() + (dictionary.rows() + 1) * sizeof(uint32_t) + in.rows * sizeof(uint16_t);
  if (dictionary_bytes >= in.bytes.size() + in.offsets.size() * sizeof(uint32_t)) return chunk;
  std::shared_ptr<ColumnChunk> out = dictionary.finish_mutable();
  out->rows = in.rows;
  out->validity = in.validity;
  out->codes = std::make_shared<const std::vector<uint16_t>>(std::move(codes));
  out->layout = TextLayout::dictionary;
  return out;
}

std::shared_ptr<const ColumnChunk> with_dictionary_values(const ColumnChunk& dictionary, TextChunkBuilder& values,
                                                          const std::vector<uint8_t>& to_null) {
  std::shared_ptr<ColumnChunk> out = values.finish_mutable();
  out->rows = dictionary.rows;
  out->validity = dictionary.validity;
  out->codes = dictionary.codes;
  out->layout = TextLayout::dictionary;
  for (size_t i = 0; i < out->rows; ++i)
    if (to_null[out->code(i)]) out->set_own_null(i);
  if (!out->validity.empty()) out->validity.resize((out->rows + 63) / 64, ~uint64_t{0});
  return out;
}

Table with_repeated_values_shared(const Table& table) {
  Table out = table;
  for (size_t c = 0; c < table.column_count(); ++c) {
    const Column& column = table.column(c);
    if (column.type() != Type::text) continue;
    auto shared = std::make_shared<Column>(Type::text);
    for (size_t k = 0; k < column.chunk_count(); ++k) shared->append_chunk(shared_repeated_values(column.chunk_ptr(k)));
    out = out.with_column(c, std::move(shared));
  }
  return out;
}

std::vector<DictionaryCount> count_dictionary_values(const ColumnChunk& chunk) {
  std::vector<DictionaryCount> counts(chunk.offsets.size() - 1);
  for (size_t i = chunk.rows; i-- > 0;) {
    if (chunk.own_is_null(i)) continue;
    DictionaryCount& c = counts[chunk.code(i)];
    ++c.count;
    c.first_row = static_cast<uint32_t>(i);
  }
  for (size_t code = 0; code < counts.size(); ++code) counts[code].code = static_cast<uint32_t>(code);
  std::erase_if(counts, [](const DictionaryCount& c) { return c.count == 0; });
  std::sort(counts.begin(), counts.end(),
            [](const DictionaryCount& a, const DictionaryCount& b) { return a.first_row < b.first_row; });
  return counts;
}

TextDeltaBuilder::TextDeltaBuilder(std::shared_ptr<const ColumnChunk> input) : input_(std::move(input)) {}

void TextDeltaBuilder::replace(size_t row, std::string_view value) {
  rows_.push_back(static_cast<uint32_t>(row));
  values_.append(value);
}

void TextDeltaBuilder::replace_with_null(size_t row) {
  rows_.push_back(static_cast<uint32_t>(row));
  values_.append_null();
}

// When the input is itself a delta, the rows it changed and the rows
// replaced now are merged in row order (a replaced row takes its new value),
// so that the result is a delta over the input's base.
std::shared_ptr<ColumnChunk> TextDeltaBuilder::merged_values(std::shared_ptr<ColumnChunk> replaced,
                                                             std::vector<uint64_t>& changed) const {
  const ColumnChunk& in = *input_;
  if (!in.is_delta()) return replaced;
  for (size_t w = 0; w < changed.size(); ++w) changed[w] |= in.changed[w];
  TextChunkBuilder merged;
  merged.reserve(in.offsets.size() + rows_.size(), in.bytes.size() + replaced->bytes.size());
  size_t next_replaced = 0, next_earlier = 0;
  for (size_t w = 0; w < changed.size(); ++w) {
    for (uint64_t bits = changed[w]; bits != 0; bits &= bits - 1) {
      const size_t row = w * 64 + static_cast<size_t>(std::countr_zero(bits));
      const bool earlier = in.row_changed(row);
      const bool now = next_replaced < rows_.size() && rows_[next_replaced] == row;
      const ColumnChunk& from = now ? *replaced : in;
      const size_t j = now ? next_replaced++ : next_earlier;
      if (from.own_is_null(j)) merged.append_null();
      else merged.append(from.own_text(j));
      next_earlier += earlier;
    }
  }
  return merged.finish_mutable();
}

std::shared_ptr<const ColumnChunk> TextDeltaBuilder::finish() {
  if (rows_.empty()) return input_;
  const ColumnChunk& in = *input_;
  std::vector<uint64_t> changed((in.rows + 63) / 64, 0);
  for (const uint32_t row : rows_) changed[row >> 6] |= uint64_t{1} << (row & 63);
  std::shared_ptr<ColumnChunk> values = merged_values(values_.finish_mutable(), changed);
  std::shared_ptr<const ColumnChunk> base = in.is_delta() ? in.base : input_;
  const size_t changed_rows = values->rows;
  if (changed_rows * 2 > in.rows) {
    TextChunkBuilder whole;
    whole.reserve(in.rows, base->bytes.size() + values->bytes.size());
    size_t j = 0;
    for (size_t i = 0; i < in.rows; ++i) {
      const bool own = (changed[i >> 6] >> (i & 63)) & 1;
      if (own ? values->own_is_null(j) : base->is_null(i)) whole.append_null();
      else whole.append(own ? values->own_text(j) : base->text(i));
      j += own;
    }
    return whole.finish();
  }
  values->rows = in.rows;
  values->layout = TextLayout::delta;
  values->base = std::move(base);
  values->changed_before.resize(changed.size());
  uint32_t before = 0;
  for (size_t w = 0; w < changed.size(); ++w) {
    values->changed_before[w] = before;
    before += static_cast<uint32_t>(std::popcount(changed[w]));
  }
  values->changed = std::move(changed);
  return values;
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
  for (const auto& c : chunks_) total += c->memory_bytes() + (c->is_delta() ? c->base->memory_bytes() : 0);
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
  auto count_chunk = [&](const ColumnChunk& chunk) {
    if (seen.insert(&chunk).second) total += chunk.memory_bytes();
  };
  auto count = [&](const Column& col) {
    for (size_t k = 0; k < col.chunk_count(); ++k) {
      count_chunk(col.chunk(k));
      if (col.chunk(k).is_delta()) count_chunk(*col.chunk(k).base);
    }
  };
  for (const auto& c : columns_) count(*c);
  count(*lines_);
  return total;
}

}  // namespace tamis
