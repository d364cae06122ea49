// The steps built on SQL expressions: keep_rows, drop_rows, derive_column.
// Removed rows are reported with their source lines, NULL conditions follow
// SQL's WHERE, parameters are checked with errors naming step and key, and a
// streamed run (batches down to one row) equals the whole-table run.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

#include <string>
#include <vector>

#include "recipe.hpp"
#include "steps/registry.hpp"
#include "steps/row_filter.hpp"
#include "test_expr_support.hpp"

using namespace tamis;
using tamis::test::canonical_cells;
using tamis::test::Cells;
using tamis::test::make_table;

namespace {

using Strings = std::vector<std::string>;
using Lines = std::vector<uint64_t>;

// Survey rows: site, height (decimal 2), species; source lines 2..7.
Table survey(size_t chunk_rows = 4096) {
  return make_table({{"site", Type::text, 0, {"North", "South", std::nullopt, "Gare", "Ré", ""}},
                     {"height", Type::decimal, 2, {"1.50", std::nullopt, "3.25", std::nullopt, "0.80", "2.00"}},
                     {"species", Type::text, 0, {"oak", "elm", "ash", std::nullopt, "ōak", "oak"}}},
                    6, chunk_rows);
}

std::unique_ptr<Step> step_of(const std::string& json, const Schema& schema, int index = 0) {
  auto step = parse_step(nlohmann::json::parse(json), index, schema);
  REQUIRE_MESSAGE(step.ok(), (step.ok() ? std::string() : step.error().to_string()));
  return std::move(step).value();
}

std::string step_error(const std::string& json, const Schema& schema, int index = 3) {
  auto step = parse_step(nlohmann::json::parse(json), index, schema);
  if (step.ok()) return "";
  CHECK(step.error().step == index);
  CHECK(step.error().kind == ErrorKind::usage);
  return step.error().message;
}

Lines lines_of(const Table& t) {
  Lines out;
  for (size_t r = 0; r < t.row_count(); ++r) out.push_back(t.source_line(r));
  return out;
}

Lines removed_lines(const ChangeRecord& change) {
  Lines out;
  for (const RemovedRow& r : change.removed) out.push_back(r.line);
  return out;
}

}  // namespace

TEST_CASE("unit_expr keep_rows: keeps TRUE rows only - FALSE and NULL rows are removed with their lines") {
  const Table t = survey();
  auto step = step_of(R"js({"op": "keep_rows", "where": "height > 1"})js", schema_of(t));
  ChangeRecord change;
  auto out = step->apply(t, nullptr, change);
  REQUIRE(out.ok());
  CHECK(lines_of(*out) == Lines{2, 4, 7});  // 1.50, 3.25, 2.00; NULL heights are not > 1
  CHECK(canonical_cells(out->column(0)) == Strings{"North", "NULL", ""});
  CHECK(canonical_cells(out->column(1)) == Strings{"1.50", "3.25", "2.00"});
  CHECK(out->names() == t.names());
  CHECK(change.rows_in == 6);
  CHECK(change.rows_out == 3);
  CHECK(change.rows_removed == 3);
  CHECK(removed_lines(change) == Lines{3, 5, 6});
  for (const RemovedRow& r : change.removed) CHECK(r.reason == "where height > 1 was not true");
  CHECK(step->describe() == "Keep only the rows where height > 1 is true.");
  CHECK(step->parameters().dump() == R"js({"where":"height > 1"})js");
}

TEST_CASE("unit_expr drop_rows: removes TRUE rows only - NULL conditions keep the row") {
  const Table t = survey();
  auto step = step_of(R"js({"op": "drop_rows", "where": "height > 1"})js", schema_of(t));
  ChangeRecord change;
  auto out = step->apply(t, nullptr, change);
  REQUIRE(out.ok());
  CHECK(lines_of(*out) == Lines{3, 5, 6});
  CHECK(removed_lines(change) == Lines{2, 4, 7});
  for (const RemovedRow& r : change.removed) CHECK(r.reason == "where height > 1 was true");
  CHECK(change.rows_in == change.rows_out + change.rows_removed);
  CHECK(step->describe() == "Remove the rows where height > 1 is true.");
  // The benchmark's rule: rows with neither measure.
  auto both = step_of(R"js({"op": "drop_rows", "where": "height IS NULL AND species IS NULL"})js", schema_of(t));
  ChangeRecord change2;
  auto out2 = both->apply(t, nullptr, change2);
  REQUIRE(out2.ok());
  CHECK(lines_of(*out2) == Lines{2, 3, 4, 6, 7});
  CHECK(removed_lines(change2) == Lines{5});
}

