#include "sql/sql_step.hpp"

namespace tamis {

std::string SqlContext::select_replacing(const std::vector<std::pair<size_t, std::string>>& replaced,
                                         std::string_view from_clause) const {
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
    if (!found) out += column(c);
  }
  out += std::string(",\n       ") + line() + "\nFROM ";
  out += from_clause.empty() ? from : std::string(from_clause);
  return out;
}

std::string SqlContext::column_list(std::string_view qualifier) const {
  const std::string prefix = qualifier.empty() ? std::string() : std::string(qualifier) + ".";
  std::string out;
  for (size_t c = 0; c < input.size(); ++c) out += prefix + column(c) + ", ";
  return out + prefix + line();
}

Result<SqlStepText> Step::to_sql(const SqlContext& context) const {
  return usage_error(std::string("no ") + std::string(dialect_name(context.dialect)) + std::string(" SQL is written for ") + std::string(op()));
}

}  // namespace tamis
