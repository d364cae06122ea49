#include "steps/fill_from_group.hpp"

#include <algorithm>
#include <unordered_map>

#include "recipe.hpp"
#include "sql/sql_step.hpp"
#include "steps/row_fill.hpp"
#include "steps/row_key.hpp"

namespace tamis {

namespace {

constexpr size_t kListedValues = 3;    // distinct values shown per conflicting group
constexpr size_t kListedConflicts = 20;

struct Group {
  uint64_t order = 0;                // groups are reported in order of first appearance
  std::vector<std::string> values;   // distinct non-NULL values as one-column keys, at most kListedValues
  bool more_values = false;          // more than kListedValues distinct values
  uint64_t nulls = 0;
};

struct FillState final : StepState {
  bool observed = false;
  Schema columns;  // as seen (a decimal's scale may be known only from the data)
  std::unordered_map<std::string, Group> groups;
};

class FillFromGroup final : public Step {
 public:
  FillFromGroup(size_t column, std::vector<size_t> keys, Schema input)
      : column_(column), keys_(std::move(keys)), input_(std::move(input)) {}

  std::string_view op() const override { return "fill_from_group"; }

  std::string describe() const override {
    return "Fill empty (NULL) values of " + input_[column_].name + " from the rows with the same " +
           join_names(input_, keys_) + " when those rows agree on one value.";
  }

  std::unique_ptr<StepState> start() const override { return std::make_unique<FillState>(); }
  bool needs_first_pass() const override { return true; }

  Status observe(const Table& batch, StepState* state) const override {
    auto& s = *static_cast<FillState*>(state);
    s.observed = true;
    s.columns = schema_of(batch);
    const RowKeys keys(batch, keys_);
    const size_t value_column[] = {column_};
    const RowKeys values(batch, value_column);
    for (size_t r = 0; r < keys.size(); ++r) {
      auto [it, added] = s.groups.try_emplace(std::string(keys.key(r)));
      Group& g = it->second;
      if (added) g.order = s.groups.size();
      if (values.has_null(r)) {
        ++g.nulls;
        continue;
      }
      const std::string_view v = values.key(r);
      if (std::find(g.values.begin(), g.values.end(), v) != g.values.end()) continue;
      if (g.values.size() < kListedValues) g.values.emplace_back(v);
      else g.more_values = true;
    }
    return Ok{};
  }

  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const override {
    const auto& s = *static_cast<FillState*>(state);
    if (!s.observed) return usage_error("(fill_from_group) was applied before its first pass over the input");
    const RowKeys keys(batch, keys_);
    ColumnPtr filled = fill_nulls(batch.column(column_), batch.name(column_), change,
                                  [&](size_t row, bool is_null) -> std::optional<std::string> {
                                    if (!is_null) return std::nullopt;
                                    const auto it = s.groups.find(std::string(keys.key(row)));
                                    if (it == s.groups.end() || it->second.values.size() != 1) return std::nullopt;
                                    return it->second.values.front();
                                  });
    change.rows_in += batch.row_count();
    change.rows_out += batch.row_count();
    return batch.with_column(column_, std::move(filled));
  }

