// Rows in which every measure column is NULL. Measure columns are the
// numeric ones: typed integer/decimal columns, text columns the profile
// types as numbers, and columns numbers_as_text or decimal_comma found.
#include <algorithm>

#include "findings/detectors.hpp"

namespace tamis {

static std::vector<size_t> measure_columns(DetectorContext& ctx) {
  std::vector<size_t> out;
  for (size_t c = 0; c < ctx.table.column_count(); ++c) {
    const std::string& name = ctx.table.name(c);
    bool numeric = ctx.table.column(c).type() == Type::integer || ctx.table.column(c).type() == Type::decimal;
    for (const ColumnProfile& p : ctx.profile.columns)
      if (p.name == name && (p.type == Type::integer || p.type == Type::decimal)) numeric = true;
    for (const Finding& f : ctx.findings)
      if ((f.kind == "numbers_as_text" || f.kind == "decimal_comma") && f.columns.size() == 1 && f.columns[0] == name)
        numeric = true;
    if (numeric) out.push_back(c);
  }
  return out;
}

namespace {

// When no row misses every measure, a group of two or more measures that are
// missing together far more often than chance still marks rows without
// measures (a survey row with neither count nor rate). "Far more": at least
// kMinRows rows and kChanceFactor times the rows expected if each column
// were missing independently (our own thresholds).
constexpr uint64_t kMinRows = 3;
constexpr double kChanceFactor = 3.0;
constexpr size_t kMaxSubsetColumns = 12;  // 4096 subsets

}  // namespace

Task<> detect_empty_measure_rows(DetectorContext& ctx) {
  const std::vector<size_t> measures = measure_columns(ctx);
  if (measures.empty() || measures.size() == ctx.table.column_count()) co_return;
  const size_t n = ctx.table.row_count();
  if (n == 0) co_return;
  // Per row, the set of measure columns that are NULL (bit i = measures[i]).
  const size_t bits = std::min(measures.size(), kMaxSubsetColumns);
  const uint64_t full = (uint64_t{1} << bits) - 1;
  std::vector<uint64_t> rows_with_mask(size_t{1} << bits, 0);
  std::vector<uint64_t> nulls(bits, 0);
  for (size_t row = 0; row < n; ++row) {
    uint64_t mask = 0;
    for (size_t i = 0; i < bits; ++i)
      if (ctx.table.column(measures[i]).is_null(row)) mask |= uint64_t{1} << i, ++nulls[i];
    ++rows_with_mask[mask];
  }
  ctx.spend(n * bits);
  const auto rows_missing_all = [&](uint64_t subset) {
    uint64_t count = 0;
    for (uint64_t mask = 0; mask <= full; ++mask)
      if ((mask & subset) == subset) count += rows_with_mask[mask];
    return count;
  };
  uint64_t chosen = 0, rows = 0;
  if (measures.size() <= kMaxSubsetColumns) rows = rows_missing_all(full);
  if (rows > 0) {
    chosen = full;
  } else {
    for (uint64_t subset = 1; subset <= full; ++subset) {
      const int size = __builtin_popcountll(subset);
      if (size < 2) continue;
      const uint64_t observed = rows_missing_all(subset);
      double expected = static_cast<double>(n);
      for (size_t i = 0; i < bits; ++i)
        if (subset >> i & 1) expected *= static_cast<double>(nulls[i]) / static_cast<double>(n);
      if (observed < kMinRows || static_cast<double>(observed) < kChanceFactor * expected) continue;
      const int chosen_size = __builtin_popcountll(chosen);
      if (size > chosen_size || (size == chosen_size && observed > rows)) chosen = subset, rows = observed;
    }
  }
  if (rows == 0) co_return;
  std::string where;
  Finding f;
  f.kind = "empty_measure_rows";
  for (size_t i = 0; i < bits; ++i) {
    if (!(chosen >> i & 1)) continue;
    if (!where.empty()) where += " AND ";
    where += sql_identifier(ctx.table.name(measures[i])) + " IS NULL";
    f.columns.push_back(ctx.table.name(measures[i]));
  }
  f.rows_affected = rows;
  std::string list;
  for (size_t i = 0; i < f.columns.size(); ++i)
    list += (i == 0 ? "" : i + 1 == f.columns.size() ? " and " : ", ") + f.columns[i];
  const bool every = chosen == full && bits == measures.size();
  f.title = count_of(rows, "row has", "rows have") + " no value in " + (every ? "any measure column (" : "") + list +
            (every ? ")" : "");
  f.explanation = every ? "Every numeric column of these rows is NULL (after blanks and placeholders are read as "
                          "NULL), so they add nothing to sums or averages and can distort counts."
                        : "In these rows " + list + " are all NULL (after blanks and placeholders are read as NULL): "
                          "far more often than if each were missing on its own, so the rows were likely recorded "
                          "without their measurements.";
  f.facts["measure_columns"] = f.columns;
  f.facts["all_measures"] = every;
  f.facts["rows"] = rows;
  nlohmann::ordered_json fix_step = {{"op", "drop_rows"}, {"where", where}, {"note", "rows without measurements"}};
  co_await ctx.add_fix(f, std::move(fix_step), false,
                       "removes whole rows: their other columns may still matter (e.g. to count visits or list sites)");
  ctx.findings.push_back(std::move(f));
}

}  // namespace tamis
