// The shared loop of the steps that rewrite text cells one by one (trim,
// collapse_spaces, change_case, normalize_unicode, replace_text, map_values,
// to_null). A chunk in which no cell changes is shared with the input; one in
// which few change is stored as a delta over it (table.hpp), so a step that
// touches few rows costs little memory; a dictionary stays a dictionary.
#pragma once

#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "change.hpp"
#include "table.hpp"

namespace tamis {

enum class CellResult : uint8_t { unchanged, replaced, null };

// A dictionary chunk is rewritten value by value: f runs once for each
// distinct value a row holds instead of once per row, and the result keeps
// the rows' codes, so what reads the column next still counts codes. Values
// are visited in code order, which is the order of their first rows.
// Changes are noted row by row, as for the other layouts, so the change
// record is the same.
template <class F>
std::shared_ptr<const ColumnChunk> map_dictionary_chunk(const std::shared_ptr<const ColumnChunk>& input,
                                                        const std::string& name, ChangeRecord& change, F& f) {
  const ColumnChunk& chunk = *input;
  const size_t value_count = chunk.offsets.size() - 1;
  std::vector<uint8_t> held(value_count, 0);
  for (size_t i = 0; i < chunk.rows; ++i)
    if (!chunk.own_is_null(i)) held[chunk.code(i)] = 1;
  std::vector<CellResult> results(value_count, CellResult::unchanged);
  std::vector<uint8_t> to_null(value_count, 0);
  TextChunkBuilder values;
  std::string replacement;
  bool changed = false;
  for (size_t j = 0; j < value_count; ++j) {
    const std::string_view value = chunk.own_text(j);
    replacement.clear();
    if (held[j]) results[j] = f(value, replacement);
    changed |= results[j] != CellResult::unchanged;
    to_null[j] = results[j] == CellResult::null;
    values.append(results[j] == CellResult::replaced ? std::string_view(replacement) : value);
  }
  if (!changed) return input;
  std::shared_ptr<const ColumnChunk> out = with_dictionary_values(chunk, values, to_null);
  for (size_t i = 0; i < chunk.rows; ++i) {
    if (chunk.own_is_null(i)) continue;
    const uint16_t code = chunk.code(i);
    if (results[code] == CellResult::unchanged) continue;
    change.note_change(name, chunk.own_text(code), to_null[code] ? std::string_view("NULL") : out->own_text(code));
  }
  return out;
}

// f(std::string_view value, std::string& replacement) -> CellResult.
// NULL cells stay NULL and are not passed to f. f sees each distinct value
// of a dictionary chunk once, so it must depend on the value alone.
template <class F>
ColumnPtr map_text_column(const Column& column, const std::string& name, ChangeRecord& change, F&& f) {
  auto out = std::make_shared<Column>(Type::text);
  std::string replacement;
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    if (chunk.layout == TextLayout::dictionary) {
      out->append_chunk(map_dictionary_chunk(column.chunk_ptr(k), name, change, f));
      continue;
    }
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
