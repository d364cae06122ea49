// Internal to the workbench: one step applied to a whole table in slices.
//
// Batches follow the table's chunk boundaries, so a batch shares its chunks
// with the table (no copy) and the columns a step leaves alone come out as
// the very same chunks: a stage costs only the columns its step changed.
#pragma once

#include <memory>
#include <optional>
#include <vector>

#include "change.hpp"
#include "error.hpp"
#include "steps/step.hpp"
#include "table.hpp"

namespace tamis::workbench {

// Rows [begin, end) of `table`; whole chunks are shared, partial ones copied.
Table slice_rows(const Table& table, size_t begin, size_t end);

// Row ranges that cover the table, cut only at chunk boundaries (of every
// column and the source lines) unless a chunk exceeds twice `target_rows`.
std::vector<std::pair<size_t, size_t>> batch_ranges(const Table& table, size_t target_rows);

// The table with every typed column as its canonical text (design §3; dates
// in ISO 8601), chunk by chunk. Some finding detectors read every column as
// text, so a stage after parse_date or parse_number is searched through
// this view.
Table as_text(const Table& table);

class StepRunner {
 public:
  // `step` must outlive the runner.
  StepRunner(const Step& step, Table input);
  // About `budget` cells of work; true when done (check error()).
  bool advance(size_t budget);
  double progress() const;
  const std::optional<Error>& error() const { return error_; }
  Table take_output() { return std::move(output_); }
  ChangeRecord take_change() { return std::move(change_); }

 private:
  const Step& step_;
  Table input_;
  std::unique_ptr<StepState> state_;
  std::vector<std::pair<size_t, size_t>> batches_;
  size_t target_rows_ = 0;
  size_t next_ = 0;
  bool observing_ = false;
  bool done_ = false;
  Table output_;
  ChangeRecord change_;
  std::optional<Error> error_;
};

// The whole table in one call.
Result<Table> apply_step(const Step& step, const Table& input, ChangeRecord& change);

}  // namespace tamis::workbench
