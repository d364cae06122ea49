#include "steps/rename_columns.hpp"

#include "sql/sql_step.hpp"
#include "steps/column_layout.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

ColumnLayout layout_renamed(const Schema& input, const std::vector<std::pair<size_t, std::string>>& renamed) {
  ColumnLayout layout;
  for (size_t c = 0; c < input.size(); ++c) {
    layout.sources.push_back(c);
    layout.names.push_back(input[c].name);
  }
  for (const auto& [c, name] : renamed) layout.names[c] = name;
  return layout;
}

class RenameColumns final : public ColumnLayoutStep {
 public:
  // renamed: (input column, new name) in the order the recipe lists them.
  RenameColumns(std::vector<std::pair<size_t, std::string>> renamed, Schema input)
      : ColumnLayoutStep(input, layout_renamed(input, renamed)), renamed_(std::move(renamed)) {}

  std::string_view op() const override { return "rename_columns"; }
  std::string describe() const override {
    std::string out = "Rename ";
    for (size_t i = 0; i < renamed_.size(); ++i) {
      if (i) out += i + 1 == renamed_.size() ? " and " : ", ";
      out += input_[renamed_[i].first].name + " to " + renamed_[i].second;
    }
    return out + ".";
  }
  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    out.select = "SELECT ";
    for (size_t c = 0; c < input_.size(); ++c) {
      out.select += sql.column(c);
      for (const auto& [renamed, name] : renamed_)
        if (renamed == c) out.select += std::string(" AS ") + sql.name(name);
      out.select += ", ";
    }
    out.select += sql.line() + std::string("\nFROM ") + sql.from;
    return out;
  }
  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["map"] = nlohmann::ordered_json::object();
    for (const auto& [c, name] : renamed_) p["map"][input_[c].name] = name;
    return p;
  }

 private:
  std::vector<std::pair<size_t, std::string>> renamed_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_rename_columns(StepParams& params) {
  const nlohmann::json* map = params.raw("map");
  if (!map) return params.error("map", "is required (an object such as {\"old name\": \"new name\"})");
  if (!map->is_object() || map->empty())
    return params.error("map", "expected a non-empty object such as {\"old name\": \"new name\"}, found " + map->dump());
  const Schema& input = params.input();
  std::vector<std::pair<size_t, std::string>> renamed;
  std::vector<std::string> names;
  for (const ColumnSchema& c : input) names.push_back(c.name);
  for (const auto& [old_name, new_name] : map->items()) {
    std::optional<size_t> column;
    for (size_t c = 0; c < input.size(); ++c)
      if (input[c].name == old_name) column = c;
    if (!column) {
      std::string known;
      for (const ColumnSchema& c : input) known += (known.empty() ? "" : ", ") + c.name;
      return params.error("map", "no column named '" + old_name + "' (the columns here are: " + known + ")");
    }
    if (!new_name.is_string())
      return params.error("map", "the new name of '" + old_name + "' must be text, found " + new_name.dump());
    const std::string name = new_name.get<std::string>();
    if (name.empty()) return params.error("map", "the new name of '" + old_name + "' is empty");
    if (utf8::first_invalid(name) != std::string_view::npos)
      return params.error("map", "the new name of '" + old_name + "' is not valid UTF-8");
    names[*column] = name;
    renamed.emplace_back(*column, name);
  }
  for (size_t a = 0; a < names.size(); ++a)
    for (size_t b = a + 1; b < names.size(); ++b)
      if (names[a] == names[b])
        return params.error("map", "would give two columns the name '" + names[a] + "' ('" + input[a].name +
                                       "' and '" + input[b].name + "')");
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new RenameColumns(std::move(renamed), input));
}

}  // namespace tamis
