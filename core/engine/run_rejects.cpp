#include "run_rejects.hpp"

#include <algorithm>
#include <iterator>
#include <limits>

namespace tamis {

Status RejectsFile::open(const std::string& path) {
  auto sink = open_file_sink(path);
  if (!sink) return sink.take_error();
  sink_ = std::move(*sink);
  auto writer = CsvWriter::make(*sink_, CsvWriteOptions{});
  if (!writer) return writer.take_error();
  writer_.emplace(std::move(*writer));
  const std::string_view header[] = {"line", "reason", "record"};
  return writer_->write_row(header);
}

Status RejectsFile::add(uint64_t line, const std::string& reason, const std::string& record) {
  if (!writer_) return Ok{};
  const std::string number = std::to_string(line);
  const std::string_view row[] = {number, reason, record};
  return writer_->write_row(row);
}

Status RejectsFile::commit() { return writer_ ? writer_->finish() : Status(Ok{}); }

std::string record_text(const Table& table, size_t row, char delimiter) {
  std::string out;
  for (size_t c = 0; c < table.column_count(); ++c) {
    if (c) out += delimiter;
    if (table.column(c).is_null(row)) continue;
    const std::string_view v = table.column(c).text(row);
    const bool quote = v.find_first_of(std::string{delimiter, '"', '\r', '\n'}) != std::string_view::npos;
    if (!quote) {
      out.append(v);
      continue;
    }
    out += '"';
    for (char ch : v) {
      if (ch == '"') out += '"';
      out += ch;
    }
    out += '"';
  }
  return out;
}

std::optional<size_t> row_at_line(const Table& table, uint64_t line) {
  size_t lo = 0, hi = table.row_count();
  while (lo < hi) {
    const size_t mid = lo + (hi - lo) / 2;
    if (table.source_line(mid) < line) lo = mid + 1;
    else hi = mid;
  }
  if (lo < table.row_count() && table.source_line(lo) == line) return lo;
  return std::nullopt;
}


Status RunRejects::add_malformed(const RejectedRecord& record) {
  std::lock_guard lock(mutex_);
  waiting_.push_back(record);
  return Ok{};
}

std::vector<RejectedRecord> RunRejects::take_malformed_through(uint64_t line) {
  std::lock_guard lock(mutex_);
  std::vector<RejectedRecord> out;
  auto end = std::find_if(waiting_.begin(), waiting_.end(), [&](const RejectedRecord& r) { return r.line > line; });
  out.assign(std::make_move_iterator(waiting_.begin()), std::make_move_iterator(end));
  waiting_.erase(waiting_.begin(), end);
  return out;
}

std::string malformed_reason(const std::string& reason) { return "malformed record: " + reason; }

std::string input_reason(const std::string& reason) { return "input: " + reason; }

std::string step_reason(const Recipe& recipe, int step, const std::string& reason) {
  return "step " + std::to_string(step + 1) + " (" + recipe.steps[static_cast<size_t>(step)].op + "): " + reason;
}

Status RunRejects::add_batch(const Table& raw, char delimiter, const std::vector<RemovedRow>& from_input,
                             std::vector<RecipeRun::Rejected> from_steps) {
  const uint64_t through = raw.row_count() ? raw.source_line(raw.row_count() - 1) : 0;
  std::vector<Reject> rows;
  for (RejectedRecord& r : take_malformed_through(through))
    rows.push_back({r.line, malformed_reason(r.reason), std::move(r.text)});
  auto record_of = [&](uint64_t line) {
    const auto row = row_at_line(raw, line);
    return row ? record_text(raw, *row, delimiter) : std::string();
  };
  for (const RemovedRow& r : from_input) rows.push_back({r.line, input_reason(r.reason), record_of(r.line)});
  for (const RecipeRun::Rejected& r : from_steps)
    rows.push_back({r.row.line, step_reason(recipe_, r.step, r.row.reason), record_of(r.row.line)});
  return write(std::move(rows));
}

Status RunRejects::finish_input() {
  std::vector<Reject> rows;
  for (RejectedRecord& r : take_malformed_through(std::numeric_limits<uint64_t>::max()))
    rows.push_back({r.line, malformed_reason(r.reason), std::move(r.text)});
  return write(std::move(rows));
}

Status RunRejects::write(std::vector<Reject> rows) {
  std::stable_sort(rows.begin(), rows.end(), [](const Reject& a, const Reject& b) { return a.line < b.line; });
  for (Reject& r : rows) {
    if (Status s = file_.add(r.line, r.reason, r.record); !s) return s;
    if (!first_) first_ = std::move(r);
  }
  count_ += rows.size();
  return Ok{};
}

}  // namespace tamis
