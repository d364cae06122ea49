// Values of a column that differ only in letter case (Unicode full case
// folding): "northwick", "NORTHWICK" next to "Northwick". The most frequent
// spelling is taken as the intended one (ties: the one seen first).
#include <map>
#include <unordered_map>

#include "findings/detectors.hpp"
#include "steps/text_step_support.hpp"

namespace tamis {

Task<> detect_case_variants(DetectorContext& ctx) {
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    const ColumnValues& values = ctx.values(c);
    std::unordered_map<std::string, std::vector<const DistinctValue*>> groups;
    std::vector<std::string> order;
    for (const DistinctValue& v : values.values) {
      auto [it, added] = groups.try_emplace(fold_case(v.value));
      if (added) order.push_back(it->first);
      it->second.push_back(&v);
    }
    std::map<std::string, std::string> map;
    uint64_t rows = 0, sets = 0;
    for (const std::string& key : order) {
      const auto& members = groups[key];
      if (members.size() < 2) continue;
      const DistinctValue* best = members.front();
      for (const DistinctValue* m : members)
        if (m->count > best->count) best = m;
      ++sets;
      for (const DistinctValue* m : members)
        if (m != best) {
          map[std::string(m->value)] = std::string(best->value);
          rows += m->count;
        }
    }
    if (map.empty()) continue;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "case_variants";
    f.columns = {name};
    f.rows_affected = rows;
    f.title = name + ": " + count_of(rows, "value differs", "values differ") + " from a more frequent spelling only in letter case";
    f.explanation = "The same category is written in different letter case (" + std::to_string(sets) +
                    (sets == 1 ? " set" : " sets") +
                    " of spellings), so it is counted several times. Mapping every spelling to the most frequent "
                    "one merges them.";
    for (const auto& [from, to] : map) {
      if (f.details.size() == 10) {
        f.details.push_back("and " + std::to_string(map.size() - 10) + " more");
        break;
      }
      f.details.push_back(shown_value(from) + " → " + shown_value(to));
    }
    f.facts["values"] = rows;
    f.facts["sets"] = sets;
    f.facts["map"] = map;
    nlohmann::ordered_json fix_step = {
        {"op", "map_values"}, {"column", name}, {"map", map}, {"note", "one spelling per category"}};
    co_await ctx.add_fix(f, std::move(fix_step), false,
                         "letter case can carry meaning (codes, names such as \"May\" and \"may\"); check the map");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
