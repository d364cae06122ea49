// Column profiles on small tables with known answers: type inference and the
// 90% share rule, counts, canonical min/max, mean and sample standard
// deviation, Hyndman & Fan type 7 quantiles, value shapes, top values, and
// Unicode-aware white space and punctuation counts.
#include <doctest/doctest.h>

#include <algorithm>
#include <cstdio>
#include <optional>
#include <string>
#include <vector>

#include "profile.hpp"
#include "unit_support.hpp"

using namespace tamis;
using tamis::test::dialect;
using tamis::test::read_ok;

namespace {

// Profiles CSV text whose first line is the header.
TableProfile profile_of(const std::string& csv, size_t batch_rows = 65536) {
  CsvOptions options = dialect(',', HeaderMode::yes);
  options.batch_rows = batch_rows;
  return profile_table(read_ok(csv, options));
}

// A one-column table with NULLs where values are absent.
Table column_table(const std::vector<std::optional<std::string>>& values) {
  TextChunkBuilder builder;
  for (const auto& v : values) {
    if (v) builder.append(*v);
    else builder.append_null();
  }
  auto column = std::make_shared<Column>(Type::text);
  column->append_chunk(builder.finish());
  auto lines = std::make_shared<ColumnChunk>();
  lines->rows = values.size();
  for (size_t i = 0; i < values.size(); ++i) lines->numbers.push_back(static_cast<int64_t>(i + 2));
  auto line_column = std::make_shared<Column>(Type::integer);
  line_column->append_chunk(lines);
  auto table = Table::make({"v"}, {column}, line_column);
  REQUIRE(table.ok());
  return std::move(table).value();
}

// The same column stored typed: int64 values (table.hpp), NULL where absent.
Table typed_table(Type type, int scale, const std::vector<std::optional<int64_t>>& values) {
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = values.size();
  chunk->validity.assign((values.size() + 63) / 64, 0);
  for (size_t i = 0; i < values.size(); ++i) {
    chunk->numbers.push_back(values[i].value_or(0));
    if (values[i]) chunk->validity[i >> 6] |= uint64_t{1} << (i & 63);
  }
  auto column = std::make_shared<Column>(type, scale);
  column->append_chunk(chunk);
  const Table text = column_table(std::vector<std::optional<std::string>>(values.size(), ""));
  auto table = Table::make({"v"}, {column}, text.source_lines_ptr());
  REQUIRE(table.ok());
  return std::move(table).value();
}

ColumnProfile single(const std::vector<std::optional<std::string>>& values) {
  const TableProfile p = profile_table(column_table(values));
  REQUIRE(p.columns.size() == 1);
  return p.columns[0];
}

// One column of values, one per line, under the header "v".
std::string one_column_csv(const std::vector<std::string>& values) {
  std::string csv = "v\n";
  for (const auto& v : values) csv += v + "\n";
  return csv;
}

std::vector<double> quantile_values(const ColumnProfile& c) {
  std::vector<double> out;
  for (const Quantile& q : c.quantiles) out.push_back(q.value);
  return out;
}

std::string number_text(double v) {
  char buffer[40];
  std::snprintf(buffer, sizeof buffer, "%.17g", v);
  return buffer;
}

// Every field of a profile in one string, so two profiles compare at once.
// (Built with += throughout: GCC 12 at -O3 reports a spurious -Wrestrict on
// "literal" + std::string temporaries.)
std::string describe(const ColumnProfile& c) {
  std::string s = c.name;
  const auto field = [&s](const char* label, const std::string& value) {
    s += ' ';
    s += label;
    s += '=';
    s += value;
  };
  field("type", std::string(type_name(c.type)));
  field("share", number_text(c.type_share));
  for (const uint64_t n : {c.rows, c.nulls, c.blanks, c.distinct, c.non_blank, c.fit_integer, c.fit_number,
                           c.fit_date, c.fit_boolean, c.length_min, c.length_max, c.edge_whitespace,
                           c.trailing_punctuation})
    field("n", std::to_string(n));
  field("min", c.min.value_or("-"));
  field("max", c.max.value_or("-"));
  field("mean", c.mean ? number_text(*c.mean) : "-");
  field("sd", c.std_dev ? number_text(*c.std_dev) : "-");
  for (const Quantile& q : c.quantiles) field(number_text(q.p).c_str(), number_text(q.value));
  for (const ValueCount& v : c.top_values) field(v.value.c_str(), std::to_string(v.count));
  for (const ValueCount& v : c.shapes) field(v.value.c_str(), std::to_string(v.count));
  return s;
}

std::vector<std::string> values_of(const std::vector<ValueCount>& counts) {
  std::vector<std::string> out;
  for (const auto& v : counts) out.push_back(v.value + "=" + std::to_string(v.count));
  return out;
}

}  // namespace

