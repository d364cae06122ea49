// Helpers shared by the unit suites: reading CSV text from memory, a byte
// source that splits its input into small reads, and table comparisons whose
// failure messages show the cells (escaped, so a stray CR is visible).
#pragma once

#include <doctest/doctest.h>

#include <algorithm>
#include <cstdint>
#include <cstring>
#include <memory>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "byte_io.hpp"
#include "csv_reader.hpp"
#include "table.hpp"

namespace tamis::test {

using Rows = std::vector<std::vector<std::string>>;
using Lines = std::vector<uint64_t>;

// Hands out its bytes in reads of the given sizes, cycling through them, so a
// test can prove the reader's result does not depend on where reads split
// the input (a pipe or a browser File slice may split anywhere).
class SplittingSource final : public ByteSource {
 public:
  SplittingSource(std::string bytes, std::vector<size_t> read_sizes)
      : bytes_(std::move(bytes)), read_sizes_(std::move(read_sizes)) {}
  Result<size_t> read(char* buffer, size_t capacity) override {
    const size_t wanted = read_sizes_[reads_++ % read_sizes_.size()];
    const size_t n = std::min({capacity, wanted, bytes_.size() - pos_});
    std::memcpy(buffer, bytes_.data() + pos_, n);
    pos_ += n;
    return n;
  }

 private:
  std::string bytes_;
  std::vector<size_t> read_sizes_;
  size_t reads_ = 0;
  size_t pos_ = 0;
};

inline CsvOptions dialect(char delimiter, HeaderMode header) {
  CsvOptions options;
  options.delimiter = delimiter;
  options.header = header;
  return options;
}

inline Result<Table> read_string(std::string bytes, CsvOptions options, ReadReport* report = nullptr,
                                 CsvReader::RejectSink on_reject = {}) {
  return read_csv(memory_source(std::move(bytes)), "test.csv", options, report, std::move(on_reject));
}

// Reads text that must parse; the error, if any, is shown in the failure.
inline Table read_ok(std::string bytes, CsvOptions options, ReadReport* report = nullptr,
                     CsvReader::RejectSink on_reject = {}) {
  auto table = read_string(std::move(bytes), options, report, std::move(on_reject));
  REQUIRE_MESSAGE(table.ok(), (table.ok() ? std::string() : table.error().to_string()));
  return std::move(table).value();
}

// The text cells of a table, row by row (NULL shows as "<NULL>").
inline Rows rows_of(const Table& table) {
  Rows rows(table.row_count());
  for (size_t r = 0; r < table.row_count(); ++r)
    for (size_t c = 0; c < table.column_count(); ++c)
      rows[r].push_back(table.column(c).is_null(r) ? std::string("<NULL>") : std::string(table.column(c).text(r)));
  return rows;
}

inline Lines lines_of(const Table& table) {
  Lines lines;
  for (size_t r = 0; r < table.row_count(); ++r) lines.push_back(table.source_line(r));
  return lines;
}

inline std::string escaped(std::string_view s) {
  static const char* const kHex = "0123456789ABCDEF";
  std::string out = "\"";
  for (const char ch : s) {
    const auto b = static_cast<unsigned char>(ch);
    if (ch == '"' || ch == '\\') out += '\\', out += ch;
    else if (ch == '\n') out += "\\n";
    else if (ch == '\r') out += "\\r";
    else if (ch == '\t') out += "\\t";
    else if (b < 0x20 || b == 0x7F) out += "\\x", out += kHex[b >> 4], out += kHex[b & 15];
    else out += ch;
  }
  return out + "\"";
}

// Empty when both tables have the same names, NULLs, cells and source lines;
// otherwise the first difference in words.
inline std::string first_difference(const Table& a, const Table& b) {
  if (a.names() != b.names()) return "the column names differ";
  if (a.row_count() != b.row_count())
    return "row counts differ: " + std::to_string(a.row_count()) + " vs " + std::to_string(b.row_count());
  for (size_t r = 0; r < a.row_count(); ++r) {
    const std::string where = "row " + std::to_string(r);
    if (a.source_line(r) != b.source_line(r))
      return where + ": source line " + std::to_string(a.source_line(r)) + " vs " + std::to_string(b.source_line(r));
    for (size_t c = 0; c < a.column_count(); ++c) {
      const Column& x = a.column(c);
      const Column& y = b.column(c);
      if (x.is_null(r) != y.is_null(r)) return where + " column " + a.name(c) + ": NULL in only one table";
      if (!x.is_null(r) && x.text(r) != y.text(r))
        return where + " column " + a.name(c) + ": " + escaped(x.text(r)) + " vs " + escaped(y.text(r));
    }
  }
  return "";
}

}  // namespace tamis::test

namespace doctest {
template <>
struct StringMaker<tamis::test::Rows> {
  static String convert(const tamis::test::Rows& rows) {
    std::string out = "{";
    for (const auto& row : rows) {
      out += "\n  {";
      for (size_t c = 0; c < row.size(); ++c) out += (c ? ", " : "") + tamis::test::escaped(row[c]);
      out += "}";
    }
    out += "}";
    return String(out.c_str());
  }
};
template <>
struct StringMaker<tamis::test::Lines> {
  static String convert(const tamis::test::Lines& lines) {
    std::string out = "{";
    for (size_t i = 0; i < lines.size(); ++i) out += (i ? ", " : "") + std::to_string(lines[i]);
    return String((out + "}").c_str());
  }
};
template <>
struct StringMaker<std::vector<std::string>> {
  static String convert(const std::vector<std::string>& values) {
    std::string out = "{";
    for (size_t i = 0; i < values.size(); ++i) out += (i ? ", " : "") + tamis::test::escaped(values[i]);
    return String((out + "}").c_str());
  }
};
}  // namespace doctest
