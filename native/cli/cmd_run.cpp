#include <nlohmann/json.hpp>

#include <unistd.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <iostream>

#include "batch_pipeline.hpp"
#include "commands.hpp"
#include "csv_writer.hpp"
#include "csvw.hpp"
#include "input_check.hpp"
#include "progress.hpp"
#include "report/run_report_html.hpp"
#include "run_rejects.hpp"
#include "run_report.hpp"
#include "run_support.hpp"
#include "staged_run.hpp"

namespace tamis::cli {

CLI::App* add_run_command(CLI::App& app, RunArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "run",
      "Clean a CSV/TSV file with a recipe, unattended. The input is read with the recipe's input\n"
      "section (dialect, expected columns); a missing or renamed column stops the run (exit 3).\n"
      "The file is streamed in batches, so memory stays bounded by what the steps remember, and\n"
      "read again for each extra pass a step needs (standard input is spooled to a temporary file\n"
      "then). The output appears only when the run succeeds (temporary file, then rename); the\n"
      "input is never modified. Rows that cannot be used (malformed records, values that do not\n"
      "fit input.columns types, rows a step rejects) are counted against the rejects cap: above\n"
      "it the run stops with exit 3 and writes no output, but the rejects file, when asked for,\n"
      "is kept so the rows can be inspected. A require step with on_fail \"stop\" exits 1.\n"
      "The run reports (--report, --report-html) are written with the output, so only when the\n"
      "run succeeds: a failed require (exit 1) or a run over the rejects cap (exit 3) writes\n"
      "neither, since its counts would describe a run that did not finish; the error message\n"
      "names the step and the first failing row, and the rejects file, if asked for, is kept.\n"
      "Row accounting always balances: rows read = written + removed + rejected.\n"
      "Example: tamis run survey.recipe.json survey.csv -o clean.csv --report report.json");
  cmd->add_option("recipe", args.recipe, "Recipe file (JSON, tamis_recipe 1)")->required();
  cmd->add_option("input", args.input, "Input file ('-' for standard input)")->required();
  cmd->add_option("-o,--output", args.output, "Output file ('-' for standard output, the default)")
      ->capture_default_str();
  cmd->add_option("--report", args.report, "Write the run report (JSON) to this file");
  cmd->add_option("--report-html", args.report_html,
                  "Write the run report as one self-contained HTML page (per-step counts, charts of the\n"
                  "changes, removed rows with their source lines; no script, nothing fetched) to this file");
  cmd->add_option("--rejects", args.rejects, "Write rejected rows to this file (CSV: line,reason,record)");
  cmd->add_option("--metadata", args.metadata,
                  "Write W3C CSV on the Web (CSVW) metadata describing the output to this file (needs -o FILE)");
  cmd->add_option("--max-rejects", args.max_rejects,
                  "Rejected rows allowed: a count (25) or a share of the rows read (0.5%); "
                  "default input.max_rejects, else 0");
  cmd->add_option("--batch-rows", args.batch_rows,
                  "Testing aid: rows per batch (default 4096); results never depend on it");
  return cmd;
}

namespace {

// Standard input can be read once; a recipe with several passes needs it
// again. The first pass reads through this source, which copies every byte
// into a temporary file that the later passes read.
class Spool {
 public:
  static Result<std::shared_ptr<Spool>> make() {
    std::string pattern = (std::filesystem::temp_directory_path() / "tamis-stdin-XXXXXX").string();
    const int fd = mkstemp(pattern.data());
    if (fd < 0) return io_error(pattern, "cannot create a temporary file to spool standard input");
    auto spool = std::make_shared<Spool>();
    spool->path_ = pattern;
    spool->file_ = fdopen(fd, "wb");
    return spool;
  }
  ~Spool() {
    if (file_) std::fclose(file_);
    std::remove(path_.c_str());
  }
  Status copy(const char* bytes, size_t n) {
    if (file_ && std::fwrite(bytes, 1, n, file_) != n)
      return io_error(path_, "cannot spool standard input (disk full?)");
    return Ok{};
  }
  // The recipe needs one pass only: nothing has to be kept.
  void drop() {
    if (file_) std::fclose(file_);
    file_ = nullptr;
    std::remove(path_.c_str());
  }
  Status finish_writing() {
    const bool ok = std::fclose(file_) == 0;
    file_ = nullptr;
    if (!ok) return io_error(path_, "cannot spool standard input (disk full?)");
    return Ok{};
  }
  const std::string& path() const { return path_; }

