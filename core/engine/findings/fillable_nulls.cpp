// NULLs another column could fill: a key column K such that rows with the
// same K nearly always agree on the value of column C (a functional
// dependency K -> C with few exceptions). Candidate keys are the other text
// columns whose values repeat (on average at least kMinGroupSize rows per
// value); a key qualifies when, over the groups with two or more values, at
// least kAgreement of the rows hold their group's most frequent value. Among
// qualifying keys the one that fills the most NULLs wins, then the one with
// fewer conflicting groups. The column is first given the variant fixes
// earlier findings suggest for it (inner spaces, case, punctuation, similar spellings),
// since a stray "Fenmor" makes a group look like a conflict.
#include <map>
#include <unordered_map>

#include "findings/detectors.hpp"

namespace tamis {

namespace {

constexpr uint64_t kMinGroupSize = 5;  // our own choice: a key that repeats, not an identifier
constexpr double kAgreement = 0.9;     // our own choice: one row in ten may disagree (variant spellings)

struct KeyScore {
  size_t key = 0;
  uint64_t fillable = 0;        // NULLs in groups with exactly one distinct value
  uint64_t conflicting = 0;     // groups with two or more distinct values and a NULL
  uint64_t conflict_nulls = 0;  // NULLs in those groups
  double agreement = 0;
};

KeyScore score(const Table& table, size_t column, size_t key) {
  struct Group {
    std::map<std::string_view, uint64_t> values;
    uint64_t nulls = 0;
  };
  std::unordered_map<std::string_view, Group> groups;
  const Column& target = table.column(column);
  const Column& keys = table.column(key);
  for (size_t row = 0; row < table.row_count(); ++row) {
    if (keys.is_null(row)) continue;
    Group& g = groups[keys.text(row)];
    if (target.is_null(row)) ++g.nulls;
    else ++g.values[target.text(row)];
  }
  KeyScore s;
  s.key = key;
  uint64_t agreeing = 0, compared = 0;
  for (const auto& [k, g] : groups) {
    uint64_t total = 0, top = 0;
    for (const auto& [v, n] : g.values) total += n, top = std::max(top, n);
    if (total >= 2) agreeing += top, compared += total;
    if (g.values.size() == 1) s.fillable += g.nulls;
    if (g.values.size() > 1 && g.nulls > 0) ++s.conflicting, s.conflict_nulls += g.nulls;
  }
  s.agreement = compared == 0 ? 0 : static_cast<double>(agreeing) / static_cast<double>(compared);
  return s;
}

}  // namespace

void detect_fillable_nulls(DetectorContext& ctx) {
  const std::vector<size_t> text = ctx.text_columns();
  for (const size_t c : text) {
    if (ctx.values(c).nulls == 0) continue;
    const std::string& name = ctx.table.name(c);
    const StepList first = ctx.earlier_fixes(name, {"inner_white_space", "trailing_punctuation", "case_variants", "similar_values"});
    auto base = apply_steps(ctx.table, first);
    if (!base) continue;
    std::optional<KeyScore> best;
    for (const size_t k : text) {
      if (k == c) continue;
      const ColumnValues& key_values = ctx.values(k);
      if (key_values.values.size() < 2 || key_values.values.size() * kMinGroupSize > key_values.non_null) continue;
      const KeyScore s = score(*base, c, k);
      if (s.fillable == 0 || s.agreement < kAgreement) continue;
      if (!best || s.fillable > best->fillable || (s.fillable == best->fillable && s.conflicting < best->conflicting))
        best = s;
    }
    if (!best) continue;
    const std::string& key = ctx.table.name(best->key);
    Finding f;
    f.kind = "fillable_nulls";
    f.columns = {name, key};
    f.rows_affected = best->fillable;
    f.title = name + ": " + count_of(best->fillable, "NULL", "NULLs") + " can be filled from rows with the same " + key;
    char agreement[32];
    std::snprintf(agreement, sizeof agreement, "%.1f%%", best->agreement * 100);
    f.explanation = "Rows with the same " + key + " almost always have the same " + name + " (" + agreement +
                    " of the rows that have a value agree with the rest of their group), so a missing " + name +
                    " can be taken from the other rows of its group when they all agree. " + key +
                    " was chosen among the columns whose values repeat because it fills the most NULLs.";
    if (best->conflicting)
      f.details.push_back(count_of(best->conflicting, "group has", "groups have") + " more than one " + name +
                          " and a NULL; its " + count_of(best->conflict_nulls, "NULL stays", "NULLs stay") +
                          " (reported as conflicts, never guessed)");
    f.facts["key"] = key;
    f.facts["fillable"] = best->fillable;
    f.facts["conflicting_groups"] = best->conflicting;
    f.facts["nulls_in_conflicting_groups"] = best->conflict_nulls;
    f.facts["agreement"] = best->agreement;
    if (!first.empty()) f.facts["previewed_after"] = first;
    std::string why = "filling assumes every row with the same " + key + " has the same " + name;
    if (!first.empty()) why += "; apply the variant-spelling fixes for " + name + " first";
    ctx.add_fix(f,
                {{"op", "fill_from_group"},
                 {"column", name},
                 {"keys", {key}},
                 {"note", "take the value the other rows of the same " + key + " agree on"}},
                false, why, first);
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
