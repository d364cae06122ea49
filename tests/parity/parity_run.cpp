// The engine's own test driver for the parity check (parity_check.py): it
// replays recipes over CSV files with the engine code `tamis run` uses
// (recipe loading, the input check, RecipeRun pass by pass and step by step,
// the CSV writer, the rejects file, the JSON run report) on one thread, so
// the same program builds natively and for WebAssembly, where node runs it.
//
//   tamis_parity_run --ops    prints the registered step ops, one a line
//   tamis_parity_run JOBS     runs every job of the file JOBS: one a line,
//                             "RECIPE<tab>INPUT<tab>PREFIX"
// A job writes PREFIX.csv (the output), PREFIX.rejects.csv and
// PREFIX.report.json, or, when the run stops, PREFIX.error: the exit code
// `tamis run` would give ("exit 1") and the error.
// One process runs all jobs: starting node costs far more than a small run.
// Unlike `tamis run`, the cap on rejected rows is not applied: every
// rejected row goes to the rejects file, where it is compared.
#include <fstream>
#include <iostream>
#include <string>
#include <vector>

#include "byte_io.hpp"
#include "csv_writer.hpp"
#include "input_check.hpp"
#include "recipe.hpp"
#include "run_rejects.hpp"
#include "run_report.hpp"
#include "steps/registry.hpp"

using namespace tamis;

namespace {

struct Job {
  std::string recipe;
  std::string input;
  std::string prefix;
};

Status write_text_file(const std::string& path, const std::string& text) {
  auto sink = open_file_sink(path);
  if (!sink) return sink.take_error();
  if (Status s = (*sink)->write(text); !s) return s;
  return (*sink)->commit();
}

// Opens the input for each pass of a recipe; later passes read it with the
// dialect the first one detected.
class Passes {
 public:
  Passes(const Job& job, CsvOptions options, CsvReader::RejectSink on_reject)
      : job_(job), options_(std::move(options)), on_reject_(std::move(on_reject)) {}

  Result<std::unique_ptr<CsvReader>> open() {
    auto source = open_file_source(job_.input);
    if (!source) return source.take_error();
    auto reader = CsvReader::open(std::move(*source), job_.input, options_, on_reject_);
    if (!reader) return reader;
    // Later passes must read exactly what the first one did (as `tamis run`).
    options_.encoding = (*reader)->report().encoding;
    options_.delimiter = (*reader)->report().delimiter;
    options_.header = (*reader)->report().header ? HeaderMode::yes : HeaderMode::no;
    return reader;
  }

