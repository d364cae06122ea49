// SQL export: quoting of identifiers and literals per dialect, the regular
// expression classes, and the refusals. The quoting rules are the dialects'
// documented ones: ISO SQL doubles the quote character in "identifiers" and
// 'literals' (PostgreSQL, SQLite, DuckDB manuals, "Lexical Structure");
// MySQL/MariaDB quote identifiers with backticks and, in the default SQL
// mode, read a backslash in a literal as an escape (MySQL manual, "String
// Literals"); Spark SQL reads \\, \' and \uXXXX escapes in literals (Spark SQL
// reference, "Literals"). The differential test on real engines is
// tests/reference/sql_export.py; this suite pins the text.
#include <doctest/doctest.h>

#include <string>

#include "recipe.hpp"
#include "sql/sql_export.hpp"
#include "sql/sql_text.hpp"

namespace tamis {
namespace {

TEST_CASE("unit_sql_export: identifiers double their quote character") {
  CHECK(sql::identifier(Dialect::postgres, "site") == "\"site\"");
  CHECK(sql::identifier(Dialect::postgres, "say \"hi\"") == "\"say \"\"hi\"\"\"");
  CHECK(sql::identifier(Dialect::sqlite, "a`b") == "\"a`b\"");
  CHECK(sql::identifier(Dialect::duckdb, "Rivière") == "\"Rivière\"");
  CHECK(sql::identifier(Dialect::mysql, "a`b") == "`a``b`");
  CHECK(sql::identifier(Dialect::mysql, "say \"hi\"") == "`say \"hi\"`");
  CHECK(sql::identifier(Dialect::spark, "a`b") == "`a``b`");
}

TEST_CASE("unit_sql_export: literals with quotes, backslashes and Unicode") {
  const std::string value = "it's C:\\temp – Ærø 東京";
  CHECK(sql::literal(Dialect::postgres, value) == "'it''s C:\\temp – Ærø 東京'");
  CHECK(sql::literal(Dialect::sqlite, value) == "'it''s C:\\temp – Ærø 東京'");
  CHECK(sql::literal(Dialect::duckdb, value) == "'it''s C:\\temp – Ærø 東京'");
  CHECK(sql::literal(Dialect::mysql, value) == "'it''s C:\\\\temp – Ærø 東京'");
  CHECK(sql::literal(Dialect::spark, value) == "'it\\'s C:\\\\temp – Ærø 東京'");
  CHECK(sql::literal(Dialect::postgres, "") == "''");
  CHECK(sql::literal(Dialect::mysql, "") == "''");
}

TEST_CASE("unit_sql_export: invisible characters are written as code points") {
  // U+0009 TAB and U+00A0 NO-BREAK SPACE (UnicodeData.txt).
  const std::string value = "a\tb\xC2\xA0";
  CHECK(sql::literal(Dialect::postgres, value) == "('a' || chr(9) || 'b' || chr(160))");
  CHECK(sql::literal(Dialect::duckdb, value) == "('a' || chr(9) || 'b' || chr(160))");
  CHECK(sql::literal(Dialect::sqlite, value) == "('a' || char(9) || 'b' || char(160))");
  CHECK(sql::literal(Dialect::mysql, value) ==
        "(CONCAT('a', _utf8mb4 X'09' COLLATE utf8mb4_bin, 'b', _utf8mb4 X'C2A0' COLLATE utf8mb4_bin))");
  CHECK(sql::literal(Dialect::spark, value) == "'a\\u0009b\\u00A0'");
  CHECK(sql::literal_problem(std::string("a\0b", 3)) != "");
  CHECK(sql::literal_problem("\xC3") != "");
  CHECK(sql::literal_problem("ok ✓") == "");
}

TEST_CASE("unit_sql_export: the White_Space class") {
  // PropList.txt (Unicode 15) lists 25 White_Space code points.
  CHECK(sql::white_space_characters().size() == 25);
  CHECK(sql::regex_class(Dialect::duckdb, sql::white_space_characters()) ==
        "[\\x{9}-\\x{D}\\x{20}\\x{85}\\x{A0}\\x{1680}\\x{2000}-\\x{200A}\\x{2028}\\x{2029}\\x{202F}\\x{205F}\\x{3000}]");
  CHECK(sql::regex_class(Dialect::postgres, U"ab-]") == "[\\u002D\\u005Dab]");
  CHECK(sql::concat(Dialect::mysql, {"a", "b"}) == "CONCAT(a, b)");
  CHECK(sql::concat(Dialect::sqlite, {"a", "b"}) == "a || b");
}

Recipe recipe_with(const std::string& steps) {
  std::string text = R"({"tamis_recipe": 1, "input": {"columns": [{"name": "site", "type": "text"},
      {"name": "note", "type": "text"}]}, "steps": )";
  text += steps;
  text += "}";
  return parse_recipe(text, "test.json").value();
}

