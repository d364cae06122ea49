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
#include <algorithm>
#include <unordered_map>
#include <utility>
#include <variant>

#include "findings/detectors.hpp"
#include "steps/typed_support.hpp"
#include "string_index.hpp"

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

// A text column as dense value ids, row by row: 0 for NULL, 1.. for each
// distinct text, so that grouping compares integers instead of strings. The
// ids of every candidate key stay at hand while each column is scored, so
// they are kept in the narrowest type that holds them: a key repeats, and
// most have fewer than 256 values (a byte per row instead of four).
struct ValueIds {
  std::variant<std::vector<uint8_t>, std::vector<uint16_t>, std::vector<uint32_t>> ids;
  uint32_t distinct = 0;
};

template <class Narrow>
std::vector<Narrow> narrowed(const std::vector<uint32_t>& ids) {
  return std::vector<Narrow>(ids.begin(), ids.end());
}

ValueIds value_ids(const Table& table, size_t column) {
  std::vector<uint32_t> ids;
  ids.reserve(table.row_count());
  StringIndex seen;
  auto id_of = [&](std::string_view v) { return seen.insert(v).first + 1; };
  std::vector<uint32_t> code_ids;  // a dictionary code's id; 0 until looked up
  const Column& values = table.column(column);
  for (size_t k = 0; k < values.chunk_count(); ++k) {
    const ColumnChunk& chunk = values.chunk(k);
    // Rows read from a dictionary (the chunk, or a delta's base) are looked up once per code.
    const ColumnChunk* dictionary = chunk.is_delta() ? chunk.base.get() : &chunk;
    if (dictionary->layout != TextLayout::dictionary) dictionary = nullptr;
    if (dictionary) code_ids.assign(dictionary->offsets.size() - 1, 0);
    for (size_t i = 0; i < chunk.rows; ++i) {
      if (chunk.is_null(i)) {
        ids.push_back(0);
      } else if (!dictionary || (chunk.is_delta() && chunk.row_changed(i))) {
        ids.push_back(id_of(chunk.text(i)));
      } else {
        uint32_t& id = code_ids[dictionary->code(i)];
        if (id == 0) id = id_of(dictionary->own_text(dictionary->code(i)));
        ids.push_back(id);
      }
    }
  }
  ValueIds out;
  out.distinct = static_cast<uint32_t>(seen.size());
  if (out.distinct <= UINT8_MAX) out.ids = narrowed<uint8_t>(ids);
  else if (out.distinct <= UINT16_MAX) out.ids = narrowed<uint16_t>(ids);
  else out.ids = std::move(ids);
  return out;
}

// The rows where both ids are set, ordered by key id, then value id: a
// least-significant-digit radix sort of two counting passes (Cormen et al.,
// Introduction to Algorithms, 3rd ed., 8.2 and 8.3), linear in the rows. The
// comparison sort of packed pairs it replaces was 7% of the page's whole load
// of the 1,000,000-row bench file.
template <class Id>
void stable_order_by(const std::vector<Id>& ids, size_t id_count, const std::vector<uint32_t>& rows,
                     std::vector<uint32_t>& out) {
  std::vector<uint32_t> start(id_count + 1, 0);
  for (const uint32_t row : rows) ++start[ids[row]];
  uint32_t sum = 0;
  for (uint32_t& n : start) sum += std::exchange(n, sum);
  out.resize(rows.size());
  for (const uint32_t row : rows) out[start[ids[row]]++] = row;
}

template <class KeyId, class ValueId>
std::vector<uint32_t> rows_by_group_and_value(const std::vector<KeyId>& keys, uint32_t key_count,
                                              const std::vector<ValueId>& target) {
  std::vector<uint32_t> rows, sorted;
  uint32_t value_count = 0;
  for (size_t row = 0; row < keys.size(); ++row) {
    if (keys[row] == 0 || target[row] == 0) continue;
    rows.push_back(static_cast<uint32_t>(row));
    value_count = std::max<uint32_t>(value_count, target[row]);
  }
  stable_order_by(target, value_count, rows, sorted);
  stable_order_by(keys, key_count, sorted, rows);
  return rows;
}

