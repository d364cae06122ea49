// Evaluating SQL expressions: three-valued logic, NULL propagation, exact
// numbers, text semantics, LIKE, CASE, CAST and the functions, on literals
// and on columns (with NULLs and chunk boundaries that differ per column).
#include <doctest/doctest.h>

#include <random>
#include <string>
#include <vector>

#include "test_expr_support.hpp"

using namespace tamis;
using tamis::test::Cells;
using tamis::test::evaluate_all;
using tamis::test::make_table;
using tamis::test::TestColumn;
using tamis::test::value_of;

namespace {

using Strings = std::vector<std::string>;

// Every pair of truth values: a and b each TRUE, FALSE, UNKNOWN (NULL).
const Table& truth_pairs() {
  static const Table table = [] {
    const Cells a = {"true", "true", "true", "false", "false", "false", std::nullopt, std::nullopt, std::nullopt};
    const Cells b = {"true", "false", std::nullopt, "true", "false", std::nullopt, "true", "false", std::nullopt};
    // Chunks of 2 and 4 rows: the columns' chunk boundaries do not line up.
    return make_table({{"a", Type::boolean, 0, a, 2}, {"b", Type::boolean, 0, b, 4}}, 9);
  }();
  return table;
}

}  // namespace

// ISO/IEC 9075-2, subclause 6.39 <boolean value expression>, the truth
// tables for AND, OR and IS (UNKNOWN is the NULL boolean) — from memory.
// Row order: (a, b) = TT TF TU FT FF FU UT UF UU.
TEST_CASE("unit_expr three-valued logic: AND, OR, NOT and IS truth tables") {
  const Table& t = truth_pairs();
  CHECK(evaluate_all("a AND b", t) == Strings{"true", "false", "NULL", "false", "false", "false", "NULL", "false", "NULL"});
  CHECK(evaluate_all("a OR b", t) == Strings{"true", "true", "true", "true", "false", "NULL", "true", "NULL", "NULL"});
  CHECK(evaluate_all("NOT a", t) == Strings{"false", "false", "false", "true", "true", "true", "NULL", "NULL", "NULL"});
  CHECK(evaluate_all("a IS TRUE", t) ==
        Strings{"true", "true", "true", "false", "false", "false", "false", "false", "false"});
  CHECK(evaluate_all("a IS FALSE", t) ==
        Strings{"false", "false", "false", "true", "true", "true", "false", "false", "false"});
  CHECK(evaluate_all("a IS UNKNOWN", t) ==
        Strings{"false", "false", "false", "false", "false", "false", "true", "true", "true"});
  CHECK(evaluate_all("b IS NOT TRUE", t) ==
        Strings{"false", "true", "true", "false", "true", "true", "false", "true", "true"});
  CHECK(evaluate_all("b IS NOT FALSE", t) ==
        Strings{"true", "false", "true", "true", "false", "true", "true", "false", "true"});
  CHECK(evaluate_all("b IS NOT NULL", t) ==
        Strings{"true", "true", "false", "true", "true", "false", "true", "true", "false"});
  // The same tables with literals, where the NULL literal is an unknown boolean.
  CHECK(value_of("NULL AND FALSE") == "false");
  CHECK(value_of("FALSE AND NULL") == "false");
  CHECK(value_of("NULL AND TRUE") == "NULL");
  CHECK(value_of("NULL OR TRUE") == "true");
  CHECK(value_of("NULL OR FALSE") == "NULL");
  CHECK(value_of("NOT NULL") == "NULL");
  // De Morgan holds in three-valued logic (a consequence of the tables).
  CHECK(evaluate_all("NOT (a AND b)", t) == evaluate_all("NOT a OR NOT b", t));
  CHECK(evaluate_all("NOT (a OR b)", t) == evaluate_all("NOT a AND NOT b", t));
}

