// `tamis suggest`: a starter recipe from the findings, and the findings
// printout that `tamis profile --findings` shares.
#include <nlohmann/json.hpp>

#include <algorithm>
#include <iostream>

#include "commands.hpp"
#include "progress.hpp"
#include "recipe.hpp"
#include "run_support.hpp"
#include "utf8.hpp"

namespace tamis::cli {

CLI::App* add_suggest_command(CLI::App& app, SuggestArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "suggest",
      "Write a starter recipe for a CSV/TSV file from its findings (see 'tamis profile --findings').\n"
      "The input section records the file's detected dialect and columns. Safe fixes are enabled:\n"
      "trimming white space, turning blanks and placeholder texts into NULL, removing rows that\n"
      "exactly repeat an earlier row. Every other suggested step is written with \"enabled\": false\n"
      "and a note saying what a person must decide before enabling it.\n"
      "Example: tamis suggest export.csv -o export.recipe.json && tamis run export.recipe.json export.csv -o clean.csv");
  cmd->add_option("input", args.input, "Input file ('-' for standard input)")->required();
  cmd->add_option("-o,--output", args.output, "Recipe file to write ('-' for standard output)")->required();
  cmd->add_option("--title", args.title, "Recipe title (default: derived from the file name)");
  cmd->add_option("--missing-text", args.sentinels,
                  "Texts that stand for a missing value, compared ignoring case and surrounding white space;\n"
                  "repeat the option for each (default: NULL, N/A, -, none, ?)");
  cmd->add_flag("--strict", args.strict, "Stop at the first malformed record (exit 3)");
  args.reading.add_to(*cmd);
  return cmd;
}

std::vector<Finding> scan_findings(const Table& table, const TableProfile& profile, const FindingOptions& options) {
  FindingScanner scanner(table, profile, options);
  Progress progress("finding problems", 1000);
  while (!scanner.step(std::max<size_t>(1, table.row_count() * table.column_count())))
    progress.update(static_cast<uint64_t>(scanner.progress() * 1000));
  return scanner.result();
}

nlohmann::ordered_json findings_json(const std::vector<Finding>& findings) {
  nlohmann::ordered_json out = nlohmann::ordered_json::array();
  for (const Finding& f : findings) out.push_back(finding_to_json(f));
  return out;
}

void print_findings(std::ostream& out, const std::vector<Finding>& findings) {
  out << "\nFindings (" << findings.size() << "), most rows affected first\n";
  if (findings.empty()) out << "  none: no problem of the kinds tamis looks for\n";
  for (size_t i = 0; i < findings.size(); ++i) {
    const Finding& f = findings[i];
    out << '\n' << i + 1 << ". " << f.title << "  [" << f.kind << ", " << f.rows_affected << " rows]\n";
    out << "   " << f.explanation << '\n';
    for (const std::string& d : f.details) out << "   - " << d << '\n';
    for (size_t k = 0; k < f.fixes.size(); ++k) {
      const SuggestedFix& fix = f.fixes[k];
      out << "   " << (k == 0 ? "fix" : "or") << (fix.safe ? " (safe): " : " (needs review): ") << fix.step.dump()
          << '\n';
      if (!fix.safe) out << "     why review: " << fix.why_review << '\n';
      out << "     preview: " << fix.preview.cells_changed << " cells changed, " << fix.preview.rows_removed
          << " rows removed\n";
      for (const FixExample& e : fix.preview.examples) {
        out << "       line " << e.source_line << ": ";
        if (e.removed) out << "removed  " << e.before << '\n';
        else out << e.column << " " << nlohmann::json(e.before).dump() << " → " << nlohmann::json(e.after).dump() << '\n';
      }
      for (const std::string& w : fix.preview.warnings) out << "       warning: " << w << '\n';
    }
  }
}

