#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <iostream>

#include "byte_io.hpp"
#include "commands.hpp"
#include "progress.hpp"
#include "similar/similar_values.hpp"
#include "utf8.hpp"

namespace tamis::cli {

CLI::App* add_similar_command(CLI::App& app, SimilarArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "similar",
      "Group the distinct values of one column into sets that probably mean the same thing (variant\n"
      "spellings), with their counts, a suggested canonical value (the most frequent; on a tie the\n"
      "fullest spelling) and each member's similarity to it. -o writes the groups as a recipe with\n"
      "one map_values step that replaces every variant by its canonical value.\n"
      "Methods:\n"
      "  token_key     equal after case folding, removing accents and punctuation, sorting the words\n"
      "  soundex       words sound alike (American Soundex of each word)\n"
      "  levenshtein   1 - edits / longer length >= threshold (insert, delete, substitute)\n"
      "  osa           the same, a swap of two neighbouring characters counting as one edit\n"
      "  jaro_winkler  Jaro-Winkler similarity >= threshold (favours a shared beginning)\n"
      "  qgram         Dice coefficient of the three-character pieces >= threshold\n"
      "The similarity methods ignore case, accents and white space runs; token_key and soundex\n"
      "ignore the threshold. Values that are only white space or punctuation are not grouped.\n"
      "Examples:\n"
      "  tamis similar survey.csv --column species\n"
      "  tamis similar survey.csv --column district --method jaro_winkler --threshold 0.9 -o merge.json\n"
      "  tamis run merge.json survey.csv -o clean.csv");
  cmd->add_option("input", args.input, "Input file ('-' for standard input)")->required();
  cmd->add_option("--column", args.column, "The column whose values to group (its header name)")->required();
  cmd->add_option("--method", args.method,
                  "token_key, soundex, levenshtein, osa, jaro_winkler or qgram (see above)")
      ->capture_default_str();
  cmd->add_option("--threshold", args.threshold,
                  "Lowest similarity, from 0 to 1, at which two values count as the same (similarity "
                  "methods only)")
      ->capture_default_str();
  cmd->add_flag("--json", args.json, "Print the groups as one JSON object instead of the readable list");
  cmd->add_option("-o,--output", args.output,
                  "Write a recipe with the map_values step for all groups to this file ('-' for standard "
                  "output); run it with `tamis run`");
  args.reading.add_to(*cmd);
  return cmd;
}

namespace {

std::string method_list() {
  std::string out;
  for (const SimilarMethod m : all_similar_methods()) {
    if (!out.empty()) out += ", ";
    out += similar_method_name(m);
  }
  return out;
}

std::string score_text(double score) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.3f", score);
  return buffer;
}

// A value in double quotes with line breaks and tabs shown as escapes, so
// white space at either end stays visible.
std::string shown_value(std::string_view v) {
  std::string out = "\"";
  for (size_t i = 0; i < v.size();) {
    const size_t start = i;
    const char32_t c = utf8::next(v, i);
    if (c == '\n') out += "\\n";
    else if (c == '\r') out += "\\r";
    else if (c == '\t') out += "\\t";
    else if (c == 0xA0) out += "\\u00a0";
    else out.append(v.substr(start, i - start));
  }
  out += '"';
  return out;
}

nlohmann::ordered_json groups_json(const std::string& file, const std::string& column, const SimilarOptions& options,
                                   const SimilarValueGrouper& grouper) {
  using json = nlohmann::ordered_json;
  json out;
  out["file"] = file;
  out["column"] = column;
  out["method"] = std::string(similar_method_name(options.method));
  out["threshold"] = is_key_method(options.method) ? json(nullptr) : json(options.threshold);
  const SimilarStats& s = grouper.stats();
  out["stats"] = {{"distinct_values", s.values},        {"ungrouped_values", s.ungrouped},
                  {"forms", s.forms},                   {"candidate_pairs", s.candidate_pairs},
                  {"compared_pairs", s.compared_pairs}, {"similar_pairs", s.similar_pairs},
                  {"block_overflows", s.block_overflows}};
  out["groups"] = json::array();
  for (const SimilarGroup& g : grouper.result()) {
    json group;
    group["canonical"] = g.canonical;
    group["rows"] = g.rows;
    group["members"] = json::array();
    for (const SimilarMember& m : g.members)
      group["members"].push_back({{"value", m.value}, {"count", m.count}, {"score", m.score}});
    out["groups"].push_back(std::move(group));
  }
  return out;
}