TEST_CASE("unit_expr three-valued logic: comparisons, IN and BETWEEN with NULL") {
  CHECK(value_of("NULL = NULL") == "NULL");
  CHECK(value_of("1 = NULL") == "NULL");
  CHECK(value_of("NULL <> 'a'") == "NULL");
  CHECK(value_of("NULL IS NULL") == "true");
  // x IN (list) is x = item1 OR x = item2 ... (ISO/IEC 9075-2 <in predicate>, from memory).
  CHECK(value_of("1 IN (1, NULL)") == "true");
  CHECK(value_of("2 IN (1, NULL)") == "NULL");
  CHECK(value_of("2 NOT IN (1, NULL)") == "NULL");
  CHECK(value_of("2 NOT IN (1, 3)") == "true");
  CHECK(value_of("NULL IN (1, 2)") == "NULL");
  CHECK(value_of("'b' IN ('a', 'b', 'c')") == "true");
  // x BETWEEN a AND b is a <= x AND x <= b (<between predicate>, from memory).
  CHECK(value_of("NULL BETWEEN 1 AND 2") == "NULL");
  CHECK(value_of("5 BETWEEN NULL AND 2") == "false");
  CHECK(value_of("1 BETWEEN NULL AND 2") == "NULL");
  CHECK(value_of("5 NOT BETWEEN NULL AND 2") == "true");
  CHECK(value_of("2 BETWEEN 3 AND 1") == "false");
  // Every operator and function passes NULL through.
  for (const char* text : {"NULL + 1", "1 - NULL", "NULL * 2.5", "NULL / 2", "-CAST(NULL AS INTEGER)", "'a' || NULL",
                           "UPPER(NULL)", "LOWER(NULL)", "CHAR_LENGTH(NULL)", "SUBSTRING(NULL FROM 1)",
                           "SUBSTRING('a', NULL, 1)", "SUBSTRING('a', 1, NULL)", "TRIM(NULL)", "TRIM(NULL FROM 'a')",
                           "ABS(NULL)", "ROUND(NULL, 1)", "CAST(NULL AS DATE)", "NULLIF(NULL, 1)", "COALESCE(NULL)",
                           "NULL LIKE 'a'", "'a' LIKE NULL", "'a' LIKE 'a' ESCAPE NULL"}) {
    CAPTURE(text);
    CHECK(value_of(text) == "NULL");
  }
}

TEST_CASE("unit_expr numbers: exact integers and decimals, never integer division") {
  CHECK(value_of("7 / 2") == "3.500000");  // design §4: 7/2 is 3.5
  CHECK(value_of("-7 / 2") == "-3.500000");
  CHECK(value_of("1 / 3") == "0.333333");
  CHECK(value_of("2 / 3") == "0.666667");  // half away from zero
  CHECK(value_of("-2 / 3") == "-0.666667");
  CHECK(value_of("1 / 8") == "0.125000");
  CHECK(value_of("1.0000000 / 3") == "0.3333333");  // the larger operand scale wins over 6
  CHECK(value_of("0.1 + 0.2") == "0.3");            // exact, no binary floating point
  CHECK(value_of("0.1 + 0.2 = 0.3") == "true");
  CHECK(value_of("1.5 + 2") == "3.5");
  CHECK(value_of("10 - 0.25") == "9.75");
  CHECK(value_of("1.25 * 1.5") == "1.875");
  CHECK(value_of("3 * 4") == "12");
  CHECK(value_of("2.50 = 2.5") == "true");
  CHECK(value_of("2 < 2.01") == "true");
  CHECK(value_of("-(-5)") == "5");
  CHECK(value_of("ABS(-2.75)") == "2.75");
  CHECK(value_of("ABS(7)") == "7");
  // ROUND half away from zero (design §4).
  CHECK(value_of("ROUND(2.5)") == "3");
  CHECK(value_of("ROUND(-2.5)") == "-3");
  CHECK(value_of("ROUND(2.45, 1)") == "2.5");
  CHECK(value_of("ROUND(-2.45, 1)") == "-2.5");
  CHECK(value_of("ROUND(2.44, 1)") == "2.4");
  CHECK(value_of("ROUND(1.5, 3)") == "1.5");
  CHECK(value_of("ROUND(1250, -2)") == "1300");
  CHECK(value_of("ROUND(-1250, -2)") == "-1300");
  CHECK(value_of("ROUND(1249, -2)") == "1200");
  CHECK(value_of("ROUND(1234.5, -1)") == "1230");
  CHECK(value_of("ROUND(7)") == "7");
}

