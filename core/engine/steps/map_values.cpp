#include "steps/map_values.hpp"

#include <map>

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

class MapValues final : public Step {
 public:
  // entries: the map as written; lookup: the same keys, case-folded when ignore_case.
  MapValues(size_t column, std::vector<std::pair<std::string, std::string>> entries,
            std::map<std::string, std::string, std::less<>> lookup, bool ignore_case, Schema input)
      : column_(column),
        entries_(std::move(entries)),
        lookup_(std::move(lookup)),
        ignore_case_(ignore_case),
        input_(std::move(input)) {}

  std::string_view op() const override { return "map_values"; }

  std::string describe() const override {
    const size_t n = entries_.size();
    return "In " + input_[column_].name + ", replace " + std::to_string(n) + (n == 1 ? " listed value" : " listed values") +
           " with " + (n == 1 ? "its" : "their") + " preferred spelling" + (ignore_case_ ? ", ignoring case." : ".");
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    const size_t columns[] = {column_};
    return map_text_cells(batch, columns, change, [&](std::string_view v, std::string& out) {
      const auto it = ignore_case_ ? lookup_.find(fold_case(v)) : lookup_.find(v);
      if (it == lookup_.end() || it->second == v) return CellResult::unchanged;
      out = it->second;
      return CellResult::replaced;
    });
  }

  // CASE x WHEN 'old' THEN 'new' ... compared as bytes is exact. With
  // ignore_case the value is case-folded by nested REPLACE calls for the
  // characters that fold into the keys' characters (sql::case_fold_for),
  // then compared with the folded keys.
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const Dialect d = sql.dialect;
    const std::string x = sql.column(column_);
    std::string operand = sql.key(column_);
    std::string from = sql.from, with;
    if (ignore_case_) {
      std::u32string alphabet;
      for (const auto& entry : lookup_)
        for (size_t i = 0; i < entry.first.size();) {
          const char32_t c = utf8::next(entry.first, i);
          if (alphabet.find(c) == std::u32string::npos) alphabet.push_back(c);
        }
      auto folding = sql::case_folding_for(alphabet);
      if (!folding) return usage_error("a folded key holds a character that case folding changes");
      const ReplacedValues folded = replaced_values(sql, {x}, *folding, "tamis_folded");
      operand = sql::exact_key(d, folded.results[0], Type::text);
      from = folded.from;
      with = folded.with;
    }
    std::string cases = std::string("CASE ") + operand;
    for (const auto& [from, to] : entries_) {
      const std::string key = ignore_case_ ? fold_case(from) : from;
      cases += std::string("\n         WHEN ") + sql::exact_key(d, sql.text(key), Type::text) + std::string(" THEN ") + sql.text(to);
    }
    cases += std::string("\n         ELSE ") + x + " END";
    SqlStepText out;
    out.select = with + sql.select_replacing({{column_, cases}}, from);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    p["map"] = nlohmann::ordered_json::object();
    for (const auto& [from, to] : entries_) p["map"][from] = to;
    p["ignore_case"] = ignore_case_;
    return p;
  }

 private:
  size_t column_;
  std::vector<std::pair<std::string, std::string>> entries_;
  std::map<std::string, std::string, std::less<>> lookup_;
  bool ignore_case_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_map_values(StepParams& params) {
  auto column = text_column(params, "column");
  if (!column) return column.take_error();
  const nlohmann::json* map = params.raw("map");
  if (!map) return params.error("map", "is required (an object {\"old spelling\": \"new spelling\", ...})");
  if (!map->is_object() || map->empty())
    return params.error("map", "expected a non-empty object {\"old spelling\": \"new spelling\", ...}, found " +
                                   map->dump());
  auto ignore_case = params.boolean_or("ignore_case", false);
  if (!ignore_case) return ignore_case.take_error();
  std::vector<std::pair<std::string, std::string>> entries;
  std::map<std::string, std::string, std::less<>> lookup;
  std::map<std::string, std::string> first_key_of;  // folded key -> the key that produced it
  for (const auto& [from, to] : map->items()) {
    if (to.is_null())
      return params.error("map", "\"" + from + "\" maps to null; map_values only respells values. "
                                 "Use a to_null step to turn \"" + from + "\" into NULL.");
    if (!to.is_string()) return params.error("map", "\"" + from + "\" must map to text, found " + to.dump());
    const std::string target = to.get<std::string>();
    if (utf8::first_invalid(from) != std::string_view::npos || utf8::first_invalid(target) != std::string_view::npos)
      return params.error("map", "\"" + from + "\": keys and values must be valid UTF-8");
    std::string key = *ignore_case ? fold_case(from) : from;
    if (const auto seen = lookup.find(key); seen != lookup.end() && seen->second != target)
      return params.error("map", "\"" + first_key_of[key] + "\" and \"" + from +
                                     "\" are the same ignoring case but map to different values (\"" + seen->second +
                                     "\" and \"" + target + "\")");
    first_key_of.emplace(key, from);
    lookup.emplace(std::move(key), target);
    entries.emplace_back(from, target);
  }
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(
      new MapValues(*column, std::move(entries), std::move(lookup), *ignore_case, params.input()));
}

}  // namespace tamis
