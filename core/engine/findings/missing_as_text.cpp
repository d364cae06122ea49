// Blank values and sentinel texts standing for "no value". They run on the
// table after the trims, so " N/A " is recognised as N/A.
#include <algorithm>
#include <set>

#include "findings/detectors.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

Task<> detect_missing_as_text(DetectorContext& ctx) {
  std::set<std::string> folded_sentinels;
  for (const std::string& s : ctx.options.sentinels) folded_sentinels.insert(fold_case(utf8::trim_white_space(s)));
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    uint64_t blanks = 0, sentinels = 0;
    std::vector<std::string> spellings;
    nlohmann::ordered_json per_spelling = nlohmann::ordered_json::object();
    for (const DistinctValue& v : ctx.values(c).values) {
      if (utf8::is_blank(v.value)) {
        blanks += v.count;
      } else if (v.value.size() <= 64 && folded_sentinels.count(fold_case(utf8::trim_white_space(v.value)))) {
        sentinels += v.count;
        spellings.emplace_back(v.value);
        per_spelling[std::string(v.value)] = v.count;
      }
    }
    if (blanks + sentinels == 0) continue;
    std::sort(spellings.begin(), spellings.end());
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "missing_as_text";
    f.columns = {name};
    f.rows_affected = blanks + sentinels;
    f.title = name + ": " + count_of(blanks + sentinels, "value stands", "values stand") + " for a missing value";
    f.explanation = "Empty text, white space alone, or a placeholder such as N/A is not a value: counted as text it "
                    "inflates the distinct values and hides gaps from NULL checks, sums and fills. Turning them into "
                    "NULL makes the gaps visible as gaps.";
    if (blanks) f.details.push_back(count_of(blanks, "blank value", "blank values") + " (empty or only white space)");
    for (const std::string& s : spellings)
      f.details.push_back(shown_value(s) + " ×" + std::to_string(per_spelling[s].get<uint64_t>()));
    f.facts["blanks"] = blanks;
    f.facts["sentinels"] = sentinels;
    f.facts["spellings"] = per_spelling;
    nlohmann::ordered_json step = {{"op", "to_null"}, {"columns", {name}}};
    if (!spellings.empty()) step["values"] = spellings;
    step["blank"] = true;
    step["note"] = "blanks and placeholders become NULL";
    co_await ctx.add_fix(f, std::move(step), true, "");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
