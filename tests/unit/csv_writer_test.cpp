// The CSV writer: minimal RFC 4180 quoting, its options, read -> write -> read
// round trips, and the canonical text form of typed cells (design §3).
#include <doctest/doctest.h>

#include <climits>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "csv_writer.hpp"
#include "unit_support.hpp"

using namespace tamis;
using tamis::test::dialect;
using tamis::test::read_ok;
using tamis::test::Rows;
using tamis::test::rows_of;

namespace {

std::string written_rows(const std::vector<std::vector<std::string_view>>& rows, CsvWriteOptions options = {}) {
  MemorySink sink;
  auto writer = CsvWriter::make(sink, std::move(options));
  REQUIRE(writer.ok());
  for (const auto& row : rows) REQUIRE(writer->write_row(row).ok());
  REQUIRE(writer->finish().ok());
  return sink.data;
}

std::string written_table(const Table& table, CsvWriteOptions options = {}) {
  MemorySink sink;
  auto writer = CsvWriter::make(sink, std::move(options));
  REQUIRE(writer.ok());
  REQUIRE(writer->write_table(table).ok());
  REQUIRE(writer->finish().ok());
  return sink.data;
}

// A column of one typed chunk; absent values are NULL.
ColumnPtr typed_column(Type type, int scale, const std::vector<std::optional<int64_t>>& values) {
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = values.size();
  bool any_null = false;
  for (const auto& v : values) any_null |= !v.has_value();
  if (any_null) chunk->validity.assign((values.size() + 63) / 64, ~uint64_t{0});
  for (size_t i = 0; i < values.size(); ++i) {
    chunk->numbers.push_back(values[i].value_or(0));
    if (!values[i]) chunk->validity[i >> 6] &= ~(uint64_t{1} << (i & 63));
  }
  auto column = std::make_shared<Column>(type, scale);
  column->append_chunk(std::move(chunk));
  return column;
}

ColumnPtr text_column(const std::vector<std::optional<std::string>>& values) {
  TextChunkBuilder builder;
  for (const auto& v : values) {
    if (v) builder.append(*v);
    else builder.append_null();
  }
  auto column = std::make_shared<Column>(Type::text);
  column->append_chunk(builder.finish());
  return column;
}

ColumnPtr line_numbers(size_t rows) {
  std::vector<std::optional<int64_t>> lines;
  for (size_t i = 0; i < rows; ++i) lines.push_back(static_cast<int64_t>(i + 2));
  return typed_column(Type::integer, 0, lines);
}

Table make_table(std::vector<std::string> names, std::vector<ColumnPtr> columns) {
  const size_t rows = columns.empty() ? 0 : columns[0]->size();
  auto table = Table::make(std::move(names), std::move(columns), line_numbers(rows));
  REQUIRE(table.ok());
  return std::move(table).value();
}

// The canonical form of every value of a one-chunk column.
std::vector<std::string> canonical(const ColumnPtr& column, std::string_view date_pattern = "%Y-%m-%d") {
  const auto format = DateFormat::compile(date_pattern);
  REQUIRE(format.ok());
  std::vector<std::string> out;
  for (size_t i = 0; i < column->size(); ++i) {
    std::string cell;
    append_canonical(*column, column->chunk(0), i, format.value(), cell);
    out.push_back(cell);
  }
  return out;
}

}  // namespace

