// SQL expressions (design §4): the one place their semantics are written.
//
// The language is a subset of ISO/IEC 9075 (SQL). Where ISO SQL leaves a
// choice to the implementation, the choice below is ours and the SQL export
// reproduces it with explicit casts.
//
// Lexical
//   Keywords and function names are case-insensitive. Column names are
//   written as they appear in the table, case-sensitively: plain (a letter
//   or _, then letters, digits, _) or "quoted" with "" for a quote inside.
//   A plain name must not be a reserved word: AND AS BETWEEN BOTH CASE CAST
//   ELSE END ESCAPE FALSE FOR FROM IN IS LEADING LIKE NOT NULL OR THEN
//   TRAILING TRUE UNKNOWN WHEN (quote it: "END"). DATE is a column name
//   unless a text literal follows it.
//   Literals: 42 (integer), 4.50 (decimal of scale 2; .5 and 5. also read),
//   'it''s' (text), TRUE, FALSE, NULL, DATE '2024-03-09'. Numbers are exact,
//   so exponent notation (1E3) is refused. Comments (-- and /* */) are
//   refused so an expression cannot hide text from its SQL export.
//
// Grammar, loosest binding first (ISO SQL's order):
//   OR;  AND;  NOT;  IS [NOT] NULL|TRUE|FALSE|UNKNOWN;
//   = <> != < <= > >=, [NOT] BETWEEN a AND b, [NOT] IN (list),
//   [NOT] LIKE pattern [ESCAPE c] (one per level: a < b < c is an error);
//   ||;  + -;  * /;  unary - +;  then literals, columns, (expr), CASE, CAST
//   and the functions COALESCE NULLIF UPPER LOWER CHAR_LENGTH
//   (CHARACTER_LENGTH) SUBSTRING TRIM ABS ROUND.
//   Parse errors say "at character N: expected X, found 'Y'", N counting
//   Unicode code points from 1.
//
// Types: text, integer (64-bit), decimal (64-bit scaled, scale 0..18), date,
// boolean. No implicit conversion between them, with two exceptions: integer
// and decimal mix freely, and a text literal compared with a date is read as
// a DATE literal. Otherwise CAST. Column names and types are checked when the
// expression is read; an unknown column is an error listing the columns.
//
// NULL (ISO SQL three-valued logic)
//   Every operator and function returns NULL when an argument is NULL, except:
//   AND is FALSE if either side is FALSE; OR is TRUE if either side is TRUE;
//   IS tests; x IN (...) is TRUE if some item equals x, else NULL if x or some
//   item is NULL, else FALSE; COALESCE; CASE (a NULL condition is not true).
//   keep_rows keeps a row only when its condition is TRUE; drop_rows removes
//   a row only when it is TRUE. NULL is never the empty text.
//
// Numbers
//   integer + - * integer -> integer; overflow is an error naming the row's
//   source line (never a wrap or a switch to floating point).
//   With a decimal operand: + - give the larger scale; * gives s1+s2 (at
//   most 18, rounded); / always gives a decimal of scale max(6, s1, s2),
//   rounded half away from zero, so 7/2 = 3.500000 and 1/3 = 0.333333 (never
//   integer division). Division by zero is an error. A value outside the
//   64-bit scaled range is an error.
//   ROUND(x [, n]) rounds half away from zero to n (default 0, may be
//   negative, must be a literal) digits; the result keeps x's type with
//   scale min(n, scale of x) (at least 0). ABS keeps the type.
//
// Text
//   Comparison is code point by code point (UTF-8 byte order), case-
//   sensitive, trailing spaces significant: 'Z' < 'a' and 'a' <> 'a '.
//   || joins two texts. UPPER/LOWER: Unicode full case mapping by ICU, root
//   locale ('straße' -> 'STRASSE'). CHAR_LENGTH counts code points.
//   SUBSTRING(x FROM a [FOR b]) and SUBSTRING(x, a [, b]) as ISO SQL: the
//   characters at positions a .. a+b-1 (1-based) that exist; a negative b
//   is an error. TRIM([BOTH|LEADING|TRAILING] [chars FROM] x) removes every
//   character of chars (a set; default the space U+0020 only, as in SQL;
//   the trim step's default of all Unicode white space is a different rule).
//   LIKE: '%' any run, '_' one code point, case-sensitive; no escape
//   character unless ESCAPE gives one (exactly one character); after it only
//   '%', '_' or itself may follow.
//
// CAST(x AS type), type one of TEXT, VARCHAR, INTEGER, INT, BIGINT (all
// 64-bit), DECIMAL(p[,s]) / NUMERIC(p[,s]) (p <= 18; a bare DECIMAL is
// refused because the scale must be known), DATE, BOOLEAN.
//   text -> integer: [spaces][sign]digits[spaces], else an error;
//   text -> decimal: any SQL numeric literal (1.5, -.5, 2E3) with spaces
//     around, rounded half away from zero to the scale; more than p digits
//     is an error;
//   text -> date: 'YYYY-MM-DD' (month and day one or two digits, a real
//     calendar date), spaces around allowed;
//   text -> boolean: TRUE, FALSE (any case, spaces around), UNKNOWN -> NULL;
//   number -> number: rounded half away from zero; anything -> text: the
//     canonical text form (design §3: 12.50, 2024-03-09, true);
//   date <-> number and boolean <-> number are refused.
//   A value that cannot be converted is an error naming the row's line
//   (ISO SQL: data exception), never a silent NULL.
//
// Evaluation order: CASE, COALESCE, AND and OR do not evaluate (nor report
// errors from) the parts their result does not depend on, so
// `b <> 0 AND a / b > 1` never divides by zero.
//
// Evaluation is column-at-a-time over blocks of rows: one pass per operator
// over plain arrays, no per-row dispatch.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"
#include "steps/step.hpp"
#include "table.hpp"

namespace tamis {

namespace expr {
struct Program;
}

class Expression {
 public:
  enum class Use : uint8_t {
    condition,  // must be boolean (a bare NULL counts as an unknown condition)
    value,      // any type; a bare NULL is a text NULL
  };

  // Reads and type-checks text against the columns it will see. Errors are
  // usage errors whose message starts "at character N: ".
  static Result<Expression> parse(std::string_view text, const Schema& columns, Use use);

  const std::string& text() const;
  Type type() const;
  int scale() const;
  // Input columns the expression reads, in order of first mention.
  const std::vector<size_t>& columns() const;

  // The value for every row of the batch, whose columns are those given to
  // parse(). Chunks follow the batch's row chunks.
  Result<ColumnPtr> evaluate(const Table& batch) const;
  // is_true[r] = 1 where the condition is TRUE (not FALSE, not NULL).
  Status evaluate_condition(const Table& batch, std::vector<uint8_t>& is_true) const;

  // Whether the SQL export can give the same results in this dialect.
  SqlSupport sql_support(Dialect dialect) const;
  // The expression in the dialect's SQL (expr/sql_render.cpp), given the SQL
  // of each input column; an error names the first operator not written.
  Result<std::string> to_sql(Dialect dialect, const std::vector<std::string>& column_sql) const;

 private:
  explicit Expression(std::shared_ptr<const expr::Program> program) : program_(std::move(program)) {}
  std::shared_ptr<const expr::Program> program_;
};

}  // namespace tamis