void print_readable(const std::string& file, const std::string& column, const SimilarOptions& options,
                    const SimilarValueGrouper& grouper) {
  const auto& groups = grouper.result();
  uint64_t rows = 0;
  for (const SimilarGroup& g : groups) rows += g.rows;
  std::cout << file << ": column " << shown_value(column) << ", " << grouper.stats().values << " distinct values; method "
            << similar_method_name(options.method);
  if (!is_key_method(options.method)) std::cout << ", threshold " << options.threshold;
  std::cout << "\n" << groups.size() << (groups.size() == 1 ? " group" : " groups") << "; mapping every variant to its "
            << "canonical value would change " << rows << (rows == 1 ? " row" : " rows") << ".\n";
  for (const SimilarGroup& g : groups) {
    std::cout << '\n' << shown_value(g.canonical) << "  (" << g.members.size() << " spellings, " << g.rows
              << (g.rows == 1 ? " row" : " rows") << " to change)\n";
    for (const SimilarMember& m : g.members) {
      std::cout << (m.value == g.canonical ? "  = " : "  ~ ") << shown_value(m.value) << "  ×" << m.count;
      if (m.value != g.canonical) std::cout << "  score " << score_text(m.score);
      std::cout << '\n';
    }
  }
}

Status write_step_recipe(const std::string& path, const std::string& column, const SimilarOptions& options,
                         const std::vector<SimilarGroup>& groups) {
  nlohmann::ordered_json step = map_values_step(column, groups);
  std::string note = "variant spellings found by `tamis similar` (method ";
  note += similar_method_name(options.method);
  if (!is_key_method(options.method)) note += ", threshold " + score_text(options.threshold);
  note += "); check each mapping before running";
  step["note"] = note;
  nlohmann::ordered_json recipe;
  recipe["tamis_recipe"] = 1;
  recipe["title"] = "Merge variant spellings in " + column;
  recipe["steps"] = nlohmann::ordered_json::array({step});
  auto sink = open_file_sink(path);
  if (!sink) return sink.take_error();
  if (Status s = (*sink)->write(recipe.dump(2) + "\n"); !s) return s;
  return (*sink)->commit();
}

}  // namespace

int run_similar(const SimilarArgs& args) {
  const std::optional<SimilarMethod> method = parse_similar_method(args.method);
  if (!method) {
    std::string message = "unknown --method '";
    message += args.method;
    message += "'; expected one of ";
    message += method_list();
    return report_error(usage_error(message));
  }
  if (!(args.threshold >= 0.0 && args.threshold <= 1.0))
    return report_error(usage_error("--threshold must be a number from 0 to 1 (a similarity), got " +
                                    score_text(args.threshold)));
  const SimilarOptions options{*method, args.threshold};
  auto csv = args.reading.to_csv_options();
  if (!csv) return report_error(csv.error());
  csv->lenient = true;
  ReadReport report;
  std::string display;
  Result<Table> table = read_whole_file(args.input, *csv, report, display);
  if (!table) return report_error(table.error());
  const std::optional<size_t> column = table->find(args.column);
  if (!column) {
    std::string message = "no column named ";
    message += shown_value(args.column);
    message += " in " + display + "; its columns are ";
    for (size_t c = 0; c < table->column_count(); ++c) {
      if (c > 0) message += ", ";
      message += shown_value(table->name(c));
    }
    return report_error(usage_error(message));
  }
  if (report.rejected > 0)
    std::cerr << "tamis: warning: " << report.rejected << " malformed records were skipped\n";
  SimilarValueGrouper grouper(distinct_values(*table, *column), options);
  {
    Progress progress("grouping", 1000);
    while (!grouper.step(1 << 16)) progress.update(static_cast<uint64_t>(grouper.progress() * 1000));
  }
  if (args.json) std::cout << groups_json(display, args.column, options, grouper).dump(2) << '\n';
  else print_readable(display, args.column, options, grouper);
  if (!args.output.empty()) {
    if (grouper.result().empty()) {
      std::cerr << "tamis: no similar values found, so no recipe was written to " << args.output << '\n';
      return 0;
    }
    if (Status s = write_step_recipe(args.output, args.column, options, grouper.result()); !s)
      return report_error(s.error());
  }
  return 0;
}

}  // namespace tamis::cli
