// Columns that carry no information: NULL in every row, or one and the same
// value in every row.
#include <set>

#include "findings/detectors.hpp"

namespace tamis {

Task<> detect_useless_columns(DetectorContext& ctx) {
  if (ctx.table.row_count() < 2) co_return;
  for (size_t c = 0; c < ctx.table.column_count(); ++c) {
    const Column& column = ctx.table.column(c);
    uint64_t nulls = 0;
    std::set<std::string> distinct;
    for (size_t row = 0; row < column.size() && distinct.size() < 2; ++row) {
      if (column.is_null(row)) ++nulls;
      else distinct.insert(cell_text(column, row));
    }
    const bool all_null = nulls == column.size();
    const bool constant = nulls == 0 && distinct.size() == 1;
    if (!all_null && !constant) continue;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "useless_columns";
    f.columns = {name};
    f.rows_affected = column.size();
    if (all_null) {
      f.title = name + ": NULL in every row";
      f.explanation = "The column holds no value at all (after blanks and placeholders are read as NULL).";
    } else {
      f.title = name + ": the same value in every row";
      f.explanation = "Every row holds " + shown_value(*distinct.begin()) + ", so the column tells rows apart in no way.";
    }
    f.facts["all_null"] = all_null;
    f.facts["constant"] = constant;
    nlohmann::ordered_json fix_step = {
        {"op", "drop_columns"}, {"columns", {name}}, {"note", "the column carries no information"}};
    co_await ctx.add_fix(f, std::move(fix_step), false,
                         "whoever reads the output may expect the column (a batch id, a fixed unit); dropping it changes the layout");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
