#include "report/run_report_html.hpp"

#include "report/html_writer.hpp"

namespace tamis {

namespace {

using json = nlohmann::ordered_json;
using html::count_text;
using html::escape;
using html::escape_value;

std::string text_of(const json& j, const char* key) {
  const auto it = j.find(key);
  if (it == j.end() || it->is_null()) return "";
  if (it->is_string()) return it->get<std::string>();
  return it->dump(-1, ' ', false, json::error_handler_t::replace);
}

uint64_t count_value(const json& v) {
  if (v.is_number_unsigned()) return v.get<uint64_t>();
  if (v.is_number_integer() && v.get<int64_t>() > 0) return static_cast<uint64_t>(v.get<int64_t>());
  return 0;
}

uint64_t count_of(const json& j, const char* key) {
  const auto it = j.find(key);
  return it != j.end() ? count_value(*it) : 0;
}

const json& list_of(const json& j, const char* key) {
  static const json empty = json::array();
  const auto it = j.find(key);
  return it != j.end() && it->is_array() ? *it : empty;
}

// The report's own sections are always there; a report from elsewhere may
// lack one, and then the page shows it empty instead of failing.
const json& member(const json& j, const char* key) {
  static const json empty = json::object();
  const auto it = j.find(key);
  return it != j.end() && it->is_object() ? *it : empty;
}

std::string value_html(const std::string& v) {
  if (v.empty()) return "<span class=\"absent\">(empty text)</span>";
  return "<code class=\"v\">" + escape_value(v) + "</code>";
}

std::string plural(uint64_t n, const char* one, const char* many) { return count_text(n) + ' ' + (n == 1 ? one : many); }

std::string step_label(const json& step) { return text_of(step, "number") + ". " + text_of(step, "op"); }

void write_header(std::string& out, const json& report) {
  const json& recipe = member(report, "recipe");
  const std::string title = text_of(recipe, "title");
  out += "<header class=\"page\"><p class=\"kind\">tamis \u00B7 run report</p><h1>";
  out += escape(title.empty() ? text_of(recipe, "file") : title);
  out += "</h1><p>Recipe <code class=\"v\">" + escape(text_of(recipe, "file")) + "</code> applied to <code class=\"v\">" +
         escape(text_of(member(report, "input"), "file")) + "</code>, written to <code class=\"v\">" +
         escape(text_of(member(report, "output"), "file")) + "</code>";
  const uint64_t passes = count_of(report, "passes");
  if (passes > 1) out += " (" + count_text(passes) + " passes over the input)";
  out += ".</p></header>";
}

void write_totals(std::string& out, const json& report) {
  const json& t = member(report, "totals");
  const bool balanced = t.value("balanced", false);
  out += "<section id=\"totals\"><h2>Totals</h2><p class=\"balance";
  out += balanced ? "\">" : " off\">";
  out += count_text(count_of(t, "rows_read")) + " rows read = " + count_text(count_of(t, "rows_written")) +
         " written + " + count_text(count_of(t, "rows_removed")) + " removed + " +
         count_text(count_of(t, "rows_rejected")) + " rejected";
  out += balanced ? " \u2014 the rows balance.</p>" : " \u2014 these do NOT balance: a defect in tamis, please report it.</p>";
  out += "<table class=\"totals\"><thead><tr><th scope=\"col\">Rows</th><th scope=\"col\" class=\"n\">Count</th></tr>"
         "</thead><tbody>";
  const std::pair<const char*, const char*> rows[] = {{"rows_read", "Read"},
                                                       {"rows_written", "Written"},
                                                       {"rows_removed", "Removed by steps"},
                                                       {"rows_rejected", "Rejected"}};
  for (const auto& [key, label] : rows)
    out += std::string("<tr id=\"total-") + key + "\"><th scope=\"row\">" + label + "</th><td class=\"n\">" +
           count_text(count_of(t, key)) + "</td></tr>";
  out += "</tbody></table></section>";
}

void write_input(std::string& out, const json& report) {
  const json& in = member(report, "input");
  out += "<section id=\"input\"><h2>Input</h2><dl class=\"facts\">";
  auto fact = [&](const char* term, const std::string& definition) {
    out += std::string("<div><dt>") + term + "</dt><dd>" + definition + "</dd></div>";
  };
  fact("File", "<code class=\"v\">" + escape(text_of(in, "file")) + "</code>");
  fact("Encoding", escape(text_of(in, "encoding")) + " <small>(" + escape(text_of(in, "encoding_reason")) + ")</small>");
  const std::string delimiter = text_of(in, "delimiter");
  fact("Delimiter", delimiter == "\t" ? std::string("tab") : value_html(delimiter));
  fact("Header", in.value("header", false) ? "yes" : "no");
  fact("Rows read", count_text(count_of(in, "rows_read")));
  fact("Malformed records", count_text(count_of(in, "rows_malformed")));
  fact("Rows not fitting the declared types", count_text(count_of(in, "rows_failing_types")));
  out += "</dl>";
  const json& lines = list_of(in, "first_malformed_lines");
  if (!lines.empty()) {
    out += "<p>First malformed records at line";
    out += lines.size() == 1 ? " " : "s ";
    for (size_t i = 0; i < lines.size(); ++i) out += (i ? ", " : "") + escape(lines[i].dump());
    out += ".</p>";
  }
  if (in.contains("first_failing_type_line"))
    out += "<p>First row not fitting the declared types: line " + escape(text_of(in, "first_failing_type_line")) + ".</p>";
  const json& warnings = list_of(in, "warnings");
  if (!warnings.empty()) {
    out += "<ul class=\"notes\">";
    for (const json& w : warnings) out += "<li>Warning: " + escape(w.is_string() ? w.get<std::string>() : w.dump()) + "</li>";
    out += "</ul>";
  }
  out += "</section>";
}

void write_step_table(std::string& out, const json& steps) {
  out += "<section id=\"steps\"><h2>Steps</h2><table class=\"wide steps\"><thead><tr>"
         "<th scope=\"col\" class=\"n\">#</th><th scope=\"col\">Step</th><th scope=\"col\" class=\"n\">Rows in</th>"
         "<th scope=\"col\" class=\"n\">Rows out</th><th scope=\"col\" class=\"n\">Removed</th>"
         "<th scope=\"col\" class=\"n\">Rejected</th><th scope=\"col\" class=\"n\">Cells changed</th>"
         "<th scope=\"col\" class=\"n\">Conflicts</th><th scope=\"col\" class=\"n\">Warnings</th></tr></thead><tbody>";
  for (const json& s : steps) {
    const std::string number = text_of(s, "number");
    out += "<tr id=\"step-row-" + escape(number) + "\"><td class=\"n\">" + escape(number) + "</td><th scope=\"row\">";
    if (!s.value("enabled", true)) {
      out += escape(text_of(s, "op")) + " <span class=\"absent\">skipped: disabled in the recipe</span></th>";
      for (int i = 0; i < 7; ++i) out += "<td class=\"n\">\u2014</td>";
      out += "</tr>";
      continue;
    }
    out += "<a href=\"#step-" + escape(number) + "\">" + escape(text_of(s, "op")) + "</a></th>";
    for (const char* key : {"rows_in", "rows_out", "rows_removed", "rows_rejected", "cells_changed_total"})
      out += "<td class=\"n\">" + count_text(count_of(s, key)) + "</td>";
    out += "<td class=\"n\">" + count_text(list_of(s, "conflicts").size()) + "</td><td class=\"n\">" +
           count_text(list_of(s, "warnings").size()) + "</td></tr>";
  }
  out += "</tbody></table>";

  std::vector<html::Bar> cells, rows;
  uint64_t rows_total = 0;
  for (const json& s : steps) {
    if (!s.value("enabled", true)) continue;
    cells.push_back({step_label(s), count_of(s, "cells_changed_total")});
    const uint64_t gone = count_of(s, "rows_removed") + count_of(s, "rows_rejected");
    rows.push_back({step_label(s), gone});
    rows_total += gone;
  }
  out += "<div class=\"charts\"><figure>" + html::bar_chart(cells, "Cells changed by step", "chart-cells") +
         "<figcaption>Cells each step changed, over all columns.</figcaption></figure>";
  if (rows_total > 0)
    out += "<figure>" + html::bar_chart(rows, "Rows removed or rejected by step", "chart-rows") +
           "<figcaption>Rows each step removed or sent to the rejects file.</figcaption></figure>";
  out += "</div></section>";
}

void write_step(std::string& out, const json& s) {
  if (!s.value("enabled", true)) return;
  const std::string number = text_of(s, "number");
  const bool eventful = count_of(s, "rows_removed") + count_of(s, "rows_rejected") > 0 ||
                        !list_of(s, "conflicts").empty() || !list_of(s, "warnings").empty();
  out += "<section class=\"card step";
  out += eventful ? " needs-look" : "";
  out += "\" id=\"step-" + escape(number) + "\"><h3 class=\"title\"><span class=\"ordinal\">" + escape(number) +
         "</span>" + escape(text_of(s, "op")) + "</h3><p>" + escape(text_of(s, "sentence")) + "</p>";
  if (s.contains("note")) out += "<p><em>Note:</em> " + escape(text_of(s, "note")) + "</p>";
  out += "<p>" + plural(count_of(s, "rows_in"), "row", "rows") + " in, " + count_text(count_of(s, "rows_out")) +
         " out, " + count_text(count_of(s, "rows_removed")) + " removed, " + count_text(count_of(s, "rows_rejected")) +
         " rejected; " + plural(count_of(s, "cells_changed_total"), "cell", "cells") + " changed.</p>";

  const auto changed = s.find("cells_changed");
  if (changed != s.end() && changed->is_object() && !changed->empty()) {
    out += "<table><caption>Cells changed per column</caption><thead><tr><th scope=\"col\">Column</th>"
           "<th scope=\"col\" class=\"n\">Cells</th></tr></thead><tbody>";
    for (const auto& [column, n] : changed->items())
      out += "<tr><th scope=\"row\">" + escape_value(column) + "</th><td class=\"n\">" +
             count_text(count_value(n)) + "</td></tr>";
    out += "</tbody></table>";
  }
  const json& samples = list_of(s, "samples");
  if (!samples.empty()) {
    out += "<table><caption>Before \u2192 after, the first distinct changes</caption><thead><tr>"
           "<th scope=\"col\">Column</th><th scope=\"col\">Before</th><th scope=\"col\">After</th>"
           "<th scope=\"col\" class=\"n\">Cells</th></tr></thead><tbody>";
    for (const json& v : samples)
      out += "<tr><td>" + escape_value(text_of(v, "column")) + "</td><td>" + value_html(text_of(v, "before")) +
             "</td><td>" + value_html(text_of(v, "after")) + "</td><td class=\"n\">" + count_text(count_of(v, "count")) +
             "</td></tr>";
    out += "</tbody></table>";
  }
  for (const char* key : {"conflicts", "warnings"}) {
    const json& notes = list_of(s, key);
    if (notes.empty()) continue;
    out += std::string("<h4>") + (key[0] == 'c' ? "Conflicts" : "Warnings") + "</h4><ul class=\"notes\">";
    for (const json& n : notes) out += "<li>" + escape(n.is_string() ? n.get<std::string>() : n.dump()) + "</li>";
    out += "</ul>";
  }
  const json& listed = list_of(s, "listed_rows");
  if (!listed.empty()) {
    const uint64_t all = count_of(s, "rows_removed") + count_of(s, "rows_rejected");
    out += "<table class=\"removed\"><caption>";
    out += s.value("listed_rows_complete", false)
               ? "Rows removed or rejected (all " + count_text(all) + ")"
               : "Rows removed or rejected: the first " + count_text(listed.size()) + " of " + count_text(all);
    out += "</caption><thead><tr><th scope=\"col\" class=\"n\">Source line</th><th scope=\"col\">Reason</th></tr>"
           "</thead><tbody>";
    for (const json& r : listed)
      out += "<tr><td class=\"n\">" + escape(text_of(r, "line")) + "</td><td>" + escape_value(text_of(r, "reason")) +
             "</td></tr>";
    out += "</tbody></table>";
  }
  out += "</section>";
}

void write_output(std::string& out, const json& report) {
  const json& o = member(report, "output");
  out += "<section id=\"output\"><h2>Output</h2><p><code class=\"v\">" + escape(text_of(o, "file")) + "</code>: " +
         escape(text_of(o, "format")) + ", " + plural(count_of(o, "rows_written"), "row", "rows") +
         ", NULL written as " + value_html(text_of(o, "null")) + ", dates as <code class=\"v\">" +
         escape(text_of(o, "date_format")) + "</code>.</p>";
  out += "<table class=\"columns\"><thead><tr><th scope=\"col\">Column</th><th scope=\"col\">Type</th></tr></thead><tbody>";
  for (const json& c : list_of(o, "columns")) {
    out += "<tr><th scope=\"row\">" + escape_value(text_of(c, "name")) + "</th><td>" + escape(text_of(c, "type"));
    if (c.contains("scale")) out += " <small>(scale " + escape(text_of(c, "scale")) + ")</small>";
    out += "</td></tr>";
  }
  out += "</tbody></table></section>";
}

}  // namespace

std::string run_report_html(const json& report) {
  std::string out;
  const std::string title = text_of(member(report, "recipe"), "title");
  out += "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
         "<meta name=\"generator\" content=\"tamis\"><title>Run report: ";
  out += escape(title.empty() ? text_of(member(report, "recipe"), "file") : title);
  out += "</title><style>";
  out += html::style_sheet();
  out += "</style></head><body><main>";
  write_header(out, report);
  out += "<nav class=\"contents\" aria-label=\"Contents\"><h2>Contents</h2><ol><li><a href=\"#totals\">Totals</a></li>"
         "<li><a href=\"#input\">Input</a></li><li><a href=\"#steps\">Steps</a></li>"
         "<li><a href=\"#output\">Output</a></li></ol></nav>";
  write_totals(out, report);
  write_input(out, report);
  const json& steps = list_of(report, "steps");
  write_step_table(out, steps);
  for (const json& s : steps) write_step(out, s);
  write_output(out, report);
  out += "<footer>Written by tamis. Counts are exact; lists of rows and examples are capped.</footer>"
         "</main></body></html>\n";
  return out;
}

std::string run_report_html(const Recipe& recipe, const CompiledRecipe& compiled,
                            const std::vector<ChangeRecord>& changes, const RunFacts& facts) {
  return run_report_html(run_report_json(recipe, compiled, changes, facts));
}

}  // namespace tamis
