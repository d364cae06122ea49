#include "csvw.hpp"

#include "csv_writer.hpp"

namespace tamis {

namespace {

using json = nlohmann::ordered_json;

// tabular-metadata §6.4.4 lists the date patterns a CSVW processor must
// understand; these are the ones tamis' zero-padding writer can produce.
struct DatePattern {
  std::string_view strptime;
  std::string_view csvw;
};
constexpr DatePattern kDatePatterns[] = {
    {"%Y-%m-%d", ""},           {"%Y%m%d", "yyyyMMdd"},     {"%d-%m-%Y", "dd-MM-yyyy"},
    {"%m-%d-%Y", "MM-dd-yyyy"}, {"%d/%m/%Y", "dd/MM/yyyy"}, {"%m/%d/%Y", "MM/dd/yyyy"},
    {"%d.%m.%Y", "dd.MM.yyyy"}, {"%m.%d.%Y", "MM.dd.yyyy"},
};

json datatype(const ColumnSchema& column, const std::string& date_format, std::vector<std::string>& warnings) {
  switch (column.type) {
    case Type::text: return "string";
    case Type::integer: return "integer";
    case Type::decimal: return "decimal";
    case Type::boolean: return "boolean";
    case Type::date: {
      const auto pattern = csvw_date_pattern(date_format);
      if (!pattern) {
        warnings.push_back("column '" + column.name + "': CSVW has no date pattern for output.date_format \"" +
                           date_format + "\", so the metadata calls it a string");
        return "string";
      }
      if (pattern->empty()) return "date";
      return {{"base", "date"}, {"format", *pattern}};
    }
  }
  return "string";
}

}  // namespace

std::optional<std::string> csvw_date_pattern(std::string_view strptime_pattern) {
  for (const DatePattern& p : kDatePatterns)
    if (p.strptime == strptime_pattern) return std::string(p.csvw);
  return std::nullopt;
}

std::string csvw_column_name(std::string_view name) {
  static const char* const kHex = "0123456789ABCDEF";
  std::string out;
  for (size_t i = 0; i < name.size(); ++i) {
    const auto b = static_cast<unsigned char>(name[i]);
    const bool plain = (b >= 'A' && b <= 'Z') || (b >= 'a' && b <= 'z') || (b >= '0' && b <= '9') ||
                       (b == '_' && i > 0);
    if (plain) out += static_cast<char>(b);
    else out += '%', out += kHex[b >> 4], out += kHex[b & 15];
  }
  return out.empty() ? "%20" : out;
}

json csvw_metadata(const CsvwTable& table, std::vector<std::string>& warnings) {
  json doc;
  doc["@context"] = "http://www.w3.org/ns/csvw";
  doc["url"] = table.url;
  if (!table.title.empty()) doc["dc:title"] = table.title;
  json schema;
  schema["columns"] = json::array();
  for (size_t c = 0; c < table.columns.size(); ++c) {
    const ColumnSchema& column = table.columns[c];
    json entry;
    entry["name"] = csvw_column_name(column.name);
    entry["titles"] = column.name;
    entry["datatype"] = datatype(column, table.date_format, warnings);
    entry["required"] = c < table.required.size() && table.required[c];
    entry["null"] = table.null_marker;
    schema["columns"].push_back(std::move(entry));
  }
  doc["tableSchema"] = std::move(schema);
  // Every dialect key is written out, also where it equals the CSVW default,
  // except trim: its default (true) would strip white space tamis kept on purpose.
  doc["dialect"] = {{"delimiter", std::string(1, table.delimiter)},
                    {"quoteChar", "\""},
                    {"doubleQuote", true},
                    {"header", true},
                    {"encoding", "utf-8"},
                    {"lineTerminators", json::array({table.line_terminator})},
                    {"skipRows", 0},
                    {"skipBlankRows", false},
                    {"skipInitialSpace", false},
                    {"trim", false}};
  return doc;
}

NullTracker::NullTracker(const Schema& columns, std::string null_marker, const DateFormat& date_format)
    : null_marker_(std::move(null_marker)), date_format_(date_format), reads_null_(columns.size(), false) {}

void NullTracker::observe(const Table& written) {
  for (size_t c = 0; c < written.column_count() && c < reads_null_.size(); ++c) {
    if (reads_null_[c]) continue;
    const Column& column = written.column(c);
    for (size_t k = 0; k < column.chunk_count() && !reads_null_[c]; ++k) {
      const ColumnChunk& chunk = column.chunk(k);
      for (size_t i = 0; i < chunk.rows; ++i) {
        if (chunk.is_null(i)) {
          reads_null_[c] = true;
          break;
        }
        if (column.type() == Type::text) {
          if (chunk.text(i) == null_marker_) {
            reads_null_[c] = true;
            break;
          }
        } else if (!null_marker_.empty()) {
          scratch_.clear();
          append_canonical(column, chunk, i, date_format_, scratch_);
          if (scratch_ == null_marker_) {
            reads_null_[c] = true;
            break;
          }
        }
      }
    }
  }
}

std::vector<bool> NullTracker::required() const {
  std::vector<bool> out;
  for (bool n : reads_null_) out.push_back(!n);
  return out;
}

}  // namespace tamis
