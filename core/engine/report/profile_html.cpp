#include "report/profile_html.hpp"

#include <algorithm>
#include <cmath>
#include <functional>
#include <map>
#include <optional>

#include "dates.hpp"
#include "scalars.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

using html::count_text;
using html::escape;
using html::escape_value;

constexpr size_t kMaxBins = 30;
constexpr size_t kPerLengthLimit = 40;

// Sturges' rule (1926): ceil(log2 n) + 1 bins — common practice.
size_t sturges_bins(uint64_t n) {
  if (n <= 1) return 1;
  return std::min(kMaxBins, static_cast<size_t>(std::ceil(std::log2(static_cast<double>(n)))) + 1);
}

// Profiling's reading of a date: a number is never a date, and the first
// common format that takes the whole value wins.
std::optional<int32_t> date_of(std::string_view t) {
  if (t.size() < 6 || t.size() > 32 || parse_double(t)) return std::nullopt;
  for (const DateFormat& f : common_date_formats())
    if (auto d = f.parse(t)) return d;
  return std::nullopt;
}

double pow10(int scale) {
  double p = 1;
  for (int i = 0; i < scale; ++i) p *= 10;
  return p;
}

// Calls visit(value) for every value of the column that reads as `type`.
void for_each_typed(const Column& column, Type type, const std::function<void(double)>& visit) {
  const bool stored_typed = column.type() != Type::text;
  const double divisor = pow10(column.scale());
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    for (size_t i = 0; i < chunk.rows; ++i) {
      if (chunk.is_null(i)) continue;
      if (stored_typed) {
        const double v = static_cast<double>(chunk.numbers[i]);
        visit(column.type() == Type::decimal ? v / divisor : v);
        continue;
      }
      const std::string_view t = utf8::trim_white_space(chunk.text(i));
      if (t.empty()) continue;
      if (type == Type::date) {
        if (auto d = date_of(t)) visit(*d);
      } else if (auto d = parse_double(t)) {
        visit(*d);
      }
    }
  }
}

// Whole-number values (integers, days, lengths): one bin per value when the
// range is small, else equal bins of a whole width.
std::vector<html::Bin> integral_bins(const std::map<int64_t, uint64_t>& counts, size_t per_value_limit,
                                     const std::function<std::string(int64_t)>& label) {
  std::vector<html::Bin> bins;
  if (counts.empty()) return bins;
  const int64_t lo = counts.begin()->first, hi = counts.rbegin()->first;
  const uint64_t span = static_cast<uint64_t>(hi - lo) + 1;
  uint64_t total = 0;
  for (const auto& entry : counts) total += entry.second;
  uint64_t width = 1;
  if (span > per_value_limit) {
    const uint64_t k = sturges_bins(total);
    width = (span + k - 1) / k;
  }
  const uint64_t k = (span + width - 1) / width;
  bins.resize(k);
  for (uint64_t i = 0; i < k; ++i) {
    const int64_t low = lo + static_cast<int64_t>(i * width);
    const int64_t high = std::min(hi, low + static_cast<int64_t>(width) - 1);
    bins[i].low = label(low);
    bins[i].high = label(high);
  }
  for (const auto& [value, n] : counts) bins[static_cast<uint64_t>(value - lo) / width].count += n;
  return bins;
}

std::vector<html::Bin> real_bins(const std::vector<double>& values) {
  std::vector<html::Bin> bins;
  if (values.empty()) return bins;
  const auto [lo_it, hi_it] = std::minmax_element(values.begin(), values.end());
  const double lo = *lo_it, hi = *hi_it;
  if (lo == hi) {
    bins.push_back({html::number_text(lo), html::number_text(lo), values.size()});
    return bins;
  }
  const size_t k = sturges_bins(values.size());
  const double width = (hi - lo) / static_cast<double>(k);
  bins.resize(k);
  for (size_t i = 0; i < k; ++i) {
    bins[i].low = html::number_text(lo + width * static_cast<double>(i));
    bins[i].high = html::number_text(i + 1 == k ? hi : lo + width * static_cast<double>(i + 1));
  }
  for (double v : values) bins[std::min(k - 1, static_cast<size_t>((v - lo) / width))].count += 1;
  return bins;
}

