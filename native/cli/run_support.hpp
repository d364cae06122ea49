// What `tamis run` and `tamis check` share: loading a recipe file, the
// input section's checks on every batch (expected columns, types declared
// in input.columns), the cap on rejected rows, and the rejects file.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "byte_io.hpp"
#include "csv_writer.hpp"
#include "recipe.hpp"
#include "run_report.hpp"

namespace tamis::cli {

// "-" reads the recipe from standard input.
Result<Recipe> load_recipe_file(const std::string& path);

// The input section applied to each batch the reader delivers: columns the
// recipe does not expect are dropped (unknown_columns "ignore"; "fail" has
// stopped the run already), and a row whose value does not fit a type
// declared in input.columns is taken out and reported. The declared types
// are checks on the text as read: steps still see text (parse_date,
// parse_number and cast convert it). An empty value fits every type.
class InputCheck {
 public:
  static Result<InputCheck> make(const RecipeInput& input, const std::vector<std::string>& file_columns,
                                 const std::string& file);
  // Columns the steps will see.
  const Schema& schema() const { return schema_; }
  // The rows of `raw` that pass, with the kept columns; failing rows are
  // appended to `failing` with their source line and reason.
  Result<Table> apply(const Table& raw, std::vector<RemovedRow>& failing) const;

 private:
  std::vector<size_t> keep_;
  std::vector<Type> types_;  // per kept column
  Schema schema_;
  bool all_kept_ = true;
};

// Rejected rows as they are found (none is held in memory): CSV with the
// columns line, reason, record. `record` is the row as the file had it.
class RejectsFile {
 public:
  Status open(const std::string& path);
  bool is_open() const { return writer_.has_value(); }
  Status add(uint64_t line, const std::string& reason, const std::string& record);
  Status commit();

 private:
  std::unique_ptr<ByteSink> sink_;
  std::optional<CsvWriter> writer_;
};

// One row of a table as a CSV record (RFC 4180 quoting), for the rejects file.
std::string record_text(const Table& table, size_t row, char delimiter);
// The row of `table` whose record starts at source line `line`, if any.
std::optional<size_t> row_at_line(const Table& table, uint64_t line);

// True when both paths name the same existing file.
bool same_file(const std::string& a, const std::string& b);

}  // namespace tamis::cli
