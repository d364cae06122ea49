// Opening a file for the workbench: the reader's batches gathered into one
// table, in slices (a Job), so the shells show progress while a large file
// loads. Records the reader cannot use are set aside (lenient), counted and
// kept for the Changes panel, as `tamis run` does with its rejects file.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "byte_io.hpp"
#include "csv_reader.hpp"
#include "job.hpp"
#include "table.hpp"

namespace tamis::workbench {

struct LoadedFile {
  std::string name;  // shown in titles and messages, and written into reports
  Table table;
  ReadReport read;                       // the dialect found, warnings
  std::vector<RejectedRecord> rejected;  // the first kListedRejects malformed records
  static constexpr size_t kListedRejects = 100;
};

class LoadJob final : public Job {
 public:
  // Reads the first block and detects the dialect (fails fast on an unreadable file).
  // options.batch_rows (at most 16384) is the unit of one slice's reading.
  static Result<std::unique_ptr<LoadJob>> start(std::unique_ptr<ByteSource> source, std::string name,
                                                CsvOptions options = {});
  ~LoadJob() override;
  bool step(size_t budget) override;
  double progress() const override;
  std::string label() const override;
  // The file once step() returned true without error or cancel.
  LoadedFile take_result();

 private:
  LoadJob() = default;
  struct State;
  std::unique_ptr<State> state_;
};

// The whole file in one call (tests, small files).
Result<LoadedFile> load_file(std::unique_ptr<ByteSource> source, std::string name, CsvOptions options = {});

}  // namespace tamis::workbench
