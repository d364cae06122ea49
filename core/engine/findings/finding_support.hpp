// What the detectors share: the table they look at, its distinct values per
// column, the preview of a suggested step by really running it, and the
// slicing of their work.
#pragma once

#include <nlohmann/json.hpp>

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "findings/detector_task.hpp"
#include "findings/findings.hpp"
#include "row_batches.hpp"

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
};
ColumnValues collect_values(const Column& column);

// Counted values by column storage. The views the detectors look at (the raw
// table, then the table after the safe fixes) share the chunks of every
// column those fixes left alone, and such a column is counted once.
class ValuesCache {
 public:
  const ColumnValues* find(const Column& column) const;
  const ColumnValues& add(const Column& column, ColumnValues values);
  // Forgets the columns `table` no longer holds, so that the cache holds no
  // more than the current view's columns.
  void keep_only(const Table& table);

 private:
  struct Entry {
    Type type = Type::text;
    std::vector<std::shared_ptr<const ColumnChunk>> chunks;  // also keeps the values' bytes alive
    std::unique_ptr<ColumnValues> values;
  };
  static bool holds(const Entry& entry, const Column& column);
  std::vector<Entry> entries_;
};

using StepList = std::vector<nlohmann::ordered_json>;

// How the scanner's coroutines share a slice (detector_task.hpp): the budget
// left in it, and the whole-table work a suspended coroutine waits for.
struct SliceControl {
  WorkBudget* budget = nullptr;
  std::function<bool(WorkBudget&)> pending;  // returns true once the work has ended
  coro::coroutine_handle<> waiting;           // resumed when `pending` has ended, or at the next slice
};

// co_await: runs `work` within this slice and, if it needs more, the next ones.
struct SlicedWork {
  SliceControl& control;
  std::function<bool(WorkBudget&)> work;
  bool await_ready() { return work(*control.budget); }
  void await_suspend(coro::coroutine_handle<> awaiting) {
    control.waiting = awaiting;
    control.pending = std::move(work);
  }
  void await_resume() const noexcept {}
};

// co_await: continues at once while the slice has budget left, else in the next slice.
struct Pause {
  SliceControl& control;
  bool await_ready() const noexcept { return !control.budget->exhausted(); }
  void await_suspend(coro::coroutine_handle<> awaiting) noexcept { control.waiting = awaiting; }
  void await_resume() const noexcept {}
};

// Steps applied to a whole table in row batches across slices.
Task<Result<Table>> apply_sliced(SliceControl& control, const Table& table, const StepList& steps,
                                 size_t batch_cells);

// One detector's view. `table` is what the detector inspects: the raw table
// for the detectors that propose the safe text fixes, otherwise the table
// after them.
class DetectorContext {
 public:
  DetectorContext(const Table& table, const TableProfile& profile, const FindingOptions& options,
                  std::vector<Finding>& findings, SliceControl& control, ValuesCache& values)
      : table(table), profile(profile), options(options), findings(findings), control_(control), values_(values) {}
  const Table& table;
  const TableProfile& profile;
  const FindingOptions& options;
  std::vector<Finding>& findings;  // earlier detectors' findings; add new ones here

  // Computed on first use, which counts as a pass over the column.
  const ColumnValues& values(size_t column);
  // Text columns that hold at least one non-NULL value.
  std::vector<size_t> text_columns() const;
  // A fix previewed on `table` (after the `first` steps, which are not
  // counted). False (and the finding's details say why) when the step does
  // not run, which would be a bug in the detector.
  Task<bool> add_fix(Finding& finding, nlohmann::ordered_json step, bool safe, std::string why_review,
                     StepList first = {});
  // `table` after the steps, computed in row batches.
  Task<Result<Table>> apply(StepList steps) {
    return apply_sliced(control_, table, std::move(steps), options.batch_cells);
  }
  // The fixes earlier findings suggest for `column` of the listed kinds
  // (their first fix each), in finding order.
  StepList earlier_fixes(const std::string& column, std::initializer_list<std::string_view> kinds) const;

  // Counts `cells` of work done against the slice's budget; co_await
  // pause() where a detector may continue in the next slice.
  void spend(size_t cells) { control_.budget->spend(cells); }
  Pause pause() { return {control_}; }

 private:
  Task<Result<FixPreview>> preview(StepList first, nlohmann::ordered_json step);
  SliceControl& control_;
  ValuesCache& values_;
};

// Applies the steps in order (all must run), in one call.
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
