#include "sql/sql_step.hpp"

#include <algorithm>
#include <cctype>

namespace tamis {

std::string SqlContext::select_replacing(const std::vector<std::pair<size_t, std::string>>& replaced,
                                         std::string_view from_clause, std::string_view qualifier) const {
  const std::string prefix = qualifier.empty() ? std::string() : std::string(qualifier) + ".";
  std::string out = "SELECT";
  for (size_t c = 0; c < input.size(); ++c) {
    out += c ? ",\n       " : " ";
    bool found = false;
    for (const auto& [column_index, expression] : replaced)
      if (column_index == c) {
        out += expression + std::string(" AS ") + column(c);
        found = true;
        break;
      }
    if (!found) out += prefix + column(c);
  }
  out += std::string(",\n       ") + prefix + line() + "\nFROM ";
  out += from_clause.empty() ? from : std::string(from_clause);
  return out;
}

std::string SqlContext::helper(std::string_view base) const {
  auto starts = [](std::string_view name, std::string_view prefix) {
    if (name.size() < prefix.size()) return false;
    for (size_t i = 0; i < prefix.size(); ++i)
      if (std::tolower(static_cast<unsigned char>(name[i])) != std::tolower(static_cast<unsigned char>(prefix[i])))
        return false;
    return true;
  };
  std::string out(base);
  while (std::any_of(input.begin(), input.end(), [&](const ColumnSchema& c) { return starts(c.name, out); })) out += '_';
  return out;
}

std::string SqlContext::column_list(std::string_view qualifier) const {
  const std::string prefix = qualifier.empty() ? std::string() : std::string(qualifier) + ".";
  std::string out;
  for (size_t c = 0; c < input.size(); ++c) out += prefix + column(c) + ", ";
  return out + prefix + line();
}

ReplacedValues replaced_values(const SqlContext& sql, const std::vector<std::string>& inputs,
                               const std::vector<std::pair<std::string, std::string>>& pairs, std::string_view prefix) {
  ReplacedValues out;
  out.from = sql.from;
  out.results = inputs;
  if (sql.dialect != Dialect::sqlite) {
    for (std::string& r : out.results) r = sql::replace_each(sql.dialect, r, pairs);
    return out;
  }
  constexpr size_t kPerLayer = 16;
  for (size_t first = 0, layer = 1; first < pairs.size(); first += kPerLayer, ++layer) {
    const std::vector<std::pair<std::string, std::string>> some(
        pairs.begin() + static_cast<std::ptrdiff_t>(first),
        pairs.begin() + static_cast<std::ptrdiff_t>(std::min(pairs.size(), first + kPerLayer)));
    const std::string table = sql.helper(prefix) + "_" + std::to_string(layer);
    std::string select = out.with.empty() ? "WITH " : ",\n";
    select += table + " AS (SELECT *";
    for (size_t k = 0; k < out.results.size(); ++k) {
      const std::string name = table + "_" + std::to_string(k);
      select += ",\n        " + sql::replace_each(sql.dialect, out.results[k], some) + " AS " + name;
      out.results[k] = name;
    }
    select += "\n FROM " + out.from + ")";
    out.with += select;
    out.from = table;
  }
  if (!out.with.empty()) out.with += "\n";
  return out;
}

std::vector<std::string> stop_unless_zero(const SqlContext& sql, std::string_view suffix,
                                          const std::string& failing_count, const std::string& message) {
  if (sql.dialect == Dialect::spark)
    return {std::string("SELECT CASE WHEN (") + failing_count + std::string(") > 0 THEN raise_error(") + sql.text(message) +
            ") END AS tamis_check"};
  const std::string guard_name =
      sql.table_prefix + std::string("_step_") + std::to_string(sql.step_number) + "_" + std::string(suffix);
  const std::string guard = sql.name(guard_name);
  return {std::string("DROP TABLE IF EXISTS ") + guard,
          std::string("CREATE TABLE ") + guard + " (\n  failing_rows BIGINT,\n  CONSTRAINT " +
              sql.name(guard_name + "_passes") + " CHECK (failing_rows = 0)\n)",
          std::string("INSERT INTO ") + guard + std::string(" (failing_rows)\n") + failing_count,
          std::string("DROP TABLE ") + guard};
}

Result<SqlStepText> conversion_sql(const SqlContext& sql, size_t c, const std::string& converted,
                                   const std::function<std::string(const std::string&)>& as_text,
                                   OnError on_error, std::string_view op, std::string_view with) {
  SqlStepText out;
  const std::string x = sql.column(c);
  switch (on_error) {
    case OnError::null: out.select = std::string(with) + sql.select_replacing({{c, converted}}); break;
    case OnError::keep:
      out.select =
          std::string(with) + sql.select_replacing({{c, std::string("COALESCE(") + as_text(converted) + ", " + x + ")"}});
      break;
    case OnError::reject:
      if (sql.rejects_allowed)
        return usage_error("on_error reject with rejected rows allowed (input.max_rejects) needs a rejects file, "
                           "which a SQL script cannot write");
      out.statements = stop_unless_zero(
          sql, "rejects",
          std::string(with) + std::string("SELECT COUNT(*) FROM ") + sql.from + std::string(" WHERE ") + x + std::string(" IS NOT NULL AND ") + converted + " IS NULL",
          std::string("step ") + std::to_string(sql.step_number) + " (" + std::string(op) + ") rejected rows, and input.max_rejects allows none");
      out.select = std::string(with) + sql.select_replacing({{c, converted}});
      break;
  }
  return out;
}

Result<SqlStepText> Step::to_sql(const SqlContext& context) const {
  return usage_error(std::string("no ") + std::string(dialect_name(context.dialect)) + std::string(" SQL is written for ") + std::string(op()));
}

}  // namespace tamis
