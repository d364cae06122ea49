// White space (Unicode White_Space) at the start or end of a text value. Values
// made only of white space are blanks, which missing_as_text reports.
#include "findings/detectors.hpp"
#include "utf8.hpp"

namespace tamis {

Task<> detect_edge_white_space(DetectorContext& ctx) {
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    uint64_t rows = 0, distinct = 0;
    for (const DistinctValue& v : ctx.values(c).values) {
      if (utf8::is_blank(v.value)) continue;
      if (utf8::starts_with_white_space(v.value) || utf8::ends_with_white_space(v.value)) rows += v.count, ++distinct;
    }
    if (rows == 0) continue;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "edge_white_space";
    f.columns = {name};
    f.rows_affected = rows;
    f.title = name + ": " + count_of(rows, "value has", "values have") + " white space at the start or end";
    f.explanation = "Spaces, tabs or no-break spaces around a value make \"Oak\" and \"Oak \" count as different "
                    "values and break joins and filters. Trimming removes them and nothing else.";
    f.facts["values"] = rows;
    f.facts["distinct_values"] = distinct;
    nlohmann::ordered_json fix_step = {
        {"op", "trim"}, {"columns", {name}}, {"note", "remove white space around values"}};
    co_await ctx.add_fix(f, std::move(fix_step), true, "");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
