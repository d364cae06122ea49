// Which SQL dialects can reproduce an expression's results exactly (design
// §4: the export adds casts, COLLATE "C" / binary collations, CONCAT for ||
// in MySQL, an explicit ESCAPE or none, and so on). An operator is marked
// approximate in a dialect when no such rewriting gives our results:
//   SQLite has no decimal type (REAL arithmetic), no DATE or BOOLEAN type,
//     and its CAST to BOOLEAN/DECIMAL/DATE does not check its input; a
//     decimal column there holds its canonical text (parse_number), which
//     only IS [NOT] NULL reads exactly (comparisons read it as REAL,
//     sql_render.cpp, and a CASE or COALESCE does not rescale it);
//   DuckDB and Spark divide decimals into DOUBLE (or with their own scale
//     rules), so a rounded quotient can differ in the last place;
//   MySQL has no BOOLEAN text form (1/0) and its TRIM removes a whole string,
//     not a set of characters (a literal set is written as a regular
//     expression instead);
//   UPPER/LOWER: each engine has its own case mapping (PostgreSQL's follows
//     the database locale, SQLite maps ASCII only, none maps ß to SS);
//   SUBSTRING with a start below 1 or a computed start/length: SQLite, MySQL,
//     DuckDB and Spark count negative starts from the end.
#include <algorithm>

#include "expr/expr.hpp"
#include "expr/program.hpp"

namespace tamis {

SqlSupport Expression::sql_support(Dialect dialect) const {
  using expr::Node;
  using expr::Op;
  using expr::VType;
  const expr::Program& p = *program_;
  SqlSupport worst = SqlSupport::exact;
  auto approximate_in = [&](std::initializer_list<Dialect> dialects) {
    if (std::find(dialects.begin(), dialects.end(), dialect) != dialects.end())
      worst = std::max(worst, SqlSupport::approximate);
  };
  auto literal_at_least = [&](uint32_t id, int64_t low) {
    const Node& n = p.nodes[id];
    return n.op == Op::literal && !n.null_literal && n.number >= low;
  };
  std::vector<uint32_t> pending{p.root};
  while (!pending.empty()) {
    const Node& n = p.nodes[pending.back()];
    pending.pop_back();
    for (uint32_t a : n.args) pending.push_back(a);
    if (n.op != Op::is_null &&
        std::any_of(n.args.begin(), n.args.end(), [&](uint32_t a) { return p.nodes[a].type == VType::decimal; }))
      approximate_in({Dialect::sqlite});
    switch (n.op) {
      case Op::divide: approximate_in({Dialect::sqlite, Dialect::duckdb, Dialect::spark}); break;
      case Op::add:
      case Op::subtract:
      case Op::multiply:
      case Op::negate:
      case Op::abs:
      case Op::rescale:
      case Op::round:
        if (n.type == VType::decimal) approximate_in({Dialect::sqlite});
        break;
      case Op::upper:
      case Op::lower:
        approximate_in({Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark});
        break;
      case Op::trim:
        if (n.args.size() == 2) {
          const Node& chars = p.nodes[n.args[1]];
          if (chars.op != Op::literal || chars.null_literal) approximate_in({Dialect::mysql});
        }
        break;
      case Op::substring:
        if (!literal_at_least(n.args[1], 1) || (n.args.size() == 3 && !literal_at_least(n.args[2], 0)))
          approximate_in({Dialect::sqlite, Dialect::mysql, Dialect::duckdb, Dialect::spark});
        break;
      case Op::cast: {
        const VType from = p.nodes[n.args[0]].type;
        if (n.type == VType::decimal) approximate_in({Dialect::sqlite});
        if (n.type == VType::boolean && from == VType::text) approximate_in({Dialect::sqlite, Dialect::mysql});
        if (n.type == VType::text && from == VType::boolean) approximate_in({Dialect::sqlite, Dialect::mysql});
        if (n.type == VType::text && from == VType::decimal) approximate_in({Dialect::sqlite});
        if (n.type == VType::date && from == VType::text) approximate_in({Dialect::sqlite});
        break;
      }
      default: break;
    }
  }
  return worst;
}

}  // namespace tamis
