// What the detectors share: the table they look at, its distinct values per
// column, and the preview of a suggested step by really running it.
#pragma once

#include <nlohmann/json.hpp>

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "findings/findings.hpp"

namespace tamis {

// The distinct non-NULL values of one column in order of first appearance,
// with counts; views point into the table's arenas.
struct DistinctValue {
  std::string_view value;
  uint64_t count = 0;
  uint64_t first_row = 0;
};
struct ColumnValues {
  uint64_t nulls = 0;
  uint64_t non_null = 0;
  std::vector<DistinctValue> values;
  const DistinctValue* find(std::string_view value) const;
  std::unordered_map<std::string_view, size_t> index;
};
ColumnValues collect_values(const Column& column);

using StepList = std::vector<nlohmann::ordered_json>;

// One detector's view. `table` is what the detector inspects: the raw table
// for the detectors that propose the safe text fixes, otherwise the table
// after them (`applied` lists the steps that made it from the raw table).
class DetectorContext {
 public:
  DetectorContext(const Table& table, const TableProfile& profile, const FindingOptions& options,
                  std::vector<Finding>& findings)
      : table(table), profile(profile), options(options), findings(findings) {}
  const Table& table;
  const TableProfile& profile;
  const FindingOptions& options;
  std::vector<Finding>& findings;  // earlier detectors' findings; add new ones here

  const ColumnValues& values(size_t column);
  // Text columns that hold at least one non-NULL value.
  std::vector<size_t> text_columns() const;
  // A fix previewed on `table` (after the `first` steps, which are not counted).
  // Returns false (and notes why in the finding's details) when the step does
  // not run, which would be a bug in the detector.
  bool add_fix(Finding& finding, nlohmann::ordered_json step, bool safe, std::string why_review,
               const StepList& first = {});
  // The fixes earlier findings suggest for `column` of the listed kinds
  // (their first fix each), in finding order.
  StepList earlier_fixes(const std::string& column, std::initializer_list<std::string_view> kinds) const;

 private:
  std::vector<std::unique_ptr<ColumnValues>> cache_;
};

// Runs `step` (after `first`) over the table and counts what it changed.
Result<FixPreview> preview_step(const Table& table, const StepList& first, const nlohmann::ordered_json& step,
                                size_t examples);
// Applies the steps in order (all must run).
Result<Table> apply_steps(const Table& table, const StepList& steps);

// "NULL" for NULL, else the canonical text of the cell.
std::string cell_text(const Column& column, size_t row);
// A column name as an SQL identifier for drop_rows conditions: always quoted.
std::string sql_identifier(std::string_view name);
// An SQL text literal.
std::string sql_text(std::string_view value);
// A value for explanations: in double quotes, control characters visible, cut
// after 40 code points.
std::string shown_value(std::string_view value);
// "3 rows" / "1 row".
std::string count_of(uint64_t n, std::string_view singular, std::string_view plural);

}  // namespace tamis
