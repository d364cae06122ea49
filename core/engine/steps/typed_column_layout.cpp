#include "steps/typed_column_layout.hpp"

namespace tamis {

Schema layout_schema(const ColumnLayout& layout, const Schema& input) {
  Schema out;
  for (size_t k = 0; k < layout.sources.size(); ++k) {
    ColumnSchema column = input[layout.sources[k]];
    column.name = layout.names[k];
    out.push_back(std::move(column));
  }
  return out;
}

Table layout_table(const ColumnLayout& layout, const Table& batch, ChangeRecord& change) {
  std::vector<ColumnPtr> columns;
  for (const size_t c : layout.sources) columns.push_back(batch.column_ptr(c));
  change.rows_in += batch.row_count();
  change.rows_out += batch.row_count();
  // The columns come from one table, so their lengths agree.
  return Table::make(layout.names, std::move(columns), batch.source_lines_ptr()).value();
}

}  // namespace tamis
