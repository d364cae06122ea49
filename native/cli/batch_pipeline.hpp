// Runs the reading side of a streaming command on a second thread, so that
// parsing the next batch overlaps with processing and writing the current
// one (the machines this runs on have at least two cores). At most `depth`
// batches wait in between, which bounds memory.
#pragma once

#include <condition_variable>
#include <deque>
#include <functional>
#include <mutex>
#include <optional>
#include <thread>

#include "csv_reader.hpp"

namespace tamis::cli {

class BatchPipeline {
 public:
  BatchPipeline(CsvReader& reader, size_t depth) : reader_(reader), depth_(depth) {
    worker_ = std::thread([this] { produce(); });
  }
  ~BatchPipeline() {
    {
      std::lock_guard lock(mutex_);
      stopping_ = true;
    }
    changed_.notify_all();
    worker_.join();
  }
  BatchPipeline(const BatchPipeline&) = delete;
  BatchPipeline& operator=(const BatchPipeline&) = delete;

  // Same contract as CsvReader::next_batch.
  Result<std::optional<Table>> next() {
    std::unique_lock lock(mutex_);
    changed_.wait(lock, [&] { return !queue_.empty(); });
    Result<std::optional<Table>> item = std::move(queue_.front());
    queue_.pop_front();
    changed_.notify_all();
    return item;
  }

 private:
  void produce() {
    for (;;) {
      {
        std::unique_lock lock(mutex_);
        changed_.wait(lock, [&] { return stopping_ || queue_.size() < depth_; });
        if (stopping_) return;
      }
      Result<std::optional<Table>> batch = reader_.next_batch();
      const bool last = !batch || !batch->has_value();
      {
        std::lock_guard lock(mutex_);
        queue_.push_back(std::move(batch));
      }
      changed_.notify_all();
      if (last) return;
    }
  }

  CsvReader& reader_;
  size_t depth_;
  std::mutex mutex_;
  std::condition_variable changed_;
  std::deque<Result<std::optional<Table>>> queue_;
  bool stopping_ = false;
  std::thread worker_;
};

}  // namespace tamis::cli
