#include "html_writer.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "utf8.hpp"

namespace tamis::html {

namespace {

constexpr char32_t kReplacement = 0xFFFD;

bool is_noncharacter(char32_t c) { return (c >= 0xFDD0 && c <= 0xFDEF) || (c & 0xFFFE) == 0xFFFE; }

// Appends text escaped for HTML and XML; `show_layout` also draws tab,
// newline and carriage return as Control Pictures.
void append_text(std::string& out, std::string_view text, bool show_layout) {
  const auto* p = reinterpret_cast<const unsigned char*>(text.data());
  const auto* end = p + text.size();
  while (p < end) {
    const unsigned char b = *p;
    if (b < 0x80) {
      ++p;
      switch (b) {
        case '&': out += "&amp;"; continue;
        case '<': out += "&lt;"; continue;
        case '>': out += "&gt;"; continue;
        case '"': out += "&quot;"; continue;
        case '\'': out += "&#39;"; continue;
        default: break;
      }
      const bool layout = b == '\t' || b == '\n' || b == '\r';
      if (b >= 0x20 && b != 0x7F) out += static_cast<char>(b);
      else if (layout && !show_layout) out += static_cast<char>(b);
      else utf8::append(out, b == 0x7F ? char32_t{0x2421} : char32_t{0x2400} + b);  // Control Pictures block
      continue;
    }
    const int n = utf8::sequence_length(p, end);
    if (n <= 0) {
      utf8::append(out, kReplacement);
      ++p;
      continue;
    }
    size_t i = 0;
    const char32_t c = utf8::next(std::string_view(reinterpret_cast<const char*>(p), static_cast<size_t>(n)), i);
    if ((c >= 0x80 && c <= 0x9F) || is_noncharacter(c)) utf8::append(out, kReplacement);
    else out.append(reinterpret_cast<const char*>(p), static_cast<size_t>(n));
    p += n;
  }
}

std::string fixed(double v, int decimals = 1) {
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.*f", decimals, v);
  return buffer;
}

// SVG text drops white space at the ends of a label: draw each such space
// as U+2423 OPEN BOX so "Oak " and "Oak" look different.
std::string visible_edges(std::string_view label) {
  size_t begin = 0, end = label.size();
  while (begin < end && label[begin] == ' ') ++begin;
  while (end > begin && label[end - 1] == ' ') --end;
  std::string out;
  for (size_t i = 0; i < begin; ++i) out += "\u2423";
  out.append(label.substr(begin, end - begin));
  for (size_t i = end; i < label.size(); ++i) out += "\u2423";
  return out;
}

void open_svg(std::string& out, std::string_view css_class, std::string_view id, std::string_view title, int width,
              int height) {
  out += "<svg class=\"chart ";
  out += css_class;
  out += "\" id=\"";
  append_escaped(out, id);
  out += "\" role=\"img\" aria-label=\"";
  append_escaped(out, title);
  out += "\" viewBox=\"0 0 " + std::to_string(width) + ' ' + std::to_string(height) + "\" width=\"" +
         std::to_string(width) + "\" height=\"" + std::to_string(height) + "\"><title>";
  append_escaped(out, title);
  out += "</title>";
}

void svg_text(std::string& out, double x, double y, std::string_view anchor, std::string_view css_class,
              std::string_view escaped_text) {
  out += "<text x=\"" + fixed(x) + "\" y=\"" + fixed(y) + "\" text-anchor=\"";
  out += anchor;
  out += "\" class=\"";
  out += css_class;
  out += "\">";
  out += escaped_text;
  out += "</text>";
}

}  // namespace

void append_escaped(std::string& out, std::string_view text) { append_text(out, text, false); }

std::string escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  append_text(out, text, false);
  return out;
}

std::string escape_value(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  append_text(out, text, true);
  return out;
}

std::string shorten(std::string_view text, size_t limit) {
  if (utf8::first_invalid(text) != std::string_view::npos) return std::string(text.substr(0, limit));
  size_t i = 0, n = 0;
  while (i < text.size() && n < limit) {
    utf8::next(text, i);
    ++n;
  }
  if (i >= text.size()) return std::string(text);
  return std::string(text.substr(0, i)) + "\u2026";
}

std::string count_text(uint64_t n) {
  const std::string digits = std::to_string(n);
  std::string out;
  for (size_t i = 0; i < digits.size(); ++i) {
    if (i > 0 && (digits.size() - i) % 3 == 0) out += "\u202F";
    out += digits[i];
  }
  return out;
}

std::string number_text(double value, int significant) {
  if (!std::isfinite(value)) return std::isnan(value) ? "not a number" : (value > 0 ? "\u221E" : "\u2212\u221E");
  if (value == 0) value = 0;  // no negative zero
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "%.*g", significant, value);
  return buffer;
}