 private:
  const Job& job_;
  CsvOptions options_;
  CsvReader::RejectSink on_reject_;
};

// The last pass: applies the steps batch by batch, one step at a time as
// `tamis run` does, and writes the output, the rejects and the report.
Status last_pass(const Job& job, const Recipe& recipe, CompiledRecipe& compiled, RecipeRun& run,
                 const InputCheck& check, CsvReader& reader, RunRejects& rejects) {
  auto sink = open_file_sink(job.prefix + ".csv");
  if (!sink) return sink.take_error();
  CsvWriteOptions write_options;
  write_options.delimiter = recipe.output.format == "tsv" ? '\t' : ',';
  write_options.null_marker = recipe.output.null_marker;
  write_options.date_format = recipe.output.date_format;
  auto writer = CsvWriter::make(**sink, write_options);
  if (!writer) return writer.take_error();
  std::vector<std::string_view> header;
  for (const ColumnSchema& c : compiled.output) header.push_back(c.name);
  if (Status s = writer->write_row(header); !s) return s;
  if (Status s = rejects.open(job.prefix + ".rejects.csv"); !s) return s;

  RunFacts facts;
  facts.recipe_file = job.recipe;
  facts.input_file = job.input;
  facts.output_file = "output.csv";  // the same name in both builds
  facts.passes = run.passes();
  std::optional<Schema> written_schema;
  while (true) {
    auto batch = reader.next_batch();
    if (!batch) return batch.take_error();
    if (!batch->has_value()) break;
    const Table& raw = **batch;
    std::vector<RemovedRow> failing;
    Result<Table> table = check.apply(raw, failing);
    facts.rows_failing_input_types += failing.size();
    if (!failing.empty() && !facts.first_failing_input_type_line)
      facts.first_failing_input_type_line = failing.front().line;
    std::vector<RecipeRun::Rejected> rejected;
    for (size_t j = 0; j < run.step_count(); ++j) {
      table = run.apply_step(j, *table);
      if (!table) return table.take_error();
      run.take_rejected(j, rejected);
    }
    if (Status s = rejects.add_batch(raw, reader.report().delimiter, failing, std::move(rejected)); !s) return s;
    if (Status s = writer->write_table(*table); !s) return s;
    if (!written_schema) written_schema = schema_of(*table);
    facts.rows_written += table->row_count();
  }
  if (Status s = rejects.finish_input(); !s) return s;
  if (Status s = run.finish(); !s) return s;
  facts.read = reader.report();
  if (Status s = check_row_accounting(compiled, run.changes(), facts); !s) return s;
  if (Status s = writer->finish(); !s) return s;
  if (Status s = rejects.commit(); !s) return s;
  if (written_schema) compiled.output = *written_schema;
  return write_text_file(job.prefix + ".report.json",
                         run_report_json(recipe, compiled, run.changes(), facts).dump(2) + "\n");
}

Status run_job(const Job& job) {
  auto recipe = load_recipe_file(job.recipe);
  if (!recipe) return recipe.take_error();
  auto options = reading_options(recipe->input);
  if (!options) return options.take_error();
  options->lenient = true;
  options->batch_rows = 4096;  // as `tamis run`; results never depend on it
  RunRejects rejects(*recipe);
  bool in_last_pass = false;
  Passes input(job, *options, [&](const RejectedRecord& r) {
    return in_last_pass ? rejects.add_malformed(r) : Status(Ok{});
  });
  auto reader = input.open();
  if (!reader) return reader.take_error();
  auto check = InputCheck::make(recipe->input, (*reader)->column_names(), job.input);
  if (!check) return check.take_error();
  auto compiled = compile_recipe(*recipe, check->schema());
  if (!compiled) return compiled.take_error();
  RecipeRun run(*compiled);
  const size_t passes = run.passes();
  in_last_pass = passes == 1;
  for (size_t pass = 0; pass + 1 < passes; ++pass) {
    if (pass > 0 && !(reader = input.open())) return reader.take_error();
    std::vector<RemovedRow> failing;
    while (true) {
      auto batch = (*reader)->next_batch();
      if (!batch) return batch.take_error();
      if (!batch->has_value()) break;
      const Table prepared = check->apply(**batch, failing);
      failing.clear();  // counted in the last pass
      if (Status s = run.observe(pass, prepared); !s) return s;
    }
    run.end_pass(pass);
  }
  if (passes > 1) {
    in_last_pass = true;
    if (!(reader = input.open())) return reader.take_error();
  }
  return last_pass(job, *recipe, *compiled, run, *check, **reader, rejects);
}

Result<std::vector<Job>> read_jobs(const std::string& path) {
  std::ifstream in(path);
  if (!in) return io_error(path, "cannot read the job list");
  std::vector<Job> jobs;
  std::string line;
  for (uint64_t number = 1; std::getline(in, line); ++number) {
    const size_t a = line.find('\t'), b = a == std::string::npos ? a : line.find('\t', a + 1);
    if (b == std::string::npos) return input_error(path, number, "expected RECIPE<tab>INPUT<tab>PREFIX");
    jobs.push_back({line.substr(0, a), line.substr(a + 1, b - a - 1), line.substr(b + 1)});
  }
  return jobs;
}

}  // namespace

int main(int argc, char** argv) {
  const std::vector<std::string> args(argv + 1, argv + argc);
  if (args.size() == 1 && args[0] == "--ops") {
    for (const StepKind& kind : step_kinds()) std::cout << kind.op << '\n';
    return 0;
  }
  if (args.size() != 1) {
    std::cerr << "usage: tamis_parity_run --ops | tamis_parity_run JOBS\n";
    return 2;
  }
  auto jobs = read_jobs(args[0]);
  if (!jobs) {
    std::cerr << jobs.error().to_string() << '\n';
    return exit_code(jobs.error().kind);
  }
  for (const Job& job : *jobs) {
    const Status s = run_job(job);
    if (s) continue;
    const std::string text = "exit " + std::to_string(exit_code(s.error().kind)) + "\n" + s.error().to_string() + "\n";
    if (Status written = write_text_file(job.prefix + ".error", text); !written) {
      std::cerr << written.error().to_string() << '\n';
      return exit_code(written.error().kind);
    }
  }
  std::cout << jobs->size() << " jobs run\n";
  return 0;
}