namespace {

std::string default_title(const std::string& input) {
  if (input == "-") return "Starter recipe";
  const size_t slash = input.find_last_of('/');
  return "Starter recipe for " + input.substr(slash == std::string::npos ? 0 : slash + 1);
}

size_t kind_order(const std::string& kind) {
  const auto kinds = finding_kinds();
  for (size_t i = 0; i < kinds.size(); ++i)
    if (kinds[i].kind == kind) return i;
  return kinds.size();
}

// The findings' fixes as recipe steps, in the order the detector table gives
// (the order each fix was previewed in), then by column position.
nlohmann::ordered_json recipe_steps(std::vector<Finding> findings, const std::vector<std::string>& columns) {
  const auto position = [&](const Finding& f) {
    if (f.columns.empty()) return columns.size();
    return static_cast<size_t>(std::find(columns.begin(), columns.end(), f.columns.front()) - columns.begin());
  };
  std::stable_sort(findings.begin(), findings.end(), [&](const Finding& a, const Finding& b) {
    const size_t ka = kind_order(a.kind), kb = kind_order(b.kind);
    return ka != kb ? ka < kb : position(a) < position(b);
  });
  nlohmann::ordered_json steps = nlohmann::ordered_json::array();
  for (const Finding& f : findings)
    for (size_t k = 0; k < f.fixes.size(); ++k) {
      const SuggestedFix& fix = f.fixes[k];
      nlohmann::ordered_json step = fix.step;
      const std::string note = step.value("note", std::string());
      if (fix.safe) {
        step["note"] = note + " (" + f.title + ")";
      } else {
        step["enabled"] = false;
        std::string why = "needs a decision: " + fix.why_review + " (" + f.title;
        if (k > 0) why += "; an alternative to the step above";
        step["note"] = note + ". " + why + ")";
      }
      steps.push_back(std::move(step));
    }
  return steps;
}

}  // namespace

int run_suggest(const SuggestArgs& args) {
  auto options = args.reading.to_csv_options();
  if (!options) return report_error(options.error());
  options->lenient = !args.strict;
  if (args.output != "-" && same_file(args.input, args.output))
    return report_error(usage_error("'" + args.output + "' is the input; tamis never overwrites what it reads"));
  ReadReport report;
  std::string display;
  Result<Table> table = read_whole_file(args.input, *options, report, display);
  if (!table) return report_error(table.error());
  for (const std::string& w : report.warnings()) std::cerr << "tamis: warning: " << w << '\n';
  const TableProfile profile = profile_with_progress(*table);
  FindingOptions finding_options;
  if (!args.sentinels.empty()) finding_options.sentinels = args.sentinels;
  const std::vector<Finding> findings = scan_findings(*table, profile, finding_options);

  nlohmann::ordered_json doc;
  doc["tamis_recipe"] = 1;
  doc["title"] = args.title.empty() ? default_title(args.input) : args.title;
  nlohmann::ordered_json input;
  input["format"] = report.delimiter == '\t' ? "tsv" : "csv";
  input["delimiter"] = std::string(1, report.delimiter);
  input["quoteChar"] = std::string(1, options->quote);
  input["encoding"] = std::string(encoding_name(report.encoding));
  input["header"] = report.header;
  input["skipRows"] = options->skip_rows;
  input["columns"] = nlohmann::ordered_json::array();
  for (const std::string& name : table->names()) input["columns"].push_back({{"name", name}, {"type", "text"}});
  input["unknown_columns"] = "fail";
  doc["input"] = std::move(input);
  doc["steps"] = recipe_steps(findings, table->names());
  doc["output"] = {{"format", "csv"}, {"null", ""}, {"date_format", "%Y-%m-%d"}};
  const std::string text = doc.dump(2) + "\n";

  // The recipe must load and its enabled steps compile against the file's
  // columns; anything else is a bug here, better reported than written.
  auto recipe = parse_recipe(text, args.output);
  if (!recipe) return report_error(recipe.error());
  if (auto compiled = compile_recipe(*recipe, schema_of(*table)); !compiled) return report_error(compiled.error());

  auto sink = open_file_sink(args.output);
  if (!sink) return report_error(sink.error());
  if (Status s = (*sink)->write(text); !s) return report_error(s.error());
  if (Status s = (*sink)->commit(); !s) return report_error(s.error());
  size_t enabled = 0;
  for (const RecipeStep& s : recipe->steps) enabled += s.enabled;
  std::cerr << "tamis: " << findings.size() << " findings; wrote " << recipe->steps.size() << " steps (" << enabled
            << " enabled, " << recipe->steps.size() - enabled << " waiting for a decision) to "
            << (args.output == "-" ? std::string("standard output") : args.output) << '\n';
  return 0;
}

}  // namespace tamis::cli
