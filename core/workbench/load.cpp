#include "load.hpp"

#include <algorithm>

namespace tamis::workbench {

struct LoadJob::State {
  std::string name;
  char quote = '"';
  size_t skip_rows = 0;
  std::unique_ptr<CsvReader> reader;
  Table table;
  std::shared_ptr<std::vector<RejectedRecord>> rejected = std::make_shared<std::vector<RejectedRecord>>();
  bool done = false;
};

Result<std::unique_ptr<LoadJob>> LoadJob::start(std::unique_ptr<ByteSource> source, std::string name,
                                                CsvOptions options) {
  std::unique_ptr<LoadJob> job(new LoadJob());
  job->state_ = std::make_unique<State>();
  State& s = *job->state_;
  s.name = name;
  s.quote = options.quote;
  s.skip_rows = options.skip_rows;
  // Like `tamis run`: a malformed record is set aside, not a reason to refuse the file.
  options.lenient = true;
  // A batch is the unit of a slice's work and a chunk of the loaded table.
  // 32,768 rows keep a slice short (the desktop's longest frame while loading
  // the 1M-row bench file: 187 ms, against 152 ms) while each chunk
  // keeps its repeated values once over more rows: against 4,096, the load's
  // peak on the 1M-row bench file fell from 203 to 185 MB and adding a step
  // from 2.7 to 2.2 s, since fewer per-chunk dictionaries are merged.
  options.batch_rows = std::min<size_t>(options.batch_rows, 32768);
  auto rejected = s.rejected;
  auto reader = CsvReader::open(std::move(source), std::move(name), options, [rejected](const RejectedRecord& r) {
    if (rejected->size() < LoadedFile::kListedRejects) rejected->push_back(r);
    return Status(Ok{});
  });
  if (!reader) return reader.take_error();
  s.reader = std::move(*reader);
  return job;
}

LoadJob::~LoadJob() = default;

bool LoadJob::step(size_t budget) {
  State& s = *state_;
  if (s.done || error_) return true;
  if (cancelled()) {
    s.done = true;
    return true;
  }
  // Measured with workbench_bench on the 1,000,000-row bench file: reading a
  // cell costs about six times what a cleaning step's pass over it costs.
  const size_t per_row = 6 * std::max<size_t>(1, s.reader->column_names().size());
  size_t spent = 0;
  while (spent < budget) {
    auto batch = s.reader->next_batch();
    if (!batch) {
      error_ = batch.take_error();
      return true;
    }
    if (!batch->has_value()) {
      if (s.table.column_count() == 0 && s.table.row_count() == 0) {
        // A file with a header and no rows still has its columns.
        std::vector<ColumnPtr> columns(s.reader->column_names().size(), std::make_shared<Column>(Type::text));
        s.table = Table::make(s.reader->column_names(), std::move(columns), std::make_shared<Column>(Type::integer))
                      .value();
      }
      s.done = true;
      return true;
    }
    spent += (*batch)->row_count() * per_row;
    // The loaded table stays in memory for the whole session: its repeated
    // values are kept once.
    if (Status st = s.table.append(with_repeated_values_shared(**batch)); !st) {
      error_ = st.take_error();
      return true;
    }
  }
  return false;
}

double LoadJob::progress() const {
  const State& s = *state_;
  if (s.done) return 1.0;
  const auto total = s.reader->total_bytes();
  if (!total || *total == 0) return 0.0;
  return std::min(1.0, static_cast<double>(s.reader->bytes_read()) / static_cast<double>(*total));
}

std::string LoadJob::label() const { return "Reading " + state_->name; }

LoadedFile LoadJob::take_result() {
  State& s = *state_;
  LoadedFile file;
  file.name = s.name;
  file.table = std::move(s.table);
  file.read = s.reader->report();
  file.quote = s.quote;
  file.skip_rows = s.skip_rows;
  file.rejected = std::move(*s.rejected);
  return file;
}

Result<LoadedFile> load_file(std::unique_ptr<ByteSource> source, std::string name, CsvOptions options) {
  auto job = LoadJob::start(std::move(source), std::move(name), options);
  if (!job) return job.take_error();
  if (!run_to_end(**job)) return *(*job)->error();
  return (*job)->take_result();
}

}  // namespace tamis::workbench