bool whole(double v) { return std::floor(v) == v && std::fabs(v) < 9e15; }

// ---- page parts -----------------------------------------------------------

std::string value_html(std::string_view v) {
  if (v.empty()) return "<span class=\"absent\">(empty text)</span>";
  return "<code class=\"v\">" + escape_value(v) + "</code>";
}

void fact(std::string& out, std::string_view term, const std::string& definition_html) {
  out += "<div><dt>";
  out += term;
  out += "</dt><dd>";
  out += definition_html;
  out += "</dd></div>";
}

std::string share_of(uint64_t part, uint64_t whole_count) {
  if (whole_count == 0 || part == 0) return "";
  return " <small>(" + html::percent_text(static_cast<double>(part) / static_cast<double>(whole_count)) + ")</small>";
}

void write_header(std::string& out, const ProfilePageInput& in) {
  const TableProfile& p = *in.profile;
  out += "<header class=\"page\"><p class=\"kind\">tamis \u00B7 column profile</p><h1>";
  out += escape(in.file);
  out += "</h1><p>" + count_text(p.rows) + (p.rows == 1 ? " row, " : " rows, ") + count_text(p.columns.size()) +
         (p.columns.size() == 1 ? " column" : " columns") + "</p>";
  if (in.read) {
    const ReadReport& r = *in.read;
    out += "<p>Read as " + escape(encoding_name(r.encoding)) + " (" + escape(r.encoding_reason) + "), delimiter ";
    out += r.delimiter == '\t' ? std::string("tab") : "<code class=\"v\">" + escape(std::string(1, r.delimiter)) + "</code>";
    out += " (" + escape(r.delimiter_reason) + "), header " + std::string(r.header ? "yes" : "no") + " (" +
           escape(r.header_reason) + ").</p>";
    if (r.rejected) {
      out += "<p>" + count_text(r.rejected) + " malformed " + (r.rejected == 1 ? "record" : "records") +
             " set aside, not profiled (first at line";
      out += r.first_rejected_lines.size() == 1 ? " " : "s ";
      for (size_t i = 0; i < r.first_rejected_lines.size(); ++i)
        out += (i ? ", " : "") + std::to_string(r.first_rejected_lines[i]);
      out += ").</p>";
    }
    const std::vector<std::string> warnings = r.warnings();
    if (!warnings.empty()) {
      out += "<ul class=\"notes\">";
      for (const std::string& w : warnings) out += "<li>Warning: " + escape(w) + "</li>";
      out += "</ul>";
    }
  }
  out += "</header>";
}

void write_contents(std::string& out, const ProfilePageInput& in) {
  out += "<nav class=\"contents\" aria-label=\"Contents\"><h2>Contents</h2><ol>";
  out += "<li><a href=\"#findings\">Findings</a></li><li><a href=\"#overview\">Columns at a glance</a></li>";
  for (size_t c = 0; c < in.profile->columns.size(); ++c)
    out += "<li><a href=\"#column-" + std::to_string(c + 1) + "\">" + escape_value(in.profile->columns[c].name) +
           "</a></li>";
  out += "</ol></nav>";
}

