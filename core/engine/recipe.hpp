// Recipes, version 1 (design §4): loading with errors that point at the
// problem, saving, checking a file's columns against the recipe's input
// section, and running the enabled steps over a table or a stream of
// batches. Loading a recipe never runs code: it is data read into plain
// structures, and every step validates its own parameters.
#pragma once

#include <nlohmann/json.hpp>

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "change.hpp"
#include "csv_reader.hpp"
#include "dates.hpp"
#include "error.hpp"
#include "steps/step.hpp"

namespace tamis {

struct InputColumn {
  std::string name;
  Type type = Type::text;
};

// Dialect keys follow the W3C "CSV on the Web" dialect description.
struct RecipeInput {
  std::string format = "csv";         // csv or tsv
  std::optional<char> delimiter;      // absent: detect (tsv: tab)
  char quote = '"';                   // quoteChar
  std::optional<std::string> encoding;  // absent: detect
  std::optional<bool> header;         // absent: detect
  size_t skip_rows = 0;               // skipRows
  std::vector<InputColumn> columns;   // expected columns, in order; empty: not checked
  std::string unknown_columns = "fail";  // fail | ignore (extra columns are dropped before step 1)
  std::optional<std::string> max_rejects;  // "N" or "P%"
};

struct RecipeOutput {
  std::string format = "csv";
  std::string null_marker;            // "null"
  std::string date_format = "%Y-%m-%d";
};

struct RecipeStep {
  std::string op;
  bool enabled = true;
  std::string note;
  nlohmann::json definition;  // the step object as written
};

struct Recipe {
  std::string title;
  RecipeInput input;
  std::vector<RecipeStep> steps;
  RecipeOutput output;
};

// `file` names the recipe in messages.
Result<Recipe> parse_recipe(std::string_view text, const std::string& file);
// Reads and parses a recipe file; "-" reads standard input.
Result<Recipe> load_recipe_file(const std::string& path);
std::string recipe_to_json(const Recipe& recipe);

Result<CsvOptions> reading_options(const RecipeInput& input);

// Compares the file's columns with input.columns. Returns the indices of the
// file columns to keep (all of them unless unknown_columns is "ignore").
Result<std::vector<size_t>> check_input_columns(const RecipeInput& input, const std::vector<std::string>& names,
                                                const std::string& file);

// Whether a value as read fits the type input.columns declares for it (an
// empty value fits every type; dates are ISO 8601, `iso` scans them). Rows
// with a value that does not fit are rejected before the first step.
bool fits_declared_type(Type type, std::string_view value, const DateFormat& iso);

struct CompiledStep {
  int index = 0;  // position in the recipe (0-based), disabled steps included
  std::shared_ptr<const Step> step;
  std::string note;
};

struct CompiledRecipe {
  std::vector<CompiledStep> steps;  // enabled steps only
  Schema input;
  Schema output;
};

// Validates every enabled step against the columns it will see.
Result<CompiledRecipe> compile_recipe(const Recipe& recipe, const Schema& input);

// Runs compiled steps over batches. Steps that need to see all rows first
// (fill_from_group) make the input be read more than once: passes() says how
// often; every pass but the last only observes.
class RecipeRun {
 public:
  explicit RecipeRun(const CompiledRecipe& recipe);
  size_t passes() const { return observe_at_.size() + 1; }
  Status observe(size_t pass, const Table& batch);
  void end_pass(size_t pass);
  Result<Table> apply(const Table& batch);
  // The last pass one step at a time, for a runner that gives steps their
  // own threads: apply(batch) is apply_step(j, ...) for every j in order.
  // Step j must get the batches in source order and from one thread at a
  // time; different steps may run on different threads at once.
  size_t step_count() const { return recipe_.steps.size(); }
  Result<Table> apply_step(size_t j, const Table& batch);
  Status finish();
  const std::vector<ChangeRecord>& changes() const { return changes_; }
  // The rows the steps rejected since the last call, in source-line order,
  // each with the recipe index of the step that rejected it.
  struct Rejected {
    int step;
    RemovedRow row;
  };
  std::vector<Rejected> take_rejected();
  // The rows step j rejected since the last call, appended to `into`.
  void take_rejected(size_t j, std::vector<Rejected>& into);

 private:
  Result<Table> run_steps(size_t end, const Table& batch, std::vector<std::unique_ptr<StepState>>& states,
                          std::vector<ChangeRecord>& changes);
  const CompiledRecipe& recipe_;
  std::vector<size_t> observe_at_;  // step positions that need a first pass
  std::vector<std::unique_ptr<StepState>> states_;
  std::vector<std::unique_ptr<StepState>> pass_states_;
  std::vector<ChangeRecord> changes_;
  std::vector<ChangeRecord> scratch_changes_;
};

// The whole table as one batch.
Result<Table> apply_recipe(const CompiledRecipe& recipe, const Table& table,
                           std::vector<ChangeRecord>* changes = nullptr);

Schema schema_of(const Table& table);

}  // namespace tamis
