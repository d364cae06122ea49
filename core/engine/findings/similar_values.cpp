// The detector uses Levenshtein similarity at 0.85 on the engine's
// comparison forms (case-folded, accents stripped, spacing normalized), so it
// catches one-letter typos in names of about seven letters or more as well as
// case, accent and spacing variants. It looks only at category-like columns:
// values repeat (at least kMinRowsPerValue rows per distinct value on
// average) and fewer than half are numbers or dates, whose near neighbours
// ("2023-01-05", "2023-01-06") are different values, not variants.
#include "findings/similar_values.hpp"

#include "dates.hpp"
#include "findings/number_text.hpp"
#include "similar/similar_values.hpp"

namespace tamis {

namespace {

constexpr uint64_t kMinRowsPerValue = 2;  // our own choice: an identifier column never qualifies
constexpr double kThreshold = 0.85;       // the similar-values engine's default

bool number_or_date(std::string_view v) {
  if (read_number_text(v).body != NumberText::Body::none) return true;
  for (const DateFormat& f : common_date_formats())
    if (f.parse(v)) return true;
  return false;
}

}  // namespace

Task<> detect_similar_values(DetectorContext& ctx) {
  SimilarOptions options;
  options.method = SimilarMethod::levenshtein;
  options.threshold = kThreshold;
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    const ColumnValues& values = ctx.values(c);
    if (values.values.size() < 2 || values.values.size() * kMinRowsPerValue > values.non_null) continue;
    uint64_t typed = 0;
    std::vector<ValueCount> counts;
    for (const DistinctValue& v : values.values) {
      if (number_or_date(v.value)) typed += v.count;
      counts.push_back({std::string(v.value), v.count});
    }
    if (typed * 2 >= values.non_null) continue;
    const std::vector<SimilarGroup> groups = group_similar_values(counts, options);
    if (groups.empty()) continue;
    uint64_t rows = 0, variants = 0;
    for (const SimilarGroup& g : groups) rows += g.rows, variants += g.members.size() - 1;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "similar_values";
    f.columns = {name};
    f.rows_affected = rows;
    f.title = name + ": " + count_of(rows, "value is", "values are") + " probably a variant spelling of another value";
    f.explanation = "These values differ from a more frequent value of the column by a typo, an accent, letter case, "
                    "spacing or punctuation (" + std::to_string(groups.size()) +
                    (groups.size() == 1 ? " set" : " sets") +
                    ", Levenshtein similarity at least 0.85 after case folding and accent stripping). Mapping "
                    "each variant to the most frequent spelling merges them.";
    nlohmann::ordered_json group_facts = nlohmann::ordered_json::array();
    for (const SimilarGroup& g : groups) {
      std::string line = shown_value(g.canonical) + " ←";
      nlohmann::ordered_json members = nlohmann::ordered_json::array();
      for (size_t i = 0; i < g.members.size(); ++i) {
        const SimilarMember& m = g.members[i];
        members.push_back({{"value", m.value}, {"count", m.count}, {"score", m.score}});
        if (i > 0) line += " " + shown_value(m.value) + " ×" + std::to_string(m.count);
      }
      if (f.details.size() < 10) f.details.push_back(line);
      group_facts.push_back({{"canonical", g.canonical}, {"rows", g.rows}, {"members", std::move(members)}});
    }
    if (groups.size() > 10) f.details.push_back("and " + std::to_string(groups.size() - 10) + " more sets");
    f.facts["method"] = similar_method_name(options.method);
    f.facts["threshold"] = options.threshold;
    f.facts["variants"] = variants;
    f.facts["groups"] = std::move(group_facts);
    nlohmann::ordered_json step = map_values_step(name, groups);
    step["note"] = "merge variant spellings";
    co_await ctx.add_fix(f, std::move(step), false,
                         "the sets are found by similarity: two different places or people with close names would be "
                         "merged too; check every set (tamis similar lets you choose another method or threshold)");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
