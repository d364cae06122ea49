// The shared loop of the steps that rewrite text cells one by one (trim,
// collapse_spaces, change_case, normalize_unicode, replace_text, map_values,
// to_null). A chunk in which no cell changes is shared with the input; one in
// which few change is stored as a delta over it (table.hpp), so a step that
// touches few rows costs little memory.
#pragma once

#include <span>
#include <string>
#include <string_view>

#include "change.hpp"
#include "table.hpp"

namespace tamis {

enum class CellResult : uint8_t { unchanged, replaced, null };

// f(std::string_view value, std::string& replacement) -> CellResult.
// NULL cells stay NULL and are not passed to f.
template <class F>
ColumnPtr map_text_column(const Column& column, const std::string& name, ChangeRecord& change, F&& f) {
  auto out = std::make_shared<Column>(Type::text);
  std::string replacement;
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    TextDeltaBuilder rewritten(column.chunk_ptr(k));
    for (size_t i = 0; i < chunk.rows; ++i) {
      if (chunk.is_null(i)) continue;
      const std::string_view value = chunk.text(i);
      replacement.clear();
      const CellResult r = f(value, replacement);
      if (r == CellResult::unchanged) continue;
      if (r == CellResult::null) {
        rewritten.replace_with_null(i);
        change.note_change(name, value, "NULL");
      } else {
        rewritten.replace(i, replacement);
        change.note_change(name, value, replacement);
      }
    }
    out->append_chunk(rewritten.finish());
  }
  return out;
}

template <class F>
Table map_text_cells(const Table& in, std::span<const size_t> columns, ChangeRecord& change, F&& f) {
  Table out = in;
  for (const size_t c : columns) out = out.with_column(c, map_text_column(in.column(c), in.name(c), change, f));
  change.rows_in += in.row_count();
  change.rows_out += in.row_count();
  return out;
}

}  // namespace tamis