void write_fix(std::string& out, const SuggestedFix& fix, size_t number, bool first) {
  out += "<h4>Fix " + std::to_string(number) + (first ? " (recommended)" : "") + " <span class=\"tag";
  out += fix.safe ? "\">safe to apply" : " review\">needs a decision";
  out += "</span></h4>";
  if (!fix.why_review.empty()) out += "<p>Why a person should decide: " + escape(fix.why_review) + "</p>";
  const FixPreview& pv = fix.preview;
  out += "<p>Preview on this file: " + count_text(pv.cells_changed) +
         (pv.cells_changed == 1 ? " cell changed, " : " cells changed, ") + count_text(pv.rows_removed) +
         (pv.rows_removed == 1 ? " row removed." : " rows removed.") + "</p>";
  if (!pv.examples.empty()) {
    out += "<table><caption>Examples</caption><thead><tr><th scope=\"col\" class=\"n\">Line</th>"
           "<th scope=\"col\">Column</th><th scope=\"col\">Before</th><th scope=\"col\">After</th></tr></thead><tbody>";
    for (const FixExample& e : pv.examples) {
      out += "<tr><td class=\"n\">" + std::to_string(e.source_line) + "</td><td>" +
             (e.removed ? std::string("<span class=\"absent\">whole row</span>") : escape_value(e.column)) +
             "</td><td>" + value_html(e.before) + "</td><td>" +
             (e.removed ? std::string("<span class=\"absent\">removed</span>") : value_html(e.after)) + "</td></tr>";
    }
    out += "</tbody></table>";
  }
  if (!pv.warnings.empty()) {
    out += "<ul class=\"notes\">";
    for (const std::string& w : pv.warnings) out += "<li>" + escape(w) + "</li>";
    out += "</ul>";
  }
  out += "<p>Recipe step:</p><pre class=\"step\">";
  out += escape(fix.step.dump(2, ' ', false, nlohmann::ordered_json::error_handler_t::replace));
  out += "</pre>";
}

void write_findings(std::string& out, const ProfilePageInput& in) {
  out += "<section id=\"findings\"><h2>Findings</h2>";
  if (!in.findings_searched) {
    out += "<p>Findings were not looked for on this page.</p></section>";
    return;
  }
  if (in.findings.empty()) {
    out += "<p>The detectors found no problem in this file.</p></section>";
    return;
  }
  out += "<p>" + count_text(in.findings.size()) + (in.findings.size() == 1 ? " finding" : " findings") +
         ", most rows affected first.</p>";
  out += "<table class=\"wide\"><thead><tr><th scope=\"col\" class=\"n\">#</th><th scope=\"col\">Finding</th>"
         "<th scope=\"col\">Columns</th><th scope=\"col\" class=\"n\">Rows affected</th></tr></thead><tbody>";
  auto column_list = [](const Finding& f) {
    std::string s;
    for (size_t i = 0; i < f.columns.size(); ++i) s += (i ? ", " : "") + escape_value(f.columns[i]);
    return s.empty() ? std::string("<span class=\"absent\">whole rows</span>") : s;
  };
  for (size_t i = 0; i < in.findings.size(); ++i) {
    const Finding& f = in.findings[i];
    out += "<tr><td class=\"n\">" + std::to_string(i + 1) + "</td><td><a href=\"#finding-" + std::to_string(i + 1) +
           "\">" + escape(f.title) + "</a></td><td>" + column_list(f) + "</td><td class=\"n\">" +
           count_text(f.rows_affected) + "</td></tr>";
  }
  out += "</tbody></table>";
  for (size_t i = 0; i < in.findings.size(); ++i) {
    const Finding& f = in.findings[i];
    out += "<section class=\"card needs-look\" id=\"finding-" + std::to_string(i + 1) + "\"><h3 class=\"title\">" +
           "<span class=\"ordinal\">" + std::to_string(i + 1) + "</span>" + escape(f.title) + " <span class=\"tag\">" +
           escape(f.kind) + "</span></h3>";
    out += "<p>Columns: " + column_list(f) + " \u00B7 rows affected: " + count_text(f.rows_affected) + "</p>";
    out += "<p>" + escape(f.explanation) + "</p>";
    if (!f.details.empty()) {
      out += "<ul class=\"notes\">";
      for (const std::string& d : f.details) out += "<li>" + escape_value(d) + "</li>";
      out += "</ul>";
    }
    for (size_t j = 0; j < f.fixes.size(); ++j) write_fix(out, f.fixes[j], j + 1, j == 0);
    out += "</section>";
  }
  out += "</section>";
}

std::string range_cell(const std::optional<std::string>& v) {
  return v ? value_html(*v) : std::string("<span class=\"absent\">none</span>");
}

