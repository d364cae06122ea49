#include "steps/reorder_columns.hpp"

#include <algorithm>

#include "steps/typed_column_layout.hpp"

namespace tamis {

namespace {

class ReorderColumns final : public Step {
 public:
  ReorderColumns(std::vector<size_t> first, Schema input) : first_(std::move(first)), input_(std::move(input)) {
    layout_.sources = first_;
    for (size_t c = 0; c < input_.size(); ++c)
      if (std::find(first_.begin(), first_.end(), c) == first_.end()) layout_.sources.push_back(c);
    for (const size_t c : layout_.sources) layout_.names.push_back(input_[c].name);
  }

  std::string_view op() const override { return "reorder_columns"; }
  std::string describe() const override {
    if (first_.size() == input_.size()) return "Put the columns in the order " + join_names(input_, first_) + ".";
    if (first_.size() == 1) return "Put the column " + input_[first_[0]].name + " first and the others after it.";
    return "Put the columns " + join_names(input_, first_) + " first, in that order, and the others after them.";
  }
  Schema output_schema(const Schema& input) const override { return layout_schema(layout_, input); }
  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    return layout_table(layout_, batch, change);
  }
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }
  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = nlohmann::ordered_json::array();
    for (const size_t c : first_) p["columns"].push_back(input_[c].name);
    return p;
  }

 private:
  std::vector<size_t> first_;
  Schema input_;
  ColumnLayout layout_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_reorder_columns(StepParams& params) {
  auto columns = params.columns("columns");
  if (!columns) return columns.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new ReorderColumns(std::move(*columns), params.input()));
}

}  // namespace tamis
