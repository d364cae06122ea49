// Dates stored as text. The formats are tried with the engine's one date
// scanner (dates.hpp). Formats that differ only in day/month order form a
// family; within a family the reading that fits more values wins, and when
// both fit the same values (every day is 12 or less) the order is ambiguous:
// both readings are offered as candidate fixes. A column already written
// entirely in ISO 8601 (YYYY-MM-DD) is not a finding.
#include <algorithm>

#include "dates.hpp"
#include "findings/detectors.hpp"

namespace tamis {

namespace {

struct Family {
  const char* name;
  std::vector<const char*> readings;  // two for a day/month family
};

const std::vector<Family>& families() {
  static const std::vector<Family> list = {
      {"ISO 8601", {"%Y-%m-%d"}},
      {"ISO 8601 with time", {"%Y-%m-%d %H:%M:%S"}},
      {"ISO 8601 with T and time", {"%Y-%m-%dT%H:%M:%S"}},
      {"year/month/day", {"%Y/%m/%d"}},
      {"slashes, four-digit year", {"%m/%d/%Y", "%d/%m/%Y"}},
      {"slashes, two-digit year", {"%m/%d/%y", "%d/%m/%y"}},
      {"dots, four-digit year", {"%d.%m.%Y", "%m.%d.%Y"}},
      {"dots, two-digit year", {"%d.%m.%y", "%m.%d.%y"}},
      {"dashes, four-digit year", {"%d-%m-%Y", "%m-%d-%Y"}},
      {"day-month name-year", {"%d-%b-%Y"}},
      {"day month name year", {"%d %B %Y"}},
      {"month name day, year", {"%B %d, %Y"}},
      {"month abbreviation day, year", {"%b %d, %Y"}},
  };
  return list;
}

// Looks like a date: three groups of digits separated by one of - / . (the
// values that fit no format are reported only when they look like this).
bool date_shaped(std::string_view v) {
  int groups = 0;
  size_t i = 0;
  char separator = 0;
  while (i < v.size()) {
    const size_t start = i;
    while (i < v.size() && v[i] >= '0' && v[i] <= '9') ++i;
    if (i == start || i - start > 4) return false;
    ++groups;
    if (i == v.size()) break;
    if (v[i] != '-' && v[i] != '/' && v[i] != '.') return false;
    if (separator && v[i] != separator) return false;
    separator = v[i++];
  }
  return groups == 3;
}

}  // namespace

Task<> detect_dates_as_text(DetectorContext& ctx) {
  std::vector<std::vector<DateFormat>> compiled;
  for (const Family& family : families()) {
    compiled.emplace_back();
    for (const char* pattern : family.readings) compiled.back().push_back(DateFormat::compile(pattern).value());
  }
  for (const size_t c : ctx.text_columns()) {
    co_await ctx.pause();
    const ColumnValues& values = ctx.values(c);
    if (values.non_null == 0) continue;
    // counts[f][r]: values reading r of family f parses.
    std::vector<std::vector<uint64_t>> counts(compiled.size());
    for (size_t f = 0; f < compiled.size(); ++f) counts[f].assign(compiled[f].size(), 0);
    uint64_t dates = 0, shaped = 0, ambiguous = 0;
    for (const DistinctValue& v : values.values) {
      if (v.value.size() < 6 || v.value.size() > 32) continue;
      bool any = false;
      for (size_t f = 0; f < compiled.size(); ++f) {
        std::vector<std::optional<int32_t>> read;
        for (size_t r = 0; r < compiled[f].size(); ++r) {
          read.push_back(compiled[f][r].parse(v.value));
          if (read.back()) counts[f][r] += v.count, any = true;
        }
        if (read.size() == 2 && read[0] && read[1] && *read[0] != *read[1]) ambiguous += v.count;
      }
      if (any) dates += v.count;
      else if (date_shaped(v.value)) shaped += v.count;
    }
    if (dates == 0 || (dates + shaped) * 10 < values.non_null * 8) continue;
    const uint64_t iso = counts[0][0];
    if (iso == values.non_null) continue;
    // The reading chosen per family; `tied` marks a family whose two readings fit the same values.
    struct Choice {
      size_t family;
      size_t reading;
      uint64_t count;
      bool tied;
    };
    std::vector<Choice> chosen;
    for (size_t f = 0; f < compiled.size(); ++f) {
      const auto& n = counts[f];
      size_t best = 0;
      for (size_t r = 1; r < n.size(); ++r)
        if (n[r] > n[best]) best = r;
      if (n[best] == 0) continue;
      chosen.push_back({f, best, n[best], n.size() == 2 && n[0] == n[1]});
    }
    std::stable_sort(chosen.begin(), chosen.end(), [](const Choice& a, const Choice& b) { return a.count > b.count; });
    const auto formats_for = [&](bool swap_tied) {
      std::vector<std::string> out;
      for (const Choice& ch : chosen) {
        const size_t r = ch.tied && swap_tied ? 1 - ch.reading : ch.reading;
        out.push_back(compiled[ch.family][r].pattern());
      }
      return out;
    };
    const std::vector<std::string> formats = formats_for(false);
    // Values that none of the chosen formats reads.
    std::vector<DateFormat> chosen_formats;
    for (const std::string& p : formats) chosen_formats.push_back(DateFormat::compile(p).value());
    uint64_t unmatched = 0;
    nlohmann::ordered_json unmatched_values = nlohmann::ordered_json::array();
    for (const DistinctValue& v : values.values) {
      bool read = false;
      for (const DateFormat& d : chosen_formats)
        if (d.parse(v.value)) {
          read = true;
          break;
        }
      if (read) continue;
      unmatched += v.count;
      if (unmatched_values.size() < 20) unmatched_values.push_back({{"value", v.value}, {"count", v.count}});
    }
    const bool any_tied = std::any_of(chosen.begin(), chosen.end(), [](const Choice& ch) { return ch.tied; });
    const std::string& name = ctx.table.name(c);
    Finding f;
    f.kind = "dates_as_text";
    f.columns = {name};
    f.rows_affected = values.non_null - iso;
    f.title = name + ": dates stored as text in " + count_of(formats.size(), "format", "formats");
    f.explanation = "This column holds dates written as text";
    f.explanation += formats.size() > 1 ? " in several formats, so they neither sort nor compare as dates. "
                                        : ", so they neither sort nor compare as dates. ";
    f.explanation += "parse_date reads them with the formats below (the first that matches wins) and stores real "
                     "dates.";
    nlohmann::ordered_json format_facts = nlohmann::ordered_json::array();
    for (const Choice& ch : chosen) {
      const Family& family = families()[ch.family];
      std::string line = compiled[ch.family][ch.reading].pattern() + " (" + family.name + "): " +
                         count_of(ch.count, "value", "values");
      if (ch.tied)
        line += "; day and month order cannot be told apart (no value has a day above 12): could also be " +
                compiled[ch.family][1 - ch.reading].pattern();
      f.details.push_back(line);
      nlohmann::ordered_json one = {{"format", compiled[ch.family][ch.reading].pattern()}, {"values", ch.count}};
      if (ch.tied) one["alternative"] = compiled[ch.family][1 - ch.reading].pattern();
      format_facts.push_back(std::move(one));
    }
    if (unmatched) {
      std::string line = count_of(unmatched, "value fits", "values fit") + " none of these formats:";
      for (const auto& u : unmatched_values) line += " " + shown_value(u["value"].get<std::string>());
      f.details.push_back(line);
    }
    if (ambiguous)
      f.details.push_back(count_of(ambiguous, "value reads", "values read") +
                          " as a different date when day and month are swapped");
    f.facts["formats"] = format_facts;
    f.facts["iso"] = iso;
    f.facts["unmatched"] = unmatched;
    f.facts["unmatched_values"] = unmatched_values;
    f.facts["ambiguous_day_month"] = ambiguous;
    std::string why;
    if (unmatched) why = count_of(unmatched, "value fits", "values fit") + " no format and would become NULL";
    if (ambiguous) {
      if (!why.empty()) why += "; ";
      why += count_of(ambiguous, "value depends", "values depend") + " on the day/month order chosen";
    }
    if (why.empty()) why = "check the formats against what the file's authors meant";
    const auto step_for = [&](const std::vector<std::string>& fs) {
      return nlohmann::ordered_json{{"op", "parse_date"},
                                    {"column", name},
                                    {"formats", fs},
                                    {"on_error", "null"},
                                    {"note", "read the text as dates"}};
    };
    co_await ctx.add_fix(f, step_for(formats), false, why);
    if (any_tied)
      co_await ctx.add_fix(f, step_for(formats_for(true)), false, why + " (this is the other day/month order)");
    ctx.findings.push_back(std::move(f));
  }
}

}  // namespace tamis