void write_overview(std::string& out, const TableProfile& p) {
  out += "<section id=\"overview\"><h2>Columns at a glance</h2>";
  out += "<table class=\"wide overview\"><thead><tr><th scope=\"col\" class=\"n\">#</th><th scope=\"col\">Column</th>"
         "<th scope=\"col\">Type</th><th scope=\"col\" class=\"n\">Fit</th><th scope=\"col\" class=\"n\">Rows</th>"
         "<th scope=\"col\" class=\"n\">NULLs</th><th scope=\"col\" class=\"n\">Blanks</th>"
         "<th scope=\"col\" class=\"n\">Distinct</th><th scope=\"col\">Min</th><th scope=\"col\">Max</th></tr></thead>"
         "<tbody>";
  for (size_t c = 0; c < p.columns.size(); ++c) {
    const ColumnProfile& col = p.columns[c];
    out += "<tr><td class=\"n\">" + std::to_string(c + 1) + "</td><th scope=\"row\"><a href=\"#column-" +
           std::to_string(c + 1) + "\">" + escape_value(col.name) + "</a></th><td>" +
           std::string(type_name(col.type)) + "</td><td class=\"n\">" + html::percent_text(col.type_share) +
           "</td><td class=\"n\">" + count_text(col.rows) + "</td><td class=\"n\">" + count_text(col.nulls) +
           "</td><td class=\"n\">" + count_text(col.blanks) + "</td><td class=\"n\">" + count_text(col.distinct) +
           "</td><td>" + range_cell(col.min) + "</td><td>" + range_cell(col.max) + "</td></tr>";
  }
  out += "</tbody></table></section>";
}

void write_column(std::string& out, const ProfilePageInput& in, size_t c) {
  const ColumnProfile& col = in.profile->columns[c];
  const std::string id = "column-" + std::to_string(c + 1);
  out += "<section class=\"card column\" id=\"" + id + "\" aria-labelledby=\"" + id + "-name\"><h2 id=\"" + id +
         "-name\"><span class=\"ordinal\">" + std::to_string(c + 1) + "</span><span class=\"name\">" +
         escape_value(col.name) + "</span> <span class=\"tag\">" + std::string(type_name(col.type)) +
         "</span></h2><dl class=\"facts\">";
  fact(out, "Rows", count_text(col.rows));
  fact(out, "NULLs", count_text(col.nulls) + share_of(col.nulls, col.rows));
  fact(out, "Blanks", count_text(col.blanks) + share_of(col.blanks, col.rows));
  fact(out, "Distinct", count_text(col.distinct));
  fact(out, "Type", std::string(type_name(col.type)));
  fact(out, "Fit the type", html::percent_text(col.type_share) + " <small>of " + count_text(col.non_blank) +
                                " non-blank</small>");
  fact(out, "Min", range_cell(col.min));
  fact(out, "Max", range_cell(col.max));
  if (col.mean) fact(out, "Mean", html::number_text(*col.mean));
  if (col.std_dev) fact(out, "Standard deviation", html::number_text(*col.std_dev));
  fact(out, "Length", count_text(col.length_min) + "\u2013" + count_text(col.length_max) + " <small>characters</small>");
  fact(out, "White space at an end", count_text(col.edge_whitespace));
  fact(out, "Ending in punctuation", count_text(col.trailing_punctuation));
  out += "</dl>";
  if (!col.quantiles.empty()) {
    out += "<table class=\"quantiles\"><caption>Quantiles (Hyndman &amp; Fan type 7)</caption><thead><tr>";
    for (const Quantile& q : col.quantiles) out += "<th scope=\"col\" class=\"n\">" + html::number_text(q.p * 100) + "%</th>";
    out += "</tr></thead><tbody><tr>";
    for (const Quantile& q : col.quantiles) out += "<td class=\"n\">" + html::number_text(q.value) + "</td>";
    out += "</tr></tbody></table>";
  }
  out += "<div class=\"charts\"><figure>";
  std::vector<html::Bar> bars;
  uint64_t listed = 0;
  for (const ValueCount& v : col.top_values) {
    bars.push_back({v.value, v.count});
    listed += v.count;
  }
  out += html::bar_chart(bars, "Most frequent values of " + col.name, id + "-top");
  out += "<figcaption>The " + std::to_string(bars.size()) + " most frequent values cover " + count_text(listed) +
         " of " + count_text(col.rows - col.nulls) + " non-NULL values. \u2423 marks a space at either end.</figcaption>";
  out += "</figure>";
  if (in.table && c < in.table->column_count()) {
    const Distribution d = column_distribution(*in.table, c, col);
    if (d.kind != DistributionKind::none) {
      const bool lengths = d.kind == DistributionKind::lengths;
      const std::string title = (lengths ? "Length distribution of " : "Distribution of ") + col.name;
      out += "<figure>" +
             html::histogram_chart(d.bins, title, lengths ? "length in characters" : std::string(type_name(col.type)),
                                   id + "-distribution");
      out += "<figcaption>" + count_text(d.counted) +
             (lengths ? " non-NULL values by length in code points, "
                      : " values that read as " + std::string(type_name(col.type)) + ", ") +
             count_text(d.bins.size()) + (d.bins.size() == 1 ? " bin." : " bins.") + "</figcaption></figure>";
    }
  }
  out += "</div>";
  if (!col.shapes.empty()) {
    out += "<table class=\"shapes\"><caption>Character shapes (A upper-case run, a lower-case run, 9 digit)</caption>"
           "<thead><tr><th scope=\"col\">Shape</th><th scope=\"col\" class=\"n\">Values</th></tr></thead><tbody>";
    for (const ValueCount& s : col.shapes)
      out += "<tr><td>" + value_html(s.value) + "</td><td class=\"n\">" + count_text(s.count) + "</td></tr>";
    out += "</tbody></table>";
  }
  out += "</section>";
}

}  // namespace

