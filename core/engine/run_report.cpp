#include "run_report.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "scalars.hpp"

namespace tamis {

namespace {

using json = nlohmann::ordered_json;

std::string delimiter_name(char d) { return d == '\t' ? "\t" : std::string(1, d); }

json step_entry(const CompiledStep& s, const ChangeRecord& c) {
  json e;
  e["number"] = s.index + 1;
  e["index"] = s.index;
  e["op"] = std::string(s.step->op());
  e["enabled"] = true;
  e["sentence"] = s.step->describe();
  if (!s.note.empty()) e["note"] = s.note;
  e["rows_in"] = c.rows_in;
  e["rows_out"] = c.rows_out;
  e["rows_removed"] = c.rows_removed;
  e["rows_rejected"] = c.rows_rejected;
  // ChangeRecord keeps the first removed and rejected rows in one list.
  e["listed_rows"] = json::array();
  for (const RemovedRow& r : c.removed) e["listed_rows"].push_back({{"line", r.line}, {"reason", r.reason}});
  e["listed_rows_complete"] = c.removed.size() == c.rows_removed + c.rows_rejected;
  e["cells_changed"] = json::object();
  uint64_t cells = 0;
  for (const auto& [column, n] : c.cells_changed) {
    e["cells_changed"][column] = n;
    cells += n;
  }
  e["cells_changed_total"] = cells;
  e["samples"] = json::array();
  for (const ValueChange& v : c.samples())
    e["samples"].push_back({{"column", v.column}, {"before", v.before}, {"after", v.after}, {"count", v.count}});
  e["conflicts"] = c.conflicts;
  e["warnings"] = c.warnings;
  return e;
}

std::string step_line(const CompiledStep& s, const ChangeRecord& c) {
  std::ostringstream line;
  line << "  " << s.index + 1 << ". " << s.step->op() << ":";
  uint64_t cells = 0;
  for (const auto& [column, n] : c.cells_changed) cells += n;
  std::string sep = " ";
  auto part = [&](uint64_t n, const char* what) {
    if (n == 0) return;
    line << sep << n << ' ' << what;
    sep = ", ";
  };
  part(cells, cells == 1 ? "cell changed" : "cells changed");
  part(c.rows_removed, c.rows_removed == 1 ? "row removed" : "rows removed");
  part(c.rows_rejected, c.rows_rejected == 1 ? "row rejected" : "rows rejected");
  part(c.conflicts.size(), c.conflicts.size() == 1 ? "conflict" : "conflicts");
  part(c.warnings.size(), c.warnings.size() == 1 ? "warning" : "warnings");
  if (sep == " ") line << " no change";
  return line.str();
}

}  // namespace

Result<RejectCap> RejectCap::parse(const std::string& text) {
  RejectCap cap;
  cap.text = text;
  auto bad = [&] {
    return usage_error("the rejects cap must be a count such as 25 or a share such as 0.5% (got '" + text + "')");
  };
  if (text.empty()) return bad();
  const bool percent = text.back() == '%';
  const std::string number = percent ? text.substr(0, text.size() - 1) : text;
  if (percent) {
    if (number_shape(number) == NumberShape::not_a_number || number[0] == '-' || number[0] == '+') return bad();
    const auto value = parse_double(number);
    if (!value || !std::isfinite(*value) || *value > 100) return bad();
    cap.percent = *value;
    return cap;
  }
  if (number.size() > 18 || !std::all_of(number.begin(), number.end(), [](char c) { return c >= '0' && c <= '9'; }))
    return bad();
  cap.count = std::stoull(number);
  return cap;
}

bool RejectCap::exceeded(uint64_t rejected, uint64_t rows_read) const {
  if (count) return rejected > *count;
  // A share of the rows read: 1% of 250 rows allows 2 (2.5 rounded down).
  return static_cast<double>(rejected) > *percent / 100.0 * static_cast<double>(rows_read);
}

Error RejectCap::error(const std::string& input_file, uint64_t rejected, uint64_t rows_read,
                       const RemovedRow& first) const {
  return input_error(input_file, 0,
                     std::to_string(rejected) + (rejected == 1 ? " row" : " rows") + " rejected, more than the cap of " +
                         text + (percent ? " of " + std::to_string(rows_read) + " rows read" : std::string()) +
                         " (--max-rejects or input.max_rejects); no output written. First: line " +
                         std::to_string(first.line) + ": " + first.reason);
}

RunTotals run_totals(const RunFacts& facts, const std::vector<ChangeRecord>& changes) {
  RunTotals t;
  t.rows_read = facts.read.rows + facts.read.rejected;
  t.rows_written = facts.rows_written;
  t.rows_rejected = facts.read.rejected + facts.rows_failing_input_types;
  for (const ChangeRecord& c : changes) {
    t.rows_removed += c.rows_removed;
    t.rows_rejected += c.rows_rejected;
  }
  return t;
}

Status check_row_accounting(const CompiledRecipe& recipe, const std::vector<ChangeRecord>& changes,
                            const RunFacts& facts) {
  auto defect = [](std::string message) {
    Error e = usage_error("row accounting does not balance: " + message + " (a defect in tamis; please report it)");
    e.kind = ErrorKind::bad_input;
    return e;
  };
  uint64_t rows = facts.read.rows - facts.rows_failing_input_types;
  for (size_t j = 0; j < recipe.steps.size(); ++j) {
    const ChangeRecord& c = changes[j];
    const std::string step = "step " + std::to_string(recipe.steps[j].index + 1) + " (" +
                             std::string(recipe.steps[j].step->op()) + ")";
    if (c.rows_in != rows)
      return defect(step + " received " + std::to_string(c.rows_in) + " rows, the step before it passed on " +
                    std::to_string(rows));
    if (c.rows_in != c.rows_out + c.rows_removed + c.rows_rejected)
      return defect(step + ": " + std::to_string(c.rows_in) + " rows in, " + std::to_string(c.rows_out) + " out, " +
                    std::to_string(c.rows_removed) + " removed, " + std::to_string(c.rows_rejected) + " rejected");
    rows = c.rows_out;
  }
  if (rows != facts.rows_written)
    return defect("the last step passed on " + std::to_string(rows) + " rows, " + std::to_string(facts.rows_written) +
                  " were written");
  const RunTotals t = run_totals(facts, changes);
  if (!t.balances())
    return defect(std::to_string(t.rows_read) + " rows read, " + std::to_string(t.rows_written) + " written + " +
                  std::to_string(t.rows_removed) + " removed + " + std::to_string(t.rows_rejected) + " rejected");
  return Ok{};
}

json run_report_json(const Recipe& recipe, const CompiledRecipe& compiled, const std::vector<ChangeRecord>& changes,
                     const RunFacts& facts) {
  json report;
  report["tamis_run_report"] = 1;
  report["recipe"] = {{"title", recipe.title}, {"file", facts.recipe_file}};
  const ReadReport& r = facts.read;
  json input;
  input["file"] = facts.input_file;
  input["encoding"] = std::string(encoding_name(r.encoding));
  input["encoding_reason"] = r.encoding_reason;
  input["delimiter"] = delimiter_name(r.delimiter);
  input["quoteChar"] = std::string(1, recipe.input.quote);
  input["header"] = r.header;
  input["skipRows"] = recipe.input.skip_rows;
  input["columns"] = json::array();
  for (const ColumnSchema& c : compiled.input) input["columns"].push_back({{"name", c.name}, {"type", type_name(c.type)}});
  input["rows_read"] = r.rows + r.rejected;
  input["rows_malformed"] = r.rejected;
  input["first_malformed_lines"] = r.first_rejected_lines;
  input["rows_failing_types"] = facts.rows_failing_input_types;
  if (facts.rows_failing_input_types) input["first_failing_type_line"] = facts.first_failing_input_type_line;
  input["warnings"] = r.warnings();
  report["input"] = input;
  report["passes"] = facts.passes;

  report["steps"] = json::array();
  size_t next = 0;
  for (size_t i = 0; i < recipe.steps.size(); ++i) {
    if (next < compiled.steps.size() && compiled.steps[next].index == static_cast<int>(i)) {
      report["steps"].push_back(step_entry(compiled.steps[next], changes[next]));
      ++next;
      continue;
    }
    json skipped = {{"number", i + 1}, {"index", i}, {"op", recipe.steps[i].op}, {"enabled", false}};
    if (!recipe.steps[i].note.empty()) skipped["note"] = recipe.steps[i].note;
    report["steps"].push_back(std::move(skipped));
  }

  json output;
  output["file"] = facts.output_file;
  output["format"] = recipe.output.format;
  output["null"] = recipe.output.null_marker;
  output["date_format"] = recipe.output.date_format;
  output["columns"] = json::array();
  for (const ColumnSchema& c : compiled.output) {
    json column = {{"name", c.name}, {"type", type_name(c.type)}};
    if (c.type == Type::decimal) column["scale"] = c.scale;
    output["columns"].push_back(std::move(column));
  }
  output["rows_written"] = facts.rows_written;
  report["output"] = output;

  const RunTotals t = run_totals(facts, changes);
  report["totals"] = {{"rows_read", t.rows_read},
                      {"rows_written", t.rows_written},
                      {"rows_removed", t.rows_removed},
                      {"rows_rejected", t.rows_rejected},
                      {"balanced", t.balances()}};
  return report;
}

std::string run_summary(const CompiledRecipe& compiled, const std::vector<ChangeRecord>& changes,
                        const RunFacts& facts) {
  const RunTotals t = run_totals(facts, changes);
  std::ostringstream out;
  out << "tamis run: " << t.rows_read << " rows read, " << t.rows_written << " written, " << t.rows_removed
      << " removed, " << t.rows_rejected << " rejected (read as " << encoding_name(facts.read.encoding)
      << ", delimiter " << (facts.read.delimiter == '\t' ? std::string("tab") : std::string(1, facts.read.delimiter))
      << ")\n";
  if (facts.read.rejected) out << "  input: " << facts.read.rejected << " malformed records set aside\n";
  if (facts.rows_failing_input_types)
    out << "  input: " << facts.rows_failing_input_types << " rows with values that do not fit input.columns types\n";
  for (size_t j = 0; j < compiled.steps.size(); ++j) out << step_line(compiled.steps[j], changes[j]) << '\n';
  return out.str();
}

}  // namespace tamis