 private:
  std::string path_;
  std::FILE* file_ = nullptr;
};

class SpoolingSource final : public ByteSource {
 public:
  SpoolingSource(std::unique_ptr<ByteSource> inner, std::shared_ptr<Spool> spool)
      : inner_(std::move(inner)), spool_(std::move(spool)) {}
  Result<size_t> read(char* buffer, size_t capacity) override {
    auto n = inner_->read(buffer, capacity);
    if (!n) return n;
    if (Status s = spool_->copy(buffer, *n); !s) return s.take_error();
    return n;
  }

 private:
  std::unique_ptr<ByteSource> inner_;
  std::shared_ptr<Spool> spool_;
};

Status write_text_file(const std::string& path, const std::string& text) {
  auto sink = open_file_sink(path);
  if (!sink) return sink.take_error();
  if (Status s = (*sink)->write(text); !s) return s;
  return (*sink)->commit();
}

Status write_json_file(const std::string& path, const nlohmann::ordered_json& doc) {
  return write_text_file(path, doc.dump(2) + "\n");
}

// The steps of the last pass in at most this many groups of neighbouring
// steps, one thread each: enough stages for the operating system to keep
// two cores busy, few enough that the batches in flight stay a handful.
constexpr size_t kStepThreads = 6;

std::vector<StagedRun::Stage> step_stages(RecipeRun& run) {
  std::vector<StagedRun::Stage> stages;
  const size_t steps = run.step_count();
  const size_t groups = std::min(steps, kStepThreads);
  for (size_t g = 0; g < groups; ++g) {
    const size_t first = steps * g / groups, end = steps * (g + 1) / groups;
    stages.push_back([&run, first, end](StagedBatch& batch) -> Status {
      for (size_t j = first; j < end; ++j) {
        auto next = run.apply_step(j, batch.table);
        if (!next) return next.take_error();
        batch.table = std::move(*next);
        run.take_rejected(j, batch.rejected);
      }
      return Ok{};
    });
  }
  return stages;
}

std::string metadata_url(const std::string& output, const std::string& metadata) {
  namespace fs = std::filesystem;
  const fs::path base = fs::absolute(fs::path(metadata)).parent_path();
  const fs::path relative = fs::absolute(fs::path(output)).lexically_relative(base);
  return relative.empty() ? fs::path(output).filename().generic_string() : relative.generic_string();
}

}  // namespace