Distribution column_distribution(const Table& table, size_t column, const ColumnProfile& profile) {
  Distribution d;
  const Column& col = table.column(column);
  switch (profile.type) {
    case Type::boolean:
      return d;
    case Type::integer:
    case Type::decimal: {
      std::vector<double> values;
      bool all_whole = true;
      for_each_typed(col, profile.type, [&](double v) {
        values.push_back(v);
        all_whole = all_whole && whole(v);
      });
      d.kind = DistributionKind::values;
      d.counted = values.size();
      if (all_whole) {
        std::map<int64_t, uint64_t> counts;
        for (double v : values) ++counts[static_cast<int64_t>(v)];
        d.bins = integral_bins(counts, kMaxBins, [](int64_t v) { return std::to_string(v); });
      } else {
        d.bins = real_bins(values);
      }
      return d;
    }
    case Type::date: {
      std::map<int64_t, uint64_t> counts;
      for_each_typed(col, Type::date, [&](double v) {
        ++counts[static_cast<int64_t>(v)];
        ++d.counted;
      });
      d.kind = DistributionKind::values;
      d.bins = integral_bins(counts, kMaxBins, [](int64_t v) { return iso_date(static_cast<int32_t>(v)); });
      return d;
    }
    case Type::text: {
      if (col.type() != Type::text) return d;
      std::map<int64_t, uint64_t> counts;
      for (size_t k = 0; k < col.chunk_count(); ++k) {
        const ColumnChunk& chunk = col.chunk(k);
        for (size_t i = 0; i < chunk.rows; ++i)
          if (!chunk.is_null(i)) ++counts[static_cast<int64_t>(utf8::code_point_count(chunk.text(i)))];
      }
      for (const auto& entry : counts) d.counted += entry.second;
      d.kind = DistributionKind::lengths;
      d.bins = integral_bins(counts, kPerLengthLimit, [](int64_t v) { return std::to_string(v); });
      return d;
    }
  }
  return d;
}

std::string profile_html(const ProfilePageInput& in) {
  std::string out;
  out += "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
         "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
         "<meta name=\"generator\" content=\"tamis\"><title>Profile of ";
  out += escape(in.file);
  out += "</title><style>";
  out += html::style_sheet();
  out += "</style></head><body><main>";
  write_header(out, in);
  write_contents(out, in);
  write_findings(out, in);
  write_overview(out, *in.profile);
  for (size_t c = 0; c < in.profile->columns.size(); ++c) write_column(out, in, c);
  out += "<footer>Written by tamis. Counts are exact; NULL is a missing value, a blank is text that is empty or only "
         "white space.</footer></main></body></html>\n";
  return out;
}

}  // namespace tamis
