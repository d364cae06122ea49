// Long work in resumable slices (design §7). The browser build has no
// threads, so every long operation of the workbench is a Job: the shell calls
// step() between frames (or on a worker thread, natively) and shows
// progress() and label() meanwhile. A slice does about `budget` cells of
// work (rows times the columns a step touches), so one budget means roughly
// the same time for every kind of job.
#pragma once

#include <atomic>
#include <cstddef>
#include <optional>
#include <string>

#include "error.hpp"
#include "row_batches.hpp"

namespace tamis::workbench {

// The engine's slice (row_batches.hpp): about 10 ms of work on a laptop.
inline constexpr size_t kSliceBudget = kSliceCells;

class Job {
 public:
  virtual ~Job() = default;

  // Does about `budget` cells of work; returns true when the job has ended
  // (finished, failed, or cancelled). Calling it again after that is harmless.
  virtual bool step(size_t budget) = 0;
  // 0..1, for a progress bar.
  virtual double progress() const = 0;
  // What is being done right now, e.g. "Reading tree_survey.csv".
  virtual std::string label() const = 0;

  // Asks the job to stop at its next slice; safe from another thread. A
  // cancelled job ends without delivering a result.
  void cancel() { cancelled_ = true; }
  bool cancelled() const { return cancelled_; }
  // Set when the job ended because the work failed.
  const std::optional<Error>& error() const { return error_; }

 protected:
  std::atomic<bool> cancelled_{false};
  std::optional<Error> error_;
};

// Steps a job until it ends. Returns false when it failed or was cancelled.
bool run_to_end(Job& job, size_t budget = kSliceBudget);

}  // namespace tamis::workbench
