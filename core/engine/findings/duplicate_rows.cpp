// Exact duplicate rows: every cell equal to an earlier row's. The fix is the
// deduplicate step itself, so the count is what deduplicate removes (NULLs
// equal each other, as in SQL's PARTITION BY).
#include "findings/detectors.hpp"

namespace tamis {

Task<> detect_duplicate_rows(DetectorContext& ctx) {
  if (ctx.table.row_count() < 2 || ctx.table.column_count() == 0) co_return;
  Finding f;
  f.kind = "duplicate_rows";
  nlohmann::ordered_json step = {{"op", "deduplicate"},
                                 {"columns", "*"},
                                 {"keep", "first"},
                                 {"note", "remove rows identical to an earlier row, keeping the first"}};
  if (!co_await ctx.add_fix(f, std::move(step), true, "")) co_return;
  const uint64_t repeats = f.fixes.front().preview.rows_removed;
  if (repeats == 0) co_return;
  f.columns = ctx.table.names();
  f.rows_affected = repeats;
  f.title = count_of(repeats, "row repeats", "rows repeat") + " an earlier row exactly";
  f.explanation =
      "These rows are identical, cell for cell, to a row above them; typically the same record was exported or "
      "entered twice. Removing the later copies keeps the first one of each.";
  f.facts["duplicate_rows"] = repeats;
  ctx.findings.push_back(std::move(f));
}

}  // namespace tamis