template <class KeyId, class ValueId>
KeyScore score_ids(const std::vector<KeyId>& keys, uint32_t key_count, const std::vector<ValueId>& target, size_t key) {
  struct Group {
    uint32_t first = 0;  // the first non-NULL value id seen
    bool several = false;
    uint64_t nulls = 0;
  };
  std::vector<Group> groups(key_count + 1);
  for (size_t row = 0; row < keys.size(); ++row) {
    const uint32_t k = keys[row], v = target[row];
    if (k == 0) continue;
    Group& g = groups[k];
    if (v == 0) {
      ++g.nulls;
      continue;
    }
    if (g.first == 0) g.first = v;
    else g.several |= g.first != v;
  }
  KeyScore s;
  s.key = key;
  for (const Group& g : groups) {
    if (g.first != 0 && !g.several) s.fillable += g.nulls;
    if (g.several && g.nulls > 0) ++s.conflicting, s.conflict_nulls += g.nulls;
  }
  if (s.fillable == 0) return s;
  // Per group: the rows with a value and the count of its most frequent
  // value, from the rows sorted by (group, value). Only a key that could fill
  // something gets this far.
  const std::vector<uint32_t> rows = rows_by_group_and_value(keys, key_count, target);
  uint64_t agreeing = 0, compared = 0;
  for (size_t i = 0; i < rows.size();) {
    const uint32_t group = keys[rows[i]];
    uint64_t total = 0, top = 0;
    while (i < rows.size() && keys[rows[i]] == group) {
      size_t j = i;
      while (j < rows.size() && keys[rows[j]] == group && target[rows[j]] == target[rows[i]]) ++j;
      total += j - i;
      top = std::max<uint64_t>(top, j - i);
      i = j;
    }
    if (total >= 2) agreeing += top, compared += total;
  }
  s.agreement = compared == 0 ? 0 : static_cast<double>(agreeing) / static_cast<double>(compared);
  return s;
}

KeyScore score(const ValueIds& keys, const ValueIds& target, size_t key) {
  return std::visit([&](const auto& key_ids, const auto& target_ids) { return score_ids(key_ids, keys.distinct, target_ids, key); },
                    keys.ids, target.ids);
}

}  // namespace

Task<> detect_fillable_nulls(DetectorContext& ctx) {
  const std::vector<size_t> text = ctx.text_columns();
  std::unordered_map<size_t, ValueIds> key_ids;  // keys are read from the table as it is; only c gets fixes
  for (const size_t c : text) {
    co_await ctx.pause();
    if (ctx.values(c).nulls == 0) continue;
    const std::string& name = ctx.table.name(c);
    const StepList first = ctx.earlier_fixes(name, {"inner_white_space", "trailing_punctuation", "case_variants", "similar_values"});
    auto base = co_await ctx.apply(first);
    if (!base) continue;
    const ValueIds target = value_ids(*base, c);
    ctx.spend(base->row_count());
    std::optional<KeyScore> best;
    for (const size_t k : text) {
      if (k == c) continue;
      co_await ctx.pause();
      const ColumnValues& key_values = ctx.values(k);
      if (key_values.values.size() < 2 || key_values.values.size() * kMinGroupSize > key_values.non_null) continue;
      auto ids = key_ids.find(k);
      if (ids == key_ids.end()) ids = key_ids.emplace(k, value_ids(ctx.table, k)).first;
      const KeyScore s = score(ids->second, target, k);
      ctx.spend(2 * ctx.table.row_count());
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
    nlohmann::ordered_json fix_step = {{"op", "fill_from_group"},
                                       {"column", name},
                                       {"keys", {key}},
                                       {"note", "take the value the other rows of the same " + key + " agree on"}};
    co_await ctx.add_fix(f, std::move(fix_step), false, why, first);
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