TEST_CASE("unit_sql_export: a step a dialect cannot express stops the export") {
  const Recipe recipe = recipe_with(R"([{"op": "trim", "columns": "*"},
      {"op": "normalize_unicode", "columns": ["site"], "form": "NFKC"}])");
  SqlExportOptions options;
  options.dialect = Dialect::sqlite;
  auto refused = export_sql(recipe, options);
  REQUIRE(!refused.ok());
  CHECK(refused.error().step == 1);
  CHECK(refused.error().message == "(normalize_unicode) cannot be exported to sqlite: no sqlite SQL gives the same "
                                   "results as tamis run for it");
  options.dialect = Dialect::postgres;
  auto script = export_sql(recipe, options);
  REQUIRE(script.ok());
  CHECK(script->find("-- Step 2 (normalize_unicode): ") != std::string::npos);
  CHECK(script->find("normalize(\"site\", NFKC)") != std::string::npos);
}

TEST_CASE("unit_sql_export: case folding for an alphabet replaces exactly the characters that fold into it") {
  // CaseFolding.txt (Unicode 15): 00DF ß F -> 0073 0073, 1E9E ẞ F -> 0073 0073, 017F ſ C -> 0073,
  // 0053 S C -> 0073, 212A KELVIN SIGN C -> 006B, 0130 İ F -> 0069 0307.
  const auto folding = sql::case_folding_for(U"st");
  REQUIRE(folding.has_value());
  const std::string folded = sql::replace_each(Dialect::sqlite, "x", *folding);
  CHECK(folded.find("replace(x, 'S', 's')") != std::string::npos);
  CHECK(folded.find(", 'ß', 'ss')") != std::string::npos);
  CHECK(folded.find(", 'ẞ', 'ss')") != std::string::npos);
  CHECK(folded.find(", 'ſ', 's')") != std::string::npos);
  CHECK(folded.find(", 'T', 't')") != std::string::npos);
  CHECK(folded.find("'K'") == std::string::npos);  // folds to k, outside the alphabet
  CHECK(folded.find("'İ'") == std::string::npos);  // folds to i + U+0307
  CHECK(!sql::case_folding_for(U"sT").has_value());  // T is not folded text
}

TEST_CASE("unit_sql_export: one-character replacements that cannot chain become one translate call") {
  // CaseFolding.txt (Unicode 15), as above, and FB05 ﬅ F -> 0073 0074, FB06 ﬆ F -> 0073 0074:
  // S, T and ſ fold to one letter each, the others to two.
  const auto folding = sql::case_folding_for(U"st");
  REQUIRE(folding.has_value());
  CHECK(sql::replace_each(Dialect::postgres, "x", *folding) ==
        "replace(replace(replace(replace(translate(x, 'STſ', 'sts'), 'ß', 'ss'), 'ẞ', 'ss'), 'ﬅ', 'st'), 'ﬆ', 'st')");
  // a -> b then b -> c replaces an a by c in turn; at once it would give b.
  CHECK(sql::replace_each(Dialect::duckdb, "x", {{"a", "b"}, {"b", "c"}}) == "replace(replace(x, 'a', 'b'), 'b', 'c')");
  CHECK(sql::replace_each(Dialect::mysql, "x", {{"a", "b"}, {"c", "d"}}) == "REPLACE(REPLACE(x, 'a', 'b'), 'c', 'd')");
}

