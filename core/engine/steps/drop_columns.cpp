#include "steps/drop_columns.hpp"

#include <algorithm>

#include "sql/sql_step.hpp"
#include "steps/column_layout.hpp"

namespace tamis {

namespace {

ColumnLayout layout_without(const Schema& input, const std::vector<size_t>& dropped) {
  ColumnLayout layout;
  for (size_t c = 0; c < input.size(); ++c)
    if (std::find(dropped.begin(), dropped.end(), c) == dropped.end()) {
      layout.sources.push_back(c);
      layout.names.push_back(input[c].name);
    }
  return layout;
}

class DropColumns final : public ColumnLayoutStep {
 public:
  DropColumns(std::vector<size_t> dropped, Schema input)
      : ColumnLayoutStep(input, layout_without(input, dropped)), dropped_(std::move(dropped)) {}

  std::string_view op() const override { return "drop_columns"; }
  std::string describe() const override {
    return std::string(dropped_.size() == 1 ? "Remove the column " : "Remove the columns ") +
           join_names(input_, dropped_) + ".";
  }
  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    out.select = "SELECT ";
    for (size_t c = 0; c < input_.size(); ++c)
      if (std::find(dropped_.begin(), dropped_.end(), c) == dropped_.end()) out.select += sql.column(c) + ", ";
    out.select += sql.line() + std::string("\nFROM ") + sql.from;
    return out;
  }
  nlohmann::ordered_json parameters() const override { return column_list_parameters(dropped_); }

 private:
  std::vector<size_t> dropped_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_drop_columns(StepParams& params) {
  auto columns = params.columns("columns");
  if (!columns) return columns.take_error();
  if (columns->size() == params.input().size())
    return params.error("columns", "would drop every column; at least one must remain");
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new DropColumns(std::move(*columns), params.input()));
}

}  // namespace tamis
