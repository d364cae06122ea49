// What a step did to a table (design §3): rows in and out, removed rows with
// their source line and reason, cells changed per column with a sample of
// before -> after pairs, conflicts and warnings. Lists are capped; counts
// are exact.
#pragma once

#include <cstdint>
#include <map>
#include <string>
#include <vector>

namespace tamis {

struct RemovedRow {
  uint64_t line = 0;  // source line of the record
  std::string reason;
};

struct ValueChange {
  std::string column;
  std::string before;  // canonical text, or "NULL"
  std::string after;
  uint64_t count = 0;
};

class ChangeRecord {
 public:
  static constexpr size_t kListedRows = 100;
  static constexpr size_t kListedChanges = 20;

  uint64_t rows_in = 0;
  uint64_t rows_out = 0;
  uint64_t rows_removed = 0;
  uint64_t rows_rejected = 0;  // sent to the rejects file (on_error: reject, require on_fail: reject)
  std::vector<RemovedRow> removed;   // first kListedRows removed or rejected rows
  std::map<std::string, uint64_t> cells_changed;
  std::vector<std::string> conflicts;
  std::vector<std::string> warnings;

  void note_removed(uint64_t line, const std::string& reason);
  void note_rejected(uint64_t line, const std::string& reason);
  // Every rejected row since the last call, uncapped, for the rejects file
  // (the runner takes them after each batch, so they never pile up).
  std::vector<RemovedRow> take_rejected();
  void note_change(const std::string& column, std::string_view before, std::string_view after);
  const std::vector<ValueChange>& samples() const { return samples_; }
  // Adds another batch's record of the same step.
  void merge(const ChangeRecord& other);

 private:
  void add_sample(const ValueChange& sample, uint64_t print);

  std::vector<ValueChange> samples_;
  // A hash of each sample's before and after, so that a change is compared
  // with the samples as one number each (every changed cell is).
  std::vector<uint64_t> sample_prints_;
  std::vector<RemovedRow> rejected_;
};

}  // namespace tamis
