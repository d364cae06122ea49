// What fill_from_group and carry_forward share: rebuilding a column with
// some of its NULL cells filled. A chunk in which nothing is filled is
// shared with the input; a text chunk in which few are is stored as a delta
// over it (table.hpp).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "change.hpp"
#include "steps/row_key.hpp"
#include "steps/typed_support.hpp"
#include "table.hpp"

namespace tamis {

// visit(size_t row, bool is_null) -> std::optional<std::string>: called for
// every row in order; for a NULL cell it may return the fill value as a
// one-column key (row_key.hpp), in the column's own type.
template <class Visit>
ColumnPtr fill_nulls(const Column& column, const std::string& name, ChangeRecord& change, Visit&& visit) {
  auto out = std::make_shared<Column>(column.type(), column.scale());
  std::vector<std::pair<size_t, std::string>> fills;
  std::string shown;
  size_t row = 0;
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    fills.clear();
    for (size_t i = 0; i < chunk.rows; ++i, ++row)
      if (auto fill = visit(row, chunk.is_null(i))) fills.emplace_back(i, std::move(*fill));
    if (fills.empty()) {
      out->append_chunk(column.chunk_ptr(k));
      continue;
    }
    if (column.type() == Type::text) {
      TextDeltaBuilder filled(column.chunk_ptr(k));
      for (const auto& [i, fill] : fills) {
        const std::string_view value = single_key_cell(fill).text;
        filled.replace(i, value);
        change.note_change(name, "NULL", value);
      }
      out->append_chunk(filled.finish());
      continue;
    }
    size_t next = 0;  // the next entry of fills
    auto fill_at = [&](size_t i) -> const std::string* {
      if (next < fills.size() && fills[next].first == i) return &fills[next++].second;
      return nullptr;
    };
    TypedChunkBuilder builder;
    builder.reserve(chunk.rows);
    for (size_t i = 0; i < chunk.rows; ++i) {
      if (const std::string* fill = fill_at(i)) {
        const int64_t value = single_key_cell(*fill).number;
        builder.append(value);
        shown.clear();
        append_canonical_value(column.type(), column.scale(), value, shown);
        change.note_change(name, "NULL", shown);
      } else if (chunk.is_null(i)) {
        builder.append_null();
      } else {
        builder.append(chunk.numbers[i]);
      }
    }
    out->append_chunk(builder.finish());
  }
  return out;
}

}  // namespace tamis
