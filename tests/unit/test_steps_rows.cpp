// The row and column steps: fill_from_group, carry_forward, deduplicate,
// require, drop_columns, rename_columns, reorder_columns, and the key index
// behind deduplicate. White space is Unicode's White_Space property and case
// folding Unicode's CaseFolding.txt (status C and F), as in Debian's
// unicode-data (Unicode 15.0) and ICU 72; SQL's NULL handling follows ISO/IEC
// 9075 (GROUP BY, PARTITION BY and DISTINCT put NULLs together; a UNIQUE or
// CHECK constraint lets NULL pass).
#include <doctest/doctest.h>

#include <map>
#include <set>
#include <string>
#include <vector>

#include "steps/deduplicate.hpp"
#include "steps/row_key.hpp"
#include "test_steps_typed_support.hpp"

namespace tamis {
namespace {

using namespace typed_test;

const Schema kColumns = {{"site", Type::text, 0}, {"grp", Type::text, 0}, {"n", Type::integer, 0},
                         {"when", Type::date, 0}, {"amount", Type::decimal, 2}};

// ----------------------------------------------------------- fill_from_group

json fill(const std::string& column, std::vector<std::string> keys) {
  return {{"op", "fill_from_group"}, {"column", column}, {"keys", keys}};
}

TEST_CASE("unit_steps_rows: fill_from_group fills only from groups that agree") {
  const Table in = text_table({"grp", "val"}, {{"g1", null_cell},   // filled from a later row
                                               {"g1", "Oak"},
                                               {"g2", "Elm"},
                                               {"g2", "Ash"},
                                               {"g2", null_cell},   // two values: a conflict, left NULL
                                               {"g3", null_cell},   // no value at all: stays NULL, no conflict
                                               {null_cell, "Fir"},  // NULL keys are one group (SQL GROUP BY)
                                               {null_cell, null_cell},
                                               {"g4", ""},          // the empty text is a value, not NULL
                                               {"g4", null_cell},
                                               {"g1", "Oak"}});
  const RunResult r = run_ok(json::array({fill("val", {"grp"})}), in);
  CHECK(cells_of(*r.table, 1) ==
        Cells{"Oak", "Oak", "Elm", "Ash", "<NULL>", "<NULL>", "Fir", "Fir", "", "", "Oak"});
  const ChangeRecord& c = r.changes[0];
  CHECK(c.cells_changed.at("val") == 3);
  CHECK(c.conflicts == std::vector<std::string>{"grp='g2': 2 different values of val ('Elm', 'Ash'); 1 NULL left unfilled"});
  CHECK(c.warnings == std::vector<std::string>{"val: 1 NULL was left unfilled because 1 group holds different values"});
  check_streaming(json::array({fill("val", {"grp"})}), in);
}

TEST_CASE("unit_steps_rows: fill_from_group with typed columns, several keys and Unicode") {
  const Table in = table_of({"a", "b", "n"}, {text_column({"x", "x", "x", "y", "y", "Zoë", "Zoe\u0308", "Zoë"}),
                                              text_column({"1", "1", "2", "1", "1", "k", "k", "k"}),
                                              typed_column(Type::integer, 0, {7, std::nullopt, std::nullopt, 8, std::nullopt,
                                                                              5, 6, std::nullopt})});
  const RunResult r = run_ok(json::array({fill("n", {"a", "b"})}), in);
  // "Zoë" (U+00EB) and "Zoe" + U+0308 are different texts code point by code
  // point, so they are different groups and each fills its own NULL.
  CHECK(cells_of(*r.table, 2) == Cells{"7", "7", "<NULL>", "8", "8", "5", "6", "5"});
  CHECK(r.changes[0].conflicts.empty());
  check_streaming(json::array({fill("n", {"a", "b"})}), in);
}

TEST_CASE("unit_steps_rows: fill_from_group caps what it lists") {
  std::vector<std::vector<Cell>> rows;
  for (int g = 0; g < 25; ++g) {
    std::string key = "g";
    key += std::to_string(g);
    for (const char* v : {"a", "b", "c", "d", "e"}) rows.push_back({key, std::string(v)});
    rows.push_back({key, null_cell});
  }
  const RunResult r = run_ok(json::array({fill("val", {"grp"})}), text_table({"grp", "val"}, rows));
  const auto& conflicts = r.changes[0].conflicts;
  REQUIRE(conflicts.size() == 21);
  CHECK(conflicts[0] == "grp='g0': more than 3 different values of val ('a', 'b', 'c', …); 1 NULL left unfilled");
  CHECK(conflicts[20] == "… and 5 more groups with different values");
  CHECK(r.changes[0].warnings[0] == "val: 25 NULLs were left unfilled because 25 groups hold different values");
}

TEST_CASE("unit_steps_rows: fill_from_group parameter errors and an empty table") {
  const Table empty = text_table({"grp", "val"}, {});
  const RunResult r = run_ok(json::array({fill("val", {"grp"})}), empty);
  CHECK(r.table->row_count() == 0);
  CHECK(r.changes[0].conflicts.empty());
  check_step_error(fill("site", {"grp", "site"}), kColumns, "keys", "must not include the filled column 'site'");
  check_step_error(fill("site", {}), kColumns, "keys", "expected a non-empty list");
  check_step_error(fill("site", {"plot"}), kColumns, "keys", "no column named 'plot'");
  check_step_error({{"op", "fill_from_group"}, {"column", "site"}}, kColumns, "keys", "is required");
  check_step_error({{"op", "fill_from_group"}, {"column", "x"}, {"keys", {"grp"}}}, kColumns, "column", "no column");
  check_step_error({{"op", "fill_from_group"}, {"column", "site"}, {"keys", {"grp"}}, {"key", "grp"}}, kColumns, "key",
                   "is not a parameter");
}

// ------------------------------------------------------------- carry_forward

TEST_CASE("unit_steps_rows: carry_forward fills from above, per group, across batches") {
  const Table in = text_table({"grp", "val"}, {{"a", null_cell},  // nothing above: stays NULL
                                               {"a", "1"},
                                               {"b", "x"},
                                               {"a", null_cell},
                                               {"b", null_cell},
                                               {"a", ""},         // the empty text is a value and is carried
                                               {"a", null_cell},
                                               {null_cell, "n"},
                                               {null_cell, null_cell}});
  const json grouped = json::array({{{"op", "carry_forward"}, {"column", "val"}, {"group_by", {"grp"}}}});
  const RunResult r = run_ok(grouped, in);
  CHECK(cells_of(*r.table, 1) == Cells{"<NULL>", "1", "x", "1", "x", "", "", "n", "n"});
  CHECK(r.changes[0].cells_changed.at("val") == 4);
  const json whole = json::array({{{"op", "carry_forward"}, {"column", "val"}}});
  CHECK(cells_of(*run_ok(whole, in).table, 1) == Cells{"<NULL>", "1", "x", "x", "x", "", "", "n", "n"});
  const json empty_list = json::array({{{"op", "carry_forward"}, {"column", "val"}, {"group_by", json::array()}}});
  CHECK(cells_of(*run_ok(empty_list, in).table, 1) == cells_of(*run_ok(whole, in).table, 1));
  check_streaming(grouped, in);
  check_streaming(whole, in);
  const Table typed = table_of({"d"}, {typed_column(Type::date, 0, {std::nullopt, 19791, std::nullopt, -1, std::nullopt})});
  CHECK(cells_of(*run_ok(json::array({{{"op", "carry_forward"}, {"column", "d"}}}), typed).table) ==
        Cells{"<NULL>", "2024-03-09", "2024-03-09", "1969-12-31", "1969-12-31"});
}

TEST_CASE("unit_steps_rows: carry_forward with Unicode text and on an empty table") {
  const Table in = text_table({"grp", "val"}, {{"Åre", "𝄞 clef"}, {"Åre", null_cell}, {"Are", null_cell}});
  const json steps = json::array({{{"op", "carry_forward"}, {"column", "val"}, {"group_by", {"grp"}}}});
  // "Åre" and "Are" are different groups: nothing is carried into the third row.
  CHECK(cells_of(*run_ok(steps, in).table, 1) == Cells{"𝄞 clef", "𝄞 clef", "<NULL>"});
  const RunResult empty = run_ok(steps, text_table({"grp", "val"}, {}));
  CHECK(empty.table->row_count() == 0);
  CHECK(empty.changes[0].cells_changed.empty());
}

TEST_CASE("unit_steps_rows: carry_forward parameter errors") {
  check_step_error({{"op", "carry_forward"}, {"column", "site"}, {"group_by", {"site"}}}, kColumns, "group_by",
                   "must not include the filled column");
  check_step_error({{"op", "carry_forward"}, {"column", "site"}, {"group_by", "grp"}}, kColumns, "group_by",
                   "expected a non-empty list");
  check_step_error({{"op", "carry_forward"}}, kColumns, "column", "is required");
  check_step_error({{"op", "carry_forward"}, {"column", "site"}, {"direction", "down"}}, kColumns, "direction",
                   "is not a parameter");
}

// --------------------------------------------------------------- deduplicate

json dedup(json columns, const std::string& keep = "first", const std::string& compare = "exact") {
  return {{"op", "deduplicate"}, {"columns", columns}, {"keep", keep}, {"compare", compare}};
}

TEST_CASE("unit_steps_rows: deduplicate keeps the first or the last and says which line it kept") {
  const Table in = text_table({"site", "grp"}, {{"Oak", "a"},      // line 2
                                                {"Oak", "b"},      // 3
                                                {"Oak", "a"},      // 4: repeats line 2
                                                {null_cell, "a"},  // 5
                                                {null_cell, "a"},  // 6: NULL equals NULL here
                                                {"", "a"},         // 7: the empty text is not NULL
                                                {"Oak", "a"}});    // 8
  const RunResult first = run_ok(json::array({dedup("*")}), in);
  CHECK(rows_of(*first.table) == std::vector<Cells>{{"Oak", "a"}, {"Oak", "b"}, {"<NULL>", "a"}, {"", "a"}});
  CHECK(test::lines_of(*first.table) == test::Lines{2, 3, 5, 7});
  CHECK(removed_lines(first.changes[0]) == std::vector<std::string>{"4: duplicate of line 2", "6: duplicate of line 5",
                                                                    "8: duplicate of line 2"});
  CHECK(first.changes[0].rows_removed == 3);
  CHECK(first.changes[0].rows_out == 4);
  const RunResult last = run_ok(json::array({dedup("*", "last")}), in);
  CHECK(test::lines_of(*last.table) == test::Lines{3, 6, 7, 8});
  CHECK(removed_lines(last.changes[0]) == std::vector<std::string>{"2: duplicate of line 8", "4: duplicate of line 8",
                                                                   "5: duplicate of line 6"});
  const RunResult by_site = run_ok(json::array({dedup(json::array({"site"}))}), in);
  CHECK(test::lines_of(*by_site.table) == test::Lines{2, 5, 7});
  for (const json& step : {dedup("*"), dedup("*", "last"), dedup(json::array({"site"}), "last")})
    check_streaming(json::array({step}), in);
}

// The workbench keeps the file it loads with each distinct value once (a
// dictionary chunk, table.hpp); a step that removes rows keeps the values
// and the kept rows' codes. The rows must be those of the same table stored
// plainly (a consistency check within the engine).
TEST_CASE("unit_steps_rows: removing rows from values kept once keeps them once") {
  const std::vector<Cell> names = {"Oak", "Elm", null_cell, "", "Oak", "Ash"};
  std::vector<Cell> site, grp;
  for (size_t r = 0; r < 24; ++r) {
    site.push_back(names[r % names.size()]);
    grp.push_back(names[(r / 2) % names.size()]);
  }
  const Table plain = table_of({"site", "grp"}, {text_column(site, site.size()), text_column(grp, grp.size())});
  const Table kept_once = with_repeated_values_shared(plain);
  for (size_t c = 0; c < 2; ++c) REQUIRE(kept_once.column(c).chunk(0).layout == TextLayout::dictionary);
  const std::vector<json> steps = {dedup("*"), {{"op", "drop_rows"}, {"where", "site = 'Oak'"}},
                                   {{"op", "keep_rows"}, {"where", "grp IS NULL OR site = ''"}}};
  for (const json& step : steps) {
    const RunResult expected = run_ok(json::array({step}), plain);
    const RunResult got = run_ok(json::array({step}), kept_once);
    CHECK_MESSAGE(rows_of(*got.table) == rows_of(*expected.table), step.dump());
    CHECK(test::lines_of(*got.table) == test::lines_of(*expected.table));
    REQUIRE(got.table->row_count() < plain.row_count());
    for (size_t c = 0; c < 2; ++c) CHECK(got.table->column(c).chunk(0).layout == TextLayout::dictionary);
  }
}

TEST_CASE("unit_steps_rows: deduplicate compares trimmed or case-folded text") {
  // U+00A0 NO-BREAK SPACE and U+3000 IDEOGRAPHIC SPACE are White_Space
  // (PropList.txt); U+200B ZERO WIDTH SPACE is not.
  const Table spaces = values_table({"Oak", " Oak", "Oak\u00A0", "\u3000Oak\t", "Oak\u200B", "O ak"});
  CHECK(test::lines_of(*run_ok(json::array({dedup("*", "first", "trimmed")}), spaces).table) == test::Lines{2, 6, 7});
  CHECK(test::lines_of(*run_ok(json::array({dedup("*")}), spaces).table) == test::Lines{2, 3, 4, 5, 6, 7});
  // CaseFolding.txt: 00DF ß; F; 0073 0073 and 1E9E ẞ; F; 0073 0073, so
  // "straße", "STRASSE" and "STRAẞE" fold alike; 0130 İ; F; 0069 0307.
  // Folding does not trim.
  const Table cases = values_table({"straße", "STRASSE", "STRAẞE", "İ", "i\u0307", "i", "Strasse "});
  const RunResult folded = run_ok(json::array({dedup("*", "first", "casefold")}), cases);
  CHECK(cells_of(*folded.table) == Cells{"straße", "İ", "i", "Strasse "});
  CHECK(removed_lines(folded.changes[0]) == std::vector<std::string>{"3: duplicate of line 2", "4: duplicate of line 2",
                                                                     "6: duplicate of line 5"});
  check_streaming(json::array({dedup("*", "last", "casefold")}), cases);
  check_streaming(json::array({dedup("*", "first", "trimmed")}), spaces);
}

TEST_CASE("unit_steps_rows: deduplicate compares long values and folded values longer than written") {
  // Lengths past 127 bytes take more than one byte in a key, and case
  // folding can lengthen text beyond what was reserved for it: ΐ (U+0390,
  // two bytes) folds to ι + U+0308 + U+0301, six bytes (CaseFolding.txt:
  // 0390; F; 03B9 0308 0301).
  const std::string long_a(200, 'a'), longer(20000, 'b');
  std::string iotas, folded_iotas;
  for (int i = 0; i < 3000; ++i) {
    iotas += "\u0390";
    folded_iotas += "\u03B9\u0308\u0301";
  }
  const Table in = values_table({long_a, longer, long_a + "x", longer, iotas, folded_iotas});
  CHECK(test::lines_of(*run_ok(json::array({dedup("*")}), in).table) == test::Lines{2, 3, 4, 6, 7});
  CHECK(test::lines_of(*run_ok(json::array({dedup("*", "first", "casefold")}), in).table) == test::Lines{2, 3, 4, 6});
}

TEST_CASE("unit_steps_rows: deduplicate compares typed values by value") {
  const Table in = table_of({"n", "amount"}, {typed_column(Type::integer, 0, {1, 1, std::nullopt, std::nullopt, 2}),
                                              typed_column(Type::decimal, 2, {150, 150, 0, 0, 150})});
  CHECK(test::lines_of(*run_ok(json::array({dedup("*")}), in).table) == test::Lines{2, 4, 6});
}

uint64_t one_bucket(std::string_view) { return 42; }

// The rows a deduplicate must keep, found by brute force: a row is kept
// unless an earlier (keep first) or later (keep last) row has the same cells.
test::Lines expected_kept(const Table& table, bool keep_last) {
  const auto rows = rows_of(table);
  std::vector<std::vector<std::string>> keys;
  for (size_t r = 0; r < rows.size(); ++r) {
    std::vector<std::string> key;
    for (size_t c = 0; c < rows[r].size(); ++c)
      key.push_back(table.column(c).is_null(r) ? std::string("\x01NULL") : "=" + rows[r][c]);
    keys.push_back(key);
  }
  test::Lines kept;
  for (size_t r = 0; r < rows.size(); ++r) {
    bool repeated = false;
    for (size_t o = 0; o < rows.size() && !repeated; ++o)
      repeated = (keep_last ? o > r : o < r) && keys[o] == keys[r];
    if (!repeated) kept.push_back(line_of_row(r));
  }
  return kept;
}

Table near_duplicates(size_t rows) {
  // Near-duplicates: one character apart, case, a trailing space, NULL
  // against the empty text, and exact repeats.
  const std::vector<Cell> a = {"Oak", "oak", "Oak ", "Oal", "", null_cell, "Öak", "Oak"};
  const std::vector<Cell> b = {"1", "1", "10", null_cell, "", "01"};
  std::vector<std::vector<Cell>> out;
  uint32_t seed = 7;
  auto next = [&](size_t n) {
    seed = seed * 1103515245u + 12345u;
    return static_cast<size_t>((seed >> 8) % n);
  };
  for (size_t r = 0; r < rows; ++r) out.push_back({a[next(a.size())], b[next(b.size())]});
  return text_table({"site", "grp"}, out);
}

TEST_CASE("unit_steps_rows: deduplicate spilled to disk with every hash colliding drops no distinct row") {
  const Table in = near_duplicates(300);
  for (const bool keep_last : {false, true}) {
    INFO("keep ", keep_last ? "last" : "first");
    const json step = dedup("*", keep_last ? "last" : "first");
    // A budget of one byte puts every stored key in the temporary file, and
    // one hash for every key makes each lookup confirm against stored keys.
    const Schema schema = schema_of(in);
    StepParams params(step, 0, "deduplicate", schema);
    auto tuned = parse_deduplicate_tuned(params, RowIndexTuning{1, one_bucket});
    REQUIRE(tuned.ok());
    Step& s = **tuned;
    auto state = s.start();
    if (s.needs_first_pass()) REQUIRE(s.observe(in, state.get()).ok());
    ChangeRecord change;
    auto out = s.apply(in, state.get(), change);
    REQUIRE(out.ok());
    CHECK(test::lines_of(*out) == expected_kept(in, keep_last));
    CHECK(test::lines_of(*out) == test::lines_of(*run_ok(json::array({step}), in).table));
    CHECK(change.rows_removed == in.row_count() - out->row_count());
  }
}

TEST_CASE("unit_steps_rows: the key index confirms every hash match, in memory and in its spill file") {
  RowIndex index(RowIndexTuning{200, one_bucket});
  std::vector<std::string> keys = {"", "a", "b", "ab", "ba", std::string(1, '\0'), std::string(300, 'x')};
  for (int i = 0; i < 60; ++i) keys.push_back("key " + std::to_string(i));
  for (size_t i = 0; i < keys.size(); ++i) {
    auto stored = index.insert(keys[i], index.hash_of(keys[i]), 100 + i);
    REQUIRE(stored.ok());
    CHECK(stored->second);
    CHECK(stored->first.line == 100 + i);
  }
  CHECK(index.size() == keys.size());
  CHECK(index.spilled());
  CHECK(index.hash_collisions() > 0);
  for (size_t i = 0; i < keys.size(); ++i) {
    auto again = index.insert(keys[i], index.hash_of(keys[i]), 999);
    REQUIRE(again.ok());
    CHECK_FALSE(again->second);
    CHECK(again->first.line == 100 + i);
  }
  auto absent = index.find("key 60", index.hash_of("key 60"));
  REQUIRE(absent.ok());
  CHECK_FALSE(absent->has_value());
  // New lines for a record in memory (the first), one written to the file
  // (the 31st) and one still waiting to be written (the last).
  for (const size_t i : {size_t{0}, size_t{30}, keys.size() - 1}) {
    auto found = index.find(keys[i], index.hash_of(keys[i]));
    REQUIRE(found.ok());
    REQUIRE(found->has_value());
    REQUIRE(index.set_line((*found)->record, 7 + i).ok());
    auto after = index.find(keys[i], index.hash_of(keys[i]));
    REQUIRE(after.ok());
    CHECK((*after)->line == 7 + i);
  }
  REQUIRE(index.insert("new after rewrite", index.hash_of("new after rewrite"), 5).ok());
  auto latest = index.find("new after rewrite", index.hash_of("new after rewrite"));
  REQUIRE((latest.ok() && latest->has_value()));
  CHECK((*latest)->line == 5);
}

TEST_CASE("unit_steps_rows: deduplicate streaming, empty tables and parameter errors") {
  const Table in = near_duplicates(40);
  for (const json& step : {dedup("*"), dedup("*", "last"), dedup(json::array({"grp"}), "last", "trimmed"),
                           dedup(json::array({"site"}), "first", "casefold")})
    check_streaming(json::array({step}), in);
  const RunResult empty = run_ok(json::array({dedup("*", "last")}), text_table({"site"}, {}));
  CHECK(empty.table->row_count() == 0);
  check_step_error(dedup("*", "middle"), kColumns, "keep", "expected one of first, last");
  check_step_error(dedup("*", "first", "fuzzy"), kColumns, "compare", "expected one of exact, trimmed, casefold");
  check_step_error(dedup(json::array()), kColumns, "columns", "expected a non-empty list");
  check_step_error(dedup(json::array({"site", "site"})), kColumns, "columns", "twice");
  check_step_error(dedup(json::array({"plot"})), kColumns, "columns", "no column named 'plot'");
  // Without columns every column is compared, as with "*".
  const Table repeated = text_table({"site", "grp"}, {{"a", "1"}, {"a", "2"}, {"a", "1"}});
  CHECK(test::lines_of(*run_ok(json::array({{{"op", "deduplicate"}}}), repeated).table) == test::Lines{2, 3});
  check_round_trip({{"op", "deduplicate"}}, kColumns);
}

// ------------------------------------------------------------------- require

json require(const std::string& rule, json extra = json::object()) {
  json step = {{"op", "require"}, {"rule", rule}};
  for (auto& [k, v] : extra.items()) step[k] = v;
  return step;
}

TEST_CASE("unit_steps_rows: require stop fails the run with the rule and the lines") {
  std::vector<Cell> cells;
  for (int i = 0; i < 30; ++i) cells.push_back(i % 5 == 1 || i >= 25 ? null_cell : Cell("x"));
  const Table in = values_table(cells);
  const json steps = json::array({{{"op", "trim"}, {"columns", {"v"}}},
                                  require("not_null", {{"columns", {"v"}}})});
  const RunResult r = run_steps(steps, in);
  REQUIRE(r.error.has_value());
  CHECK(r.error->kind == ErrorKind::rule_failed);
  CHECK(exit_code(r.error->kind) == 1);
  REQUIRE(r.error->step.has_value());
  CHECK(*r.error->step == 1);
  // Rows 1, 6, 11, 16, 21 and 25..29 are NULL: source lines 3, 8, ... (10 rows).
  CHECK(r.error->message.find("(require) rule not_null on v failed on 10 rows: line 3 (v is NULL); line 8 (v is NULL)") ==
        0);
  CHECK(r.error->message.find("line 31 (v is NULL)") != std::string::npos);
  std::vector<Cell> many(25, null_cell);
  const RunResult capped = run_steps(json::array({require("not_null", {{"columns", {"v"}}})}), values_table(many));
  REQUIRE(capped.error.has_value());
  CHECK(capped.error->message.find("failed on 25 rows") != std::string::npos);
  CHECK(capped.error->message.find("line 21 (v is NULL); and 5 more") != std::string::npos);
  CHECK(capped.error->message.find("line 22") == std::string::npos);
  check_streaming(steps, in);
}

TEST_CASE("unit_steps_rows: require reject and warn") {
  const Table in = values_table({"a", null_cell, "b", null_cell});
  const RunResult rejected = run_ok(json::array({require("not_null", {{"columns", {"v"}}, {"on_fail", "reject"}})}), in);
  CHECK(cells_of(*rejected.table) == Cells{"a", "b"});
  CHECK(removed_lines(rejected.changes[0]) ==
        std::vector<std::string>{"3: require not_null: v is NULL", "5: require not_null: v is NULL"});
  CHECK(rejected.changes[0].rows_rejected == 2);
  const RunResult warned = run_ok(json::array({require("not_null", {{"columns", {"v"}}, {"on_fail", "warn"}})}), in);
  CHECK(warned.table->row_count() == 4);
  CHECK(warned.changes[0].warnings == std::vector<std::string>{
                                          "rule not_null on v failed on 2 rows: line 3 (v is NULL); line 5 (v is NULL) "
                                          "(the rows were kept)"});
  for (const char* on_fail : {"stop", "reject", "warn"})
    check_streaming(json::array({require("not_null", {{"columns", {"v"}}, {"on_fail", on_fail}})}), in);
}

TEST_CASE("unit_steps_rows: require unique, in_set and pattern") {
  const Table in = text_table({"site", "grp"}, {{"A-1", "x"},
                                                {"A-1", "y"},
                                                {"A-1", "x"},       // repeats line 2
                                                {null_cell, "x"},   // NULL never conflicts (SQL UNIQUE)
                                                {null_cell, "x"},
                                                {"a-2", "z"},
                                                {"A-12x", "x"}});
  const RunResult unique =
      run_ok(json::array({require("unique", {{"columns", {"site", "grp"}}, {"on_fail", "reject"}})}), in);
  CHECK(removed_lines(unique.changes[0]) ==
        std::vector<std::string>{"4: require unique: the values of site and grp repeat line 2"});
  const RunResult in_set =
      run_ok(json::array({require("in_set", {{"columns", {"grp"}}, {"values", {"x", "y"}}, {"on_fail", "reject"}})}), in);
  CHECK(removed_lines(in_set.changes[0]) ==
        std::vector<std::string>{"7: require in_set: grp 'z' is not one of the allowed values"});
  // The pattern must match the whole value (ICU RegexMatcher::matches).
  const RunResult pattern = run_ok(
      json::array({require("pattern", {{"columns", {"site"}}, {"pattern", "[A-Z]-\\d+"}, {"on_fail", "reject"}})}), in);
  CHECK(removed_lines(pattern.changes[0]) ==
        std::vector<std::string>{"7: require pattern: site 'a-2' does not match the pattern [A-Z]-\\d+",
                                 "8: require pattern: site 'A-12x' does not match the pattern [A-Z]-\\d+"});
  for (const json& step : {require("unique", {{"columns", {"site"}}, {"on_fail", "reject"}}),
                           require("unique", {{"columns", {"grp"}}, {"on_fail", "warn"}})})
    check_streaming(json::array({step}), in);
  // Typed values are compared in their canonical text form.
  const Table numbers = table_of({"n"}, {typed_column(Type::integer, 0, {1, 2, std::nullopt, 3})});
  const RunResult typed = run_ok(
      json::array({require("in_set", {{"columns", {"n"}}, {"values", {"1", "2"}}, {"on_fail", "reject"}})}), numbers);
  CHECK(cells_of(*typed.table) == Cells{"1", "2", "<NULL>"});
}

TEST_CASE("unit_steps_rows: require on Unicode text and on an empty table") {
  // \p{Lu}: General_Category Lu (UnicodeData.txt): É (U+00C9) and Σ (U+03A3)
  // are upper-case letters, é (U+00E9) and σ are not.
  const Table in = values_table({"Émile", "émile", "Σοφία", "σοφία"});
  const RunResult r = run_ok(
      json::array({require("pattern", {{"columns", {"v"}}, {"pattern", "\\p{Lu}.*"}, {"on_fail", "reject"}})}), in);
  CHECK(cells_of(*r.table) == Cells{"Émile", "Σοφία"});
  const RunResult set = run_ok(
      json::array({require("in_set", {{"columns", {"v"}}, {"values", {"Émile", "σοφία"}}, {"on_fail", "reject"}})}), in);
  CHECK(cells_of(*set.table) == Cells{"Émile", "σοφία"});
  for (const char* rule : {"not_null", "unique"}) {
    const RunResult empty = run_ok(json::array({require(rule, {{"columns", {"v"}}})}), values_table({}));
    CHECK(empty.table->row_count() == 0);
    CHECK(empty.changes[0].warnings.empty());
  }
}

TEST_CASE("unit_steps_rows: require pattern runs under ICU's time limit") {
  // (a+)+b on a run of a's without b backtracks exponentially: ICU's match
  // time limit (counted in engine steps, so the outcome does not depend on
  // the machine) stops it with an error naming the line.
  const Table in = values_table({"ab", std::string(40, 'a')});
  const RunResult r = run_steps(json::array({require("pattern", {{"columns", {"v"}}, {"pattern", "(a+)+b"}})}), in);
  REQUIRE(r.error.has_value());
  CHECK(r.error->kind == ErrorKind::bad_input);
  CHECK(r.error->line == 3);
  CHECK(r.error->message.find("time limit") != std::string::npos);
}

TEST_CASE("unit_steps_rows: require range compares numbers and dates exactly") {
  const Table in = table_of({"amount", "n", "when"},
                            {typed_column(Type::decimal, 2, {50, 49, 1000, 1001, std::nullopt}),
                             typed_column(Type::integer, 0, {-3, -4, 0, 7, 8}),
                             typed_column(Type::date, 0, {18262, 18261, 19791, std::nullopt, 0})});
  auto failing = [&](json step) {
    step["on_fail"] = "reject";
    return removed_lines(run_ok(json::array({step}), in).changes[0]);
  };
  // 0.5 as JSON is read from its text, exactly: 0.49 fails, 0.50 passes.
  CHECK(failing(require("range", {{"columns", {"amount"}}, {"min", 0.5}, {"max", 10}})) ==
        std::vector<std::string>{"3: require range: amount 0.49 is below the minimum 0.5",
                                 "5: require range: amount 10.01 is above the maximum 10"});
  CHECK(failing(require("range", {{"columns", {"n", "amount"}}, {"min", -3}})) ==
        std::vector<std::string>{"3: require range: n -4 is below the minimum -3"});
  CHECK(failing(require("range", {{"columns", {"n"}}, {"max", 7.5}})) ==
        std::vector<std::string>{"6: require range: n 8 is above the maximum 7.5"});
  // Python: date(2020, 1, 1) is day 18262 since 1970-01-01.
  CHECK(failing(require("range", {{"columns", {"when"}}, {"min", "2020-01-01"}, {"max", "2024-03-09"}})) ==
        std::vector<std::string>{"3: require range: when 2019-12-31 is before 2020-01-01",
                                 "6: require range: when 1970-01-01 is before 2020-01-01"});
}

TEST_CASE("unit_steps_rows: require row_count") {
  const Table in = values_table({"a", "b", "c"});
  const RunResult too_few = run_steps(json::array({require("row_count", {{"min", 5}})}), in);
  REQUIRE(too_few.error.has_value());
  CHECK(too_few.error->kind == ErrorKind::rule_failed);
  CHECK(too_few.error->message == "(require) rule row_count failed: 3 rows reached this step; the rule requires at least 5");
  CHECK(run_ok(json::array({require("row_count", {{"min", 3}, {"max", 3}})}), in).table->row_count() == 3);
  const RunResult warned = run_ok(json::array({require("row_count", {{"max", 2}, {"on_fail", "warn"}})}), in);
  CHECK(warned.changes[0].warnings ==
        std::vector<std::string>{"rule row_count failed: 3 rows reached this step; the rule requires at most 2"});
  check_streaming(json::array({{{"op", "drop_rows"}, {"where", "v = 'b'"}}, require("row_count", {{"max", 1}})}), in);
  const RunResult empty = run_steps(json::array({require("row_count", {{"min", 1}})}), values_table({}));
  REQUIRE(empty.error.has_value());
  CHECK(empty.error->message.find("0 rows reached this step") != std::string::npos);
}

TEST_CASE("unit_steps_rows: require parameter errors") {
  check_step_error({{"op", "require"}, {"columns", {"site"}}}, kColumns, "rule", "is required");
  check_step_error(require("positive", {{"columns", {"site"}}}), kColumns, "rule", "expected one of not_null, unique");
  check_step_error(require("not_null", {{"columns", {"site"}}, {"on_fail", "ignore"}}), kColumns, "on_fail",
                   "expected one of stop, reject, warn");
  check_step_error(require("not_null"), kColumns, "columns", "is required");
  check_step_error(require("row_count", {{"columns", {"site"}}, {"min", 1}}), kColumns, "columns", "takes no columns");
  check_step_error(require("row_count", {{"min", 1}, {"on_fail", "reject"}}), kColumns, "on_fail", "cannot reject");
  check_step_error(require("row_count", {{"min", -1}}), kColumns, "min", "expected a whole number of rows");
  check_step_error(require("row_count", {{"max", 1.5}}), kColumns, "max", "expected a whole number of rows");
  check_step_error(require("row_count"), kColumns, "min", "needs min, max or both");
  check_step_error(require("row_count", {{"min", 5}, {"max", 4}}), kColumns, "max", "is below min");
  check_step_error(require("in_set", {{"columns", {"site"}}}), kColumns, "values", "is required");
  check_step_error(require("in_set", {{"columns", {"site"}}, {"values", json::array()}}), kColumns, "values",
                   "at least one allowed value");
  check_step_error(require("not_null", {{"columns", {"site"}}, {"values", {"a"}}}), kColumns, "values",
                   "is not a parameter of the rule not_null");
  check_step_error(require("pattern", {{"columns", {"site"}}, {"pattern", "(ab"}}), kColumns, "pattern",
                   "not a valid ICU regular expression");
  check_step_error(require("pattern", {{"columns", {"site"}}, {"pattern", ""}}), kColumns, "pattern", "must not be empty");
  check_step_error(require("range", {{"columns", {"site"}}, {"min", 1}}), kColumns, "columns",
                   "'site' is text; range checks integer, decimal or date columns");
  check_step_error(require("range", {{"columns", {"n", "when"}}, {"min", 1}}), kColumns, "columns", "mixes date and number");
  check_step_error(require("range", {{"columns", {"n"}}}), kColumns, "min", "needs min, max or both");
  check_step_error(require("range", {{"columns", {"n"}}, {"min", "1"}}), kColumns, "min", "expected a number");
  check_step_error(require("range", {{"columns", {"n"}}, {"min", 1e30}}), kColumns, "min", "expected a number");
  check_step_error(require("range", {{"columns", {"when"}}, {"max", "2024-3-9"}}), kColumns, "max",
                   "expected an ISO 8601 date");
  check_step_error(require("range", {{"columns", {"when"}}, {"max", 20240309}}), kColumns, "max",
                   "expected an ISO 8601 date");
  check_step_error(require("range", {{"columns", {"amount"}}, {"min", 2}, {"max", 1}}), kColumns, "max", "is below min");
  check_step_error(require("unique", {{"columns", {"site"}}, {"limit", 1}}), kColumns, "limit", "is not a parameter");
}

// ------------------------------------------------- drop, rename and reorder

TEST_CASE("unit_steps_rows: drop, rename and reorder columns share the data and change the schema") {
  const Table in = table_of({"a", "b", "c", "d"}, {text_column({"1", "2"}), text_column({"x", null_cell}),
                                                  typed_column(Type::integer, 0, {5, 6}), text_column({"p", "q"})});
  const RunResult dropped = run_ok(json::array({{{"op", "drop_columns"}, {"columns", {"b", "d"}}}}), in);
  CHECK(dropped.table->names() == std::vector<std::string>{"a", "c"});
  CHECK(dropped.schema.size() == 2);
  CHECK(dropped.schema[1].type == Type::integer);
  CHECK(dropped.table->column_ptr(1) == in.column_ptr(2));

  const RunResult renamed = run_ok(json::array({{{"op", "rename_columns"}, {"map", {{"a", "b"}, {"b", "a"}, {"c", "Größe"}}}}}), in);
  CHECK(renamed.table->names() == std::vector<std::string>{"b", "a", "Größe", "d"});
  CHECK(renamed.schema[2].name == "Größe");
  CHECK(rows_of(*renamed.table) == rows_of(in));

  const RunResult reordered = run_ok(json::array({{{"op", "reorder_columns"}, {"columns", {"d", "b"}}}}), in);
  CHECK(reordered.table->names() == std::vector<std::string>{"d", "b", "a", "c"});
  CHECK(reordered.schema[3].type == Type::integer);
  CHECK(cells_of(*reordered.table, 3) == Cells{"5", "6"});
  // A later step sees the new names.
  CHECK(cells_of(*run_ok(json::array({{{"op", "rename_columns"}, {"map", {{"b", "site"}}}},
                                      {{"op", "carry_forward"}, {"column", "site"}}}),
                         in)
                      .table,
                 1) == Cells{"x", "x"});
  for (const json& step : {json{{"op", "drop_columns"}, {"columns", {"a"}}},
                           json{{"op", "rename_columns"}, {"map", {{"a", "z"}}}},
                           json{{"op", "reorder_columns"}, {"columns", {"c"}}}})
    check_streaming(json::array({step}), in);
}

TEST_CASE("unit_steps_rows: column steps on an empty table") {
  const Table empty = text_table({"a", "b"}, {});
  const RunResult r = run_ok(json::array({{{"op", "rename_columns"}, {"map", {{"a", "x"}}}},
                                          {{"op", "reorder_columns"}, {"columns", {"b"}}},
                                          {{"op", "drop_columns"}, {"columns", {"x"}}}}),
                             empty);
  CHECK(r.table->names() == std::vector<std::string>{"b"});
  CHECK(r.table->row_count() == 0);
}

TEST_CASE("unit_steps_rows: column step parameter errors") {
  check_step_error({{"op", "drop_columns"}, {"columns", "*"}}, kColumns, "columns", "would drop every column");
  check_step_error({{"op", "drop_columns"}, {"columns", {"plot"}}}, kColumns, "columns", "no column named 'plot'");
  check_step_error({{"op", "rename_columns"}}, kColumns, "map", "is required");
  check_step_error({{"op", "rename_columns"}, {"map", {"site"}}}, kColumns, "map", "expected a non-empty object");
  check_step_error({{"op", "rename_columns"}, {"map", json::object()}}, kColumns, "map", "expected a non-empty object");
  check_step_error({{"op", "rename_columns"}, {"map", {{"plot", "x"}}}}, kColumns, "map", "no column named 'plot'");
  check_step_error({{"op", "rename_columns"}, {"map", {{"site", "grp"}}}}, kColumns, "map",
                   "would give two columns the name 'grp'");
  check_step_error({{"op", "rename_columns"}, {"map", {{"site", "x"}, {"grp", "x"}}}}, kColumns, "map",
                   "would give two columns the name 'x'");
  check_step_error({{"op", "rename_columns"}, {"map", {{"site", ""}}}}, kColumns, "map", "is empty");
  check_step_error({{"op", "rename_columns"}, {"map", {{"site", 3}}}}, kColumns, "map", "must be text");
  check_step_error({{"op", "reorder_columns"}, {"columns", {"n", "n"}}}, kColumns, "columns", "twice");
  check_step_error({{"op", "reorder_columns"}, {"columns", {"plot"}}}, kColumns, "columns", "no column named");
  check_step_error({{"op", "reorder_columns"}, {"order", {"n"}}}, kColumns, "columns", "is required");
}

// --------------------------------------------------------------- all steps

TEST_CASE("unit_steps_rows: parameters round-trip, sentences and SQL support") {
  const std::vector<json> steps = {
      fill("site", {"grp", "n"}),
      {{"op", "carry_forward"}, {"column", "n"}},
      {{"op", "carry_forward"}, {"column", "site"}, {"group_by", {"grp"}}},
      dedup("*"),
      dedup(json::array({"site", "when"}), "last", "casefold"),
      require("not_null", {{"columns", {"site", "n"}}}),
      require("unique", {{"columns", {"site"}}, {"on_fail", "warn"}}),
      require("in_set", {{"columns", {"grp"}}, {"values", {"a", "b"}}, {"on_fail", "reject"}}),
      require("pattern", {{"columns", {"site"}}, {"pattern", "^\\p{Lu}"}}),
      require("range", {{"columns", {"amount"}}, {"min", -0.25}, {"max", 1e3}}),
      require("range", {{"columns", {"when"}}, {"min", "2020-02-29"}}),
      require("row_count", {{"min", 1}, {"max", 10}, {"on_fail", "warn"}}),
      {{"op", "drop_columns"}, {"columns", {"n"}}},
      {{"op", "rename_columns"}, {"map", {{"n", "count"}, {"site", "place"}}}},
      {{"op", "reorder_columns"}, {"columns", {"when", "site"}}},
  };
  for (const json& step : steps) {
    INFO(step.dump());
    check_round_trip(step, kColumns);
  }
  auto sentence = [](const json& step) { return parse_step(step, 0, kColumns).value()->describe(); };
  CHECK(sentence(dedup("*")) == "Remove rows that repeat another row in every column, keeping the first of each set.");
  CHECK(sentence(fill("site", {"grp"})) ==
        "Fill empty (NULL) values of site from the rows with the same grp when those rows agree on one value.");
  CHECK(sentence(require("range", {{"columns", {"amount"}}, {"min", 0}, {"max", 10}})) ==
        "Require amount to be between 0 and 10; stop the run if a row fails.");
  CHECK(sentence({{"op", "reorder_columns"}, {"columns", {"when", "site"}}}) ==
        "Put the columns when and site first, in that order, and the others after them.");
  CHECK(sentence({{"op", "reorder_columns"}, {"columns", {"n"}}}) == "Put the column n first and the others after it.");
  CHECK(sentence(require("row_count", {{"min", 1}})) == "Require at least 1 row; stop the run if not.");
  auto support = [](const json& step, Dialect d) { return parse_step(step, 0, kColumns).value()->sql_support(d); };
  for (const Dialect d : {Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark}) {
    CHECK(support(dedup("*"), d) == SqlSupport::exact);
    CHECK(support(dedup("*", "first", "trimmed"), d) == SqlSupport::exact);
    // SQL's LOWER/UPPER map case; none of the dialects folds case fully.
    CHECK(support(dedup("*", "first", "casefold"), d) == SqlSupport::approximate);
    CHECK(support(require("not_null", {{"columns", {"site"}}, {"on_fail", "reject"}}), d) == SqlSupport::unsupported);
    CHECK(support(fill("site", {"grp"}), d) == SqlSupport::exact);
  }
  CHECK(support(require("pattern", {{"columns", {"site"}}, {"pattern", "a"}}), Dialect::sqlite) == SqlSupport::unsupported);
}

}  // namespace
}  // namespace tamis
