// Long work over a whole table in resumable slices (design §7): the browser
// has no threads, so the workbench and the finding scanner do a bounded
// amount of work per frame and continue in the next one.
//
// Batches follow the table's chunk boundaries, so a batch shares its chunks
// with the table (no copy) and the columns a step leaves alone come out as
// the very same chunks.
#pragma once

#include <algorithm>
#include <cstddef>
#include <functional>
#include <optional>
#include <utility>
#include <vector>

#include "recipe.hpp"
#include "table.hpp"

namespace tamis {

// About 10 ms of work on a laptop, in cells (rows times the columns a piece
// of work touches) (common practice: keep each frame's work well under the
// 16 ms of a 60 Hz frame).
inline constexpr size_t kSliceCells = size_t{1} << 18;

// The cells of work left in the current slice.
struct WorkBudget {
  size_t left = kSliceCells;
  void spend(size_t cells) { left -= std::min(left, cells); }
  bool exhausted() const { return left == 0; }
};

// Rows [begin, end) of `table`; whole chunks are shared, partial ones copied.
Table slice_rows(const Table& table, size_t begin, size_t end);

// Row ranges that cover the table, cut only at chunk boundaries (of every
// column and the source lines) unless a chunk exceeds twice `target_rows`.
std::vector<std::pair<size_t, size_t>> batch_ranges(const Table& table, size_t target_rows);

// Compiled steps run over a whole table batch by batch, with the passes that
// steps needing every row first (fill_from_group) ask for, exactly as
// apply_recipe runs them on the table as one batch.
class BatchedRun {
 public:
  // Called for each batch of the last pass with its rows before the last step
  // and after it, and the last step's change record so far.
  using BatchObserver = std::function<void(const Table& before_last, const Table& after, const ChangeRecord& last)>;

  // Batches of about `batch_cells` cells.
  BatchedRun(CompiledRecipe recipe, Table input, size_t batch_cells = kSliceCells);
  BatchedRun(const BatchedRun&) = delete;
  BatchedRun& operator=(const BatchedRun&) = delete;

  void observe_batches(BatchObserver observer) { observer_ = std::move(observer); }
  // For a run read only through its observer and change records.
  void discard_output() { keep_output_ = false; }

  // Runs batches until the budget is spent; true when done (check error()).
  bool advance(WorkBudget& budget);
  double progress() const;
  const std::optional<Error>& error() const { return error_; }
  Table take_output() { return std::move(output_); }
  // One record per step, complete once advance() has returned true (also
  // after an error: what the steps did up to it).
  std::vector<ChangeRecord>& changes() { return changes_; }

 private:
  bool fail(Error error);
  bool run_batch(const Table& batch);

  CompiledRecipe recipe_;
  RecipeRun run_;
  Table input_;
  BatchObserver observer_;
  bool keep_output_ = true;
  std::vector<std::pair<size_t, size_t>> batches_;
  size_t pass_ = 0;
  size_t next_ = 0;
  bool done_ = false;
  Table output_;
  std::vector<ChangeRecord> changes_;
  std::optional<Error> error_;
};

}  // namespace tamis
