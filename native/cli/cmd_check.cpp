#include <iostream>

#include "batch_pipeline.hpp"
#include "commands.hpp"
#include "dates.hpp"
#include "input_check.hpp"
#include "progress.hpp"
#include "run_report.hpp"
#include "run_support.hpp"

namespace tamis::cli {

CLI::App* add_check_command(CLI::App& app, CheckArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "check",
      "Validate a recipe without running it or writing anything: the JSON, every key and value,\n"
      "and every enabled step against the columns it will see. Without IN the columns come from\n"
      "the recipe's input.columns (a recipe without them is checked as far as that allows).\n"
      "With IN the file is read once: its columns must match the input section (exit 3 if one is\n"
      "missing or unexpected), every step must compile against them, and the malformed records\n"
      "and values that do not fit input.columns types must stay within the rejects cap.\n"
      "Exit codes: 0 valid, 2 the recipe is invalid, 3 the file does not fit it, 4 I/O error.\n"
      "Example: tamis check survey.recipe.json next_month.csv");
  cmd->add_option("recipe", args.recipe, "Recipe file (JSON, tamis_recipe 1)")->required();
  cmd->add_option("input", args.input, "A file the recipe should accept ('-' for standard input)");
  cmd->add_option("--max-rejects", args.max_rejects,
                  "Rejected rows allowed: a count or a share (0.5%); default input.max_rejects, else 0");
  return cmd;
}

namespace {

Status check_output_section(const Recipe& recipe) {
  auto date_format = DateFormat::compile(recipe.output.date_format);
  if (!date_format) {
    Error e = date_format.take_error();
    e.kind = ErrorKind::usage;
    e.message = "output.date_format: " + e.message;
    return e;
  }
  return Ok{};
}

Schema declared_schema(const Recipe& recipe) {
  Schema schema;
  for (const InputColumn& c : recipe.input.columns) schema.push_back({c.name, Type::text, 0});
  return schema;
}

}  // namespace

int run_check(const CheckArgs& args) {
  auto recipe = load_recipe_file(args.recipe);
  if (!recipe) return report_error(recipe.error());
  if (Status s = check_output_section(*recipe); !s) return report_error(s.error());
  auto cap = RejectCap::parse(args.max_rejects.empty() ? recipe->input.max_rejects.value_or("0") : args.max_rejects);
  if (!cap) return report_error(cap.error());
  size_t enabled = 0;
  for (const RecipeStep& s : recipe->steps) enabled += s.enabled;

  if (args.input.empty()) {
    if (recipe->input.columns.empty()) {
      std::cout << args.recipe << ": valid recipe format, " << recipe->steps.size()
                << " steps; the steps were not checked against columns (the recipe lists no input.columns; "
                   "give a file to check them)\n";
      return 0;
    }
    auto compiled = compile_recipe(*recipe, declared_schema(*recipe));
    if (!compiled) {
      Error e = compiled.take_error();
      e.file = args.recipe;
      return report_error(e);
    }
    std::cout << args.recipe << ": valid; " << enabled << " of " << recipe->steps.size()
              << " steps enabled, all compile against the " << recipe->input.columns.size()
              << " columns in input.columns\n";
    return 0;
  }

  auto options = reading_options(recipe->input);
  if (!options) return report_error(options.error());
  options->lenient = true;
  const std::string display = args.input == "-" ? "<stdin>" : args.input;
  auto source = open_file_source(args.input);
  if (!source) return report_error(source.error());
  // Counted on the reading thread, read after it has joined.
  uint64_t malformed = 0;
  std::optional<RejectedRecord> first_malformed;
  auto reader = CsvReader::open(std::move(*source), display, *options, [&](const RejectedRecord& r) {
    if (!malformed++) first_malformed = r;
    return Status(Ok{});
  });
  if (!reader) return report_error(reader.error());
  auto check = InputCheck::make(recipe->input, (*reader)->column_names(), display);
  if (!check) return report_error(check.error());
  auto compiled = compile_recipe(*recipe, check->schema());
  if (!compiled) {
    Error e = compiled.take_error();
    e.file = args.recipe;
    return report_error(e);
  }
  std::vector<RemovedRow> failing;
  uint64_t failing_count = 0;
  std::optional<RemovedRow> first_failing;
  {
    Progress progress("checking", (*reader)->total_bytes());
    BatchPipeline batches(**reader, 2);
    for (;;) {
      auto batch = batches.next();
      if (!batch) return report_error(batch.error());
      if (!batch->has_value()) break;
      failing.clear();
      check->apply(**batch, failing);  // only the failing rows matter here
      if (!failing.empty() && !first_failing) first_failing = failing.front();
      failing_count += failing.size();
      progress.update((*reader)->bytes_read());
    }
  }
  const ReadReport& report = (*reader)->report();
  const uint64_t rows_read = report.rows + report.rejected;
  const uint64_t rejected = malformed + failing_count;
  for (const std::string& w : report.warnings()) std::cerr << "warning: " << w << '\n';
  if (cap->exceeded(rejected, rows_read)) {
    std::string message = std::to_string(rejected) + " of " + std::to_string(rows_read) +
                          " rows would be rejected, more than the cap of " + cap->text + ":";
    if (first_malformed)
      message += " " + std::to_string(malformed) + " malformed (first: line " + std::to_string(first_malformed->line) +
                 ": " + first_malformed->reason + ")";
    if (first_failing)
      message += std::string(first_malformed ? ";" : "") + " " + std::to_string(failing_count) +
                 " with values that do not fit input.columns (first: line " + std::to_string(first_failing->line) +
                 ": " + first_failing->reason + ")";
    return report_error(input_error(display, 0, message));
  }
  std::cout << args.recipe << ": valid; " << enabled << " of " << recipe->steps.size()
            << " steps enabled, all compile against " << display << " (" << check->schema().size() << " columns, "
            << rows_read << " rows";
  if (rejected) std::cout << ", " << rejected << " would be rejected, within the cap of " << cap->text;
  std::cout << ")\n";
  return 0;
}

}  // namespace tamis::cli
