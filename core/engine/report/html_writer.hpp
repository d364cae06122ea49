// Small building blocks of the HTML reports (profile page, run report):
// escaping of untrusted text, number formatting, the shared stylesheet and
// two inline SVG charts.
//
// The pages are self-contained documents an analyst attaches to a ticket:
// no script, no external resource, light background, printable. Inline SVG
// is written as well-formed XML (no HTML-only entities, no xmlns URL: the
// HTML parser puts <svg> in the SVG namespace by itself), so a fragment can
// also be read by any XML parser.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <string_view>

namespace tamis::html {

// Text for element content or a quoted attribute: & < > " ' escaped.
// Ill-formed UTF-8 becomes U+FFFD; control characters other than tab and
// newline, and Unicode noncharacters, are replaced too (the HTML standard
// calls them parse errors), C0 controls by their visible Control Pictures.
void append_escaped(std::string& out, std::string_view text);
std::string escape(std::string_view text);

// A data value shown as it is: like escape(), but tab, newline and carriage
// return are drawn as Control Pictures (U+2409, U+240A, U+240D) so a value
// that hides one is visible in the page.
std::string escape_value(std::string_view text);

// Cut to `limit` code points, with "…" when something was cut (not escaped).
std::string shorten(std::string_view text, size_t limit);

// 1234567 -> "1 234 567" with U+202F NARROW NO-BREAK SPACE between groups
// of three (the digit grouping of ISO 80000-1, which favours no decimal mark).
std::string count_text(uint64_t n);
// Up to `significant` significant digits, no exponent for ordinary
// magnitudes, trailing zeros dropped ("12.5", "0.0031", "1.2e+12").
std::string number_text(double value, int significant = 6);
// share in 0..1 as a percentage with one decimal ("97.5 %"), "100 %" and
// "0 %" exact.
std::string percent_text(double share);

// The style sheet shared by both pages (screen and print).
std::string_view style_sheet();

// Length of a bar for `value` when the largest value gets `full` units:
// proportional, 0 for 0, and never thinner than 1 unit for a non-zero value
// so a rare value stays visible.
double bar_length(uint64_t value, uint64_t largest, double full);

struct Bar {
  std::string label;  // raw text; escaped and shortened by the chart
  uint64_t value = 0;
};

// Horizontal bars, one per item, in the given order, each labelled with its
// text and count. `title` becomes the SVG's <title> and aria-label. An empty
// list gives a short paragraph saying so.
std::string bar_chart(std::span<const Bar> bars, std::string_view title, std::string_view id);

struct Bin {
  std::string low, high;  // labels of the edges ("12", "2021-03-01"); equal for a one-value bin
  uint64_t count = 0;
};

// Vertical bars of equal width, one per bin, left to right; the axis names
// the first low edge, the last high edge and the largest count.
std::string histogram_chart(std::span<const Bin> bins, std::string_view title, std::string_view axis_label,
                            std::string_view id);

}  // namespace tamis::html
