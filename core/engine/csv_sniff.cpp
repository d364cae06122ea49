#include "csv_sniff.hpp"

#include <map>

#include "dates.hpp"
#include "scalars.hpp"

namespace tamis {

std::vector<std::vector<std::string>> split_sample(std::string_view s, char delimiter, char quote,
                                                   size_t max_records, bool whole_input) {
  std::vector<std::vector<std::string>> records;
  std::vector<std::string> record;
  std::string field;
  bool in_quotes = false;
  size_t i = 0;
  auto end_record = [&] {
    record.push_back(std::move(field));
    field.clear();
    records.push_back(std::move(record));
    record.clear();
  };
  while (i < s.size() && records.size() < max_records) {
    const char c = s[i];
    if (in_quotes) {
      if (c == quote && i + 1 < s.size() && s[i + 1] == quote) field += quote, i += 2;
      else if (c == quote) in_quotes = false, ++i;
      else field += c, ++i;
      continue;
    }
    if (c == quote && field.empty()) {
      in_quotes = true;
      ++i;
    } else if (c == delimiter) {
      record.push_back(std::move(field));
      field.clear();
      ++i;
    } else if (c == '\n' || c == '\r') {
      const bool blank = record.empty() && field.empty();
      i += (c == '\r' && i + 1 < s.size() && s[i + 1] == '\n') ? 2 : 1;
      if (!blank) end_record();
    } else {
      field += c;
      ++i;
    }
  }
  if (whole_input && !in_quotes && records.size() < max_records && (!record.empty() || !field.empty()))
    end_record();
  return records;
}

char detect_delimiter(std::string_view sample, char quote, bool whole_input, std::string& reason) {
  char best = ',';
  double best_score = 0;
  for (const char candidate : {',', ';', '\t', '|'}) {
    const auto records = split_sample(sample, candidate, quote, 200, whole_input);
    std::map<size_t, size_t> counts;
    for (const auto& r : records) ++counts[r.size()];
    size_t mode = 1, mode_count = 0;
    for (const auto& [fields, n] : counts)
      if (n > mode_count) mode = fields, mode_count = n;
    if (mode < 2 || records.empty()) continue;
    // Share of records with the usual field count, lightly favouring more
    // fields so that a stray comma inside text does not win over tabs.
    const double score = static_cast<double>(mode_count) / static_cast<double>(records.size()) +
                         static_cast<double>(mode) * 1e-6;
    if (score > best_score) {
      best_score = score;
      best = candidate;
    }
  }
  const std::string shown = best == '\t' ? "tab" : std::string(1, best);
  reason = best_score > 0 ? "'" + shown + "' splits the first records most consistently"
                          : "no candidate splits the records; one column assumed";
  return best;
}

namespace {
bool looks_typed(std::string_view v) {
  if (number_shape(v) != NumberShape::not_a_number) return true;
  for (const auto& f : common_date_formats())
    if (f.parse(v)) return true;
  return false;
}
}  // namespace

bool detect_header(std::string_view sample, char delimiter, char quote, bool whole_input,
                   std::string& reason) {
  const auto records = split_sample(sample, delimiter, quote, 50, whole_input);
  if (records.empty()) {
    reason = "no records to look at; header assumed";
    return true;
  }
  const auto& first = records[0];
  for (const auto& v : first)
    if (looks_typed(v)) {
      reason = "the first row holds a number or date ('" + v + "')";
      return false;
    }
  for (size_t c = 0; c < first.size(); ++c) {
    size_t typed = 0, seen = 0;
    for (size_t r = 1; r < records.size(); ++r) {
      if (c >= records[r].size() || records[r][c].empty()) continue;
      ++seen;
      typed += looks_typed(records[r][c]);
    }
    if (seen > 0 && typed * 2 > seen) {
      reason = "the first row is text above a column of numbers or dates ('" + first[c] + "')";
      return true;
    }
  }
  reason = "every column is text; the first row is taken as the header";
  return true;
}

}  // namespace tamis
