#include "change.hpp"

#include <algorithm>
#include <functional>
#include <utility>

namespace tamis {

void ChangeRecord::note_removed(uint64_t line, const std::string& reason) {
  ++rows_removed;
  if (removed.size() < kListedRows) removed.push_back({line, reason});
}

void ChangeRecord::note_rejected(uint64_t line, const std::string& reason) {
  ++rows_rejected;
  if (removed.size() < kListedRows) removed.push_back({line, reason});
  rejected_.push_back({line, reason});
}

std::vector<RemovedRow> ChangeRecord::take_rejected() { return std::exchange(rejected_, {}); }

namespace {
uint64_t change_print(std::string_view before, std::string_view after) {
  const std::hash<std::string_view> hash;
  return hash(before) ^ (hash(after) * 0x9E3779B97F4A7C15u);
}
}  // namespace

void ChangeRecord::add_sample(const ValueChange& sample, uint64_t print) {
  samples_.push_back(sample);
  sample_prints_.push_back(print);
}

void ChangeRecord::note_change(const std::string& column, std::string_view before, std::string_view after) {
  ++cells_changed[column];
  const uint64_t print = change_print(before, after);
  for (size_t i = 0; i < samples_.size(); ++i) {
    ValueChange& s = samples_[i];
    if (sample_prints_[i] == print && s.before == before && s.after == after && s.column == column) {
      ++s.count;
      return;
    }
  }
  if (samples_.size() < kListedChanges) add_sample({column, std::string(before), std::string(after), 1}, print);
}

void ChangeRecord::merge(const ChangeRecord& other) {
  rows_in += other.rows_in;
  rows_out += other.rows_out;
  rows_removed += other.rows_removed;
  rows_rejected += other.rows_rejected;
  for (const RemovedRow& r : other.removed)
    if (removed.size() < kListedRows) removed.push_back(r);
  for (const auto& [column, n] : other.cells_changed) cells_changed[column] += n;
  for (const ValueChange& s : other.samples_) {
    auto it = std::find_if(samples_.begin(), samples_.end(), [&](const ValueChange& x) {
      return x.column == s.column && x.before == s.before && x.after == s.after;
    });
    if (it != samples_.end()) it->count += s.count;
    else if (samples_.size() < kListedChanges) add_sample(s, change_print(s.before, s.after));
  }
  rejected_.insert(rejected_.end(), other.rejected_.begin(), other.rejected_.end());
  for (const auto& c : other.conflicts) conflicts.push_back(c);
  for (const auto& w : other.warnings)
    if (std::find(warnings.begin(), warnings.end(), w) == warnings.end()) warnings.push_back(w);
}

}  // namespace tamis
