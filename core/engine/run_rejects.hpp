// The rows a recipe run sets aside, and the rejects file that keeps them:
// records the reader could not use, rows whose values do not fit the types
// declared in input.columns, and rows a step rejected. Every runner of
// recipes over files (`tamis run`, the parity driver) writes them the same
// way, so their rejects files compare byte for byte.
#pragma once

#include <cstdint>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <vector>

#include "byte_io.hpp"
#include "csv_reader.hpp"
#include "csv_writer.hpp"
#include "recipe.hpp"

namespace tamis {

// Rejected rows as they are found (none is held in memory): CSV with the
// columns line, reason, record. `record` is the row as the file had it.
class RejectsFile {
 public:
  Status open(const std::string& path);
  bool is_open() const { return writer_.has_value(); }
  // Does nothing while the file is not open.
  Status add(uint64_t line, const std::string& reason, const std::string& record);
  Status commit();

 private:
  std::unique_ptr<ByteSink> sink_;
  std::optional<CsvWriter> writer_;
};

// One row of a table as a CSV record (RFC 4180 quoting), for the rejects file.
std::string record_text(const Table& table, size_t row, char delimiter);
// The row of `table` whose record starts at source line `line`, if any.
std::optional<size_t> row_at_line(const Table& table, uint64_t line);

// The reason of a rejected row, as the rejects file and the reject cap's
// message give it: "malformed record: ...", "input: ...", "step N (op): ...".
std::string malformed_reason(const std::string& reason);
std::string input_reason(const std::string& reason);
std::string step_reason(const Recipe& recipe, int step, const std::string& reason);

// Collects a run's rejected rows batch by batch and writes them in
// source-line order, each with its reason ("malformed record: ...",
// "input: ...", "step N (op): ...") and the record as read.
class RunRejects {
 public:
  struct Reject {
    uint64_t line;
    std::string reason;
    std::string record;
  };

  explicit RunRejects(const Recipe& recipe) : recipe_(recipe) {}
  // Also write the rows to this file (without one they are only counted).
  Status open(const std::string& path) { return file_.open(path); }
  Status commit() { return file_.commit(); }

  // A record the reader set aside. Safe to call from a reading thread: the
  // record waits until the batch around it is written.
  Status add_malformed(const RejectedRecord& record);
  // One batch is through: `raw` as read (its records are quoted with
  // `delimiter`), the rows the input check took out and the rows the steps
  // rejected. Writes those and the malformed records up to the batch's last line.
  Status add_batch(const Table& raw, char delimiter, const std::vector<RemovedRow>& from_input,
                   std::vector<RecipeRun::Rejected> from_steps);
  // The input has ended: writes the malformed records after the last batch.
  Status finish_input();

  uint64_t count() const { return count_; }
  const std::optional<Reject>& first() const { return first_; }

 private:
  std::vector<RejectedRecord> take_malformed_through(uint64_t line);
  Status write(std::vector<Reject> rows);

  const Recipe& recipe_;
  RejectsFile file_;
  std::mutex mutex_;                      // guards waiting_
  std::vector<RejectedRecord> waiting_;  // malformed records not yet written
  uint64_t count_ = 0;
  std::optional<Reject> first_;
};

}  // namespace tamis