std::string percent_text(double share) {
  if (share >= 1) return "100%";
  if (share <= 0) return "0%";
  // Rounded down, so a column with one misfit never reads "100%".
  const double tenths = std::floor(share * 1000) / 10;
  if (tenths <= 0) return "<0.1%";
  return fixed(tenths) + "%";
}

double bar_length(uint64_t value, uint64_t largest, double full) {
  if (value == 0 || largest == 0) return 0;
  return std::max(1.0, full * static_cast<double>(value) / static_cast<double>(largest));
}

std::string bar_chart(std::span<const Bar> bars, std::string_view title, std::string_view id) {
  if (bars.empty()) return "<p class=\"empty-chart\">" + escape(title) + ": nothing to draw.</p>";
  constexpr int kWidth = 640, kRow = 22, kLabelRight = 206, kBarLeft = 214;
  constexpr double kFull = 340;
  uint64_t largest = 0;
  for (const Bar& b : bars) largest = std::max(largest, b.value);
  const int height = static_cast<int>(bars.size()) * kRow + 6;
  std::string out;
  open_svg(out, "bars", id, title, kWidth, height);
  for (size_t i = 0; i < bars.size(); ++i) {
    const Bar& b = bars[i];
    const double top = 3 + static_cast<double>(i) * kRow;
    const double length = bar_length(b.value, largest, kFull);
    out += "<g class=\"bar-row\">";
    if (b.label.empty()) svg_text(out, kLabelRight, top + 13, "end", "label absent", "(empty text)");
    else svg_text(out, kLabelRight, top + 13, "end", "label", escape_value(visible_edges(shorten(b.label, 30))));
    out += "<rect class=\"bar\" x=\"" + std::to_string(kBarLeft) + "\" y=\"" + fixed(top + 2) + "\" width=\"" +
           fixed(length, 2) + "\" height=\"14\"><title>";
    out += escape_value(b.label.empty() ? std::string_view("(empty text)") : std::string_view(b.label));
    out += ": " + count_text(b.value) + "</title></rect>";
    svg_text(out, kBarLeft + length + 6, top + 13, "start", "count", count_text(b.value));
    out += "</g>";
  }
  out += "</svg>";
  return out;
}

std::string histogram_chart(std::span<const Bin> bins, std::string_view title, std::string_view axis_label,
                            std::string_view id) {
  if (bins.empty()) return "<p class=\"empty-chart\">" + escape(title) + ": no values to draw.</p>";
  constexpr int kWidth = 640, kHeight = 206;
  constexpr double kLeft = 64, kRight = 630, kTop = 14, kBase = 160;
  uint64_t largest = 0;
  for (const Bin& b : bins) largest = std::max(largest, b.count);
  const double step = (kRight - kLeft) / static_cast<double>(bins.size());
  const double gap = step > 4 ? 1 : 0;
  std::string out;
  open_svg(out, "histogram", id, title, kWidth, kHeight);
  out += "<line class=\"axis\" x1=\"" + fixed(kLeft) + "\" y1=\"" + fixed(kBase) + "\" x2=\"" + fixed(kRight) +
         "\" y2=\"" + fixed(kBase) + "\"/>";
  svg_text(out, kLeft - 6, kTop + 4, "end", "tick", count_text(largest));
  svg_text(out, kLeft - 6, kBase, "end", "tick", "0");
  for (size_t i = 0; i < bins.size(); ++i) {
    const Bin& b = bins[i];
    const double h = bar_length(b.count, largest, kBase - kTop);
    out += "<rect class=\"bin\" x=\"" + fixed(kLeft + static_cast<double>(i) * step, 2) + "\" y=\"" +
           fixed(kBase - h, 2) + "\" width=\"" + fixed(step - gap, 2) + "\" height=\"" + fixed(h, 2) + "\"><title>";
    out += escape_value(b.low);
    if (b.high != b.low) out += " to " + escape_value(b.high);
    out += ": " + count_text(b.count) + "</title></rect>";
  }
  svg_text(out, kLeft, kBase + 16, "start", "tick", escape_value(shorten(bins.front().low, 24)));
  svg_text(out, kRight, kBase + 16, "end", "tick", escape_value(shorten(bins.back().high, 24)));
  svg_text(out, (kLeft + kRight) / 2, kBase + 38, "middle", "axis-label", escape(axis_label));
  out += "</svg>";
  return out;
}

