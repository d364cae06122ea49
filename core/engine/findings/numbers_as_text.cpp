// Numbers written for people rather than programs: thousands separators,
// currency signs, percent signs, a decimal comma. The suggested parse_number
// step gets the marks this column uses; a column that mostly uses a decimal
// point is previewed after its decimal_comma fix.
#include "findings/detectors.hpp"
#include "findings/number_text.hpp"

namespace tamis {

Task<> detect_numbers_as_text(DetectorContext& ctx) {
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    const std::string& name = ctx.table.name(c);
    const StepList first = ctx.earlier_fixes(name, {"decimal_comma"});
    // Without a decimal_comma fix the column is as the context holds it,
    // whose values other detectors have usually counted already.
    std::optional<Table> fixed;  // holds the bytes fixed_values points into
    ColumnValues fixed_values;
    if (!first.empty()) {
      auto base = co_await ctx.apply(first);
      if (!base) continue;
      fixed = std::move(*base);
      fixed_values = collect_values(fixed->column(c));
      ctx.spend(fixed->row_count());
    }
    const ColumnValues& values = first.empty() ? ctx.values(c) : fixed_values;
    uint64_t numbers = 0, comma_groups = 0, point_groups = 0, decimal_commas = 0, percents = 0, currencies = 0;
    uint64_t point_fractions = 0, fractions = 0, unreadable = 0;
    bool inner_space = false;
    std::string currency;
    std::vector<std::string> unreadable_examples;
    for (const DistinctValue& v : values.values) {
      const NumberText n = read_number_text(v.value);
      if (n.body == NumberText::Body::none) {
        unreadable += v.count;
        if (unreadable_examples.size() < 10) unreadable_examples.emplace_back(v.value);
        continue;
      }
      numbers += v.count;
      if (n.body == NumberText::Body::comma_groups) comma_groups += v.count;
      if (n.body == NumberText::Body::point_groups) point_groups += v.count;
      if (n.body == NumberText::Body::decimal_comma) decimal_commas += v.count;
      if (n.body == NumberText::Body::plain && v.value.find('.') != std::string_view::npos) point_fractions += v.count;
      if (v.value.find_first_of(".,") != std::string_view::npos && n.body != NumberText::Body::comma_groups &&
          n.body != NumberText::Body::point_groups)
        fractions += v.count;
      if (n.body == NumberText::Body::comma_groups && v.value.find('.') != std::string_view::npos) fractions += v.count;
      if (n.body == NumberText::Body::point_groups && v.value.find(',') != std::string_view::npos) fractions += v.count;
      if (n.percent) percents += v.count;
      if (!n.currency.empty()) currencies += v.count;
      for (const std::string_view sign : {"$", "€", "£", "¥"})
        if (n.currency.find(sign) != std::string::npos && currency.find(sign) == std::string::npos) currency += sign;
      inner_space = inner_space || n.inner_space;
    }
    const uint64_t decorated = comma_groups + point_groups + decimal_commas + percents + currencies;
    if (decorated == 0 || values.non_null == 0 || numbers * 10 < values.non_null * 9) continue;
    const bool decimal_comma = decimal_commas + point_groups > comma_groups && point_fractions == 0;
    const bool all_percent = percents == numbers;
    nlohmann::ordered_json step = {{"op", "parse_number"}, {"column", name}};
    step["decimal_mark"] = decimal_comma ? "," : ".";
    if (decimal_comma && point_groups) step["group_mark"] = ".";
    if (!decimal_comma && comma_groups) step["group_mark"] = ",";
    std::string strip = currency;
    if (inner_space) strip += ' ';
    if (percents && !all_percent) strip += '%';
    if (!strip.empty()) step["strip"] = strip;
    if (all_percent) step["percent"] = true;
    if (fractions == 0 && !all_percent) step["scale"] = 0;
    step["on_error"] = "null";
    step["note"] = "read the column as numbers";

    Finding f;
    f.kind = "numbers_as_text";
    f.columns = {name};
    f.rows_affected = decorated;
    f.title = name + ": " + count_of(decorated, "number is", "numbers are") +
              " written with separators or signs that make it text";
    f.explanation = "These values are numbers to a reader but text to a program, so sums, ranges and sorting skip "
                    "or misorder them. parse_number reads them with the marks this column uses.";
    if (comma_groups || point_groups)
      f.details.push_back(count_of(comma_groups + point_groups, "value has", "values have") + " thousands separators");
    if (decimal_commas) f.details.push_back(count_of(decimal_commas, "value has", "values have") + " a decimal comma");
    if (percents) f.details.push_back(count_of(percents, "value ends", "values end") + " in a percent sign");
    if (currencies) f.details.push_back(count_of(currencies, "value has", "values have") + " a currency sign");
    for (const std::string& e : unreadable_examples) f.details.push_back("not a number: " + shown_value(e));
    f.facts["thousands_separator"] = comma_groups + point_groups;
    f.facts["decimal_comma"] = decimal_commas;
    f.facts["percent_sign"] = percents;
    f.facts["currency_sign"] = currencies;
    f.facts["not_numbers"] = unreadable;
    if (!first.empty()) f.facts["previewed_after"] = first;
    std::string why = "the column becomes numeric";
    if (unreadable) why += "; " + count_of(unreadable, "value that is", "values that are") + " not a number become NULL";
    if (percents && !all_percent)
      why += "; the percent signs are removed (not divided by 100) because the other values are written in percent "
             "without the sign";
    if (!first.empty()) why += "; apply the decimal-comma fix first";
    co_await ctx.add_fix(f, std::move(step), false, why, first);
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
