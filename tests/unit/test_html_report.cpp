// The HTML reports: escaping of untrusted text (the HTML standard's
// character references for & < > " '), chart geometry (bar lengths
// proportional to the counts), the distributions behind the histograms,
// empty tables and Unicode. The whole pages are parsed by an outside HTML
// parser in tests/reference/html_reports.py.
#include <doctest/doctest.h>

#include <cmath>
#include <string>
#include <vector>

#include "profile.hpp"
#include "report/html_writer.hpp"
#include "report/profile_html.hpp"
#include "report/run_report_html.hpp"
#include "unit_support.hpp"

using namespace tamis;
using tamis::test::dialect;
using tamis::test::read_ok;

namespace {

const std::string kHostile = "</style><script>alert(1)</script>\"' onmouseover=\"x\" &amp;";

// The values of attribute `name` on every <rect> whose class is `css_class`, in order.
std::vector<double> rect_attribute(const std::string& svg, const std::string& css_class, const std::string& name) {
  std::vector<double> out;
  const std::string start = "<rect class=\"" + css_class + "\"";
  for (size_t at = svg.find(start); at != std::string::npos; at = svg.find(start, at + 1)) {
    const size_t end = svg.find('>', at);
    const std::string tag = svg.substr(at, end - at);
    const size_t a = tag.find(" " + name + "=\"");
    REQUIRE(a != std::string::npos);
    out.push_back(std::stod(tag.substr(a + name.size() + 3)));
  }
  return out;
}

size_t occurrences(const std::string& text, const std::string& what) {
  size_t n = 0;
  for (size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++n;
  return n;
}

Table table_of(const std::string& csv) { return read_ok(csv, dialect(',', HeaderMode::yes)); }

uint64_t bin_total(const Distribution& d) {
  uint64_t n = 0;
  for (const html::Bin& b : d.bins) n += b.count;
  return n;
}

}  // namespace

TEST_CASE("unit_html_report: markup characters become character references") {
  // HTML Living Standard, 13.1.4 and 13.5 (serialising): & < > in text, " in
  // attribute values; ' too, since a value may land in a single-quoted attribute.
  CHECK(html::escape("a&b<c>d\"e'f") == "a&amp;b&lt;c&gt;d&quot;e&#39;f");
  const std::string escaped = html::escape(kHostile);
  CHECK(escaped.find('<') == std::string::npos);
  CHECK(escaped.find('>') == std::string::npos);
  CHECK(escaped.find('"') == std::string::npos);
  CHECK(escaped.find('\'') == std::string::npos);
  CHECK(escaped == "&lt;/style&gt;&lt;script&gt;alert(1)&lt;/script&gt;&quot;&#39; onmouseover=&quot;x&quot; &amp;amp;");
}

TEST_CASE("unit_html_report: controls, ill-formed UTF-8 and noncharacters never reach the page") {
  // C0 controls as Control Pictures (U+2400 block), DEL as U+2421.
  CHECK(html::escape(std::string("a\x01" "b\x7F", 4)) == "a\u2401b\u2421");
  CHECK(html::escape(std::string("\0", 1)) == "\u2400");
  // Layout characters stay in plain text, and are drawn in values.
  CHECK(html::escape("a\tb\nc") == "a\tb\nc");
  CHECK(html::escape_value("a\tb\nc\r") == "a\u2409b\u240Ac\u240D");
  // RFC 3629: 0xFF never appears in UTF-8; a lone continuation byte; a truncated sequence.
  CHECK(html::escape("x\xFFy") == "x\uFFFDy");
  CHECK(html::escape("\x80") == "\uFFFD");
  CHECK(html::escape("ab\xC3") == "ab\uFFFD");
  // C1 control U+0085 and noncharacters U+FDD0, U+FFFE (Unicode §23.7).
  CHECK(html::escape("\xC2\x85") == "\uFFFD");
  CHECK(html::escape("\xEF\xB7\x90") == "\uFFFD");
  CHECK(html::escape("\xEF\xBF\xBE") == "\uFFFD");
}

TEST_CASE("unit_html_report: Unicode text passes unchanged and is cut by code points") {
  const std::string text = "Rivi\u00E8re Quay \u00B7 Platanus \u00D7 hispanica \U0001F333";
  CHECK(html::escape(text) == text);
  CHECK(html::shorten("Rivi\u00E8re", 5) == "Rivi\u00E8\u2026");
  CHECK(html::shorten("Rivi\u00E8re", 7) == "Rivi\u00E8re");
  CHECK(html::shorten("\U0001F333\U0001F333\U0001F333", 2) == "\U0001F333\U0001F333\u2026");
  CHECK(html::shorten("", 3).empty());
}

TEST_CASE("unit_html_report: counts, numbers and shares as text") {
  CHECK(html::count_text(0) == "0");
  CHECK(html::count_text(999) == "999");
  CHECK(html::count_text(1000) == "1\u202F000");
  CHECK(html::count_text(1234567) == "1\u202F234\u202F567");
  CHECK(html::number_text(12.5) == "12.5");
  CHECK(html::number_text(-0.0) == "0");
  CHECK(html::number_text(0.0031) == "0.0031");
  CHECK(html::percent_text(1) == "100%");
  CHECK(html::percent_text(0) == "0%");
  CHECK(html::percent_text(0.9999) == "99.9%");  // one misfit never reads as 100%
  CHECK(html::percent_text(0.975) == "97.5%");
  CHECK(html::percent_text(0.00001) == "<0.1%");
}

TEST_CASE("unit_html_report: bar lengths are proportional to the counts") {
  CHECK(html::bar_length(50, 100, 340) == doctest::Approx(170));
  CHECK(html::bar_length(100, 100, 340) == doctest::Approx(340));
  CHECK(html::bar_length(0, 100, 340) == 0);
  CHECK(html::bar_length(0, 0, 340) == 0);
  CHECK(html::bar_length(1, 1000000, 340) == 1);  // a rare value stays visible

  const std::vector<html::Bar> bars = {{"Oak", 400}, {"Rowan", 100}, {"Ginkgo", 300}, {"Alder", 20}};
  const std::string svg = html::bar_chart(bars, "Species", "species");
  const std::vector<double> widths = rect_attribute(svg, "bar", "width");
  REQUIRE(widths.size() == bars.size());
  for (size_t i = 0; i < bars.size(); ++i) {
    CAPTURE(i);
    // Written with two decimals: within 0.01 of the exact proportion.
    CHECK(std::fabs(widths[i] - 340.0 * static_cast<double>(bars[i].value) / 400.0) <= 0.006);
  }
  const std::vector<double> ys = rect_attribute(svg, "bar", "y");
  for (size_t i = 1; i < ys.size(); ++i) CHECK(ys[i] > ys[i - 1]);  // in the given order, top to bottom
  CHECK(svg.find("<title>Species</title>") != std::string::npos);
  CHECK(svg.find("aria-label=\"Species\"") != std::string::npos);
  CHECK(svg.find("http") == std::string::npos);  // no namespace URL, no link
}

TEST_CASE("unit_html_report: histogram bar heights are proportional to the bin counts") {
  const std::vector<html::Bin> bins = {{"0", "9", 5}, {"10", "19", 20}, {"20", "29", 0}, {"30", "39", 10}};
  const std::string svg = html::histogram_chart(bins, "Planted count", "integer", "h");
  const std::vector<double> heights = rect_attribute(svg, "bin", "height");
  const std::vector<double> ys = rect_attribute(svg, "bin", "y");
  const std::vector<double> xs = rect_attribute(svg, "bin", "x");
  REQUIRE(heights.size() == bins.size());
  const double full = heights[1];  // the largest bin
  for (size_t i = 0; i < bins.size(); ++i) {
    CAPTURE(i);
    CHECK(std::fabs(heights[i] - full * static_cast<double>(bins[i].count) / 20.0) <= 0.01);
    CHECK(std::fabs(ys[i] + heights[i] - (ys[1] + heights[1])) <= 0.01);  // one baseline
    if (i > 0) CHECK(xs[i] > xs[i - 1]);
  }
  CHECK(svg.find(">20<") != std::string::npos);  // the axis names the largest count
}

TEST_CASE("unit_html_report: chart labels and titles from the data are escaped") {
  const std::vector<html::Bar> bars = {{kHostile, 3}, {"", 2}, {"  Oak ", 1}};
  const std::string svg = html::bar_chart(bars, kHostile, kHostile);
  CHECK(svg.find("<script") == std::string::npos);
  CHECK(svg.find("<style") == std::string::npos);
  CHECK(occurrences(svg, "onmouseover=\"") == 0);
  CHECK(svg.find("(empty text)") != std::string::npos);
  CHECK(svg.find("\u2423\u2423Oak\u2423") != std::string::npos);  // spaces at the ends drawn
  CHECK(html::bar_chart({}, "Nothing", "n").find("<svg") == std::string::npos);
  CHECK(html::histogram_chart({}, "Nothing", "x", "n").find("<svg") == std::string::npos);
}

TEST_CASE("unit_html_report: integer columns get one bin per value over a small range") {
  // Ten numbers, a blank and one misfit: 10 of 11 non-blank values fit, over the 90% rule.
  const Table t = table_of("n\n1\n2\n2\n5\n5\n5\n5\n5\n5\n5\n \nx\n");
  const TableProfile p = profile_table(t);
  REQUIRE(p.columns[0].type == Type::integer);
  const Distribution d = column_distribution(t, 0, p.columns[0]);
  CHECK(d.kind == DistributionKind::values);
  REQUIRE(d.bins.size() == 5);  // 1..5, the empty bins included
  CHECK(d.bins[0].low == "1");
  CHECK(d.bins[0].count == 1);
  CHECK(d.bins[1].count == 2);
  CHECK(d.bins[2].count == 0);
  CHECK(d.bins[4].count == 7);
  CHECK(d.bins[4].high == "5");
  CHECK(d.counted == 10);  // the blank and "x" do not read as numbers
  CHECK(bin_total(d) == d.counted);
}

TEST_CASE("unit_html_report: a wide range follows Sturges' rule and loses no value") {
  std::string csv = "n\n";
  for (int i = 0; i < 1000; ++i) csv += std::to_string(i * 7) + "\n";
  const Table t = table_of(csv);
  const TableProfile p = profile_table(t);
  const Distribution d = column_distribution(t, 0, p.columns[0]);
  // Sturges (1926): ceil(log2 1000) + 1 = 11 bins.
  CHECK(d.bins.size() == 11);
  CHECK(bin_total(d) == 1000);
  CHECK(d.bins.front().low == "0");
  CHECK(d.bins.back().high == "6993");
}

TEST_CASE("unit_html_report: decimal and date columns") {
  const Table t = table_of("x,d\n0.5,2024-01-01\n1.5,2024-01-03\n2.5,2024-01-03\n3.25,2024-01-02\n");
  const TableProfile p = profile_table(t);
  REQUIRE(p.columns[0].type == Type::decimal);
  REQUIRE(p.columns[1].type == Type::date);
  const Distribution x = column_distribution(t, 0, p.columns[0]);
  CHECK(bin_total(x) == 4);
  CHECK(x.bins.front().low == "0.5");
  CHECK(x.bins.back().high == "3.25");
  const Distribution d = column_distribution(t, 1, p.columns[1]);
  REQUIRE(d.bins.size() == 3);  // one per day
  CHECK(d.bins[0].low == "2024-01-01");
  CHECK(d.bins[1].count == 1);
  CHECK(d.bins[2].count == 2);
}

TEST_CASE("unit_html_report: text lengths are counted in code points, NULLs left out") {
  // "Rivière" is 7 code points in 8 bytes; the empty cell is read as empty text.
  const Table t = table_of("s,n\nRivi\u00E8re,1\nOak,2\n,3\n\U0001F333,4\n");
  const TableProfile p = profile_table(t);
  const Distribution d = column_distribution(t, 0, p.columns[0]);
  CHECK(d.kind == DistributionKind::lengths);
  REQUIRE(d.bins.size() == 8);  // lengths 0..7
  CHECK(d.bins[0].count + d.bins[1].count + d.bins[3].count + d.bins[7].count == bin_total(d));
  CHECK(d.bins[7].count == 1);
  CHECK(d.bins[3].count == 1);
  CHECK(d.bins[1].count == 1);  // the tree emoji is one code point
}

TEST_CASE("unit_html_report: the profile page of an empty table") {
  const Table t = table_of("a,b\n");
  const TableProfile p = profile_table(t);
  ProfilePageInput in;
  in.file = "empty.csv";
  in.table = &t;
  in.profile = &p;
  const std::string page = profile_html(in);
  CHECK(page.rfind("<!DOCTYPE html>", 0) == 0);
  CHECK(page.find("0 rows, 2 columns") != std::string::npos);
  CHECK(page.find("id=\"column-2\"") != std::string::npos);
  CHECK(page.find("The detectors found no problem") != std::string::npos);
  CHECK(page.find("</html>") != std::string::npos);

  const Table none;
  const TableProfile nothing = profile_table(none);
  in.table = &none;
  in.profile = &nothing;
  in.findings_searched = false;
  const std::string bare = profile_html(in);
  CHECK(bare.find("0 rows, 0 columns") != std::string::npos);
  CHECK(bare.find("were not looked for") != std::string::npos);
}

TEST_CASE("unit_html_report: the profile page escapes names, values, findings and file names") {
  const std::string csv = "\"\"\"><img src=x onerror=alert(1)>\",n\n\"" + std::string("</style><script>alert(1)</script>") +
                          "\",1\n\"a\"\"b\",2\n";
  const Table t = table_of(csv);
  const TableProfile p = profile_table(t);
  Finding f;
  f.kind = "kind<script>";
  f.title = kHostile;
  f.columns = {kHostile};
  f.rows_affected = 2;
  f.explanation = kHostile;
  f.details = {kHostile};
  SuggestedFix fix;
  fix.step = {{"op", "trim"}, {"note", kHostile}};
  fix.why_review = kHostile;
  fix.preview.examples.push_back({kHostile, kHostile, kHostile, false, 2});
  f.fixes.push_back(fix);
  const std::vector<Finding> findings = {f};
  ProfilePageInput in;
  in.file = kHostile;
  in.table = &t;
  in.profile = &p;
  in.findings = findings;
  const std::string page = profile_html(in);
  CHECK(page.find("<script") == std::string::npos);
  CHECK(page.find("<img") == std::string::npos);
  CHECK(occurrences(page, "<style>") == 1);
  CHECK(occurrences(page, "</style>") == 1);
  CHECK(page.find("onmouseover=\"") == std::string::npos);
  CHECK(page.find("onerror=") != std::string::npos);  // as text, inside an escaped value
  CHECK(page.find("&lt;img src=x onerror=alert(1)&gt;") != std::string::npos);
  CHECK(page.find("a&quot;b") != std::string::npos);
  CHECK(page.find("id=\"finding-1\"") != std::string::npos);
}

TEST_CASE("unit_html_report: the run page shows the JSON report's numbers, escaped") {
  nlohmann::ordered_json report = {
      {"recipe", {{"title", kHostile}, {"file", "r.json"}}},
      {"input", {{"file", "in.csv"}, {"rows_read", 10}, {"rows_malformed", 1}, {"warnings", {kHostile}}}},
      {"passes", 1},
      {"steps",
       {{{"number", 1}, {"index", 0}, {"op", "trim"}, {"enabled", true}, {"sentence", kHostile},
         {"rows_in", 9}, {"rows_out", 7}, {"rows_removed", 2}, {"rows_rejected", 0},
         {"listed_rows", {{{"line", 4}, {"reason", kHostile}}, {{"line", 9}, {"reason", "duplicate of line 2"}}}},
         {"listed_rows_complete", true},
         {"cells_changed", {{kHostile, 3}}}, {"cells_changed_total", 3},
         {"samples", {{{"column", "c"}, {"before", " x"}, {"after", "x"}, {"count", 3}}}},
         {"conflicts", nlohmann::ordered_json::array()}, {"warnings", {kHostile}}},
        {{"number", 2}, {"index", 1}, {"op", "deduplicate"}, {"enabled", false}}}},
      {"output", {{"file", "out.csv"}, {"rows_written", 7}, {"columns", {{{"name", kHostile}, {"type", "text"}}}}}},
      {"totals", {{"rows_read", 10}, {"rows_written", 7}, {"rows_removed", 2}, {"rows_rejected", 1}, {"balanced", true}}}};
  const std::string page = run_report_html(report);
  CHECK(page.find("<script") == std::string::npos);
  CHECK(page.find("onmouseover=\"") == std::string::npos);
  CHECK(page.find("10 rows read = 7 written + 2 removed + 1 rejected") != std::string::npos);
  CHECK(page.find("<tr id=\"step-row-1\"><td class=\"n\">1</td>") != std::string::npos);
  CHECK(page.find("skipped: disabled in the recipe") != std::string::npos);
  CHECK(page.find("Rows removed or rejected (all 2)") != std::string::npos);
  CHECK(page.find("duplicate of line 2") != std::string::npos);
  const std::vector<double> widths = rect_attribute(page, "bar", "width");
  REQUIRE(widths.size() == 2);  // cells changed by step 1, rows removed by step 1 (step 2 is skipped)

  // A report with nothing in it still makes a page.
  const std::string bare = run_report_html(nlohmann::ordered_json::object());
  CHECK(bare.find("0 rows read = 0 written + 0 removed + 0 rejected") != std::string::npos);
  CHECK(bare.find("do NOT balance") != std::string::npos);
}
