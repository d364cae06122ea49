// The report of one recipe run (design §5): how the input was read, what
// every step did, and totals that balance:
//   rows read = rows written + rows removed (all steps) + rows rejected
// where rows read counts every record of the input, malformed ones included,
// and rows rejected counts the records the reader set aside, the rows whose
// values do not fit the types declared in input.columns, and the rows the
// steps rejected. The batch runner and the workbench both build it.
#pragma once

#include <nlohmann/json.hpp>

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "change.hpp"
#include "csv_reader.hpp"
#include "recipe.hpp"

namespace tamis {

struct RunFacts {
  std::string recipe_file;
  std::string input_file;
  std::string output_file;             // "-" for standard output
  ReadReport read;                     // dialect used; read.rows delivered, read.rejected set aside
  uint64_t rows_failing_input_types = 0;
  uint64_t first_failing_input_type_line = 0;
  uint64_t rows_written = 0;
  size_t passes = 1;
};

struct RunTotals {
  uint64_t rows_read = 0;
  uint64_t rows_written = 0;
  uint64_t rows_removed = 0;
  uint64_t rows_rejected = 0;
  bool balances() const { return rows_read == rows_written + rows_removed + rows_rejected; }
};

RunTotals run_totals(const RunFacts& facts, const std::vector<ChangeRecord>& changes);

// input.max_rejects (or `tamis run --max-rejects`): a count ("25") or a share
// of the rows read ("0.5%"). One rule for `tamis run`, `tamis check` and the
// workbench's export.
struct RejectCap {
  std::optional<uint64_t> count;
  std::optional<double> percent;
  std::string text;

  static Result<RejectCap> parse(const std::string& text);
  // The recipe's cap; none given allows no rejected row.
  static Result<RejectCap> of(const RecipeInput& input) { return parse(input.max_rejects.value_or("0")); }
  bool exceeded(uint64_t rejected, uint64_t rows_read) const;
  // The error when exceeded: counts, the cap, and the first rejected row.
  // rows_read is shown only for a share.
  Error error(const std::string& input_file, uint64_t rejected, uint64_t rows_read, const RemovedRow& first) const;
};

// Checks the accounting: every step's rows in = rows out + removed +
// rejected, each step receives what the one before produced, the first step
// receives what the input check let through, and the totals balance. A
// failure is a defect in tamis, and the message names the step.
Status check_row_accounting(const CompiledRecipe& recipe, const std::vector<ChangeRecord>& changes,
                            const RunFacts& facts);

// The JSON run report. Steps are listed in recipe order, disabled ones as
// skipped; lists of rows and samples are capped (see ChangeRecord), counts
// are exact.
nlohmann::ordered_json run_report_json(const Recipe& recipe, const CompiledRecipe& compiled,
                                       const std::vector<ChangeRecord>& changes, const RunFacts& facts);

// A few lines for people: totals, then one line per step.
std::string run_summary(const CompiledRecipe& compiled, const std::vector<ChangeRecord>& changes,
                        const RunFacts& facts);

}  // namespace tamis
