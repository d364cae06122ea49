// Helpers of the SQL expression suites: small typed tables written as text,
// and the canonical text of an expression's value for each row.
#pragma once

#include <doctest/doctest.h>

#include <algorithm>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "csv_writer.hpp"
#include "dates.hpp"
#include "expr/expr.hpp"
#include "expr/numeric.hpp"
#include "recipe.hpp"
#include "table.hpp"
#include "unit_support.hpp"

namespace tamis::test {

using Cells = std::vector<std::optional<std::string>>;  // nullopt = NULL

struct TestColumn {
  std::string name;
  Type type = Type::text;
  int scale = 0;
  Cells cells;
  size_t chunk_rows = 0;  // 0: the table's chunk size
};

// A typed cell from its canonical text.
inline int64_t typed_value(Type type, int scale, const std::string& text) {
  switch (type) {
    case Type::integer: return std::stoll(text);
    case Type::decimal: {
      int64_t v = 0;
      REQUIRE(expr::read_scaled(text, scale, v) == expr::NumberRead::ok);
      return v;
    }
    case Type::date: {
      const auto days = DateFormat::compile("%Y-%m-%d").value().parse(text);
      REQUIRE(days.has_value());
      return *days;
    }
    case Type::boolean: return text == "true" ? 1 : 0;
    case Type::text: break;
  }
  return 0;
}

inline ColumnPtr make_column(Type type, int scale, const Cells& cells, size_t chunk_rows) {
  auto column = std::make_shared<Column>(type, scale);
  for (size_t start = 0; start < cells.size(); start += chunk_rows) {
    const size_t end = std::min(cells.size(), start + chunk_rows);
    if (type == Type::text) {
      TextChunkBuilder builder;
      for (size_t i = start; i < end; ++i) {
        if (cells[i]) builder.append(*cells[i]);
        else builder.append_null();
      }
      column->append_chunk(builder.finish());
      continue;
    }
    auto chunk = std::make_shared<ColumnChunk>();
    chunk->rows = end - start;
    bool any_null = false;
    for (size_t i = start; i < end; ++i) any_null |= !cells[i];
    if (any_null) chunk->validity.assign((chunk->rows + 63) / 64, ~uint64_t{0});
    for (size_t i = start; i < end; ++i) {
      chunk->numbers.push_back(cells[i] ? typed_value(type, scale, *cells[i]) : 0);
      if (!cells[i]) chunk->validity[(i - start) >> 6] &= ~(uint64_t{1} << ((i - start) & 63));
    }
    column->append_chunk(std::move(chunk));
  }
  return column;
}

// Source lines start at 2 (line 1 is the header) unless given.
inline Table make_table(const std::vector<TestColumn>& columns, size_t rows, size_t chunk_rows = 4096,
                        std::vector<int64_t> lines = {}) {
  std::vector<std::string> names;
  std::vector<ColumnPtr> built;
  for (const TestColumn& c : columns) {
    REQUIRE(c.cells.size() == rows);
    names.push_back(c.name);
    built.push_back(make_column(c.type, c.scale, c.cells, c.chunk_rows ? c.chunk_rows : chunk_rows));
  }
  if (lines.empty())
    for (size_t r = 0; r < rows; ++r) lines.push_back(static_cast<int64_t>(r + 2));
  Cells line_cells;
  for (int64_t l : lines) line_cells.push_back(std::to_string(l));
  auto table = Table::make(names, built, make_column(Type::integer, 0, line_cells, chunk_rows ? chunk_rows : 1));
  REQUIRE(table.ok());
  return table.value();
}

// The canonical text of every value of a column, "NULL" for NULL.
inline std::vector<std::string> canonical_cells(const Column& column) {
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  std::vector<std::string> out;
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    for (size_t i = 0; i < chunk.rows; ++i) {
      std::string cell;
      if (chunk.is_null(i)) cell = "NULL";
      else append_canonical(column, chunk, i, iso, cell);
      out.push_back(cell);
    }
  }
  return out;
}

// "error: <message>" (appended: GCC 12's -Wrestrict misfires on "..." + s).
inline std::vector<std::string> error_result(const Error& error) {
  std::string shown = "error: ";
  shown += error.message;
  return {shown};
}

// The value of expr for each row, or "error: <message>".
inline std::vector<std::string> evaluate_all(const std::string& text, const Table& table) {
  auto expression = Expression::parse(text, schema_of(table), Expression::Use::value);
  if (!expression) return error_result(expression.error());
  auto column = expression->evaluate(table);
  if (!column) return error_result(column.error());
  return canonical_cells(**column);
}

// A one-row table without columns, for expressions of literals.
inline const Table& one_row() {
  static const Table table = make_table({}, 1);
  return table;
}

// The value of an expression of literals ("NULL", "error: ...").
inline std::string value_of(const std::string& text) {
  const auto values = evaluate_all(text, one_row());
  REQUIRE(values.size() == 1);
  return values[0];
}

// The parse error's message, or "" when the expression parses.
inline std::string parse_error(const std::string& text, const Schema& schema = {},
                               Expression::Use use = Expression::Use::value) {
  auto expression = Expression::parse(text, schema, use);
  return expression ? std::string() : expression.error().message;
}

}  // namespace tamis::test
