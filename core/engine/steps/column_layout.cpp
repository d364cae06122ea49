#include "steps/column_layout.hpp"

namespace tamis {

Schema ColumnLayoutStep::output_schema(const Schema& input) const {
  Schema out;
  for (size_t k = 0; k < layout_.sources.size(); ++k) {
    ColumnSchema column = input[layout_.sources[k]];
    column.name = layout_.names[k];
    out.push_back(std::move(column));
  }
  return out;
}

Result<Table> ColumnLayoutStep::apply(const Table& batch, StepState*, ChangeRecord& change) const {
  std::vector<ColumnPtr> columns;
  for (const size_t c : layout_.sources) columns.push_back(batch.column_ptr(c));
  change.rows_in += batch.row_count();
  change.rows_out += batch.row_count();
  // The columns come from one table, so their lengths agree.
  return Table::make(layout_.names, std::move(columns), batch.source_lines_ptr()).value();
}

nlohmann::ordered_json ColumnLayoutStep::column_list_parameters(const std::vector<size_t>& columns) const {
  nlohmann::ordered_json p;
  p["columns"] = nlohmann::ordered_json::array();
  for (const size_t c : columns) p["columns"].push_back(input_[c].name);
  return p;
}

}  // namespace tamis
