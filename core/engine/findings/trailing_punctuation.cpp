// Category values that end in punctuation where the same value without it
// (ignoring letter case) is also in the column: "Canal Basin." next to
// "Canal Basin". Requiring the bare form keeps names that really end in
// punctuation ("Co.", "Hollin & Sons (Ltd.)") out of the findings.
#include <map>
#include <unordered_map>

#include "findings/detectors.hpp"
#include "findings/number_text.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

std::string_view without_trailing_punctuation(std::string_view v) {
  size_t end = v.size();
  while (end > 0) {
    size_t i = end;
    const char32_t c = utf8::previous(v, i);
    if (!utf8::is_punctuation(c) && !utf8::is_white_space(c)) break;
    end = i;
  }
  return v.substr(0, end);
}

// Numbers ("36%", "-") are left to numbers_as_text and missing_as_text.
bool ends_with_punctuation(std::string_view v) {
  if (v.empty() || read_number_text(v).body != NumberText::Body::none) return false;
  size_t i = v.size();
  return utf8::is_punctuation(utf8::previous(v, i));
}

}  // namespace

Task<> detect_trailing_punctuation(DetectorContext& ctx) {
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    const ColumnValues& values = ctx.values(c);
    // The most frequent spelling of each case-folded value without trailing punctuation.
    std::unordered_map<std::string, const DistinctValue*> bare;
    for (const DistinctValue& v : values.values) {
      if (ends_with_punctuation(v.value)) continue;
      const DistinctValue*& best = bare[fold_case(v.value)];
      if (!best || v.count > best->count) best = &v;
    }
    std::map<std::string, std::string> map;
    uint64_t rows = 0;
    for (const DistinctValue& v : values.values) {
      if (!ends_with_punctuation(v.value)) continue;
      const std::string_view stem = without_trailing_punctuation(v.value);
      if (stem.empty()) continue;
      const auto it = bare.find(fold_case(stem));
      if (it == bare.end()) continue;
      map[std::string(v.value)] = std::string(it->second->value);
      rows += v.count;
    }
    if (map.empty()) continue;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "trailing_punctuation";
    f.columns = {name};
    f.rows_affected = rows;
    f.title = name + ": " + count_of(rows, "value ends", "values end") + " in stray punctuation";
    f.explanation = "These values are another value of the column with a full stop, comma or other punctuation "
                    "added at the end, so they are counted as separate categories. Mapping them to the bare "
                    "spelling merges them.";
    for (const auto& [from, to] : map) {
      if (f.details.size() == 10) {
        f.details.push_back("and " + std::to_string(map.size() - 10) + " more");
        break;
      }
      f.details.push_back(shown_value(from) + " → " + shown_value(to));
    }
    f.facts["values"] = rows;
    f.facts["map"] = map;
    nlohmann::ordered_json fix_step = {
        {"op", "map_values"}, {"column", name}, {"map", map}, {"note", "drop stray punctuation at the end"}};
    co_await ctx.add_fix(f, std::move(fix_step), false,
                         "punctuation at the end can belong to a value (an abbreviation such as \"St.\"); check the map");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