TEST_SUITE("unit_csv_writer") {

TEST_CASE("unit_csv_writer: minimal quoting follows RFC 4180 rules 5-7") {
  // RFC 4180 §2 rule 5: fields "may or may not be enclosed in double quotes";
  // rule 6: "Fields containing line breaks (CRLF), double quotes, and commas
  // should be enclosed in double-quotes"; rule 7: a double quote inside is
  // "escaped by preceding it with another double quote". Minimal quoting
  // quotes exactly the fields rule 6 names.
  CHECK(written_rows({{"plain", "with,comma", "say \"hi\"", "line\nbreak", "cr\rhere", "crlf\r\nhere"}}) ==
        "plain,\"with,comma\",\"say \"\"hi\"\"\",\"line\nbreak\",\"cr\rhere\",\"crlf\r\nhere\"\n");
  // Rule 4: spaces are part of a field, so they need no quotes and are kept.
  CHECK(written_rows({{" lead", "trail ", " both "}}) == " lead,trail , both \n");
  // Non-ASCII text and an empty field among others are written as they are.
  CHECK(written_rows({{"caf\xC3\xA9", "", "\xF0\x9F\x8C\xB3"}}) == "caf\xC3\xA9,,\xF0\x9F\x8C\xB3\n");
  CHECK(written_rows({{"\""}}) == "\"\"\"\"\n");
}

TEST_CASE("unit_csv_writer: a record of one empty field is written as two quotes") {
  // An unquoted empty single field would be an empty line, which readers skip.
  CHECK(written_rows({{""}}) == "\"\"\n");
  CHECK(written_rows({{"x"}, {""}, {"y"}}) == "x\n\"\"\ny\n");
  CHECK(written_rows({{"", ""}}) == ",\n");
  const Table one_column = make_table({"v"}, {text_column({"a", "", "b"})});
  CHECK(written_table(one_column) == "a\n\"\"\nb\n");
}

TEST_CASE("unit_csv_writer: CRLF line endings") {
  // RFC 4180 §2 rule 1 delimits records with CRLF.
  CsvWriteOptions options;
  options.line_ending = "\r\n";
  CHECK(written_rows({{"a", "b"}, {"1", "x\r\ny"}}, options) == "a,b\r\n1,\"x\r\ny\"\r\n");
}

TEST_CASE("unit_csv_writer: NULL is written with the null marker, distinct from empty text") {
  const Table t = make_table({"a", "b"}, {text_column({"x", std::nullopt, ""}), text_column({std::nullopt, "y", "z"})});
  CHECK(written_table(t) == "x,\n,y\n,z\n");
  CsvWriteOptions marker;
  marker.null_marker = "\\N";
  CHECK(written_table(t, marker) == "x,\\N\n\\N,y\n,z\n");
  // A marker that holds the delimiter is quoted like any other text.
  CsvWriteOptions comma;
  comma.null_marker = "N,A";
  CHECK(written_table(t, comma) == "x,\"N,A\"\n\"N,A\",y\n,z\n");
  // Typed columns use the marker too.
  const Table typed = make_table({"n"}, {typed_column(Type::integer, 0, {1, std::nullopt})});
  CsvWriteOptions na;
  na.null_marker = "NA";
  CHECK(written_table(typed, na) == "1\nNA\n");
}

TEST_CASE("unit_csv_writer: TSV quotes tabs, not commas") {
  CsvWriteOptions tsv;
  tsv.delimiter = '\t';
  CHECK(written_rows({{"a,b", "c\td", "e"}}, tsv) == "a,b\t\"c\td\"\te\n");
}

TEST_CASE("unit_csv_writer: impossible options are refused") {
  MemorySink sink;
  CsvWriteOptions same;
  same.delimiter = '"';
  CHECK(CsvWriter::make(sink, same).error().kind == ErrorKind::usage);
  CsvWriteOptions bad_date;
  bad_date.date_format = "%Y-%Q";
  CHECK(!CsvWriter::make(sink, bad_date).ok());
}

TEST_CASE("unit_csv_writer: read, write, read gives the same records") {
  const std::vector<std::string> inputs{
      "a,b,c\n1,2,3\n",
      "\"x,y\",\"say \"\"hi\"\"\",\"l1\nl2\"\n\"cr\rin\",\"crlf\r\nin\",\"\"\"\"\n",
      " lead ,\" quoted lead \",trail \n,,\n\"\",\"\",\"\"\n",
      "caf\xC3\xA9,\xE2\x82\xAC,\xF0\x9F\x8C\xB3\n\"\xF0\x9F\x8C\xB3,\",x,\"\xC3\xA9\"\"\"\n",
      "bare\"quote,\"a\",b\"\"c\n",
      "\"\"\nx\n\"\"\n",
      "last,record,\"no newline\"",
  };
  for (const std::string& input : inputs) {
    CAPTURE(input);
    for (const char* line_ending : {"\n", "\r\n"}) {
      const Table first = read_ok(input, dialect(',', HeaderMode::no));
      CsvWriteOptions options;
      options.line_ending = line_ending;
      const std::string written = written_table(first, options);
      CAPTURE(written);
      const Table second = read_ok(written, dialect(',', HeaderMode::no));
      CHECK(rows_of(first) == rows_of(second));
      // Writing the re-read table again gives the same bytes.
      CHECK(written_table(second, options) == written);
    }
  }
}

TEST_CASE("unit_csv_writer: canonical integers") {
  // Design §3: integers without leading zeros.
  CHECK(canonical(typed_column(Type::integer, 0, {0, 7, -42, 1000, INT64_MAX, INT64_MIN})) ==
        std::vector<std::string>{"0", "7", "-42", "1000", "9223372036854775807", "-9223372036854775808"});
}

TEST_CASE("unit_csv_writer: canonical decimals at the column scale") {
  // Design §3: decimals are scaled 64-bit integers printed in plain notation
  // at the column's scale.
  CHECK(canonical(typed_column(Type::decimal, 2, {-5, 5, 0, -1250, 1250, 123456, 100, -100, 99, -99})) ==
        std::vector<std::string>{"-0.05", "0.05", "0.00", "-12.50", "12.50", "1234.56", "1.00", "-1.00", "0.99",
                                 "-0.99"});
  CHECK(canonical(typed_column(Type::decimal, 2, {INT64_MAX, INT64_MIN})) ==
        std::vector<std::string>{"92233720368547758.07", "-92233720368547758.08"});
  CHECK(canonical(typed_column(Type::decimal, 3, {-1, 1, -1000, 12345})) ==
        std::vector<std::string>{"-0.001", "0.001", "-1.000", "12.345"});
  CHECK(canonical(typed_column(Type::decimal, 0, {-7, 42})) == std::vector<std::string>{"-7", "42"});
}

TEST_CASE("unit_csv_writer: canonical dates in the output date format") {
  // Day numbers checked with Python datetime: (date - date(1970, 1, 1)).days.
  const auto days = typed_column(Type::date, 0, {0, -1, 11016, 11017, 19527});
  CHECK(canonical(days) ==
        std::vector<std::string>{"1970-01-01", "1969-12-31", "2000-02-29", "2000-03-01", "2023-06-19"});
  CHECK(canonical(days, "%d/%m/%Y") ==
        std::vector<std::string>{"01/01/1970", "31/12/1969", "29/02/2000", "01/03/2000", "19/06/2023"});
  CHECK(canonical(days, "%d %B %Y") ==
        std::vector<std::string>{"01 January 1970", "31 December 1969", "29 February 2000", "01 March 2000",
                                 "19 June 2023"});
}

TEST_CASE("unit_csv_writer: canonical booleans") {
  // Design §3: booleans as true/false.
  CHECK(canonical(typed_column(Type::boolean, 0, {1, 0})) == std::vector<std::string>{"true", "false"});
}

TEST_CASE("unit_csv_writer: write_table writes typed columns canonically, quoting where needed") {
  const Table t = make_table({"site", "count", "height", "planted", "alive"},
                             {text_column({"North, gate", "Mill \"Lane\"", std::nullopt}),
                              typed_column(Type::integer, 0, {12, -3, std::nullopt}),
                              typed_column(Type::decimal, 2, {-5, 1250, std::nullopt}),
                              typed_column(Type::date, 0, {19527, 11016, std::nullopt}),
                              typed_column(Type::boolean, 0, {1, 0, std::nullopt})});
  CsvWriteOptions options;
  options.line_ending = "\r\n";
  options.null_marker = "NULL";
  options.date_format = "%B %d, %Y";
  CHECK(written_table(t, options) ==
        "\"North, gate\",12,-0.05,\"June 19, 2023\",true\r\n"
        "\"Mill \"\"Lane\"\"\",-3,12.50,\"February 29, 2000\",false\r\n"
        "NULL,NULL,NULL,NULL,NULL\r\n");
}

TEST_CASE("unit_csv_writer: columns chunked differently are written row by row") {
  auto text = std::make_shared<Column>(Type::text);
  for (const std::vector<std::string>& part : {std::vector<std::string>{"a", "b"}, std::vector<std::string>{},
                                               std::vector<std::string>{"c", "d", "e"}}) {
    TextChunkBuilder builder;
    for (const auto& v : part) builder.append(v);
    text->append_chunk(builder.finish());
  }
  auto numbers = std::make_shared<Column>(Type::integer);
  for (const std::vector<int64_t>& part : {std::vector<int64_t>{1}, std::vector<int64_t>{2, 3, 4, 5}}) {
    auto chunk = std::make_shared<ColumnChunk>();
    chunk->rows = part.size();
    chunk->numbers = part;
    numbers->append_chunk(chunk);
  }
  const Table t = make_table({"t", "n"}, {text, numbers});
  CHECK(written_table(t) == "a,1\nb,2\nc,3\nd,4\ne,5\n");
}

TEST_CASE("unit_csv_writer: output larger than the write buffer arrives whole and in order") {
  std::vector<std::optional<std::string>> values;
  std::string expected;
  for (int i = 0; i < 40000; ++i) {
    std::string v = "row " + std::to_string(i) + (i % 7 == 0 ? ", with comma" : "") + std::string(40, 'x');
    expected += (i % 7 == 0 ? "\"" + v + "\"" : v) + "\n";
    values.push_back(std::move(v));
  }
  const std::string written = written_table(make_table({"v"}, {text_column(values)}));
  CHECK(written.size() > (1u << 20));
  CHECK(written == expected);
}

TEST_CASE("unit_csv_writer: dates that share a slot of the writer's date cache keep their own text") {
  // 4096 days apart (the cache's size), and before 1970: day numbers checked
  // with Python datetime, (date - date(1970, 1, 1)).days.
  const Table t = make_table({"d"}, {typed_column(Type::date, 0, {19527, 19527 + 4096, 19527, -4096, 0, -4096})});
  CHECK(written_table(t) == "2023-06-19\n2034-09-05\n2023-06-19\n1958-10-15\n1970-01-01\n1958-10-15\n");
  CsvWriteOptions options;
  options.date_format = "%d,%m,%Y";
  CHECK(written_table(t, options) ==
        "\"19,06,2023\"\n\"05,09,2034\"\n\"19,06,2023\"\n\"15,10,1958\"\n\"01,01,1970\"\n\"15,10,1958\"\n");
}

TEST_CASE("unit_csv_writer: a field longer than the write buffer is written whole") {
  const std::string big(3u << 20, 'q');
  const std::string quoted = big + "\"end";
  const std::string written = written_table(make_table({"a", "b"}, {text_column({big, "x"}), text_column({"y", quoted})}));
  CHECK(written == big + ",y\nx,\"" + big + "\"\"end\"\n");
}

}  // TEST_SUITE
