#include <nlohmann/json.hpp>

#include <cstdlib>
#include <iomanip>
#include <iostream>
#include <sstream>

#include "commands.hpp"
#include "profile.hpp"
#include "report/profile_html.hpp"
#include "run_support.hpp"
#include "utf8.hpp"

namespace tamis::cli {

CLI::App* add_profile_command(CLI::App& app, ProfileArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "profile",
      "Describe every column of a CSV/TSV file: inferred type and how many values fit it, NULLs,\n"
      "blanks, distinct values, range, mean, standard deviation and quantiles of numbers, lengths,\n"
      "most frequent values, character shapes (A upper-case run, a lower-case run, 9 digit), values\n"
      "with white space at either end or ending in punctuation. Malformed records are counted and\n"
      "listed, not fatal, unless --strict.\n"
      "Example: tamis profile export.csv --json > profile.json");
  cmd->add_option("input", args.input, "Input file ('-' for standard input)")->required();
  cmd->add_flag("--json", args.json, "Print one JSON object instead of the readable report");
  cmd->add_flag("--strict", args.strict, "Stop at the first malformed record (exit 3)");
  cmd->add_flag("--findings", args.findings,
                "Also list the problems found (duplicates, stray white space, placeholders for missing\n"
                "values, variant spellings, dates and numbers stored as text, fillable NULLs, empty rows\n"
                "and columns), ranked by rows affected, each with ready-made recipe steps and a preview");
  cmd->add_option("--html", args.html,
                  "Also write the profile as one self-contained HTML page (styles and charts inline, no\n"
                  "script, nothing fetched; prints well) to this file, written only when profiling succeeds;\n"
                  "'-' sends the page to standard output instead of the report");
  args.reading.add_to(*cmd);
  return cmd;
}

namespace {

std::string delimiter_text(char d) { return d == '\t' ? "tab" : std::string(1, d); }

nlohmann::ordered_json to_json(const std::string& file, const ReadReport& report, const TableProfile& p) {
  using json = nlohmann::ordered_json;
  json out;
  out["file"] = file;
  out["encoding"] = encoding_name(report.encoding);
  out["delimiter"] = std::string(1, report.delimiter);
  out["header"] = report.header;
  out["rows"] = p.rows;
  out["rejected"] = report.rejected;
  out["rejected_lines"] = report.first_rejected_lines;
  out["warnings"] = report.warnings();
  out["columns"] = json::array();
  for (const ColumnProfile& c : p.columns) {
    json col;
    col["name"] = c.name;
    col["type"] = type_name(c.type);
    col["type_share"] = c.type_share;
    col["rows"] = c.rows;
    col["nulls"] = c.nulls;
    col["blanks"] = c.blanks;
    col["distinct"] = c.distinct;
    col["min"] = c.min ? json(*c.min) : json(nullptr);
    col["max"] = c.max ? json(*c.max) : json(nullptr);
    if (c.mean) col["mean"] = *c.mean;
    if (c.std_dev) col["std"] = *c.std_dev;
    if (!c.quantiles.empty()) {
      col["quantiles"] = json::array();
      for (const Quantile& q : c.quantiles) col["quantiles"].push_back({{"p", q.p}, {"value", q.value}});
    }
    col["length_min"] = c.length_min;
    col["length_max"] = c.length_max;
    col["top_values"] = json::array();
    for (const ValueCount& v : c.top_values) col["top_values"].push_back({{"value", v.value}, {"count", v.count}});
    col["shapes"] = json::array();
    for (const ValueCount& v : c.shapes) col["shapes"].push_back({{"shape", v.value}, {"count", v.count}});
    col["edge_whitespace"] = c.edge_whitespace;
    col["trailing_punctuation"] = c.trailing_punctuation;
    out["columns"].push_back(std::move(col));
  }
  return out;
}

// Shows a value so that white space at the ends and control characters are
// visible, cut to `width` code points.
std::string shown(std::string_view v, size_t width = 24) {
  std::string out = "\"";
  size_t i = 0, n = 0;
  while (i < v.size() && n < width) {
    const char32_t c = utf8::next(v, i);
    if (c == '\n') out += "\\n";
    else if (c == '\r') out += "\\r";
    else if (c == '\t') out += "\\t";
    else utf8::append(out, c);
    ++n;
  }
  if (i < v.size()) out += "…";
  return out + "\"";
}

std::string percent(double share) {
  std::ostringstream s;
  s << std::fixed << std::setprecision(share >= 0.999 || share == 0 ? 0 : 1) << share * 100 << '%';
  return s.str();
}

// Pads to `width` display columns, counting code points (not bytes).
std::string pad(const std::string& s, size_t width) {
  const size_t n = utf8::code_point_count(s);
  return n >= width ? s : s + std::string(width - n, ' ');
}

void print_readable(const std::string& file, const ReadReport& report, const TableProfile& p) {
  std::cout << file << ": " << p.rows << " rows, " << p.columns.size() << " columns\n"
            << "  read as " << encoding_name(report.encoding) << " (" << report.encoding_reason << "), delimiter "
            << delimiter_text(report.delimiter) << " (" << report.delimiter_reason << "), header "
            << (report.header ? "yes" : "no") << " (" << report.header_reason << ")\n";
  for (const std::string& w : report.warnings()) std::cout << "  warning: " << w << '\n';
  std::cout << '\n'
            << pad("  #", 5) << pad("column", 22) << pad("type", 9) << pad("fit", 7) << pad("nulls", 8)
            << pad("blanks", 8) << pad("distinct", 10) << "range\n";
  for (size_t i = 0; i < p.columns.size(); ++i) {
    const ColumnProfile& c = p.columns[i];
    std::string range = c.min ? shown(*c.min, 16) + " … " + shown(*c.max, 16) : "";
    std::cout << pad("  " + std::to_string(i + 1), 5) << pad(c.name.substr(0, 20), 22)
              << pad(std::string(type_name(c.type)), 9) << pad(percent(c.type_share), 7)
              << pad(std::to_string(c.nulls), 8) << pad(std::to_string(c.blanks), 8)
              << pad(std::to_string(c.distinct), 10) << range << '\n';
  }
  for (const ColumnProfile& c : p.columns) {
    std::cout << '\n' << c.name << " (" << type_name(c.type) << ")\n"
              << "  length " << c.length_min << "–" << c.length_max << " characters; " << c.edge_whitespace
              << " with white space at an end; " << c.trailing_punctuation << " ending in punctuation\n";
    if (c.mean) {
      std::cout << "  mean " << *c.mean;
      if (c.std_dev) std::cout << ", standard deviation " << *c.std_dev;
      std::cout << "; quantiles";
      for (const Quantile& q : c.quantiles) std::cout << ' ' << q.p * 100 << "%: " << q.value;
      std::cout << '\n';
    }
    std::cout << "  most frequent:";
    for (const ValueCount& v : c.top_values) std::cout << ' ' << shown(v.value) << " ×" << v.count;
    std::cout << "\n  shapes:";
    for (const ValueCount& v : c.shapes) std::cout << ' ' << shown(v.value) << " ×" << v.count;
    std::cout << '\n';
  }
}

}  // namespace

