#include "steps/carry_forward.hpp"

#include <algorithm>
#include <unordered_map>

#include "sql/sql_step.hpp"
#include "steps/row_fill.hpp"
#include "steps/row_key.hpp"

namespace tamis {

namespace {

struct CarryState final : StepState {
  // The last non-NULL value of each group, as a one-column key.
  std::unordered_map<std::string, std::string> last;
};

class CarryForward final : public Step {
 public:
  CarryForward(size_t column, std::vector<size_t> group_by, Schema input)
      : column_(column), group_by_(std::move(group_by)), input_(std::move(input)) {}

  std::string_view op() const override { return "carry_forward"; }

  std::string describe() const override {
    const std::string& name = input_[column_].name;
    if (group_by_.empty()) return "Fill empty (NULL) values of " + name + " with the last value above them.";
    return "Fill empty (NULL) values of " + name + " with the last value above them among the rows with the same " +
           join_names(input_, group_by_) + ".";
  }

  std::unique_ptr<StepState> start() const override { return std::make_unique<CarryState>(); }

  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const override {
    auto& last = static_cast<CarryState*>(state)->last;
    const RowKeys groups(batch, group_by_);
    const size_t value_column[] = {column_};
    const RowKeys values(batch, value_column);
    std::string group;
    ColumnPtr filled = fill_nulls(batch.column(column_), batch.name(column_), change,
                                  [&](size_t row, bool is_null) -> std::optional<std::string> {
                                    group.assign(groups.key(row));
                                    if (!is_null) {
                                      last[group].assign(values.key(row));
                                      return std::nullopt;
                                    }
                                    const auto it = last.find(group);
                                    if (it == last.end()) return std::nullopt;
                                    return it->second;
                                  });
    change.rows_in += batch.row_count();
    change.rows_out += batch.row_count();
    return batch.with_column(column_, std::move(filled));
  }

  // COUNT(column) OVER (PARTITION BY groups ORDER BY line) numbers the runs
  // that start at each non-NULL value; FIRST_VALUE over each run fills it.
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    std::string groups;
    for (const size_t c : group_by_) groups += sql.key(c) + ", ";
    const std::string x = sql.column(column_);
    const std::string partition = group_by_.empty() ? std::string() : std::string("PARTITION BY ") + groups.substr(0, groups.size() - 2) + " ";
    const std::string run = sql.helper("tamis_run");
    SqlStepText out;
    out.select = sql.select_replacing(
        {{column_, std::string("COALESCE(") + x + std::string(", MAX(") + x + std::string(") OVER (PARTITION BY ") + groups + run + "))"}},
        std::string("(SELECT *,\n             COUNT(") + x + std::string(") OVER (") + partition + std::string("ORDER BY ") + sql.line() +
            "\n                               ROWS BETWEEN UNBOUNDED PRECEDING AND CURRENT ROW) AS " + run + "\n      FROM " +
            sql.from + ") AS runs");
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    if (!group_by_.empty()) {
      p["group_by"] = nlohmann::ordered_json::array();
      for (const size_t c : group_by_) p["group_by"].push_back(input_[c].name);
    }
    return p;
  }

 private:
  size_t column_;
  std::vector<size_t> group_by_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_carry_forward(StepParams& params) {
  auto column = params.column("column");
  if (!column) return column.take_error();
  std::vector<size_t> group_by;
  if (const auto* written = params.raw("group_by"); written && !(written->is_array() && written->empty())) {
    auto listed = params.columns("group_by");
    if (!listed) return listed.take_error();
    group_by = std::move(*listed);
  }
  if (std::find(group_by.begin(), group_by.end(), *column) != group_by.end())
    return params.error("group_by", "must not include the filled column '" + params.input()[*column].name + "'");
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new CarryForward(*column, std::move(group_by), params.input()));
}

}  // namespace tamis