TEST_CASE("unit_expr row filters: Unicode text, chunks shared when untouched, empty tables") {
  const Table t = survey(2);
  auto accents = step_of(R"js({"op": "keep_rows", "where": "site LIKE '_é' OR species = 'ōak'"})js", schema_of(t));
  ChangeRecord change;
  auto out = accents->apply(t, nullptr, change);
  REQUIRE(out.ok());
  CHECK(lines_of(*out) == Lines{6});
  // Removing only from the third chunk leaves the first two shared.
  auto last = step_of(R"js({"op": "drop_rows", "where": "site = ''"})js", schema_of(t));
  ChangeRecord change2;
  auto kept = last->apply(t, nullptr, change2);
  REQUIRE(kept.ok());
  CHECK(lines_of(*kept) == Lines{2, 3, 4, 5, 6});
  for (size_t c = 0; c < t.column_count(); ++c) {
    CHECK(&kept->column(c).chunk(0) == &t.column(c).chunk(0));
    CHECK(&kept->column(c).chunk(1) == &t.column(c).chunk(1));
  }
  // Nothing removed: the very same table comes back.
  auto none = step_of(R"js({"op": "drop_rows", "where": "FALSE"})js", schema_of(t));
  ChangeRecord change3;
  auto same = none->apply(t, nullptr, change3);
  REQUIRE(same.ok());
  CHECK(same->column_ptr(0) == t.column_ptr(0));
  CHECK(change3.rows_removed == 0);
  // Everything removed, and an empty input.
  auto all = step_of(R"js({"op": "keep_rows", "where": "NULL"})js", schema_of(t));
  ChangeRecord change4;
  auto nothing = all->apply(t, nullptr, change4);
  REQUIRE(nothing.ok());
  CHECK(nothing->row_count() == 0);
  CHECK(nothing->column_count() == 3);
  CHECK(change4.rows_removed == 6);
  ChangeRecord change5;
  auto empty = all->apply(*nothing, nullptr, change5);
  REQUIRE(empty.ok());
  CHECK(empty->row_count() == 0);
  CHECK(change5.rows_in == 0);
}

TEST_CASE("unit_expr select_rows keeps types, scales, NULLs and text across runs") {
  const Table t = survey(4);
  const Table picked = select_rows(t, {1, 0, 1, 1, 0, 1});
  CHECK(lines_of(picked) == Lines{2, 4, 5, 7});
  CHECK(canonical_cells(picked.column(0)) == Strings{"North", "NULL", "Gare", ""});
  CHECK(canonical_cells(picked.column(1)) == Strings{"1.50", "3.25", "NULL", "2.00"});
  CHECK(canonical_cells(picked.column(2)) == Strings{"oak", "ash", "NULL", "oak"});
  CHECK(picked.column(1).type() == Type::decimal);
  CHECK(picked.column(1).scale() == 2);
  // A chunk whose kept rows have no NULL stores no validity bitmap.
  const Table no_nulls = select_rows(t, {1, 1, 0, 0, 1, 1});
  CHECK_FALSE(no_nulls.column(0).chunk(0).has_nulls());
}

TEST_CASE("unit_expr derive_column: appends a typed column - runtime errors name the line") {
  const Table t = survey();
  auto step = step_of(R"js({"op": "derive_column", "name": "height_cm", "expr": "height * 100"})js", schema_of(t));
  const Schema after = step->output_schema(schema_of(t));
  REQUIRE(after.size() == 4);
  CHECK(after[3].name == "height_cm");
  CHECK(after[3].type == Type::decimal);
  CHECK(after[3].scale == 2);
  ChangeRecord change;
  auto out = step->apply(t, nullptr, change);
  REQUIRE(out.ok());
  CHECK(out->names() == Strings{"site", "height", "species", "height_cm"});
  CHECK(canonical_cells(out->column(3)) == Strings{"150.00", "NULL", "325.00", "NULL", "80.00", "200.00"});
  CHECK(out->column_ptr(0) == t.column_ptr(0));  // the other columns are shared
  CHECK(lines_of(*out) == lines_of(t));
  CHECK(change.rows_in == 6);
  CHECK(change.rows_out == 6);
  CHECK(step->describe() == "Add the column height_cm computed as height * 100.");
  CHECK(step->parameters().dump() == R"js({"name":"height_cm","expr":"height * 100"})js");

  auto label = step_of(R"js({"op": "derive_column", "name": "étiquette",
                           "expr": "COALESCE(UPPER(site), '?') || ' ' || CAST(COALESCE(height, 0) AS TEXT)"})js",
                       schema_of(t));
  ChangeRecord change2;
  auto labelled = label->apply(t, nullptr, change2);
  REQUIRE(labelled.ok());
  CHECK(canonical_cells(labelled->column(3)) ==
        Strings{"NORTH 1.50", "SOUTH 0.00", "? 3.25", "GARE 0.00", "RÉ 0.80", " 2.00"});

  auto failing = step_of(R"js({"op": "derive_column", "name": "n", "expr": "CAST(species AS INTEGER)"})js", schema_of(t));
  ChangeRecord change3;
  auto error = failing->apply(t, nullptr, change3);
  REQUIRE_FALSE(error.ok());
  CHECK(error.error().kind == ErrorKind::bad_input);
  CHECK(error.error().line == 2);
  CHECK(error.error().message ==
        "at character 1 (CAST(species AS INTEGER)): cannot CAST 'oak' to INTEGER: not an integer in the row from "
        "line 2");
}

