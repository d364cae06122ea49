// Helpers for the typed-step and row-step suites: small tables, running a
// recipe over a table whole or batch by batch through RecipeRun, and
// comparisons on the canonical text form of cells (design §3).
#pragma once

#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <optional>
#include <string>
#include <vector>

#include "recipe.hpp"
#include "steps/registry.hpp"
#include "steps/row_filter.hpp"
#include "steps/typed_support.hpp"
#include "unit_support.hpp"

namespace tamis::typed_test {

using nlohmann::json;
using Cell = std::optional<std::string>;
using Cells = std::vector<std::string>;  // canonical text, "<NULL>" for NULL
inline const Cell null_cell = std::nullopt;

// The source line of row r in the tables built here: line 1 is the header.
inline uint64_t line_of_row(size_t r) { return r + 2; }

inline ColumnPtr lines_column(size_t rows) {
  auto lines = std::make_shared<Column>(Type::integer);
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = rows;
  for (size_t r = 0; r < rows; ++r) chunk->numbers.push_back(static_cast<int64_t>(line_of_row(r)));
  lines->append_chunk(chunk);
  return lines;
}

// A text column cut into chunks of chunk_rows rows, so steps meet more than
// one chunk per column.
inline ColumnPtr text_column(const std::vector<Cell>& cells, size_t chunk_rows = 2) {
  auto column = std::make_shared<Column>(Type::text);
  for (size_t start = 0; start < cells.size(); start += chunk_rows) {
    TextChunkBuilder builder;
    for (size_t r = start; r < std::min(cells.size(), start + chunk_rows); ++r)
      if (cells[r]) builder.append(*cells[r]);
      else builder.append_null();
    column->append_chunk(builder.finish());
  }
  return column;
}

inline ColumnPtr typed_column(Type type, int scale, const std::vector<std::optional<int64_t>>& values) {
  auto column = std::make_shared<Column>(type, scale);
  TypedChunkBuilder builder;
  for (const auto& v : values)
    if (v) builder.append(*v);
    else builder.append_null();
  column->append_chunk(builder.finish());
  return column;
}

inline Table table_of(const std::vector<std::string>& names, const std::vector<ColumnPtr>& columns) {
  const size_t rows = columns.empty() ? 0 : columns[0]->size();
  auto table = Table::make(names, columns, lines_column(rows));
  REQUIRE_MESSAGE(table.ok(), (table.ok() ? "" : table.error().to_string()));
  return std::move(table).value();
}

// A table of text columns given row by row.
inline Table text_table(const std::vector<std::string>& names, const std::vector<std::vector<Cell>>& rows) {
  std::vector<ColumnPtr> columns;
  for (size_t c = 0; c < names.size(); ++c) {
    std::vector<Cell> cells;
    for (const auto& row : rows) cells.push_back(row[c]);
    columns.push_back(text_column(cells));
  }
  return table_of(names, columns);
}

// One text column named "v".
inline Table values_table(const std::vector<Cell>& cells) { return table_of({"v"}, {text_column(cells)}); }

inline Cells cells_of(const Table& table, size_t c = 0) {
  Cells out;
  const Column& column = table.column(c);
  for (size_t r = 0; r < table.row_count(); ++r) {
    if (column.is_null(r)) {
      out.push_back("<NULL>");
      continue;
    }
    std::string text;
    if (column.type() == Type::text) text = column.text(r);
    else append_canonical_value(column.type(), column.scale(), column.number(r), text);
    out.push_back(text);
  }
  return out;
}

inline std::vector<Cells> rows_of(const Table& table) {
  std::vector<Cells> rows(table.row_count());
  for (size_t c = 0; c < table.column_count(); ++c) {
    const Cells cells = cells_of(table, c);
    for (size_t r = 0; r < cells.size(); ++r) rows[r].push_back(cells[r]);
  }
  return rows;
}

// Rows [begin, end) of a table, source lines included.
inline Table slice(const Table& table, size_t begin, size_t end) {
  std::vector<uint8_t> keep(table.row_count(), 0);
  std::fill(keep.begin() + static_cast<std::ptrdiff_t>(begin), keep.begin() + static_cast<std::ptrdiff_t>(end), 1);
  return select_rows(table, keep);
}

struct RunResult {
  std::optional<Table> table;  // absent when the run failed
  Schema schema;               // the compiled output schema
  std::vector<ChangeRecord> changes;
  std::optional<Error> error;
};

inline CompiledRecipe compile_ok(const json& steps, const Schema& schema) {
  const json recipe = {{"tamis_recipe", 1}, {"steps", steps}};
  auto parsed = parse_recipe(recipe.dump(), "test.json");
  REQUIRE_MESSAGE(parsed.ok(), (parsed.ok() ? "" : parsed.error().to_string()));
  auto compiled = compile_recipe(*parsed, schema);
  REQUIRE_MESSAGE(compiled.ok(), (compiled.ok() ? "" : compiled.error().to_string()));
  return std::move(compiled).value();
}

// Runs steps over the table: whole (batch_rows 0, apply_recipe) or through
// RecipeRun in batches of batch_rows rows, every pass reading the batches
// again, as `tamis run` does.
inline RunResult run_steps(const json& steps, const Table& table, size_t batch_rows = 0) {
  const CompiledRecipe compiled = compile_ok(steps, schema_of(table));
  RunResult result;
  result.schema = compiled.output;
  if (batch_rows == 0) {
    auto out = apply_recipe(compiled, table, &result.changes);
    if (!out) result.error = out.error();
    else result.table = std::move(out).value();
    return result;
  }
  std::vector<Table> batches;
  for (size_t begin = 0; begin < table.row_count(); begin += batch_rows)
    batches.push_back(slice(table, begin, std::min(table.row_count(), begin + batch_rows)));
  RecipeRun run(compiled);
  for (size_t pass = 0; pass + 1 < run.passes(); ++pass) {
    for (const Table& batch : batches)
      if (Status s = run.observe(pass, batch); !s) {
        result.error = s.error();
        return result;
      }
    run.end_pass(pass);
  }
  Table joined;
  for (const Table& batch : batches) {
    auto out = run.apply(batch);
    if (!out) {
      result.error = out.error();
      return result;
    }
    REQUIRE(joined.append(*out).ok());
  }
  if (Status s = run.finish(); !s) {
    result.error = s.error();
    return result;
  }
  result.changes = run.changes();
  result.table = std::move(joined);
  return result;
}

inline RunResult run_ok(const json& steps, const Table& table, size_t batch_rows = 0) {
  RunResult r = run_steps(steps, table, batch_rows);
  REQUIRE_MESSAGE(!r.error, (r.error ? r.error->to_string() : ""));
  return r;
}

inline std::vector<std::string> removed_lines(const ChangeRecord& change) {
  std::vector<std::string> out;
  for (const RemovedRow& r : change.removed) out.push_back(std::to_string(r.line) + ": " + r.reason);
  return out;
}

// The same steps give the same table (cells, types, source lines) and the
// same change counts whole and in batches of 1, 2 and 3 rows.
inline void check_streaming(const json& steps, const Table& table) {
  const RunResult whole = run_steps(steps, table);
  for (const size_t batch_rows : {size_t{1}, size_t{2}, size_t{3}}) {
    INFO(steps.dump(), " in batches of ", batch_rows, " rows");
    const RunResult streamed = run_steps(steps, table, batch_rows);
    REQUIRE(whole.error.has_value() == streamed.error.has_value());
    if (whole.error) {
      CHECK(whole.error->message == streamed.error->message);
      continue;
    }
    const Table& a = *whole.table;
    const Table& b = *streamed.table;
    if (table.row_count() > 0 && b.row_count() > 0) {
      CHECK(a.names() == b.names());
      for (size_t c = 0; c < a.column_count(); ++c) {
        CHECK(a.column(c).type() == b.column(c).type());
        CHECK(a.column(c).scale() == b.column(c).scale());
      }
    }
    CHECK(rows_of(a) == rows_of(b));
    CHECK(test::lines_of(a) == test::lines_of(b));
    REQUIRE(whole.changes.size() == streamed.changes.size());
    for (size_t j = 0; j < whole.changes.size(); ++j) {
      const ChangeRecord& x = whole.changes[j];
      const ChangeRecord& y = streamed.changes[j];
      CHECK(x.rows_in == y.rows_in);
      CHECK(x.rows_out == y.rows_out);
      CHECK(x.rows_removed == y.rows_removed);
      CHECK(x.rows_rejected == y.rows_rejected);
      CHECK(x.cells_changed == y.cells_changed);
      CHECK(removed_lines(x) == removed_lines(y));
      CHECK(x.conflicts == y.conflicts);
      CHECK(x.warnings == y.warnings);
    }
  }
}

// The error of a step definition that must not parse, as step 3 of a recipe.
inline Error step_error(const json& step, const Schema& schema) {
  auto parsed = parse_step(step, 3, schema);
  REQUIRE_MESSAGE(!parsed.ok(), step.dump());
  Error e = parsed.take_error();
  CHECK(e.kind == ErrorKind::usage);
  REQUIRE(e.step.has_value());
  CHECK(*e.step == 3);
  return e;
}

// The error names the op and the key, and says `words`.
inline void check_step_error(const json& step, const Schema& schema, const std::string& key, const std::string& words) {
  const Error e = step_error(step, schema);
  INFO(step.dump(), " -> ", e.message);
  CHECK(e.message.find("(" + step["op"].get<std::string>() + ") '" + key + "'") != std::string::npos);
  CHECK(e.message.find(words) != std::string::npos);
}

// parameters() written back into a step parses to the same step: same
// parameters, same sentence.
inline void check_round_trip(const json& step, const Schema& schema) {
  auto first = parse_step(step, 0, schema);
  REQUIRE_MESSAGE(first.ok(), (first.ok() ? "" : first.error().to_string()));
  json again = json::parse((*first)->parameters().dump());
  again["op"] = step["op"];
  auto second = parse_step(again, 0, schema);
  REQUIRE_MESSAGE(second.ok(), again.dump());
  CHECK((*first)->parameters() == (*second)->parameters());
  CHECK((*first)->describe() == (*second)->describe());
  const std::string sentence = (*first)->describe();
  CHECK(!sentence.empty());
  CHECK(sentence.back() == '.');
}

}  // namespace tamis::typed_test
