// What a step needs to write its SQL (Step::to_sql) and what it gives back.
// The exporter (sql_export.hpp) chains the steps: each one reads the table
// the previous step made and becomes one CREATE TABLE ... AS SELECT.
#pragma once

#include <functional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "sql/sql_text.hpp"
#include "steps/step.hpp"
#include "steps/typed_support.hpp"

namespace tamis {

// The hidden column that carries each row's position in the source file, for
// ordering (deduplicate's first/last, carry_forward) and for the final order.
inline constexpr std::string_view kSqlLineColumn = "tamis_line";

struct SqlStepText {
  // Statements run before the step's table is made (a require step's check).
  std::vector<std::string> statements;
  // The SELECT that makes the step's table; empty when the table is unchanged.
  std::string select;
  // For an approximate export: what can differ from `tamis run`.
  std::string approximation;
};

struct SqlContext {
  Dialect dialect = Dialect::postgres;
  Schema input;             // the columns the step sees
  std::string from;         // the previous table, quoted
  int step_number = 0;      // 1-based position in the recipe
  std::string table_prefix; // for tables a step makes besides its own (unquoted)
  // The recipe's input.max_rejects allows rejected rows (the script has no
  // rejects file to put them in, nor the bound to check).
  bool rejects_allowed = false;

  std::string name(std::string_view identifier) const { return sql::identifier(dialect, identifier); }
  std::string column(size_t c) const { return name(input[c].name); }
  std::string line() const { return name(kSqlLineColumn); }
  std::string text(std::string_view value) const { return sql::literal(dialect, value); }
  std::string key(size_t c) const { return sql::exact_key(dialect, column(c), input[c].type); }

  // "SELECT a, <expr> AS b, ..., tamis_line FROM <from>": every column in
  // order, the replaced ones computed, the others (and the line column)
  // prefixed with `qualifier.` when one is given (a FROM clause with a join).
  std::string select_replacing(const std::vector<std::pair<size_t, std::string>>& replaced,
                               std::string_view from_clause = {}, std::string_view qualifier = {}) const;
  // `base`, or base followed by as many '_' as make it the start of no input
  // column's name (ignoring ASCII case, as SQLite and MySQL compare names):
  // the name of a helper column a step adds beside the input columns, or
  // the prefix of a family of them, never takes a column's name.
  std::string helper(std::string_view base) const;
  // The columns (and the line column) as a select list, each prefixed with
  // `qualifier.` when one is given.
  std::string column_list(std::string_view qualifier = {}) const;
};

// Nested REPLACE of `pairs` over each of `inputs` (expressions over the
// previous table). SQLite's parser holds only about 33 nested calls, and
// nested subqueries count too, so there the REPLACE calls are spread over a
// chain of common table expressions of at most 16 each, which add columns
// named <prefix>_<input>_<layer>; elsewhere they stay one expression. The
// step's SELECT is `with` followed by a SELECT from `from`, using each
// input's result.
struct ReplacedValues {
  std::string with;
  std::string from;
  std::vector<std::string> results;
};
ReplacedValues replaced_values(const SqlContext& sql, const std::vector<std::string>& inputs,
                               const std::vector<std::pair<std::string, std::string>>& pairs, std::string_view prefix);

// Statements that stop the script with `message` when the query
// `failing_count` (one row, one number) gives more than 0: a CHECK
// constraint on a scratch table (raise_error in Spark).
std::vector<std::string> stop_unless_zero(const SqlContext& sql, std::string_view suffix,
                                          const std::string& failing_count, const std::string& message);

// The SQL of a converting step (parse_date, parse_number, cast) of the text
// column c under on_error (steps/typed_support.hpp). `converted` is the
// converted value, NULL where the text does not convert; `as_text` writes a
// converted value in its canonical text, for keep. reject: `tamis run` stops
// when a row is rejected and input.max_rejects allows none (its default), and
// so does the script; with rejected rows allowed the step is refused, since
// no script writes a rejects file. `with`, when given, is a WITH clause
// ("WITH a AS (...), b AS (...)\n") that the statements start with, whose
// last table `sql.from` names: the stages a converted value is computed in.
Result<SqlStepText> conversion_sql(const SqlContext& sql, size_t c, const std::string& converted,
                                   const std::function<std::string(const std::string&)>& as_text,
                                   OnError on_error, std::string_view op, std::string_view with = {});

}  // namespace tamis