  Status finish(StepState* state, ChangeRecord& change) const override {
    const auto& s = *static_cast<FillState*>(state);
    std::vector<std::pair<const std::string*, const Group*>> conflicts;
    uint64_t unfilled = 0;
    for (const auto& [key, g] : s.groups)
      if (g.values.size() > 1 && g.nulls > 0) {
        conflicts.emplace_back(&key, &g);
        unfilled += g.nulls;
      }
    if (conflicts.empty()) return Ok{};
    std::sort(conflicts.begin(), conflicts.end(),
              [](const auto& a, const auto& b) { return a.second->order < b.second->order; });
    const ColumnSchema& filled = s.columns[column_];
    for (size_t i = 0; i < conflicts.size() && i < kListedConflicts; ++i) {
      const Group& g = *conflicts[i].second;
      std::string values;
      for (const std::string& v : g.values)
        values += (values.empty() ? "" : ", ") + describe_value(v, filled.type, filled.scale);
      change.conflicts.push_back(describe_key(*conflicts[i].first, s.columns, keys_) + ": " +
                                 (g.more_values ? "more than " + std::to_string(kListedValues) : std::to_string(g.values.size())) +
                                 " different values of " + input_[column_].name + " (" + values +
                                 (g.more_values ? ", …" : "") + "); " + std::to_string(g.nulls) +
                                 (g.nulls == 1 ? " NULL left unfilled" : " NULLs left unfilled"));
    }
    if (conflicts.size() > kListedConflicts)
      change.conflicts.push_back("… and " + std::to_string(conflicts.size() - kListedConflicts) +
                                 " more groups with different values");
    change.warnings.push_back(input_[column_].name + ": " + std::to_string(unfilled) +
                              (unfilled == 1 ? " NULL was" : " NULLs were") + " left unfilled because " +
                              std::to_string(conflicts.size()) +
                              (conflicts.size() == 1 ? " group holds" : " groups hold") + " different values");
    return Ok{};
  }

  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  // A group holds one distinct non-NULL value exactly when the MIN and MAX of
  // its values (compared byte for byte) agree.
  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    out.select = sql.dialect == Dialect::mysql ? grouped_sql(sql) : window_sql(sql);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    p["keys"] = nlohmann::ordered_json::array();
    for (const size_t c : keys_) p["keys"].push_back(input_[c].name);
    return p;
  }

 private:
  size_t column_;
  std::vector<size_t> keys_;
  Schema input_;

  // The MIN and MAX as window aggregates over the group: one sort, and
  // every row keeps its place.
  std::string window_sql(const SqlContext& sql) const {
    std::string partition;
    for (const size_t c : keys_) partition += (partition.empty() ? "" : ", ") + sql.key(c);
    const std::string over = std::string(" OVER (PARTITION BY ") + partition + ")";
    const std::string x = sql.column(column_), k = sql.key(column_);
    return sql.select_replacing(
        {{column_, std::string("CASE WHEN ") + x + std::string(" IS NULL\n                 AND MIN(") + k + std::string(")") + over + std::string(" = MAX(") + k + std::string(")") + over +
                       std::string("\n            THEN MAX(") + x + std::string(")") + over + std::string("\n            ELSE ") + x + " END"}});
  }

  // MariaDB computes a MIN or MAX window again for every row of its
  // partition (hours on a million rows with large groups), so there the
  // single-valued groups come from a GROUP BY, joined back on the group keys
  // with the NULL-safe <=> (a NULL key is a group of its own, as in tamis
  // run). The keys stay binary strings on both sides so the join compares
  // bytes, not the padded collation.
  std::string grouped_sql(const SqlContext& sql) const {
    std::string keys, grouping, join;
    for (size_t i = 0; i < keys_.size(); ++i) {
      const std::string key = sql.name(std::string("tamis_key_") + std::to_string(i + 1));
      keys += sql.key(keys_[i]) + " AS " + key + ", ";
      grouping += (i ? std::string(", ") : std::string()) + key;
      const std::string row_key = sql::exact_key(sql.dialect, std::string("t.") + sql.column(keys_[i]),
                                                 sql.input[keys_[i]].type);
      join += (i ? std::string(" AND ") : std::string()) +
              sql::same_or_both_null(sql.dialect, row_key, std::string("g.") + key);
    }
    const std::string x = sql.column(column_), k = sql.key(column_);
    const std::string filled = std::string("CASE WHEN t.") + x + " IS NULL THEN g.tamis_value ELSE t." + x + " END";
    const std::string from = sql.from + " AS t\nLEFT JOIN (SELECT " + keys + "MAX(" + x + ") AS tamis_value\n           FROM " +
                             sql.from + "\n           GROUP BY " + grouping + "\n           HAVING MIN(" + k + ") = MAX(" + k +
                             ")) AS g\n       ON " + join;
    return sql.select_replacing({{column_, filled}}, from, "t");
  }
};

}  // namespace

Result<std::unique_ptr<Step>> parse_fill_from_group(StepParams& params) {
  auto column = params.column("column");
  if (!column) return column.take_error();
  auto keys = params.columns("keys");
  if (!keys) return keys.take_error();
  if (std::find(keys->begin(), keys->end(), *column) != keys->end())
    return params.error("keys", "must not include the filled column '" + params.input()[*column].name + "'");
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new FillFromGroup(*column, std::move(*keys), params.input()));
}

}  // namespace tamis