TEST_CASE("unit_expr numbers: overflow and division by zero name the row's source line") {
  const Table t = make_table({{"n", Type::integer, 0, {"1", "9223372036854775807", "0"}},
                              {"d", Type::decimal, 2, {"1.00", "2.00", "0.00"}}},
                             3, 4096, {10, 11, 12});
  CHECK(evaluate_all("n + 1", t) ==
        Strings{"error: at character 1 (n + 1): the result is out of range for a 64-bit integer in the row from line 11"});
  CHECK(evaluate_all("n * 2", t)[0].ends_with("in the row from line 11"));
  CHECK(evaluate_all("-n - 2", t)[0].ends_with("in the row from line 11"));
  CHECK(evaluate_all("1 / n", t) == Strings{"error: at character 1 (1 / n): division by zero in the row from line 12"});
  CHECK(evaluate_all("d / d", t) == Strings{"error: at character 1 (d / d): division by zero in the row from line 12"});
  CHECK(evaluate_all("n * d", t)[0].starts_with("error: at character 1 (n * d): the result is out of range for a "
                                                "decimal of scale 2"));
  CHECK(value_of("ABS(-9223372036854775807 - 1)") == "error: at character 1 (ABS(-9223372036854775807 - 1)): the "
                                                     "result is out of range in the row from line 2");
  // A NULL operand gives NULL, not an error.
  const Table nulls = make_table({{"n", Type::integer, 0, {std::nullopt, "9223372036854775807"}}}, 2);
  CHECK(evaluate_all("CASE WHEN n IS NULL THEN n + 1 END", nulls) == Strings{"NULL", "NULL"});
}

TEST_CASE("unit_expr evaluation order: CASE, COALESCE, AND and OR skip what they do not need") {
  const Table t = make_table({{"a", Type::integer, 0, {"6", "6", "5"}}, {"b", Type::integer, 0, {"3", "0", "0"}}}, 3);
  CHECK(evaluate_all("CASE WHEN b = 0 THEN NULL ELSE a / b END", t) == Strings{"2.000000", "NULL", "NULL"});
  CHECK(evaluate_all("b <> 0 AND a / b > 1", t) == Strings{"true", "false", "false"});
  CHECK(evaluate_all("b = 0 OR a / b > 1", t) == Strings{"true", "true", "true"});
  CHECK(evaluate_all("COALESCE(NULLIF(b, 0), 1) + 0 * (a / COALESCE(NULLIF(b, 0), 1))", t) ==
        Strings{"3.000000", "1.000000", "1.000000"});
  // Without the guard the first row that divides by zero is named.
  CHECK(evaluate_all("a / b > 1", t) ==
        Strings{"error: at character 1 (a / b): division by zero in the row from line 3"});
}

TEST_CASE("unit_expr text: code point order, case and trailing spaces count") {
  CHECK(value_of("'Z' < 'a'") == "true");      // U+005A < U+0061
  CHECK(value_of("'z' < 'é'") == "true");      // U+007A < U+00E9
  CHECK(value_of("'é' < 'ê'") == "true");
  CHECK(value_of("'\xEF\xBF\xBF' < '\xF0\x9D\x84\x9E'") == "true");  // U+FFFF < U+1D11E: code points, not UTF-16
  CHECK(value_of("'a' = 'a '") == "false");    // trailing spaces are significant
  CHECK(value_of("'Oak' = 'oak'") == "false");
  CHECK(value_of("'' = ''") == "true");
  CHECK(value_of("'ab' > 'a'") == "true");
  CHECK(value_of("'a' || 'b' || 'c'") == "abc");
  CHECK(value_of("'' || ''") == "");
  CHECK(value_of("CHAR_LENGTH('héllo')") == "5");
  CHECK(value_of("CHARACTER_LENGTH('\xF0\x9D\x84\x9E')") == "1");
  CHECK(value_of("CHAR_LENGTH('')") == "0");
}

