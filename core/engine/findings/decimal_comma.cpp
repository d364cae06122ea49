// A numeric column that mostly writes a decimal point but sometimes a decimal
// comma (31,1 next to 52.4). parse_number reads one decimal mark per column,
// so the commas are turned into points first. A comma followed by exactly
// three digits is left alone: it may be a thousands separator.
#include "findings/detectors.hpp"
#include "findings/number_text.hpp"

namespace tamis {

Task<> detect_decimal_comma(DetectorContext& ctx) {
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    const ColumnValues& values = ctx.values(c);
    uint64_t commas = 0, points = 0, numbers = 0;
    std::vector<std::string> examples;
    for (const DistinctValue& v : values.values) {
      const NumberText n = read_number_text(v.value);
      if (n.body == NumberText::Body::none) continue;
      numbers += v.count;
      if (n.body == NumberText::Body::decimal_comma && n.currency.empty() && !n.percent) {
        commas += v.count;
        if (examples.size() < 5) examples.emplace_back(v.value);
      } else if (n.body == NumberText::Body::plain && v.value.find('.') != std::string_view::npos) {
        points += v.count;
      }
    }
    if (commas == 0 || points <= commas || numbers * 10 < values.non_null * 9) continue;
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "decimal_comma";
    f.columns = {name};
    f.rows_affected = commas;
    f.title = name + ": " + count_of(commas, "number is", "numbers are") + " written with a decimal comma";
    f.explanation = "Most numbers in this column use a decimal point, these use a comma (" +
                    std::to_string(points) + " with a point). Read as they are, they are not numbers. Rewriting "
                    "the comma as a point makes the column read with one decimal mark.";
    for (const std::string& e : examples) f.details.push_back("for example " + shown_value(e));
    f.facts["decimal_comma"] = commas;
    f.facts["decimal_point"] = points;
    nlohmann::ordered_json fix_step = {{"op", "replace_text"},
                                       {"columns", {name}},
                                       {"find", "^([+-]?[0-9]+),([0-9]{1,2}|[0-9]{4,})$"},
                                       {"replace", "$1.$2"},
                                       {"match", "regex"},
                                       {"note", "decimal comma becomes a decimal point"}};
    co_await ctx.add_fix(f, std::move(fix_step), false,
                         "check that the commas are decimal marks and not list separators or thousands separators");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
