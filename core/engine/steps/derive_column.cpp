#include "steps/derive_column.hpp"

#include <algorithm>

#include "expr/expr.hpp"
#include "sql/sql_step.hpp"

namespace tamis {

namespace {

class DeriveColumn final : public Step {
 public:
  DeriveColumn(std::string name, Expression expression) : name_(std::move(name)), expression_(std::move(expression)) {}

  std::string_view op() const override { return "derive_column"; }

  std::string describe() const override {
    return "Add the column " + name_ + " computed as " + expression_.text() + ".";
  }

  Schema output_schema(const Schema& input) const override {
    Schema out = input;
    out.push_back({name_, expression_.type(), expression_.type() == Type::decimal ? expression_.scale() : 0});
    return out;
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    auto column = expression_.evaluate(batch);
    if (!column) return column.take_error();
    std::vector<std::string> names = batch.names();
    std::vector<ColumnPtr> columns;
    for (size_t c = 0; c < batch.column_count(); ++c) columns.push_back(batch.column_ptr(c));
    names.push_back(name_);
    columns.push_back(std::move(*column));
    change.rows_in += batch.row_count();
    change.rows_out += batch.row_count();
    return Table::make(std::move(names), std::move(columns), batch.source_lines_ptr());
  }

  // The expression's own support, where its operators are written in the
  // dialect (expr/sql_render.cpp). MySQL and SQLite store booleans as 1/0,
  // not as the canonical true/false.
  SqlSupport sql_support(Dialect dialect) const override {
    if (expression_.type() == Type::boolean && (dialect == Dialect::mysql || dialect == Dialect::sqlite))
      return SqlSupport::unsupported;
    size_t columns = 0;
    for (const size_t c : expression_.columns()) columns = std::max(columns, c + 1);
    if (!expression_.to_sql(dialect, std::vector<std::string>(columns, "c"))) return SqlSupport::unsupported;
    return expression_.sql_support(dialect);
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    std::vector<std::string> columns;
    for (size_t c = 0; c < sql.input.size(); ++c) columns.push_back(sql.column(c));
    auto value = expression_.to_sql(sql.dialect, columns);
    if (!value) return value.take_error();
    SqlStepText out;
    out.select = std::string("SELECT ") + sql.column_list() + std::string(",\n       ") + *value + std::string(" AS ") + sql.name(name_) + std::string("\nFROM ") + sql.from;
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["name"] = name_;
    p["expr"] = expression_.text();
    return p;
  }

 private:
  std::string name_;
  Expression expression_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_derive_column(StepParams& params) {
  auto name = params.text("name");
  if (!name) return name.take_error();
  if (name->empty()) return params.error("name", "must not be empty");
  for (const ColumnSchema& c : params.input())
    if (c.name == *name) return params.error("name", "a column named '" + *name + "' already exists");
  auto text = params.text("expr");
  if (!text) return text.take_error();
  auto expression = Expression::parse(*text, params.input(), Expression::Use::value);
  if (!expression) return params.error("expr", expression.error().message);
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new DeriveColumn(std::move(*name), std::move(*expression)));
}

}  // namespace tamis