// Unicode SpecialCasing.txt and UnicodeData.txt mappings (from memory),
// applied by ICU with the root locale.
TEST_CASE("unit_expr text: UPPER and LOWER use Unicode full case mapping") {
  CHECK(value_of("UPPER('straße')") == "STRASSE");      // U+00DF -> 0053 0053 (SpecialCasing)
  CHECK(value_of("UPPER('ﬁne')") == "FINE");            // U+FB01 -> 0046 0049 (SpecialCasing)
  CHECK(value_of("LOWER('ΟΔΟΣ')") == "οδος");           // final sigma (SpecialCasing Final_Sigma)
  CHECK(value_of("LOWER('İ')") == "i\xCC\x87");         // U+0130 -> 0069 0307 (SpecialCasing, no locale)
  CHECK(value_of("UPPER('ǆ')") == "Ǆ");                 // U+01C6 -> U+01C4 (UnicodeData)
  CHECK(value_of("UPPER('abc-xyz 09')") == "ABC-XYZ 09");
  CHECK(value_of("LOWER('ÀÉÎ')") == "àéî");
  CHECK(value_of("UPPER('')") == "");
}

TEST_CASE("unit_expr text: SUBSTRING and TRIM") {
  // ISO SQL <character substring function>: positions start .. start+length-1 that exist.
  CHECK(value_of("SUBSTRING('hello' FROM 2 FOR 3)") == "ell");
  CHECK(value_of("SUBSTRING('hello' FROM 2)") == "ello");
  CHECK(value_of("SUBSTRING('hello', 0, 2)") == "h");
  CHECK(value_of("SUBSTRING('hello', -1, 3)") == "h");
  CHECK(value_of("SUBSTRING('hello', -5, 3)") == "");
  CHECK(value_of("SUBSTRING('hello', 9)") == "");
  CHECK(value_of("SUBSTRING('hello', 4, 100)") == "lo");
  CHECK(value_of("SUBSTRING('héllo', 2, 2)") == "él");
  CHECK(value_of("SUBSTRING('a\xF0\x9D\x84\x9E" "b', 2, 1)") == "\xF0\x9D\x84\x9E");
  CHECK(value_of("SUBSTRING('hello', 2, 0)") == "");
  CHECK(value_of("SUBSTRING('hello', 2, -1)") ==
        "error: at character 1 (SUBSTRING('hello', 2, -1)): the length -1 is negative in the row from line 2");
  CHECK(value_of("TRIM('  a b  ')") == "a b");
  CHECK(value_of("TRIM('\ta ')") == "\ta");  // only spaces by default, as in SQL
  CHECK(value_of("TRIM(LEADING FROM '  a  ')") == "a  ");
  CHECK(value_of("TRIM(TRAILING FROM '  a  ')") == "  a");
  CHECK(value_of("TRIM(BOTH 'x' FROM 'xxaxx')") == "a");
  CHECK(value_of("TRIM(LEADING 'x' FROM 'xxaxx')") == "axx");
  CHECK(value_of("TRIM('xy' FROM 'xyyxaxy')") == "a");
  CHECK(value_of("TRIM('é' FROM 'ééaé')") == "a");
  CHECK(value_of("TRIM('' FROM ' a ')") == " a ");
  CHECK(value_of("TRIM('a' FROM 'aaa')") == "");
}