std::string_view style_sheet() {
  // Our own look: paper-white page, slate ink, one moss-green accent for
  // data marks and an ochre one for what needs attention.
  return R"css(
:root { --ink: #1f2a33; --muted: #5b6770; --paper: #fdfcf8; --rule: #d9d5c7; --mark: #4f7a3a;
  --mark-soft: #e5eedc; --attention: #9a5b13; --attention-soft: #f6ead8; --panel: #ffffff; }
* { box-sizing: border-box; }
body { margin: 0; background: var(--paper); color: var(--ink);
  font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif; }
main { max-width: 1040px; margin: 0 auto; padding: 0 24px 48px; }
header.page { border-bottom: 3px double var(--rule); padding: 28px 0 14px; margin-bottom: 18px; }
header.page .kind { margin: 0; font-size: 13px; letter-spacing: .08em; text-transform: uppercase; color: var(--mark); }
header.page h1 { margin: 4px 0 6px; font-size: 26px; overflow-wrap: anywhere; }
header.page p { margin: 2px 0; color: var(--muted); }
h2 { font-size: 20px; margin: 32px 0 10px; }
h3 { font-size: 16px; margin: 18px 0 6px; }
nav.contents ol { columns: 3 14em; margin: 0; padding-left: 1.4em; }
nav.contents a, a { color: #285f73; }
table { border-collapse: collapse; margin: 6px 0 12px; font-variant-numeric: tabular-nums; }
caption { text-align: left; font-weight: 600; padding: 4px 0; }
th, td { border-bottom: 1px solid var(--rule); padding: 4px 10px 4px 0; text-align: left; vertical-align: top; }
thead th { border-bottom: 2px solid var(--ink); font-size: 13px; }
td.n, th.n { text-align: right; padding-left: 10px; }
.wide { width: 100%; }
section.card { background: var(--panel); border: 1px solid var(--rule); border-left: 6px solid var(--mark);
  border-radius: 4px; padding: 6px 20px 14px; margin: 22px 0; }
section.card.needs-look { border-left-color: var(--attention); }
.card h2, .card h3.title { margin-top: 10px; }
.ordinal { display: inline-block; min-width: 1.8em; color: var(--muted); font-weight: 400; }
.tag { display: inline-block; font-size: 12px; font-weight: 600; padding: 0 7px; border-radius: 9px;
  background: var(--mark-soft); color: #2f4d22; vertical-align: middle; margin-left: 6px; }
.tag.review { background: var(--attention-soft); color: var(--attention); }
dl.facts { display: grid; grid-template-columns: repeat(auto-fill, minmax(150px, 1fr)); gap: 6px 16px; margin: 8px 0 12px; }
dl.facts div { border-top: 1px solid var(--rule); padding-top: 3px; }
dl.facts dt { font-size: 12px; color: var(--muted); }
dl.facts dd { margin: 0; font-size: 17px; font-variant-numeric: tabular-nums; overflow-wrap: anywhere; }
code.v { font-family: ui-monospace, "DejaVu Sans Mono", Menlo, Consolas, monospace; font-size: 13px;
  white-space: pre-wrap; overflow-wrap: anywhere; background: #f3f1ea; outline: 1px dotted #b9b3a0; padding: 0 1px; }
.absent { font-style: italic; color: var(--muted); }
.charts { display: flex; flex-wrap: wrap; gap: 10px 28px; }
figure { margin: 8px 0; }
figcaption { font-size: 13px; color: var(--muted); max-width: 640px; }
svg.chart { max-width: 100%; height: auto; display: block; }
svg.chart text { font-size: 12px; fill: var(--ink); white-space: pre; }
svg.chart text.count, svg.chart text.tick { fill: var(--muted); font-variant-numeric: tabular-nums; }
svg.chart text.absent { font-style: italic; fill: var(--muted); }
svg.chart .bar, svg.chart .bin { fill: var(--mark); }
svg.chart .bar.second { fill: var(--attention); }
svg.chart .axis { stroke: var(--ink); stroke-width: 1; }
pre.step { background: #f3f1ea; border: 1px solid var(--rule); padding: 6px 10px; white-space: pre-wrap;
  overflow-wrap: anywhere; font-size: 13px; }
.balance { font-size: 17px; padding: 8px 12px; border: 1px solid var(--rule); background: var(--panel); }
.balance.off { border-color: var(--attention); background: var(--attention-soft); }
ul.notes li { margin: 2px 0; }
footer { margin-top: 40px; color: var(--muted); font-size: 13px; border-top: 1px solid var(--rule); padding-top: 8px; }
@media print {
  body { background: #fff; font-size: 11pt; }
  main { max-width: none; padding: 0; }
  nav.contents { display: none; }
  section.card { break-inside: avoid; border-color: #999; }
  figure, table, svg.chart { break-inside: avoid; }
  a { color: inherit; text-decoration: none; }
  h2, h3 { break-after: avoid; }
}
)css";
}

}  // namespace tamis::html
