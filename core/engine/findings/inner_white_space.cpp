// White space inside a value that is not a single space: doubled spaces, tabs,
// line breaks, no-break spaces between two other characters.
#include "findings/detectors.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

// True when a run of white space between two other characters is longer than
// one character or is not U+0020.
bool has_odd_inner_space(std::string_view value) {
  const std::string_view core = utf8::trim_white_space(value);
  size_t i = 0;
  size_t run = 0;
  bool odd = false;
  while (i < core.size()) {
    const char32_t c = utf8::next(core, i);
    if (utf8::is_white_space(c)) {
      ++run;
      if (c != U' ') odd = true;
      if (run > 1) odd = true;
      if (odd) return true;
    } else {
      run = 0;
    }
  }
  return false;
}

}  // namespace

Task<> detect_inner_white_space(DetectorContext& ctx) {
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    uint64_t rows = 0, line_breaks = 0;
    for (const DistinctValue& v : ctx.values(c).values) {
      if (!has_odd_inner_space(v.value)) continue;
      rows += v.count;
      const std::string_view core = utf8::trim_white_space(v.value);
      if (core.find_first_of("\r\n") != std::string_view::npos) line_breaks += v.count;
    }
    if (rows == 0) continue;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "inner_white_space";
    f.columns = {name};
    f.rows_affected = rows;
    f.title = name + ": " + count_of(rows, "value has", "values have") + " doubled spaces, tabs or line breaks inside";
    f.explanation = "Inside these values white space is doubled or is a tab, line break or no-break space, so "
                    "\"Crab  apple\" and \"Crab apple\" count as different values. Collapsing turns every such run "
                    "into one space.";
    f.facts["values"] = rows;
    f.facts["line_breaks"] = line_breaks;
    if (line_breaks) f.details.push_back(count_of(line_breaks, "value contains", "values contain") + " a line break");
    nlohmann::ordered_json fix_step = {
        {"op", "collapse_spaces"}, {"columns", {name}}, {"note", "one space between words"}};
    co_await ctx.add_fix(f, std::move(fix_step), false,
                         "a line break or tab inside a value can be deliberate (an address, a list); look at the examples");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