TEST_CASE("unit_expr LIKE: % and _ on code points, case-sensitive, with ESCAPE") {
  const std::vector<std::pair<std::string, std::string>> cases = {
      {"'abc' LIKE 'a%'", "true"},       {"'abc' LIKE '%c'", "true"},
      {"'abc' LIKE '%b%'", "true"},      {"'abc' LIKE 'a_c'", "true"},
      {"'abc' LIKE 'a_'", "false"},      {"'abc' LIKE 'ABC'", "false"},
      {"'abc' LIKE 'abc'", "true"},      {"'' LIKE '%'", "true"},
      {"'' LIKE '_'", "false"},          {"'' LIKE ''", "true"},
      {"'é' LIKE '_'", "true"},          {"'\xF0\x9D\x84\x9Ex' LIKE '_x'", "true"},
      {"'aXbXc' LIKE 'a%b%c'", "true"},  {"'ab' LIKE 'a%b%c'", "false"},
      {"'mississippi' LIKE '%iss%ipp%'", "true"}, {"'abcabc' LIKE '%abc'", "true"},
      {"'ab' LIKE '%%b'", "true"},       {"'axxxb' LIKE 'a%_b'", "true"},
      {"'ab' LIKE 'a%_b'", "false"},     {"'abc' NOT LIKE 'a%'", "false"},
      {"'%' LIKE '!%' ESCAPE '!'", "true"},       {"'a' LIKE '!%' ESCAPE '!'", "false"},
      {"'100%' LIKE '100!%' ESCAPE '!'", "true"}, {"'1000' LIKE '100!%' ESCAPE '!'", "false"},
      {"'a_b' LIKE 'a\\_b' ESCAPE '\\'", "true"}, {"'axb' LIKE 'a\\_b' ESCAPE '\\'", "false"},
      {"'a\\b' LIKE 'a\\\\b' ESCAPE '\\'", "true"},
      {"'a!%x' LIKE 'a!!!%%' ESCAPE '!'", "true"},
      {"'x%' LIKE '%é%%' ESCAPE 'é'", "true"},    {"'x%y' LIKE '%é%' ESCAPE 'é'", "false"},
      // Without ESCAPE there is no escape character (ISO SQL), backslash included.
      {"'a\\b' LIKE 'a\\b'", "true"},  {"'a\\x' LIKE 'a\\%'", "true"}, {"'a%' LIKE 'a\\%'", "false"},
  };
  // Not a structured binding: clang 14 (the Emscripten build) cannot capture one in CAPTURE.
  for (const auto& c : cases) {
    CAPTURE(c.first);
    CHECK(value_of(c.first) == c.second);
  }
  // A pattern from a column is compiled per value; a bad one names its row.
  const Table t = make_table({{"v", Type::text, 0, {"a%", "ab", "ab", std::nullopt}},
                              {"p", Type::text, 0, {"a!%", "a%", "a!", "a%"}}},
                             4);
  CHECK(evaluate_all("v LIKE p", t) == Strings{"false", "true", "false", "NULL"});  // '!' is no escape here
  CHECK(evaluate_all("v LIKE p ESCAPE '!'", t) ==
        Strings{"error: at character 1 (v LIKE p ESCAPE '!'): invalid LIKE pattern 'a!': the pattern ends with the "
                "escape character in the row from line 4"});
  CHECK(evaluate_all("v LIKE 'a' ESCAPE p", t)[0].ends_with("ESCAPE needs exactly one character, found 'a!%' in the "
                                                             "row from line 2"));
}

TEST_CASE("unit_expr CASE: searched and simple forms") {
  const Table t = make_table({{"n", Type::integer, 0, {"1", "2", "3", std::nullopt}}}, 4);
  CHECK(evaluate_all("CASE WHEN n < 2 THEN 'small' WHEN n < 3 THEN 'medium' ELSE 'large' END", t) ==
        Strings{"small", "medium", "large", "large"});
  CHECK(evaluate_all("CASE WHEN n < 2 THEN 'small' END", t) == Strings{"small", "NULL", "NULL", "NULL"});
  CHECK(evaluate_all("CASE n WHEN 1 THEN 'one' WHEN 2 THEN 'two' ELSE 'other' END", t) ==
        Strings{"one", "two", "other", "other"});  // NULL = 1 is not true
  CHECK(evaluate_all("CASE n WHEN NULL THEN 'null' ELSE 'not' END", t) == Strings{"not", "not", "not", "not"});
  CHECK(evaluate_all("CASE WHEN n IS NULL THEN 0 ELSE n * 1.5 END", t) ==
        Strings{"1.5", "3.0", "4.5", "0.0"});  // integer and decimal results unify to the larger scale
  CHECK(evaluate_all("CASE WHEN TRUE THEN NULL ELSE n END", t) == Strings{"NULL", "NULL", "NULL", "NULL"});
  CHECK(value_of("CASE WHEN NULL THEN 1 ELSE 2 END") == "2");
  CHECK(value_of("CASE WHEN FALSE THEN 1 END") == "NULL");
}

