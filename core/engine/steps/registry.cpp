#include "steps/registry.hpp"

#include "steps/carry_forward.hpp"
#include "steps/cast.hpp"
#include "steps/change_case.hpp"
#include "steps/collapse_spaces.hpp"
#include "steps/deduplicate.hpp"
#include "steps/derive_column.hpp"
#include "steps/drop_columns.hpp"
#include "steps/drop_rows.hpp"
#include "steps/fill_from_group.hpp"
#include "steps/keep_rows.hpp"
#include "steps/map_values.hpp"
#include "steps/normalize_unicode.hpp"
#include "steps/parse_date.hpp"
#include "steps/parse_number.hpp"
#include "steps/rename_columns.hpp"
#include "steps/reorder_columns.hpp"
#include "steps/replace_text.hpp"
#include "steps/require.hpp"
#include "steps/split_column.hpp"
#include "steps/to_null.hpp"
#include "steps/trim.hpp"

namespace tamis {

namespace {
constexpr StepKind kStepKinds[] = {
    {"trim", parse_trim, "remove white space (or given characters) at the ends of text values"},
    {"collapse_spaces", parse_collapse_spaces, "turn runs of white space inside text values into one space"},
    {"change_case", parse_change_case, "convert text to lower, upper or title case (Unicode full case mapping)"},
    {"normalize_unicode", parse_normalize_unicode, "normalize text to Unicode NFC or NFKC, optionally without accents"},
    {"replace_text", parse_replace_text, "replace text inside values: literally, whole values, or by regular expression"},
    {"map_values", parse_map_values, "merge variant spellings of values into one preferred spelling"},
    {"to_null", parse_to_null, "turn sentinel values (and blank values) into NULL"},
    {"split_column", parse_split_column, "split a text column at a separator into new columns"},
    {"keep_rows", parse_keep_rows, "keep only the rows where an SQL condition is true"},
    {"drop_rows", parse_drop_rows, "remove the rows where an SQL condition is true"},
    {"derive_column", parse_derive_column, "add a column computed by an SQL expression"},
    {"parse_date", parse_parse_date, "read text as dates with strptime-style formats (the whole value must match)"},
    {"parse_number", parse_parse_number, "read text as numbers with given decimal and group marks, currency signs and percent"},
    {"cast", parse_cast, "convert a column to another type as SQL CAST does"},
    {"fill_from_group", parse_fill_from_group, "fill NULLs from rows with the same keys when those rows agree on one value"},
    {"carry_forward", parse_carry_forward, "fill NULLs with the last value above them (per group)"},
    {"deduplicate", parse_deduplicate, "remove rows that repeat another row, keeping the first or the last"},
    {"require", parse_require, "check a rule (not_null, unique, in_set, pattern, range, row_count): stop, reject or warn"},
    {"drop_columns", parse_drop_columns, "remove columns"},
    {"rename_columns", parse_rename_columns, "rename columns"},
    {"reorder_columns", parse_reorder_columns, "put columns in a new order"},
};
}  // namespace

std::span<const StepKind> step_kinds() { return kStepKinds; }

std::string_view dialect_name(Dialect dialect) {
  constexpr std::string_view names[] = {"postgres", "mysql", "sqlite", "duckdb", "spark"};
  return names[static_cast<size_t>(dialect)];
}

Result<std::unique_ptr<Step>> parse_step(const nlohmann::json& object, int index, const Schema& input) {
  auto fail = [&](std::string message) {
    Error e = usage_error(std::move(message));
    e.step = index;
    return e;
  };
  if (!object.is_object()) return fail("expected an object with an \"op\" key, found " + object.dump());
  const auto op = object.find("op");
  if (op == object.end() || !op->is_string()) return fail("\"op\" is required and must be text");
  for (const StepKind& kind : kStepKinds)
    if (kind.op == op->get<std::string>()) {
      StepParams params(object, index, kind.op, input);
      if (const auto* note = params.raw("note"); note && !note->is_string())
        return params.error("note", "expected text");
      if (const auto* enabled = params.raw("enabled"); enabled && !enabled->is_boolean())
        return params.error("enabled", "expected true or false");
      return kind.parse(params);
    }
  std::string known;
  for (const StepKind& kind : kStepKinds) known += (known.empty() ? "" : ", ") + std::string(kind.op);
  return fail("unknown op '" + op->get<std::string>() + "' (known: " + known + ")");
}

}  // namespace tamis
