#include "steps/reorder_columns.hpp"

#include <algorithm>

#include "sql/sql_step.hpp"
#include "steps/column_layout.hpp"

namespace tamis {

namespace {

ColumnLayout layout_with_first(const Schema& input, const std::vector<size_t>& first) {
  ColumnLayout layout;
  layout.sources = first;
  for (size_t c = 0; c < input.size(); ++c)
    if (std::find(first.begin(), first.end(), c) == first.end()) layout.sources.push_back(c);
  for (const size_t c : layout.sources) layout.names.push_back(input[c].name);
  return layout;
}

class ReorderColumns final : public ColumnLayoutStep {
 public:
  ReorderColumns(std::vector<size_t> first, Schema input)
      : ColumnLayoutStep(input, layout_with_first(input, first)), first_(std::move(first)) {}

  std::string_view op() const override { return "reorder_columns"; }
  std::string describe() const override {
    if (first_.size() == input_.size()) return "Put the columns in the order " + join_names(input_, first_) + ".";
    if (first_.size() == 1) return "Put the column " + input_[first_[0]].name + " first and the others after it.";
    return "Put the columns " + join_names(input_, first_) + " first, in that order, and the others after them.";
  }
  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    out.select = "SELECT ";
    for (const size_t c : first_) out.select += sql.column(c) + ", ";
    for (size_t c = 0; c < input_.size(); ++c)
      if (std::find(first_.begin(), first_.end(), c) == first_.end()) out.select += sql.column(c) + ", ";
    out.select += sql.line() + std::string("\nFROM ") + sql.from;
    return out;
  }
  nlohmann::ordered_json parameters() const override { return column_list_parameters(first_); }

 private:
  std::vector<size_t> first_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_reorder_columns(StepParams& params) {
  auto columns = params.columns("columns");
  if (!columns) return columns.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new ReorderColumns(std::move(*columns), params.input()));
}

}  // namespace tamis
