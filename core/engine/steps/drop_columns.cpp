#include "steps/drop_columns.hpp"

#include <algorithm>

#include "steps/typed_column_layout.hpp"

namespace tamis {

namespace {

class DropColumns final : public Step {
 public:
  DropColumns(std::vector<size_t> dropped, Schema input) : dropped_(std::move(dropped)), input_(std::move(input)) {
    for (size_t c = 0; c < input_.size(); ++c)
      if (std::find(dropped_.begin(), dropped_.end(), c) == dropped_.end()) {
        layout_.sources.push_back(c);
        layout_.names.push_back(input_[c].name);
      }
  }

  std::string_view op() const override { return "drop_columns"; }
  std::string describe() const override {
    return std::string(dropped_.size() == 1 ? "Remove the column " : "Remove the columns ") +
           join_names(input_, dropped_) + ".";
  }
  Schema output_schema(const Schema& input) const override { return layout_schema(layout_, input); }
  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    return layout_table(layout_, batch, change);
  }
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }
  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = nlohmann::ordered_json::array();
    for (const size_t c : dropped_) p["columns"].push_back(input_[c].name);
    return p;
  }

 private:
  std::vector<size_t> dropped_;
  Schema input_;
  ColumnLayout layout_;
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