TEST_CASE("unit_expr COALESCE and NULLIF") {
  const Table t = make_table({{"n", Type::integer, 0, {"1", std::nullopt, std::nullopt}},
                              {"d", Type::decimal, 1, {"2.5", "3.5", std::nullopt}}},
                             3);
  CHECK(evaluate_all("COALESCE(n, d)", t) == Strings{"1.0", "3.5", "NULL"});
  CHECK(evaluate_all("COALESCE(n, d, 0)", t) == Strings{"1.0", "3.5", "0.0"});
  CHECK(evaluate_all("NULLIF(d, 3.5)", t) == Strings{"2.5", "NULL", "NULL"});
  CHECK(value_of("NULLIF('a', 'a')") == "NULL");
  CHECK(value_of("NULLIF('a', 'b')") == "a");
  CHECK(value_of("NULLIF('a', NULL)") == "a");
}

TEST_CASE("unit_expr CAST: conversions and the errors ISO SQL calls data exceptions") {
  CHECK(value_of("CAST(' 42 ' AS INTEGER)") == "42");
  CHECK(value_of("CAST('-7' AS BIGINT)") == "-7");
  CHECK(value_of("CAST('+7' AS INT)") == "7");
  CHECK(value_of("CAST('2.345' AS DECIMAL(5,2))") == "2.35");   // half away from zero
  CHECK(value_of("CAST('-2.345' AS NUMERIC(5,2))") == "-2.35");
  CHECK(value_of("CAST('1e3' AS DECIMAL(6,1))") == "1000.0");
  CHECK(value_of("CAST('.5' AS DECIMAL(3,0))") == "1");
  CHECK(value_of("CAST(2.5 AS INTEGER)") == "3");
  CHECK(value_of("CAST(-2.5 AS INTEGER)") == "-3");
  CHECK(value_of("CAST(7 AS DECIMAL(4,2))") == "7.00");
  CHECK(value_of("CAST(1.50 AS TEXT)") == "1.50");
  CHECK(value_of("CAST(-0.05 AS VARCHAR)") == "-0.05");
  CHECK(value_of("CAST(TRUE AS TEXT)") == "true");
  CHECK(value_of("CAST(DATE '2024-03-09' AS TEXT)") == "2024-03-09");
  CHECK(value_of("CAST(' 2024-3-9 ' AS DATE)") == "2024-03-09");
  CHECK(value_of("CAST('TRUE ' AS BOOLEAN)") == "true");
  CHECK(value_of("CAST('false' AS BOOLEAN)") == "false");
  CHECK(value_of("CAST('Unknown' AS BOOLEAN)") == "NULL");
  CHECK(value_of("CAST(12 AS TEXT) || 'x'") == "12x");
  const std::vector<std::pair<std::string, std::string>> failures = {
      {"CAST('abc' AS INTEGER)", "cannot CAST 'abc' to INTEGER: not an integer"},
      {"CAST('12.5' AS INTEGER)", "cannot CAST '12.5' to INTEGER: not an integer"},
      {"CAST('' AS INTEGER)", "cannot CAST '' to INTEGER: not an integer"},
      {"CAST('99999999999999999999' AS INTEGER)", "cannot CAST '99999999999999999999' to INTEGER: out of range"},
      {"CAST('12345' AS DECIMAL(4,1))", "cannot CAST '12345' to DECIMAL(4,1): out of range"},
      {"CAST('1,5' AS DECIMAL(4,1))", "cannot CAST '1,5' to DECIMAL(4,1): not a number"},
      {"CAST('2024-02-30' AS DATE)", "cannot CAST '2024-02-30' to DATE: not a date in the form YYYY-MM-DD"},
      {"CAST('09/03/2024' AS DATE)", "cannot CAST '09/03/2024' to DATE: not a date in the form YYYY-MM-DD"},
      {"CAST('yes' AS BOOLEAN)", "cannot CAST 'yes' to BOOLEAN: expected TRUE, FALSE or UNKNOWN"},
      {"CAST(123.45 AS DECIMAL(4,2))", "cannot CAST 123.45 to DECIMAL(4,2): out of range"},
  };
  for (const auto& failure : failures) {
    CAPTURE(failure.first);
    const std::string got = value_of(failure.first);
    CHECK(got.starts_with("error: at character 1 ("));
    CHECK(got.ends_with(failure.second + " in the row from line 2"));
  }
}

