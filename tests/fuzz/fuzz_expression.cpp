// libFuzzer target for the SQL expression parser and evaluator: the
// expressions of keep_rows, drop_rows and derive_column come from untrusted
// recipes. Any bytes must give an expression or an error whose message
// starts with the character position (never a crash, hang or exception);
// an expression that parses must evaluate on a small typed table (text,
// integer, decimal, date, NULLs) to a column of the right length, or to an
// error value.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "byte_io.hpp"
#include "csv_reader.hpp"
#include "expr/expr.hpp"
#include "recipe.hpp"

namespace {

// Typed columns come from the engine's own steps, as in a real recipe.
constexpr std::string_view kTypingRecipe = R"({"tamis_recipe": 1, "steps": [
  {"op": "to_null", "columns": ["count", "share", "planted"], "values": [], "blank": true},
  {"op": "parse_number", "column": "count", "on_error": "null"},
  {"op": "parse_number", "column": "share", "decimal_mark": ",", "on_error": "null"},
  {"op": "parse_date", "column": "planted", "formats": ["%Y-%m-%d"], "on_error": "null"}]})";

constexpr std::string_view kRows =
    "site,count,share,planted\n"
    "Elm Row,12,\"0,5\",2023-04-01\n"
    " Quay ,-3,\"12,25\",2020-02-29\n"
    ",,,\n"
    "Straße é,9223372036854775807,\"0,01\",1970-01-01\n";

tamis::Table typed_table() {
  auto text = tamis::read_csv(tamis::memory_source(std::string(kRows)), "rows.csv", tamis::CsvOptions{});
  if (!text) std::abort();
  auto recipe = tamis::parse_recipe(kTypingRecipe, "typing.json");
  if (!recipe) std::abort();
  auto compiled = tamis::compile_recipe(*recipe, tamis::schema_of(*text));
  if (!compiled) std::abort();
  auto typed = tamis::apply_recipe(*compiled, *text);
  if (!typed) std::abort();
  return *typed;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  static const tamis::Table table = typed_table();
  static const tamis::Schema schema = tamis::schema_of(table);
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  for (const auto use : {tamis::Expression::Use::value, tamis::Expression::Use::condition}) {
    auto expression = tamis::Expression::parse(text, schema, use);
    if (!expression) {
      if (expression.error().message.rfind("at character ", 0) != 0) std::abort();
      continue;
    }
    if (use == tamis::Expression::Use::value) {
      auto values = expression->evaluate(table);
      if (values && (*values)->size() != table.row_count()) std::abort();
    } else {
      std::vector<uint8_t> is_true;
      if (expression->evaluate_condition(table, is_true) && is_true.size() != table.row_count()) std::abort();
    }
  }
  return 0;
}
