// W3C "CSV on the Web" (CSVW) metadata describing a CSV/TSV file tamis
// wrote, so other tools read it right: column names and titles, datatypes
// from the CSVW built-in datatypes, which columns are required, the NULL
// marker, and the dialect. References: "Metadata Vocabulary for Tabular Data"
// (W3C Recommendation, 17 December 2015; https://www.w3.org/TR/tabular-metadata/)
// and "Model for Tabular Data and Metadata on the Web" (same date;
// https://www.w3.org/TR/tabular-data-model/).
#pragma once

#include <nlohmann/json.hpp>

#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "dates.hpp"
#include "steps/step.hpp"
#include "table.hpp"

namespace tamis {

struct CsvwTable {
  std::string url;            // the CSV file, relative to the metadata document
  std::string title;          // dc:title when not empty
  Schema columns;
  std::vector<bool> required; // per column: no cell reads back as null
  char delimiter = ',';
  std::string null_marker;
  std::string date_format = "%Y-%m-%d";
  std::string line_terminator = "\n";
};

// The metadata document. A date column whose output format has no CSVW date
// pattern is described as a string, with a warning saying so.
nlohmann::ordered_json csvw_metadata(const CsvwTable& table, std::vector<std::string>& warnings);

// The CSVW date pattern (tabular-metadata §6.4.4 "Formats for Dates and
// Times") written by a strptime-style output pattern; "" for ISO 8601
// (%Y-%m-%d, the datatype's own lexical form); nullopt when CSVW has none.
std::optional<std::string> csvw_date_pattern(std::string_view strptime_pattern);

// A CSVW column name for a tamis column: the URI Template variable-name
// characters (RFC 6570 §2.3: ALPHA, DIGIT, "_" and percent-encoded UTF-8)
// and not starting with "_" (tabular-metadata §5.6 "name").
std::string csvw_column_name(std::string_view name);

// Watches the tables as they are written and remembers, per column, whether
// any cell will read back as null: a NULL, or a value whose written text is
// the null marker (tabular-data-model §6.4: a cell equal to the null marker
// is null).
class NullTracker {
 public:
  NullTracker(const Schema& columns, std::string null_marker, const DateFormat& date_format);
  void observe(const Table& written);
  std::vector<bool> required() const;

 private:
  std::string null_marker_;
  const DateFormat& date_format_;
  std::vector<bool> reads_null_;
  std::string scratch_;
};

}  // namespace tamis