TEST_CASE("unit_expr dates and booleans compare, and a text literal next to a date is a DATE") {
  const Table t = make_table({{"planted", Type::date, 0, {"2023-12-31", "2024-01-01", std::nullopt}},
                              {"healthy", Type::boolean, 0, {"true", "false", "true"}}},
                             3);
  CHECK(evaluate_all("planted >= DATE '2024-01-01'", t) == Strings{"false", "true", "NULL"});
  CHECK(evaluate_all("planted < '2024-01-01'", t) == Strings{"true", "false", "NULL"});
  CHECK(evaluate_all("planted BETWEEN '2023-01-01' AND '2023-12-31'", t) == Strings{"true", "false", "NULL"});
  CHECK(evaluate_all("healthy = TRUE", t) == Strings{"true", "false", "true"});
  CHECK(evaluate_all("healthy > FALSE", t) == Strings{"true", "false", "true"});
  CHECK(evaluate_all("COALESCE(planted, DATE '1999-01-01')", t) == Strings{"2023-12-31", "2024-01-01", "1999-01-01"});
}

// The vectorised path over many rows, NULLs and ragged chunks agrees with a
// row-at-a-time computation of the same rule written out in C++.
TEST_CASE("unit_expr columns: many rows across chunk boundaries agree with a scalar loop") {
  std::mt19937 random(20240309);  // fixed seed: the same rows every run
  const size_t rows = 10007;
  Cells a, b, s;
  std::vector<std::optional<int64_t>> av, bv;
  std::vector<std::optional<std::string>> sv;
  for (size_t r = 0; r < rows; ++r) {
    const bool a_null = random() % 7 == 0, b_null = random() % 5 == 0, s_null = random() % 9 == 0;
    const int64_t x = static_cast<int64_t>(random() % 200) - 100, y = static_cast<int64_t>(random() % 50) - 25;
    av.push_back(a_null ? std::nullopt : std::optional<int64_t>(x));
    bv.push_back(b_null ? std::nullopt : std::optional<int64_t>(y));
    const std::string text = std::string(1 + random() % 3, static_cast<char>('a' + random() % 4));
    sv.push_back(s_null ? std::nullopt : std::optional<std::string>(text));
    a.push_back(av.back() ? std::optional<std::string>(std::to_string(*av.back())) : std::nullopt);
    b.push_back(bv.back() ? std::optional<std::string>(std::to_string(*bv.back())) : std::nullopt);
    s.push_back(sv.back());
  }
  const Table t = make_table({{"a", Type::integer, 0, a, 1000}, {"b", Type::integer, 0, b, 777}, {"s", Type::text, 0, s, 4099}},
                             rows, 3000);
  const Strings got = evaluate_all("(a > b OR s LIKE 'b%') AND NOT (a IS NULL AND b IS NULL) AND a + b <> 3", t);
  REQUIRE(got.size() == rows);
  for (size_t r = 0; r < rows; ++r) {
    // Three-valued logic written out: nullopt is UNKNOWN.
    using Truth = std::optional<bool>;
    auto and3 = [](Truth x, Truth y) -> Truth {
      if ((x && !*x) || (y && !*y)) return false;
      if (x && y) return true;
      return std::nullopt;
    };
    auto or3 = [](Truth x, Truth y) -> Truth {
      if ((x && *x) || (y && *y)) return true;
      if (x && y) return false;
      return std::nullopt;
    };
    const Truth greater = av[r] && bv[r] ? Truth(*av[r] > *bv[r]) : std::nullopt;
    const Truth like = sv[r] ? Truth(sv[r]->starts_with("b")) : std::nullopt;
    const Truth both_null = !av[r] && !bv[r];
    const Truth sum = av[r] && bv[r] ? Truth(*av[r] + *bv[r] != 3) : std::nullopt;
    const Truth expected = and3(and3(or3(greater, like), Truth(!*both_null)), sum);
    const std::string want = expected ? (*expected ? "true" : "false") : "NULL";
    CAPTURE(r);
    CHECK(got[r] == want);
  }
}