TEST_CASE("unit_sql_export: helper columns never take an input column's name") {
  const Recipe recipe = recipe_with(R"([{"op": "deduplicate", "columns": "*"}])");
  SqlExportOptions options;
  options.dialect = Dialect::sqlite;
  Recipe clashing = recipe;
  clashing.input.columns[0].name = "TAMIS_COPY";
  auto plain = export_sql(recipe, options), renamed = export_sql(clashing, options);
  REQUIRE(plain.ok());
  REQUIRE(renamed.ok());
  CHECK(plain->find("WHERE tamis_copy = 1") != std::string::npos);
  CHECK(renamed->find("WHERE tamis_copy_ = 1") != std::string::npos);
}

TEST_CASE("unit_sql_export: on_error reject stops the script, unless the recipe allows rejected rows") {
  const std::string steps = R"([{"op": "parse_number", "column": "site", "scale": 1, "on_error": "reject"}])";
  SqlExportOptions options;
  options.dialect = Dialect::postgres;
  auto script = export_sql(recipe_with(steps), options);
  REQUIRE(script.ok());
  CHECK(script->find("CONSTRAINT \"tamis_clean_step_1_rejects_passes\" CHECK (failing_rows = 0)") != std::string::npos);
  Recipe allowing = recipe_with(steps);
  allowing.input.max_rejects = std::string(1, '5');
  auto refused = export_sql(allowing, options);
  REQUIRE(!refused.ok());
  CHECK(refused.error().step == 0);
  CHECK(refused.error().message.find("(parse_number) cannot be exported to postgres: on_error reject") == 0);
}

TEST_CASE("unit_sql_export: parse_number on SQLite reads the value in stages, the reject check too") {
  // The stages are common table expressions; the check that stops the script
  // counts over the same stages (tests/reference/sql_export.py runs both on
  // SQLite). A column named like the helpers pushes them to other names.
  Recipe recipe = recipe_with(R"([{"op": "parse_number", "column": "site", "scale": 2, "group_mark": ",",
      "on_error": "reject"}])");
  recipe.input.columns[1].name = "Tamis_Number";
  SqlExportOptions options;
  options.dialect = Dialect::sqlite;
  auto script = export_sql(recipe, options);
  REQUIRE(script.ok());
  CHECK(script->find("(failing_rows)\nWITH tamis_number__1 AS MATERIALIZED (") != std::string::npos);
  CHECK(script->find("CREATE TABLE \"tamis_clean_step_1\" AS\nWITH tamis_number__1 AS MATERIALIZED (") !=
        std::string::npos);
  CHECK(script->find(" tamis_number_1 ") == std::string::npos);
}

TEST_CASE("unit_sql_export: approximate steps need --allow-approximate and carry a warning") {
  const Recipe recipe = recipe_with(R"([{"op": "change_case", "columns": ["site"], "to": "upper", "note": "shout"}])");
  SqlExportOptions options;
  options.dialect = Dialect::duckdb;
  auto refused = export_sql(recipe, options);
  REQUIRE(!refused.ok());
  CHECK(refused.error().message.find("only approximately; pass --allow-approximate") != std::string::npos);
  options.allow_approximate = true;
  auto script = export_sql(recipe, options);
  REQUIRE(script.ok());
  CHECK(script->find("-- Note: shout\n-- WARNING: approximate in duckdb") != std::string::npos);
  CHECK(script->find("UPPER(\"site\")") != std::string::npos);
}

TEST_CASE("unit_sql_export: the raw table is only read, every step table is dropped at the end") {
  const Recipe recipe = recipe_with(R"([{"op": "deduplicate", "columns": ["site"], "keep": "last"}])");
  SqlExportOptions options;
  options.dialect = Dialect::mysql;
  options.source = "raw data";
  auto script = export_sql(recipe, options);
  REQUIRE(script.ok());
  CHECK(script->find("FROM `raw data`") != std::string::npos);
  CHECK(script->find("INSERT INTO `raw data`") == std::string::npos);
  CHECK(script->find("DROP TABLE `raw data`") == std::string::npos);
  CHECK(script->find("PARTITION BY CAST(`site` AS BINARY)") != std::string::npos);
  CHECK(script->find("ORDER BY `tamis_line` DESC") != std::string::npos);
  CHECK(script->find("DROP TABLE `tamis_clean_step_1`;") != std::string::npos);
}

}  // namespace
}  // namespace tamis