TEST_CASE("unit_expr steps: every bad parameter is an error naming the step and the key") {
  const Schema schema = schema_of(survey());
  CHECK(step_error(R"js({"op": "keep_rows"})js", schema) == "(keep_rows) 'where': is required (text)");
  CHECK(step_error(R"js({"op": "drop_rows", "where": 5})js", schema) == "(drop_rows) 'where': expected text, found a number");
  CHECK(step_error(R"js({"op": "keep_rows", "where": "hieght > 1"})js", schema) ==
        "(keep_rows) 'where': at character 1: unknown column 'hieght' (the columns are: site, height, species)");
  CHECK(step_error(R"js({"op": "keep_rows", "where": "height + 1"})js", schema) ==
        "(keep_rows) 'where': at character 1: expected a condition (true or false), found decimal (scale 2) "
        "expression");
  CHECK(step_error(R"js({"op": "drop_rows", "where": ""})js", schema) ==
        "(drop_rows) 'where': at character 1: expected an expression, found nothing");
  CHECK(step_error(R"js({"op": "keep_rows", "where": "TRUE", "wher": "x"})js", schema).find("'wher'") !=
        std::string::npos);
  CHECK(step_error(R"js({"op": "derive_column", "expr": "1"})js", schema) == "(derive_column) 'name': is required (text)");
  CHECK(step_error(R"js({"op": "derive_column", "name": "", "expr": "1"})js", schema) ==
        "(derive_column) 'name': must not be empty");
  CHECK(step_error(R"js({"op": "derive_column", "name": "site", "expr": "1"})js", schema) ==
        "(derive_column) 'name': a column named 'site' already exists");
  CHECK(step_error(R"js({"op": "derive_column", "name": "x"})js", schema) == "(derive_column) 'expr': is required (text)");
  CHECK(step_error(R"js({"op": "derive_column", "name": "x", "expr": ["1"]})js", schema) ==
        "(derive_column) 'expr': expected text, found a list");
  CHECK(step_error(R"js({"op": "derive_column", "name": "x", "expr": "1 +"})js", schema) ==
        "(derive_column) 'expr': at character 4: expected a value, found the end of the expression");
  CHECK(step_error(R"js({"op": "derive_column", "name": "x", "expr": "1", "type": "integer"})js", schema)
            .find("'type'") != std::string::npos);
}

TEST_CASE("unit_expr steps: registered, and the SQL support follows the expression") {
  const Schema schema = schema_of(survey());
  std::vector<std::string> ops;
  for (const StepKind& k : step_kinds()) ops.push_back(std::string(k.op));
  for (const char* op : {"keep_rows", "drop_rows", "derive_column"})
    CHECK(std::find(ops.begin(), ops.end(), op) != ops.end());
  auto simple = step_of(R"js({"op": "keep_rows", "where": "site IS NOT NULL"})js", schema);
  auto division = step_of(R"js({"op": "derive_column", "name": "r", "expr": "height / 3"})js", schema);
  for (Dialect d : {Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark})
    CHECK(simple->sql_support(d) == SqlSupport::exact);
  CHECK(division->sql_support(Dialect::postgres) == SqlSupport::exact);
  CHECK(division->sql_support(Dialect::sqlite) == SqlSupport::approximate);
}

