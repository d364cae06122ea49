// Column profiles: what is in each column, counted over the whole table.
//
// Every per-value fact (type fit, length, shape, white space, punctuation,
// numeric value) is derived once per distinct value and weighted by its
// count, so a category column with a million rows and twenty distinct values
// costs twenty derivations. The work is resumable in slices (step) so both
// shells can show progress without a thread.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "table.hpp"

namespace tamis {

struct ValueCount {
  std::string value;
  uint64_t count = 0;
};

struct Quantile {
  double p = 0;
  double value = 0;
};

struct ColumnProfile {
  std::string name;
  Type type = Type::text;   // inferred from the non-blank values
  double type_share = 0;    // share of non-blank values that fit `type`
  uint64_t rows = 0, nulls = 0, blanks = 0, distinct = 0;
  // How many non-blank values (white space around them ignored) fit each type.
  uint64_t non_blank = 0, fit_integer = 0, fit_number = 0, fit_date = 0, fit_boolean = 0;
  std::optional<std::string> min, max;  // canonical text form of `type`
  std::optional<double> mean, std_dev;  // sample standard deviation (n - 1)
  std::vector<Quantile> quantiles;      // p = 0.05 0.25 0.5 0.75 0.95, Hyndman & Fan type 7
  uint64_t length_min = 0, length_max = 0;  // code points, over non-NULL values
  std::vector<ValueCount> top_values;       // up to 10, most frequent first
  std::vector<ValueCount> shapes;           // up to 5, most frequent first
  uint64_t edge_whitespace = 0;             // values with leading or trailing white space
  uint64_t trailing_punctuation = 0;        // values whose last character is punctuation
};

struct TableProfile {
  uint64_t rows = 0;
  std::vector<ColumnProfile> columns;
};

// A value's character shape: upper-case letters A, lower-case letters a
// (a run of same-case letters is written once), each digit 9, white space a
// space, anything else itself; at most 40 symbols.
std::string value_shape(std::string_view value);

class TableProfiler {
 public:
  explicit TableProfiler(Table table);
  ~TableProfiler();
  // Does about `budget` values of work; returns true when finished.
  bool step(size_t budget);
  double progress() const;
  const TableProfile& result() const { return result_; }

 private:
  struct ColumnState;
  Table table_;
  TableProfile result_;
  size_t column_ = 0;
  std::unique_ptr<ColumnState> state_;
  uint64_t work_done_ = 0;
};

TableProfile profile_table(const Table& table);

}  // namespace tamis
