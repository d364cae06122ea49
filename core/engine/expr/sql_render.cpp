// Writing an expression as SQL. Only the operators below are written; the
// others make the steps that use them refuse the export, so no script holds
// an operator whose dialect semantics have not been checked against ours:
//   text comparisons compare bytes (CAST AS BINARY in MySQL, COLLATE "C" in
//   PostgreSQL), which in UTF-8 is code point order; SQLite holds a decimal
//   as its text, so there a decimal is compared as REAL, which sql_support
//   calls approximate;
//   integer + - * and ABS only where overflow is an error as in the engine
//   (PostgreSQL, DuckDB, MySQL; SQLite switches to REAL, Spark wraps);
//   division as exact NUMERIC rounded half away from zero in PostgreSQL,
//   and SQLite's REAL quotient, which sql_support calls approximate;
//   LIKE with a literal pattern as a whole-text regular expression over code
//   points ('.' with the s flag, so it also matches a line break), or GLOB
//   in SQLite, which has no regular expressions; both compare exactly and
//   know no escape character of their own;
//   CHAR_LENGTH counts code points; SUBSTRING is ISO SQL's in PostgreSQL and
//   SUBSTR elsewhere (sql_support calls a start below 1 approximate there);
//   TRIM with literal characters as a set (sql::trim_characters);
//   IS [NOT] TRUE|FALSE through COALESCE; ROUND of an integer to n >= 0
//   digits is the integer itself.
//   CAST is not written yet (each engine reads text its own way).
#include <optional>

#include "expr/expr.hpp"
#include "expr/program.hpp"
#include "sql/sql_text.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

using expr::Node;
using expr::Op;
using expr::VType;

class Renderer {
 public:
  Renderer(const expr::Program& program, Dialect dialect, const std::vector<std::string>& columns)
      : p_(program), d_(dialect), columns_(columns) {}

