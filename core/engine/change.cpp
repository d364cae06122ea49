#include "change.hpp"

#include <algorithm>
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

void ChangeRecord::note_change(const std::string& column, std::string_view before, std::string_view after) {
  ++cells_changed[column];
  for (ValueChange& s : samples_)
    if (s.column == column && s.before == before && s.after == after) {
      ++s.count;
      return;
    }
  if (samples_.size() < kListedChanges) samples_.push_back({column, std::string(before), std::string(after), 1});
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
    else if (samples_.size() < kListedChanges) samples_.push_back(s);
  }
  rejected_.insert(rejected_.end(), other.rejected_.begin(), other.rejected_.end());
  for (const auto& c : other.conflicts) conflicts.push_back(c);
  for (const auto& w : other.warnings)
    if (std::find(warnings.begin(), warnings.end(), w) == warnings.end()) warnings.push_back(w);
}

}  // namespace tamis
