// The last pass of `tamis run` as a pipeline of threads: one thread reads,
// parses and checks batches, each group of steps has a thread of its own, and
// the caller's thread writes. Every stage takes the batches in source order
// and keeps at most one waiting for the next stage, so a step's change record
// and state see exactly what a single-threaded run shows them, memory stays a
// few batches deep, and the operating system spreads the stages over the
// cores (no stage is tied to one).
#pragma once

#include <condition_variable>
#include <cstdint>
#include <deque>
#include <functional>
#include <mutex>
#include <optional>
#include <thread>
#include <utility>
#include <vector>

#include "csv_reader.hpp"
#include "recipe.hpp"

namespace tamis::cli {

// One batch on its way through the stages.
struct StagedBatch {
  Table raw;                                  // as read, for the rejects file
  Table table;                                // after the stages so far
  std::vector<RemovedRow> failing;            // rows the input check took out
  std::vector<RecipeRun::Rejected> rejected;  // rows the steps rejected, step by step
  uint64_t bytes_read = 0;                    // source bytes consumed once the batch was read
};

// What passes between two stages: a batch, the end (nullopt), or the error
// that stopped an earlier stage, which later stages hand on untouched.
using StagedItem = Result<std::optional<StagedBatch>>;

class StagedRun {
 public:
  // Changes a batch in place; an error stops the run at that batch.
  using Stage = std::function<Status(StagedBatch&)>;

  // `prepare` runs on the reading thread; each entry of `stages` gets a thread.
  StagedRun(CsvReader& reader, Stage prepare, std::vector<Stage> stages)
      : reader_(reader), prepare_(std::move(prepare)), stages_(std::move(stages)), links_(stages_.size() + 1) {
    threads_.emplace_back([this] { read(); });
    for (size_t s = 0; s < stages_.size(); ++s) threads_.emplace_back([this, s] { transform(s); });
  }
  ~StagedRun() {
    {
      std::lock_guard lock(mutex_);
      stopping_ = true;
    }
    for (Link& link : links_) link.changed.notify_all();
    for (std::thread& t : threads_) t.join();
  }
  StagedRun(const StagedRun&) = delete;
  StagedRun& operator=(const StagedRun&) = delete;

  // The batches in source order after every stage, then nullopt (or an error).
  StagedItem next() {
    std::optional<StagedItem> item = take(links_.size() - 1);
    return item ? std::move(*item) : StagedItem(std::optional<StagedBatch>{});
  }

 private:
  // Hands an item to link `to`, waiting while the previous one is still
  // there; false when the run is being stopped.
  bool put(size_t to, StagedItem item) {
    Link& link = links_[to];
    std::unique_lock lock(mutex_);
    link.changed.wait(lock, [&] { return stopping_ || !link.item; });
    if (stopping_) return false;
    link.item.emplace(std::move(item));
    link.changed.notify_all();
    return true;
  }
  std::optional<StagedItem> take(size_t from) {
    Link& link = links_[from];
    std::unique_lock lock(mutex_);
    link.changed.wait(lock, [&] { return stopping_ || link.item.has_value(); });
    if (stopping_) return std::nullopt;
    std::optional<StagedItem> item = std::exchange(link.item, std::nullopt);
    link.changed.notify_all();
    return item;
  }

  static bool is_last(const StagedItem& item) { return !item || !item->has_value(); }

  void read() {
    for (;;) {
      auto batch = reader_.next_batch();
      StagedItem item = std::optional<StagedBatch>{};
      if (!batch) {
        item = batch.take_error();
      } else if (batch->has_value()) {
        StagedBatch staged;
        staged.raw = std::move(**batch);
        staged.table = staged.raw;
        staged.bytes_read = reader_.bytes_read();
        if (Status s = prepare_(staged); !s) item = s.take_error();
        else item = std::optional<StagedBatch>(std::move(staged));
      }
      const bool last = is_last(item);
      if (!put(0, std::move(item)) || last) return;
    }
  }

  void transform(size_t s) {
    for (;;) {
      std::optional<StagedItem> item = take(s);
      if (!item) return;
      if (!is_last(*item)) {
        StagedBatch& batch = item->value().value();
        if (Status done = stages_[s](batch); !done) *item = done.take_error();
      }
      const bool last = is_last(*item);
      if (!put(s + 1, std::move(*item)) || last) return;
    }
  }

  CsvReader& reader_;
  Stage prepare_;
  std::vector<Stage> stages_;
  // Where one stage leaves a batch for the next; only those two wait on it.
  struct Link {
    std::optional<StagedItem> item;
    std::condition_variable changed;
  };
  std::mutex mutex_;
  std::vector<Link> links_;  // links_[s] feeds stage s; the last feeds next()
  bool stopping_ = false;
  std::vector<std::thread> threads_;
};

}  // namespace tamis::cli