int run_run(const RunArgs& args) {
  auto recipe = load_recipe_file(args.recipe);
  if (!recipe) return report_error(recipe.error());
  for (const std::string* path : {&args.output, &args.report, &args.report_html, &args.rejects, &args.metadata})
    if (!path->empty() && (same_file(args.input, *path) || same_file(args.recipe, *path)))
      return report_error(usage_error("'" + *path +
                                      "' is the input or the recipe; tamis never overwrites what it reads"));
  if (!args.metadata.empty() && args.output == "-")
    return report_error(usage_error("--metadata describes an output file: give -o FILE"));
  auto cap = RejectCap::parse(args.max_rejects.empty() ? recipe->input.max_rejects.value_or("0") : args.max_rejects);
  if (!cap) return report_error(cap.error());
  auto options = reading_options(recipe->input);
  if (!options) return report_error(options.error());
  options->lenient = true;
  // Far smaller than the reader's default: the last pass holds a batch in
  // every stage and between every two stages (staged_run.hpp), and 4096
  // rows keep that a few megabytes while a batch still fits a core's cache.
  options->batch_rows = args.batch_rows ? args.batch_rows : 4096;
  const std::string display = args.input == "-" ? "<stdin>" : args.input;

  auto source = open_file_source(args.input);
  if (!source) return report_error(source.error());
  std::shared_ptr<Spool> spool;
  if (args.input == "-") {
    auto made = Spool::make();
    if (!made) return report_error(made.error());
    spool = *made;
    source = std::unique_ptr<ByteSource>(new SpoolingSource(std::move(*source), spool));
  }
  // Records the reader sets aside arrive on the reading thread; they wait in
  // `rejects` until the batches around them have been processed, so the
  // rejects file stays in source-line order.
  RunRejects rejects(*recipe);
  bool last_pass = false;  // set before any reading thread starts
  auto on_reject = [&](const RejectedRecord& r) { return last_pass ? rejects.add_malformed(r) : Status(Ok{}); };
  auto opened = CsvReader::open(std::move(*source), display, *options, on_reject);
  if (!opened) return report_error(opened.error());
  std::unique_ptr<CsvReader> reader = std::move(*opened);
  auto check = InputCheck::make(recipe->input, reader->column_names(), display);
  if (!check) return report_error(check.error());
  auto compiled = compile_recipe(*recipe, check->schema());
  if (!compiled) {
    Error e = compiled.take_error();
    e.file = args.recipe;
    return report_error(e);
  }
  RecipeRun run(*compiled);
  const size_t passes = run.passes();
  if (spool && passes == 1) spool->drop();
  last_pass = passes == 1;

  // Later passes must read exactly what the first one did.
  CsvOptions fixed = *options;
  fixed.encoding = reader->report().encoding;
  fixed.delimiter = reader->report().delimiter;
  fixed.header = reader->report().header ? HeaderMode::yes : HeaderMode::no;
  auto reopen = [&]() -> Result<std::unique_ptr<CsvReader>> {
    auto again = open_file_source(spool ? spool->path() : args.input);
    if (!again) return again.take_error();
    return CsvReader::open(std::move(*again), display, fixed, on_reject);
  };

  std::vector<RemovedRow> failing;
  for (size_t pass = 0; pass + 1 < passes; ++pass) {
    if (pass > 0) {
      auto next = reopen();
      if (!next) return report_error(next.error());
      reader = std::move(*next);
    }
    Progress progress("pass " + std::to_string(pass + 1) + " of " + std::to_string(passes), reader->total_bytes());
    BatchPipeline batches(*reader, 2);
    for (;;) {
      auto batch = batches.next();
      if (!batch) return report_error(batch.error());
      if (!batch->has_value()) break;
      const Table prepared = check->apply(**batch, failing);
      failing.clear();
      if (Status s = run.observe(pass, prepared); !s) return report_error(s.error());
      progress.update(reader->bytes_read());
    }
    run.end_pass(pass);
    if (pass == 0 && spool)
      if (Status s = spool->finish_writing(); !s) return report_error(s.error());
  }
  if (passes > 1) {
    last_pass = true;
    auto next = reopen();
    if (!next) return report_error(next.error());
    reader = std::move(*next);
  }

  auto sink = open_file_sink(args.output);
  if (!sink) return report_error(sink.error());
  CsvWriteOptions write_options;
  write_options.delimiter = recipe->output.format == "tsv" ? '\t' : ',';
  write_options.null_marker = recipe->output.null_marker;
  write_options.date_format = recipe->output.date_format;
  auto writer = CsvWriter::make(**sink, write_options);
  if (!writer) return report_error(writer.error());
  std::vector<std::string_view> header;
  for (const ColumnSchema& c : compiled->output) header.push_back(c.name);
  if (Status s = writer->write_row(header); !s) return report_error(s.error());
  if (!args.rejects.empty())
    if (Status s = rejects.open(args.rejects); !s) return report_error(s.error());
  auto date_format = DateFormat::compile(recipe->output.date_format);
  if (!date_format) return report_error(date_format.error());
  NullTracker nulls(compiled->output, recipe->output.null_marker, *date_format);

  RunFacts facts;
  facts.recipe_file = args.recipe;
  facts.input_file = display;
  facts.output_file = args.output;
  facts.passes = passes;
  const char input_delimiter = reader->report().delimiter;
  auto over_cap = [&](uint64_t rows_read) -> int {
    if (Status s = rejects.commit(); !s) return report_error(s.error());
    Error error = cap->error(display, rejects.count(), rows_read, RemovedRow{rejects.first()->line, rejects.first()->reason});
    error.message += args.rejects.empty() ? "; use --rejects FILE to see every rejected row"
                                          : "; the rejected rows so far are in " + args.rejects;
    return report_error(error);
  };

  // A decimal's scale can depend on the data (parse_number without scale):
  // the columns written are the authority for the report and the metadata.
  std::optional<Schema> written_schema;
  Progress progress(passes > 1 ? "pass " + std::to_string(passes) + " of " + std::to_string(passes) : "running",
                    reader->total_bytes());
  {
    auto prepare = [&](StagedBatch& batch) -> Status {
      batch.table = check->apply(batch.raw, batch.failing);
      return Ok{};
    };
    StagedRun staged(*reader, prepare, step_stages(run));
    for (;;) {
      auto item = staged.next();
      if (!item) return report_error(item.error());
      if (!item->has_value()) break;
      StagedBatch& batch = **item;
      const Table& raw = batch.raw;
      facts.rows_failing_input_types += batch.failing.size();
      if (!batch.failing.empty() && !facts.first_failing_input_type_line)
        facts.first_failing_input_type_line = batch.failing.front().line;
      if (Status s = rejects.add_batch(raw, input_delimiter, batch.failing, std::move(batch.rejected)); !s)
        return report_error(s.error());
      // A count cap stops the run as soon as it is exceeded; a share can only be judged at the end.
      if (cap->count && cap->exceeded(rejects.count(), 0)) return over_cap(0);
      const Table& out = batch.table;
      if (Status s = writer->write_table(out); !s) return report_error(s.error());
      if (!args.metadata.empty()) nulls.observe(out);
      if (!written_schema) written_schema = schema_of(out);
      facts.rows_written += out.row_count();
      progress.update(batch.bytes_read);
    }
  }
  progress.finish();
  if (Status s = rejects.finish_input(); !s) return report_error(s.error());
  if (Status s = run.finish(); !s) return report_error(s.error());
  facts.read = reader->report();
  const RunTotals totals = run_totals(facts, run.changes());
  const uint64_t rejected = rejects.count();
  if (rejected != totals.rows_rejected)
    return report_error(input_error(display, 0,
                                    "the rejects file got " + std::to_string(rejected) + " rows, the steps counted " +
                                        std::to_string(totals.rows_rejected) +
                                        " (a defect in tamis; please report it)"));
  if (cap->exceeded(rejected, totals.rows_read)) return over_cap(totals.rows_read);
  if (Status s = check_row_accounting(*compiled, run.changes(), facts); !s) return report_error(s.error());

  if (Status s = writer->finish(); !s) return report_error(s.error());
  if (Status s = rejects.commit(); !s) return report_error(s.error());
  if (written_schema) compiled->output = *written_schema;
  if (!args.report.empty())
    if (Status s = write_json_file(args.report, run_report_json(*recipe, *compiled, run.changes(), facts)); !s)
      return report_error(s.error());
  if (!args.report_html.empty())
    if (Status s = write_text_file(args.report_html, run_report_html(*recipe, *compiled, run.changes(), facts)); !s)
      return report_error(s.error());
  std::vector<std::string> metadata_warnings;
  if (!args.metadata.empty()) {
    CsvwTable table;
    table.url = metadata_url(args.output, args.metadata);
    table.title = recipe->title;
    table.columns = compiled->output;
    table.required = nulls.required();
    table.delimiter = write_options.delimiter;
    table.null_marker = recipe->output.null_marker;
    table.date_format = recipe->output.date_format;
    table.line_terminator = write_options.line_ending;
    if (Status s = write_json_file(args.metadata, csvw_metadata(table, metadata_warnings)); !s)
      return report_error(s.error());
  }

  std::cerr << run_summary(*compiled, run.changes(), facts);
  for (const std::string& w : facts.read.warnings()) std::cerr << "warning: " << w << '\n';
  for (const std::string& w : metadata_warnings) std::cerr << "warning: " << w << '\n';
  if (rejected && args.rejects.empty()) std::cerr << "note: use --rejects FILE to keep the rejected rows\n";
  return 0;
}

}  // namespace tamis::cli