  Result<std::string> render(uint32_t id) {
    const Node& n = p_.node(id);
    std::vector<std::string> a;
    for (const uint32_t arg : n.args) {
      auto text = render(arg);
      if (!text) return text;
      a.push_back(std::move(*text));
    }
    auto key = [&](size_t i) {
      const VType type = p_.node(n.args[i]).type;
      if (type == VType::decimal && d_ == Dialect::sqlite) return std::string("CAST(") + a[i] + " AS REAL)";
      return sql::exact_key(d_, a[i], type == VType::text ? Type::text : Type::integer);
    };
    const std::string no = n.negated ? "NOT " : "";
    switch (n.op) {
      case Op::literal:
        if (n.null_literal) return std::string("NULL");
        switch (n.type) {
          case VType::text: return sql::literal(d_, n.text);
          case VType::integer: return std::to_string(n.number);
          case VType::boolean: return std::string(n.number ? "TRUE" : "FALSE");
          default: break;
        }
        break;
      case Op::column: return columns_[static_cast<size_t>(n.number)];
      case Op::negate:
        if (integer_arithmetic()) return std::string("(-") + a[0] + ")";
        break;
      case Op::add:
      case Op::subtract:
      case Op::multiply:
        if (integer_arithmetic() && n.type == VType::integer) {
          const char* symbol = n.op == Op::add ? " + " : n.op == Op::subtract ? " - " : " * ";
          return std::string("(") + a[0] + symbol + a[1] + ")";
        }
        break;
      case Op::divide:
        if (n.type != VType::decimal) break;
        if (d_ == Dialect::postgres)
          return std::string("ROUND(CAST(") + a[0] + std::string(" AS NUMERIC) / CAST(") + a[1] + std::string(" AS NUMERIC), ") + std::to_string(n.scale) + ")";
        if (d_ == Dialect::sqlite) return std::string("ROUND(CAST(") + a[0] + std::string(" AS REAL) / ") + a[1] + std::string(", ") + std::to_string(n.scale) + ")";
        break;
      case Op::concat: return sql::concat(d_, {a[0], a[1]});
      case Op::equal: return std::string("(") + key(0) + std::string(" = ") + key(1) + ")";
      case Op::not_equal: return std::string("(") + key(0) + std::string(" <> ") + key(1) + ")";
      case Op::less: return std::string("(") + key(0) + std::string(" < ") + key(1) + ")";
      case Op::less_equal: return std::string("(") + key(0) + std::string(" <= ") + key(1) + ")";
      case Op::greater: return std::string("(") + key(0) + std::string(" > ") + key(1) + ")";
      case Op::greater_equal: return std::string("(") + key(0) + std::string(" >= ") + key(1) + ")";
      case Op::logical_and: return std::string("(") + a[0] + std::string(" AND ") + a[1] + ")";
      case Op::logical_or: return std::string("(") + a[0] + std::string(" OR ") + a[1] + ")";
      case Op::logical_not: return std::string("(NOT ") + a[0] + ")";
      case Op::is_null: return std::string("(") + a[0] + std::string(" IS ") + no + "NULL)";
      case Op::between: return std::string("(") + key(0) + std::string(" ") + no + std::string("BETWEEN ") + key(1) + std::string(" AND ") + key(2) + ")";
      case Op::in_list: {
        std::string items;
        for (size_t i = 1; i < a.size(); ++i) items += std::string(i > 1 ? ", " : "") + key(i);
        return std::string("(") + key(0) + std::string(" ") + no + std::string("IN (") + items + "))";
      }
      case Op::case_when: {
        // Written as a searched CASE, so a simple CASE's comparisons are exact too.
        std::string out = "CASE";
        size_t i = n.simple_case ? 1 : 0;
        const size_t pairs_end = a.size() - (n.has_else ? 1 : 0);
        for (; i < pairs_end; i += 2) {
          const std::string when = n.simple_case ? key(0) + std::string(" = ") + key(i) : a[i];
          out += std::string(" WHEN ") + when + std::string(" THEN ") + a[i + 1];
        }
        if (n.has_else) out += std::string(" ELSE ") + a.back();
        return out + " END";
      }
      case Op::coalesce: {
        std::string out = "COALESCE(";
        for (size_t i = 0; i < a.size(); ++i) out += std::string(i ? ", " : "") + a[i];
        return out + ")";
      }
      case Op::nullif: return std::string("CASE WHEN ") + key(0) + std::string(" = ") + key(1) + std::string(" THEN NULL ELSE ") + a[0] + " END";
      case Op::upper: return std::string("UPPER(") + a[0] + ")";
      case Op::lower: return std::string("LOWER(") + a[0] + ")";
      case Op::is_true:
        return std::string(n.negated ? "(NOT COALESCE(" : "(COALESCE(") + a[0] + ", FALSE))";
      case Op::is_false:
        return std::string(n.negated ? "(COALESCE(" : "(NOT COALESCE(") + a[0] + ", TRUE))";
      case Op::like:
        if (n.pattern) return like(n, a[0]);
        break;
      case Op::char_length: return sql::char_length(d_, a[0]);
      case Op::substring:
        if (d_ == Dialect::postgres)
          return std::string("SUBSTRING(") + a[0] + " FROM " + a[1] + (a.size() == 3 ? " FOR " + a[2] : std::string()) + ")";
        return sql::substring(d_, a[0], a[1], a.size() == 3 ? a[2] : std::string());
      case Op::trim: {
        std::u32string characters = U" ";
        if (n.args.size() == 2) {
          const Node& chars = p_.node(n.args[1]);
          if (chars.op != Op::literal || chars.null_literal) break;
          characters.clear();
          for (size_t i = 0; i < chars.text.size();) characters.push_back(utf8::next(chars.text, i));
        }
        if (characters.empty()) return a[0];
        const auto side = static_cast<expr::TrimSide>(n.param);
        return sql::trim_characters(d_, a[0], characters,
                                    side == expr::TrimSide::both      ? "both"
                                    : side == expr::TrimSide::leading ? "leading"
                                                                      : "trailing");
      }
      case Op::abs:
        if (integer_arithmetic() && n.type == VType::integer) return std::string("ABS(") + a[0] + ")";
        break;
      case Op::round:
        if (n.type == VType::integer && p_.node(n.args[0]).type == VType::integer && n.param >= 0) return a[0];
        break;
      default: break;
    }
    return usage_error(p_.where(id) + std::string("this operator is not written as ") + std::string(dialect_name(d_)) + " SQL yet");
  }

 private:
  std::string like(const Node& n, const std::string& value) const {
    const std::string& pattern = p_.node(n.args[1]).text;
    std::optional<char32_t> escape;
    if (n.args.size() == 3) {
      size_t i = 0;
      escape = utf8::next(p_.node(n.args[2]).text, i);
    }
    std::string regex, glob;
    for (size_t i = 0; i < pattern.size();) {
      char32_t c = utf8::next(pattern, i);
      if (escape && c == *escape) {
        c = utf8::next(pattern, i);  // LikePattern::compile checked that one follows
      } else if (c == U'%') {
        regex += ".*";
        glob += '*';
        continue;
      } else if (c == U'_') {
        regex += '.';
        glob += '?';
        continue;
      }
      regex += sql::regex_class(d_, std::u32string(1, c));
      std::string one;
      utf8::append(one, c);
      glob += c == U'*' || c == U'?' || c == U'[' ? "[" + one + "]" : one;
    }
    const std::string test = d_ == Dialect::sqlite
                                 ? std::string("(") + value + " GLOB " + sql::literal(d_, glob) + ")"
                                 : sql::regex_matches(d_, value, "(?s)" + sql::regex_whole(d_, regex));
    return n.negated ? std::string("(NOT ") + test + ")" : test;
  }

  bool integer_arithmetic() const {
    return d_ == Dialect::postgres || d_ == Dialect::duckdb || d_ == Dialect::mysql;
  }

  const expr::Program& p_;
  Dialect d_;
  const std::vector<std::string>& columns_;
};

}  // namespace

Result<std::string> Expression::to_sql(Dialect dialect, const std::vector<std::string>& column_sql) const {
  return Renderer(*program_, dialect, column_sql).render(program_->root);
}

}  // namespace tamis