int run_profile(const ProfileArgs& args) {
  auto options = args.reading.to_csv_options();
  if (!options) return report_error(options.error());
  options->lenient = !args.strict;
  if (args.html == "-" && args.json)
    return report_error(usage_error("--json and --html - both want standard output: give --html a file name"));
  if (!args.html.empty() && args.html != "-" && same_file(args.input, args.html))
    return report_error(usage_error("'" + args.html + "' is the input; tamis never overwrites what it reads"));
  ReadReport report;
  std::string display;
  Result<Table> table = read_whole_file(args.input, *options, report, display);
  if (!table) return report_error(table.error());
  if (std::getenv("TAMIS_STATS")) std::cerr << "memory: table " << table->memory_bytes() << " bytes\n";
  const TableProfile profile = profile_with_progress(*table);
  std::vector<Finding> findings;
  // The page always shows the findings: they are what a reviewer reads first.
  if (args.findings || !args.html.empty()) findings = scan_findings(*table, profile, FindingOptions{});
  if (!args.html.empty()) {
    ProfilePageInput page;
    page.file = display;
    page.read = &report;
    page.table = &*table;
    page.profile = &profile;
    page.findings = findings;
    auto sink = open_file_sink(args.html);
    if (!sink) return report_error(sink.error());
    if (Status s = (*sink)->write(profile_html(page)); !s) return report_error(s.error());
    if (Status s = (*sink)->commit(); !s) return report_error(s.error());
    if (args.html == "-") return 0;
  }
  if (args.json) {
    auto doc = to_json(display, report, profile);
    if (args.findings) doc["findings"] = findings_json(findings);
    std::cout << doc.dump(2) << '\n';
  } else {
    print_readable(display, report, profile);
    if (args.findings) print_findings(std::cout, findings);
  }
  return 0;
}

}  // namespace tamis::cli