TEST_SUITE("unit_profile") {

TEST_CASE("unit_profile: type inference for integer, decimal, date, boolean and text") {
  const TableProfile p = profile_of(
      "i,d,dt,b,t\n"
      "1,1.5,2023-06-19,true,oak\n"
      "-2,2,6/20/2023,False,ash\n"
      "+3,3.25,2023-06-21,yes,elm\n"
      "0,-0.5,16-Dec-2022,NO,pine\n");
  REQUIRE(p.columns.size() == 5);
  CHECK(p.rows == 4);
  CHECK(p.columns[0].type == Type::integer);
  CHECK(p.columns[0].fit_integer == 4);
  CHECK(p.columns[1].type == Type::decimal);
  CHECK(p.columns[1].fit_integer == 1);
  CHECK(p.columns[1].fit_number == 4);
  CHECK(p.columns[2].type == Type::date);
  CHECK(p.columns[2].fit_date == 4);
  CHECK(p.columns[3].type == Type::boolean);
  CHECK(p.columns[3].fit_boolean == 4);
  CHECK(p.columns[4].type == Type::text);
  for (const auto& c : p.columns) {
    CAPTURE(c.name);
    CHECK(c.non_blank == 4);
    CHECK(c.type_share == doctest::Approx(1.0));
  }
}

TEST_CASE("unit_profile: a type needs 90% of the non-blank values") {
  // Our own threshold (profile.cpp, kTypeShare): 9 of 10 fit keeps the type.
  const ColumnProfile nine = profile_of(one_column_csv({"1", "2", "3", "4", "5", "6", "7", "8", "9", "n/a"})).columns[0];
  CHECK(nine.type == Type::integer);
  CHECK(nine.type_share == doctest::Approx(0.9));
  CHECK(nine.fit_integer == 9);
  const ColumnProfile eight = profile_of(one_column_csv({"1", "2", "3", "4", "5", "6", "7", "8", "n/a", "?"})).columns[0];
  CHECK(eight.type == Type::text);
  CHECK(eight.fit_integer == 8);
  // Blanks are not counted against the type.
  const ColumnProfile with_blanks = single({"1", "2", "", "   ", std::nullopt, "3"});
  CHECK(with_blanks.type == Type::integer);
  CHECK(with_blanks.non_blank == 3);
  CHECK(with_blanks.type_share == doctest::Approx(1.0));
  // White space around a value does not stop it from fitting.
  CHECK(single({" 1", "2 ", "\xC2\xA0" "3"}).type == Type::integer);
}

TEST_CASE("unit_profile: NULLs, blanks, distinct values and lengths") {
  // NULL is not the empty string (design §3); a blank is empty or Unicode
  // white space only (U+3000 IDEOGRAPHIC SPACE is White_Space in PropList.txt).
  const ColumnProfile c = single({std::nullopt, std::nullopt, "", "  ", "\xE3\x80\x80", "a", "a", "b\xC3\xA9"});
  CHECK(c.rows == 8);
  CHECK(c.nulls == 2);
  CHECK(c.blanks == 3);
  CHECK(c.non_blank == 3);
  CHECK(c.distinct == 5);
  // Lengths in code points over non-NULL values: "" is 0, "bé" is 2.
  CHECK(c.length_min == 0);
  CHECK(c.length_max == 2);
}

TEST_CASE("unit_profile: min and max in the canonical form of the type") {
  const TableProfile p = profile_of(
      "i,d,dt,t\n"
      "007,1.5,6/19/2023,pine\n"
      "12,-0.5,2023-01-02,ash\n"
      "-3,2.25,12/16/22,Oak\n");
  // Design §3: integers without leading zeros; decimals in plain notation at
  // the column's scale (here 2, the most fraction digits seen); dates ISO 8601.
  CHECK(p.columns[0].min.value_or("<none>") == "-3");
  CHECK(p.columns[0].max.value_or("<none>") == "12");
  CHECK(p.columns[1].min.value_or("<none>") == "-0.50");
  CHECK(p.columns[1].max.value_or("<none>") == "2.25");
  CHECK(p.columns[2].min.value_or("<none>") == "2022-12-16");
  CHECK(p.columns[2].max.value_or("<none>") == "2023-06-19");
  // Text compares code point by code point (design §4): 'O' sorts before 'a'.
  CHECK(p.columns[3].min.value_or("<none>") == "Oak");
  CHECK(p.columns[3].max.value_or("<none>") == "pine");
}

TEST_CASE("unit_profile: integer min and max stay exact beyond 2^53") {
  // 9007199254740993 = 2^53 + 1 has no double; an integer's canonical form is
  // its exact digits (design §3), as for 18-digit identifiers in extracts.
  const ColumnProfile c = profile_of(one_column_csv({"9007199254740993", "1", "123456789012345678"})).columns[0];
  CHECK(c.type == Type::integer);
  CHECK(c.min.value_or("<none>") == "1");
  CHECK(c.max.value_or("<none>") == "123456789012345678");
  const ColumnProfile d = profile_of(one_column_csv({"9007199254740993", "-5"})).columns[0];
  CHECK(d.max.value_or("<none>") == "9007199254740993");
}

TEST_CASE("unit_profile: negative zero has the canonical form 0") {
  // A scaled 64-bit integer has no negative zero, so "-0" and "-0.00" are
  // printed 0 and 0.00 in the canonical form (design §3).
  const ColumnProfile i = profile_of(one_column_csv({"-0", "5"})).columns[0];
  CHECK(i.type == Type::integer);
  CHECK(i.min.value_or("<none>") == "0");
  const ColumnProfile d = profile_of(one_column_csv({"-0.00", "1.25"})).columns[0];
  CHECK(d.type == Type::decimal);
  CHECK(d.min.value_or("<none>") == "0.00");
}

TEST_CASE("unit_profile: mean, sample standard deviation and type 7 quantiles of 1..10") {
  // Hyndman & Fan (1996), definition 7 (R's default, numpy's "linear"):
  // h = (n-1)p, Q = x[floor h] + (h - floor h)(x[floor h + 1] - x[floor h]),
  // 0-based. For x = 1..10: p=0.25 -> h=2.25 -> 3.25; p=0.5 -> h=4.5 -> 5.5;
  // p=0.05 -> 1.45, p=0.75 -> 7.75, p=0.95 -> 9.55 (checked with numpy.quantile).
  // Mean 5.5; sample standard deviation sqrt(82.5/9) = 3.0276503540974917
  // (checked with Python statistics.stdev).
  const ColumnProfile c =
      profile_of(one_column_csv({"7", "3", "10", "1", "5", "2", "9", "4", "8", "6"})).columns[0];
  REQUIRE(c.mean.has_value());
  REQUIRE(c.std_dev.has_value());
  CHECK(*c.mean == doctest::Approx(5.5));
  CHECK(*c.std_dev == doctest::Approx(3.0276503540974917));
  REQUIRE(c.quantiles.size() == 5);
  const std::vector<double> p{0.05, 0.25, 0.5, 0.75, 0.95};
  const std::vector<double> expected{1.45, 3.25, 5.5, 7.75, 9.55};
  for (size_t k = 0; k < 5; ++k) {
    CAPTURE(k);
    CHECK(c.quantiles[k].p == doctest::Approx(p[k]));
    CHECK(c.quantiles[k].value == doctest::Approx(expected[k]));
  }
}

TEST_CASE("unit_profile: statistics weight repeated values by their count") {
  // x = 1,2,2,3,3,3,4,4,4,4: numpy.quantile gives 1.45, 2.25, 3, 4, 4; mean 3;
  // statistics.stdev gives 1.0540925533894598 (both checked with /usr/bin/python3).
  const ColumnProfile c =
      profile_of(one_column_csv({"4", "3", "2", "4", "1", "3", "4", "2", "3", "4"})).columns[0];
  CHECK(*c.mean == doctest::Approx(3.0));
  CHECK(*c.std_dev == doctest::Approx(1.0540925533894598));
  const std::vector<double> expected{1.45, 2.25, 3.0, 4.0, 4.0};
  const std::vector<double> got = quantile_values(c);
  REQUIRE(got.size() == 5);
  for (size_t k = 0; k < 5; ++k) CHECK(got[k] == doctest::Approx(expected[k]));

  // The textbook example 2,4,4,4,5,5,7,9 has population standard deviation 2
  // (from memory) and sample standard deviation sqrt(32/7) =
  // 2.138089935299395 (checked with Python statistics.stdev).
  const ColumnProfile t = profile_of(one_column_csv({"2", "4", "4", "4", "5", "5", "7", "9"})).columns[0];
  CHECK(*t.mean == doctest::Approx(5.0));
  CHECK(*t.std_dev == doctest::Approx(2.138089935299395));

  // One value: no sample standard deviation (n - 1 = 0); every quantile is it.
  const ColumnProfile one = profile_of(one_column_csv({"4.5"})).columns[0];
  CHECK(*one.mean == doctest::Approx(4.5));
  CHECK(!one.std_dev.has_value());
  for (const double q : quantile_values(one)) CHECK(q == doctest::Approx(4.5));
}

TEST_CASE("unit_profile: value shapes") {
  CHECK(value_shape("AB-123") == "A-999");
  CHECK(value_shape("Oak Street 12") == "Aa Aa 99");
  CHECK(value_shape("McDonald") == "AaAa");
  CHECK(value_shape("john.smith@example.org") == "a.a@a.a");
  CHECK(value_shape("(555) 010-9999") == "(999) 999-9999");
  CHECK(value_shape("") == "");
  CHECK(value_shape("a\tb") == "a a");
  // Non-ASCII letters by their case, other digits as 9 (U+FF12 FULLWIDTH
  // DIGIT TWO is Nd in UnicodeData.txt), other symbols as themselves.
  CHECK(value_shape("\xC3\x89" "COLE") == "A");
  CHECK(value_shape("\xC3\xA9t\xC3\xA9") == "a");
  CHECK(value_shape("\xEF\xBC\x92") == "9");
  CHECK(value_shape("x\xF0\x9F\x8C\xB3") == "a\xF0\x9F\x8C\xB3");
  CHECK(value_shape(std::string(50, '7')) == std::string(40, '9'));

  const ColumnProfile c = profile_of(one_column_csv({"AB-1", "CD-2", "EF-3", "x1", "y2", "Z"})).columns[0];
  CHECK(values_of(c.shapes) == std::vector<std::string>{"A-9=3", "a9=2", "A=1"});
}

TEST_CASE("unit_profile: top values by count, ties by value") {
  const ColumnProfile c = profile_of(one_column_csv({"b", "a", "d", "b", "l", "k", "a", "j", "i", "d", "h", "g",
                                                     "f", "e", "c", "b", "a"}))
                              .columns[0];
  CHECK(values_of(c.top_values) ==
        std::vector<std::string>{"a=3", "b=3", "d=2", "c=1", "e=1", "f=1", "g=1", "h=1", "i=1", "j=1"});
  CHECK(c.distinct == 12);
}

TEST_CASE("unit_profile: edge white space includes non-ASCII white space") {
  // PropList.txt (Unicode 15.0, Debian unicode-data): U+00A0 NO-BREAK SPACE
  // and U+3000 IDEOGRAPHIC SPACE are White_Space; U+200B ZERO WIDTH SPACE is not.
  const ColumnProfile c = single({"\xC2\xA0oak", "ash\xE3\x80\x80", " elm", "fir\t", "pine", "yew\xE2\x80\x8B",
                                  "in\xC2\xA0side", std::nullopt});
  CHECK(c.edge_whitespace == 4);
}

TEST_CASE("unit_profile: trailing punctuation includes non-ASCII punctuation") {
  // UnicodeData.txt general categories: U+3002 IDEOGRAPHIC FULL STOP is Po,
  // '.' is Po, ')' is Pe, U+2014 EM DASH is Pd; '$' is Sc and '+' is Sm
  // (symbols, not punctuation).
  const ColumnProfile c = single({"end\xE3\x80\x82", "end.", "end)", "end\xE2\x80\x94", "end$", "end+", "end",
                                  ".start", std::nullopt});
  CHECK(c.trailing_punctuation == 4);
}

TEST_CASE("unit_profile: stepping with a tiny budget, or repeated values kept once, gives the same profile") {
  std::string csv = "id,species,height,planted,note\n";
  for (int i = 0; i < 200; ++i) {
    csv += std::to_string(i % 37);
    csv += i % 3 == 0 ? ",oak," : i % 3 == 1 ? ",Ash ," : ",elm.,";
    csv += std::to_string(i % 11) + "." + std::to_string(i % 7);
    csv += ",2023-0" + std::to_string(1 + i % 9) + "-1" + std::to_string(i % 10) + ",";
    if (i % 5 != 0) csv += 'n', csv += std::to_string(i);
    csv += '\n';
  }
  CsvOptions options = dialect(',', HeaderMode::yes);
  options.batch_rows = 7;  // many chunks, so the profiler has many slices
  const Table table = read_ok(csv, options);
  REQUIRE(table.column(0).chunk_count() > 20);
  const TableProfile whole = profile_table(table);

  TableProfiler profiler(table);
  size_t calls = 0;
  double last_progress = profiler.progress();
  bool done = false;
  while (!done && calls < 1000000) {
    done = profiler.step(1);
    ++calls;
    CHECK(profiler.progress() >= last_progress);
    CHECK(profiler.progress() <= 1.0);
    last_progress = profiler.progress();
  }
  REQUIRE(done);
  CHECK(calls > 50);
  const TableProfile& stepped = profiler.result();
  CHECK(stepped.rows == whole.rows);
  REQUIRE(stepped.columns.size() == whole.columns.size());
  for (size_t c = 0; c < whole.columns.size(); ++c) CHECK(describe(stepped.columns[c]) == describe(whole.columns[c]));
  // The workbench's tables keep repeated values once (a dictionary per chunk).
  const TableProfile shared = profile_table(with_repeated_values_shared(table));
  for (size_t c = 0; c < whole.columns.size(); ++c) CHECK(describe(shared.columns[c]) == describe(whole.columns[c]));
  CHECK(whole.columns[1].type == Type::text);
  CHECK(whole.columns[2].type == Type::decimal);
  CHECK(whole.columns[3].type == Type::date);
}

TEST_CASE("unit_profile: progress reaches 1 when the work is done") {
  // 10 rows with 3 distinct values: the progress bar must end full.
  TableProfiler profiler(column_table({"a", "a", "a", "a", "b", "b", "b", "c", "c", "c"}));
  CHECK(profiler.progress() == doctest::Approx(0.0));
  while (!profiler.step(1)) {
  }
  CHECK(profiler.progress() == doctest::Approx(1.0));
}

TEST_CASE("unit_profile: thousands of distinct values are all counted") {
  // Value k appears k % 3 + 1 times; k = 2, 5, 8, ... appear three times.
  std::vector<std::optional<std::string>> values;
  for (int k = 0; k < 5000; ++k)
    for (int copy = 0; copy <= k % 3; ++copy) values.push_back(std::string("value ").append(std::to_string(k)));
  const ColumnProfile c = single(values);
  CHECK(c.distinct == 5000);
  CHECK(c.rows == values.size());
  // All three-times values tie, and ties sort by value (byte order).
  std::vector<std::string> tied;
  for (int k = 2; k < 5000; k += 3) tied.push_back(std::string("value ").append(std::to_string(k)));
  std::sort(tied.begin(), tied.end());
  tied.resize(10);
  std::vector<std::string> top;
  for (const ValueCount& v : c.top_values) {
    top.push_back(v.value);
    CHECK(v.count == 3);
  }
  CHECK(top == tied);
}

TEST_CASE("unit_profile: a typed column is profiled as its canonical text") {
  // Design §3: a typed value's canonical text is the integer in decimal, the
  // decimal at the column's scale, the date in ISO 8601 (day 0 = 1970-01-01,
  // day 19723 = 2024-01-01: 54 years of 365 days plus 13 leap days, from the
  // Gregorian rule), and true/false.
  struct Case {
    Type type;
    int scale;
    std::vector<std::optional<int64_t>> values;
    std::vector<std::optional<std::string>> canonical;
  };
  const std::vector<Case> cases = {
      {Type::integer, 0, {42, std::nullopt, -7, 42}, {"42", std::nullopt, "-7", "42"}},
      {Type::decimal, 2, {1234, -5, std::nullopt, 0}, {"12.34", "-0.05", std::nullopt, "0.00"}},
      {Type::date, 0, {0, 19723, 19723, std::nullopt}, {"1970-01-01", "2024-01-01", "2024-01-01", std::nullopt}},
      {Type::boolean, 0, {1, 0, 1, 1}, {"true", "false", "true", "true"}},
  };
  for (const Case& c : cases) {
    CAPTURE(type_name(c.type));
    const TableProfile typed = profile_table(typed_table(c.type, c.scale, c.values));
    const ColumnProfile expected = single(c.canonical);
    REQUIRE(typed.columns.size() == 1);
    const ColumnProfile& got = typed.columns[0];
    CHECK(got.type == expected.type);
    CHECK(got.nulls == expected.nulls);
    CHECK(got.distinct == expected.distinct);
    CHECK(got.min == expected.min);
    CHECK(got.max == expected.max);
    CHECK(got.mean == expected.mean);
    CHECK(values_of(got.top_values) == values_of(expected.top_values));
    CHECK(values_of(got.shapes) == values_of(expected.shapes));
    CHECK(got.length_max == expected.length_max);
  }
  const ColumnProfile date = profile_table(typed_table(Type::date, 0, cases[2].values)).columns[0];
  CHECK(date.type == Type::date);
  CHECK(date.min == std::optional<std::string>("1970-01-01"));
  CHECK(date.max == std::optional<std::string>("2024-01-01"));
}

}  // TEST_SUITE