// A streamed run feeds the same steps batch by batch; the output and the
// change records must not depend on where the batches split.
TEST_CASE("unit_expr steps: streaming in batches down to one row equals the whole-table run") {
  const size_t rows = 523;
  Cells site, height, note;
  for (size_t r = 0; r < rows; ++r) {
    site.push_back(r % 11 == 0 ? std::nullopt : std::optional<std::string>(r % 3 ? "Nord" : "Süd"));
    height.push_back(r % 7 == 0 ? std::nullopt : std::optional<std::string>(std::to_string(r % 40) + ".5"));
    note.push_back(r % 5 == 0 ? std::nullopt : std::optional<std::string>(std::string(r % 4, 'x')));
  }
  const Table whole = make_table({{"site", Type::text, 0, site, 100},
                                  {"height", Type::decimal, 1, height, 64},
                                  {"note", Type::text, 0, note, 0}},
                                 rows, 97);
  auto recipe = parse_recipe(R"js({"tamis_recipe": 1, "steps": [
      {"op": "derive_column", "name": "tall", "expr": "CASE WHEN height >= 20 THEN 'tall' ELSE 'short' END"},
      {"op": "drop_rows", "where": "height IS NULL AND note IS NULL"},
      {"op": "keep_rows", "where": "site = 'Nord' OR tall = 'tall' OR CHAR_LENGTH(note) > 2"},
      {"op": "derive_column", "name": "ratio", "expr": "height / (CHAR_LENGTH(COALESCE(note, '')) + 1)"}]})js",
                             "stream.json");
  REQUIRE(recipe.ok());
  auto compiled = compile_recipe(*recipe, schema_of(whole));
  REQUIRE(compiled.ok());
  std::vector<ChangeRecord> expected_changes;
  auto expected = apply_recipe(*compiled, whole, &expected_changes);
  REQUIRE(expected.ok());
  CHECK(expected->row_count() > 0);
  CHECK(expected->row_count() < rows);
  for (size_t batch : {size_t{1}, size_t{2}, size_t{3}, size_t{7}, size_t{64}, size_t{500}}) {
    CAPTURE(batch);
    RecipeRun run(*compiled);
    Table streamed;
    for (size_t first = 0; first < rows; first += batch) {
      std::vector<uint8_t> in_batch(rows, 0);
      for (size_t r = first; r < std::min(rows, first + batch); ++r) in_batch[r] = 1;
      auto out = run.apply(select_rows(whole, in_batch));
      REQUIRE(out.ok());
      REQUIRE(streamed.append(*out).ok());
    }
    REQUIRE(run.finish().ok());
    REQUIRE(streamed.row_count() == expected->row_count());
    CHECK(lines_of(streamed) == lines_of(*expected));
    CHECK(streamed.names() == expected->names());
    for (size_t c = 0; c < expected->column_count(); ++c)
      CHECK(canonical_cells(streamed.column(c)) == canonical_cells(expected->column(c)));
    for (size_t s = 0; s < expected_changes.size(); ++s) {
      CHECK(run.changes()[s].rows_in == expected_changes[s].rows_in);
      CHECK(run.changes()[s].rows_removed == expected_changes[s].rows_removed);
      CHECK(removed_lines(run.changes()[s]) == removed_lines(expected_changes[s]));
    }
  }
}

// The benchmark's drop_rows shape over many rows (a correctness check; no
// time is asserted).
TEST_CASE("unit_expr drop_rows over 200,000 rows removes exactly the rows with both values NULL") {
  const size_t rows = 200000;
  Cells a, b;
  size_t both_null = 0;
  for (size_t r = 0; r < rows; ++r) {
    const bool a_null = r % 3 == 0, b_null = r % 5 == 0;
    both_null += a_null && b_null;
    a.push_back(a_null ? std::nullopt : std::optional<std::string>("1.5"));
    b.push_back(b_null ? std::nullopt : std::optional<std::string>("x"));
  }
  const Table t = make_table({{"a", Type::decimal, 1, a, 65536}, {"b", Type::text, 0, b, 65536}}, rows, 65536);
  auto step = step_of(R"js({"op": "drop_rows", "where": "a IS NULL AND b IS NULL"})js", schema_of(t));
  ChangeRecord change;
  auto out = step->apply(t, nullptr, change);
  REQUIRE(out.ok());
  CHECK(change.rows_removed == both_null);
  CHECK(out->row_count() == rows - both_null);
  CHECK(change.removed.size() == ChangeRecord::kListedRows);
  CHECK(change.removed[0].line == 2);   // row 0
  CHECK(change.removed[1].line == 17);  // row 15
  bool none_left = true;
  for (size_t r = 0; r < out->row_count(); ++r) none_left &= !(out->column(0).is_null(r) && out->column(1).is_null(r));
  CHECK(none_left);
}
