#include "exports.hpp"

#include "csv_writer.hpp"
#include "run_rejects.hpp"
#include "run_report.hpp"

namespace tamis::workbench {

namespace {

// tamis run would stop on these; the workbench refuses to export a result
// the batch runner would not produce.
Status ready_for_export(Document& document) {
  document.result();
  const auto problems = document.problems();
  if (problems.empty()) return Ok{};
  const StepProblem& p = problems.front();
  std::string where = p.step ? "step " + std::to_string(*p.step + 1) : std::string("the input section");
  Error e = usage_error("the recipe does not fit this file yet (" + where + "): " + p.message);
  if (p.step) e.step = static_cast<int>(*p.step);
  return e;
}

// What `tamis run` would count for this recipe over this file.
RunFacts run_facts(Document& document, const std::string& output_name) {
  RunFacts facts;
  facts.recipe_file = document.recipe().title.empty() ? "workbench recipe" : document.recipe().title;
  facts.input_file = document.file().name;
  facts.output_file = output_name;
  facts.read = document.file().read;
  facts.rows_failing_input_types = document.input_rejected_rows();
  if (!document.input_rejects().empty()) facts.first_failing_input_type_line = document.input_rejects().front().line;
  facts.rows_written = document.result().row_count();
  return facts;
}

// The first rejected row as `tamis run` names it: a malformed record, a
// value not fitting input.columns, or a row a step rejected.
RemovedRow first_reject(Document& document) {
  std::optional<RemovedRow> first;
  auto consider = [&](uint64_t line, std::string reason) {
    if (!first || line < first->line) first = RemovedRow{line, std::move(reason)};
  };
  if (!document.file().rejected.empty())
    consider(document.file().rejected.front().line, malformed_reason(document.file().rejected.front().reason));
  if (!document.input_rejects().empty())
    consider(document.input_rejects().front().line, input_reason(document.input_rejects().front().reason));
  for (size_t i = 0; i < document.step_count(); ++i) {
    ChangeRecord change = document.change(i);
    const std::vector<RemovedRow> rejected = change.take_rejected();
    if (!rejected.empty())
      consider(rejected.front().line, step_reason(document.recipe(), static_cast<int>(i), rejected.front().reason));
  }
  return first.value_or(RemovedRow{});
}

// `tamis run` writes nothing when more rows are rejected than
// input.max_rejects allows; neither does the export.
Status within_reject_cap(Document& document) {
  auto cap = RejectCap::of(document.recipe().input);
  if (!cap) return cap.take_error();
  std::vector<ChangeRecord> changes;
  for (size_t i = 0; i < document.step_count(); ++i) changes.push_back(document.change(i));
  const RunTotals totals = run_totals(run_facts(document, ""), changes);
  if (!cap->exceeded(totals.rows_rejected, totals.rows_read)) return Ok{};
  return cap->error(document.file().name, totals.rows_rejected, totals.rows_read, first_reject(document));
}

}  // namespace

Result<std::string> export_cleaned(Document& document, std::optional<std::string> format) {
  if (Status s = ready_for_export(document); !s) return s.take_error();
  if (Status s = within_reject_cap(document); !s) return s.take_error();
  const Recipe& recipe = document.recipe();
  const std::string chosen = format.value_or(recipe.output.format);
  if (chosen != "csv" && chosen != "tsv") return usage_error("export format must be csv or tsv, not '" + chosen + "'");
  MemorySink sink;
  CsvWriteOptions options;
  options.delimiter = chosen == "tsv" ? '\t' : ',';
  options.null_marker = recipe.output.null_marker;
  options.date_format = recipe.output.date_format;
  auto writer = CsvWriter::make(sink, options);
  if (!writer) return writer.take_error();
  const Table& result = document.result();
  std::vector<std::string_view> header(result.names().begin(), result.names().end());
  if (Status s = writer->write_row(header); !s) return s.take_error();
  if (Status s = writer->write_table(result); !s) return s.take_error();
  if (Status s = writer->finish(); !s) return s.take_error();
  return std::move(sink.data);
}

std::string export_recipe(const Document& document) { return recipe_to_json(document.recipe()); }

Result<std::string> export_sql_script(const Document& document, Dialect dialect, bool allow_approximate) {
  SqlExportOptions options;
  options.dialect = dialect;
  options.allow_approximate = allow_approximate;
  return export_sql(document.recipe(), options);
}

Result<std::string> export_run_report(Document& document, const std::string& output_name) {
  if (Status s = ready_for_export(document); !s) return s.take_error();
  auto compiled = compile_recipe(document.recipe(), schema_of(document.table_at(0)));
  if (!compiled) return compiled.take_error();
  std::vector<ChangeRecord> changes;
  for (const CompiledStep& step : compiled->steps) changes.push_back(document.change(static_cast<size_t>(step.index)));
  compiled->output = schema_of(document.result());
  RunFacts facts = run_facts(document, output_name);
  facts.passes = RecipeRun(*compiled).passes();
  return run_report_json(document.recipe(), *compiled, changes, facts).dump(2) + "\n";
}

}  // namespace tamis::workbench