TEST_CASE("unit_expr derive: output types and chunks") {
  const Table t = make_table({{"n", Type::integer, 0, {"1", "2", std::nullopt, "4", "5"}}}, 5, 2);
  auto e = Expression::parse("n * 0.5", schema_of(t), Expression::Use::value);
  REQUIRE(e.ok());
  CHECK(e->type() == Type::decimal);
  CHECK(e->scale() == 1);
  auto column = e->evaluate(t);
  REQUIRE(column.ok());
  CHECK((*column)->chunk_count() == 3);  // follows the batch's row chunks
  CHECK(tamis::test::canonical_cells(**column) == Strings{"0.5", "1.0", "NULL", "2.0", "2.5"});
  auto text = Expression::parse("NULL", schema_of(t), Expression::Use::value);
  REQUIRE(text.ok());
  CHECK(text->type() == Type::text);
  auto condition = Expression::parse("n > 1", schema_of(t), Expression::Use::condition);
  REQUIRE(condition.ok());
  std::vector<uint8_t> is_true;
  REQUIRE(condition->evaluate_condition(t, is_true).ok());
  CHECK(is_true == std::vector<uint8_t>{0, 1, 0, 1, 1});
  CHECK(condition->columns() == std::vector<size_t>{0});
  const Table empty = make_table({{"n", Type::integer, 0, {}}}, 0);
  auto none = e->evaluate(empty);
  REQUIRE(none.ok());
  CHECK((*none)->size() == 0);
}

TEST_CASE("unit_expr sql_support: per dialect, from the operators used") {
  const Schema schema = {{"site", Type::text, 0}, {"n", Type::integer, 0}, {"d", Type::decimal, 2}};
  auto support = [&](const std::string& text, Dialect dialect) {
    auto e = Expression::parse(text, schema, Expression::Use::value);
    REQUIRE(e.ok());
    return e->sql_support(dialect);
  };
  for (Dialect d : {Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark}) {
    CAPTURE(dialect_name(d));
    CHECK(support("site IS NULL AND n > 3", d) == SqlSupport::exact);
    CHECK(support("site LIKE 'a%' OR site IN ('x', 'y')", d) == SqlSupport::exact);
    CHECK(support("UPPER(site)", d) == SqlSupport::approximate);
  }
  CHECK(support("n / 2", Dialect::postgres) == SqlSupport::exact);
  CHECK(support("n / 2", Dialect::sqlite) == SqlSupport::approximate);
  CHECK(support("d + 1", Dialect::sqlite) == SqlSupport::approximate);
  // SQLite holds a decimal as its text: only IS NULL reads it exactly.
  CHECK(support("d IS NOT NULL", Dialect::sqlite) == SqlSupport::exact);
  CHECK(support("d > 3", Dialect::sqlite) == SqlSupport::approximate);
  CHECK(support("d > 3", Dialect::postgres) == SqlSupport::exact);
  CHECK(support("COALESCE(d, n)", Dialect::sqlite) == SqlSupport::approximate);
  CHECK(support("d + 1", Dialect::duckdb) == SqlSupport::exact);
  CHECK(support("n + 1", Dialect::sqlite) == SqlSupport::exact);
  CHECK(support("TRIM('xy' FROM site)", Dialect::mysql) == SqlSupport::exact);
  CHECK(support("TRIM(site FROM site)", Dialect::mysql) == SqlSupport::approximate);
  CHECK(support("SUBSTRING(site, 2, 3)", Dialect::sqlite) == SqlSupport::exact);
  CHECK(support("SUBSTRING(site, n, 3)", Dialect::sqlite) == SqlSupport::approximate);
  CHECK(support("SUBSTRING(site, n, 3)", Dialect::postgres) == SqlSupport::exact);
  CHECK(support("CAST(site AS BOOLEAN)", Dialect::mysql) == SqlSupport::approximate);
}
