// The compiled date scanner (design §3 "Dates"): fixed directive widths, the
// POSIX %y pivot, Gregorian validity, day numbers checked against Python's
// datetime, and format/parse round trips on many dates.
#include <doctest/doctest.h>

#include <array>
#include <cstdint>
#include <optional>
#include <random>
#include <string>
#include <string_view>
#include <vector>

#include "dates.hpp"

using namespace tamis;

namespace {

DateFormat compiled(std::string_view pattern) {
  auto f = DateFormat::compile(pattern);
  REQUIRE_MESSAGE(f.ok(), pattern);
  return std::move(f).value();
}

std::optional<int32_t> parse(std::string_view pattern, std::string_view text) { return compiled(pattern).parse(text); }

std::string formatted(const DateFormat& f, int32_t days) {
  std::string out;
  f.format(days, out);
  return out;
}

std::string two_digits(unsigned v) {
  std::string s(1, static_cast<char>('0' + v / 10));
  s += static_cast<char>('0' + v % 10);
  return s;
}

// Gregorian leap year rule (every 4th year, except centuries not divisible
// by 400): the oracle for the day-by-day walk below.
bool is_leap(int year) { return (year % 4 == 0 && year % 100 != 0) || year % 400 == 0; }
unsigned month_length(int year, unsigned month) {
  static constexpr std::array<unsigned, 12> kLengths{31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
  return month == 2 && is_leap(year) ? 29 : kLengths[month - 1];
}

}  // namespace

TEST_SUITE("unit_dates") {

TEST_CASE("unit_dates: days_from_civil known values") {
  // 1970-01-01 is day 0 by definition (design §3: days since 1970-01-01).
  CHECK(days_from_civil(1970, 1, 1) == std::optional<int32_t>(0));
  // Checked with Python datetime: (date(y, m, d) - date(1970, 1, 1)).days.
  CHECK(days_from_civil(2000, 3, 1) == std::optional<int32_t>(11017));
  CHECK(days_from_civil(2000, 2, 29) == std::optional<int32_t>(11016));
  CHECK(days_from_civil(1969, 12, 31) == std::optional<int32_t>(-1));
  CHECK(days_from_civil(2023, 6, 19) == std::optional<int32_t>(19527));
  CHECK(days_from_civil(1600, 1, 1) == std::optional<int32_t>(-135140));
  CHECK(days_from_civil(1, 1, 1) == std::optional<int32_t>(-719162));
  CHECK(days_from_civil(9999, 12, 31) == std::optional<int32_t>(2932896));
  CHECK(iso_date(0) == "1970-01-01");
  CHECK(iso_date(11017) == "2000-03-01");
  CHECK(iso_date(-719162) == "0001-01-01");
  CHECK(iso_date(2932896) == "9999-12-31");
}

TEST_CASE("unit_dates: Gregorian leap years and impossible dates") {
  // Gregorian calendar rule: a century year is a leap year only when
  // divisible by 400, so 2000-02-29 exists and 1900-02-29 does not.
  CHECK(days_from_civil(2000, 2, 29).has_value());
  CHECK(!days_from_civil(1900, 2, 29).has_value());
  CHECK(!days_from_civil(2100, 2, 29).has_value());
  CHECK(days_from_civil(2024, 2, 29).has_value());
  CHECK(!days_from_civil(2023, 2, 29).has_value());
  CHECK(!days_from_civil(2023, 4, 31).has_value());
  CHECK(!days_from_civil(2023, 13, 1).has_value());
  CHECK(!days_from_civil(2023, 0, 1).has_value());
  CHECK(!days_from_civil(2023, 1, 0).has_value());
  CHECK(parse("%Y-%m-%d", "2000-02-29") == std::optional<int32_t>(11016));
  CHECK(!parse("%Y-%m-%d", "1900-02-29").has_value());
}

TEST_CASE("unit_dates: every day from 1600 to 2400 against a day-by-day walk") {
  // An independent oracle: count days one by one with the month lengths of
  // the Gregorian calendar, starting from 1600-01-01 = -135140 (checked with
  // Python datetime).
  const DateFormat iso = compiled("%Y-%m-%d");
  int32_t days = -135140;
  size_t mismatches = 0;
  for (int year = 1600; year <= 2400; ++year)
    for (unsigned month = 1; month <= 12; ++month)
      for (unsigned day = 1; day <= month_length(year, month); ++day, ++days) {
        const std::string text = std::to_string(year) + "-" + two_digits(month) + "-" + two_digits(day);
        if (days_from_civil(year, month, day) != std::optional<int32_t>(days) || formatted(iso, days) != text ||
            iso.parse(text) != std::optional<int32_t>(days)) {
          if (mismatches++ < 5) FAIL_CHECK("mismatch at " << text << " (day " << days << ")");
        }
      }
  CHECK(mismatches == 0);
  // 2400-12-31 is day 157419 (checked with Python datetime).
  CHECK(days == 157419 + 1);
}

TEST_CASE("unit_dates: the classic two-digit-year and calendar pitfalls") {
  // %y takes exactly two digits and the whole value must be consumed, so a
  // four-digit year does not half-match.
  CHECK(!parse("%m/%d/%y", "12/16/2022").has_value());
  // %Y takes exactly four digits, so a two-digit year is not year 22.
  CHECK(!parse("%m/%d/%Y", "12/16/22").has_value());
  // February 30 does not exist.
  CHECK(!parse("%m/%d/%Y", "2/30/2023").has_value());
  // One-digit month and day are accepted; 2023-06-19 is day 19527 (checked
  // with Python datetime).
  CHECK(parse("%m/%d/%Y", "6/19/2023") == std::optional<int32_t>(19527));
  CHECK(parse("%m/%d/%y", "12/16/22") == std::optional<int32_t>(19342));
  CHECK(parse("%m/%d/%Y", "12/16/2022") == std::optional<int32_t>(19342));
}

TEST_CASE("unit_dates: %y pivot - 00-68 are 20yy, 69-99 are 19yy") {
  // POSIX strptime (The Open Group Base Specifications Issue 7): "%y [...]
  // values in the range [69,99] shall refer to years 1969 to 1999 inclusive
  // and values in the range [00,68] shall refer to years 2000 to 2068
  // inclusive."
  CHECK(parse("%d/%m/%y", "01/01/68") == days_from_civil(2068, 1, 1));
  CHECK(parse("%d/%m/%y", "01/01/69") == days_from_civil(1969, 1, 1));
  CHECK(parse("%d/%m/%y", "01/01/00") == days_from_civil(2000, 1, 1));
  CHECK(parse("%d/%m/%y", "31/12/99") == days_from_civil(1999, 12, 31));
  // The same in day numbers, checked with Python datetime.
  CHECK(parse("%d/%m/%y", "01/01/68") == std::optional<int32_t>(35794));
  CHECK(parse("%d/%m/%y", "01/01/69") == std::optional<int32_t>(-365));
  CHECK(!parse("%d/%m/%y", "01/01/6").has_value());
}

TEST_CASE("unit_dates: strict widths, no sign, no white space, whole value") {
  CHECK(parse("%Y-%m-%d", "2023-6-9") == days_from_civil(2023, 6, 9));
  CHECK(parse("%Y-%m-%d", "2023-06-09") == days_from_civil(2023, 6, 9));
  for (const char* bad : {" 2023-06-19", "2023-06-19 ", "+2023-06-19", "-2023-06-19", "2023-006-19", "202-06-19",
                          "20230-06-19", "2023/06/19", "2023-06-", "", "2023-06-19x", "2023-+6-19"}) {
    CAPTURE(bad);
    CHECK(!parse("%Y-%m-%d", bad).has_value());
  }
  // A fixed-width pattern without separators.
  CHECK(parse("%Y%m%d", "20230619") == std::optional<int32_t>(19527));
}

TEST_CASE("unit_dates: English month names, any case") {
  // 2022-12-16 is day 19342 (checked with Python datetime).
  for (const char* text : {"16-Dec-2022", "16-DEC-2022", "16-dec-2022", "16-dEc-2022"}) {
    CAPTURE(text);
    CHECK(parse("%d-%b-%Y", text) == std::optional<int32_t>(19342));
  }
  for (const char* text : {"16 December 2022", "16 DECEMBER 2022", "16 december 2022"}) {
    CAPTURE(text);
    CHECK(parse("%d %B %Y", text) == std::optional<int32_t>(19342));
  }
  CHECK(parse("%B %d, %Y", "May 1, 2023") == days_from_civil(2023, 5, 1));
  CHECK(!parse("%d-%b-%Y", "16-Dez-2022").has_value());
  CHECK(!parse("%d %B %Y", "16 Decembre 2022").has_value());
  CHECK(formatted(compiled("%d-%b-%Y"), 19342) == "16-Dec-2022");
  CHECK(formatted(compiled("%d %B %Y"), 19342) == "16 December 2022");
}

TEST_CASE("unit_dates: time directives are checked, dropped, and formatted as 00") {
  CHECK(parse("%Y-%m-%d %H:%M:%S", "2023-06-19 23:59:59") == std::optional<int32_t>(19527));
  CHECK(parse("%Y-%m-%dT%H:%M:%S", "2023-06-19T00:00:00") == std::optional<int32_t>(19527));
  CHECK(!parse("%Y-%m-%d %H:%M:%S", "2023-06-19 24:00:00").has_value());
  CHECK(!parse("%Y-%m-%d %H:%M:%S", "2023-06-19 23:60:00").has_value());
  CHECK(!parse("%Y-%m-%d %H:%M:%S", "2023-06-19 23:00:60").has_value());
  CHECK(formatted(compiled("%Y-%m-%d %H:%M:%S"), 19527) == "2023-06-19 00:00:00");
}

TEST_CASE("unit_dates: %% is a literal percent sign") {
  CHECK(parse("%Y%%%m", "2023%06") == days_from_civil(2023, 6, 1));
  CHECK(!parse("%Y%%%m", "2023-06").has_value());
  CHECK(formatted(compiled("%Y%%%m"), 19527) == "2023%06");
}

TEST_CASE("unit_dates: unknown directives and a lone percent are errors") {
  for (const char* pattern : {"%Y-%Q", "%j", "%Y-%"}) {
    CAPTURE(pattern);
    const auto f = DateFormat::compile(pattern);
    REQUIRE(!f.ok());
    CHECK(f.error().kind == ErrorKind::usage);
    CHECK(f.error().message.find(pattern) != std::string::npos);
  }
  CHECK(DateFormat::compile("%Y-%Q").error().message.find("%Q") != std::string::npos);
  CHECK(compiled("%d.%m.%Y").pattern() == "%d.%m.%Y");
}

TEST_CASE("unit_dates: dates generated with Python datetime parse and format the same") {
  // Generated with /usr/bin/python3: random.Random(2024), days drawn from
  // [-150000, 150000], then (d - date(1970,1,1)).days and d.strftime(...) for
  // %Y-%m-%d, %d/%m/%Y and %d %B %Y (C locale).
  struct Sample {
    int32_t days;
    const char* iso;
    const char* dmy;
    const char* long_form;
  };
  const Sample samples[] = {
      {96462, "2234-02-08", "08/02/2234", "08 February 2234"},
      {-54734, "1820-02-23", "23/02/1820", "23 February 1820"},
      {9253, "1995-05-03", "03/05/1995", "03 May 1995"},
      {-45037, "1846-09-11", "11/09/1846", "11 September 1846"},
      {65004, "2147-12-23", "23/12/2147", "23 December 2147"},
      {-10948, "1940-01-11", "11/01/1940", "11 January 1940"},
      {129540, "2324-09-02", "02/09/2324", "02 September 2324"},
      {-21463, "1911-03-29", "29/03/1911", "29 March 1911"},
      {111253, "2274-08-08", "08/08/2274", "08 August 2274"},
      {35688, "2067-09-17", "17/09/2067", "17 September 2067"},
      {68036, "2156-04-11", "11/04/2156", "11 April 2156"},
      {126472, "2316-04-09", "09/04/2316", "09 April 2316"},
  };
  const DateFormat iso = compiled("%Y-%m-%d"), dmy = compiled("%d/%m/%Y"), long_form = compiled("%d %B %Y");
  for (const Sample& s : samples) {
    CAPTURE(s.iso);
    CHECK(iso.parse(s.iso) == std::optional<int32_t>(s.days));
    CHECK(dmy.parse(s.dmy) == std::optional<int32_t>(s.days));
    CHECK(long_form.parse(s.long_form) == std::optional<int32_t>(s.days));
    CHECK(formatted(iso, s.days) == s.iso);
    CHECK(formatted(dmy, s.days) == s.dmy);
    CHECK(formatted(long_form, s.days) == s.long_form);
  }
}

TEST_CASE("unit_dates: 2000 random dates survive format then parse in several formats") {
  // std::mt19937's sequence is fixed by the C++ standard, so this draws the
  // same dates on every platform (the modulo avoids the distributions, whose
  // algorithms are not standardised).
  std::mt19937 random(20230619);
  const int32_t first = -135140, last = 157419;  // 1600-01-01 .. 2400-12-31
  const std::vector<DateFormat> four_digit_years{compiled("%Y-%m-%d"), compiled("%d/%m/%Y"), compiled("%m/%d/%Y"),
                                                 compiled("%d.%m.%Y"), compiled("%Y%m%d"),   compiled("%d %B %Y"),
                                                 compiled("%b %d, %Y"), compiled("%d-%b-%Y"),
                                                 compiled("%Y-%m-%dT%H:%M:%S")};
  const DateFormat two_digit_year = compiled("%d/%m/%y");
  const DateFormat iso = compiled("%Y-%m-%d");
  size_t failures = 0;
  for (int i = 0; i < 2000; ++i) {
    const auto days = static_cast<int32_t>(first + static_cast<int32_t>(random() % static_cast<uint32_t>(last - first + 1)));
    for (const DateFormat& f : four_digit_years) {
      const std::string text = formatted(f, days);
      if (f.parse(text) != std::optional<int32_t>(days) && failures++ < 5)
        FAIL_CHECK(f.pattern() << ": " << text << " does not parse back to day " << days);
    }
    // %y keeps the year modulo 100 and the pivot picks 1969-2068, so only the
    // dates in that window come back unchanged; the others keep month, day
    // and the last two digits of the year.
    const std::string text = formatted(two_digit_year, days);
    const auto back = two_digit_year.parse(text);
    const std::string original = formatted(iso, days);
    const int year = std::stoi(original.substr(0, 4));
    if (year >= 1969 && year <= 2068) {
      if (back != std::optional<int32_t>(days) && failures++ < 5) FAIL_CHECK(text << " does not parse back to " << original);
    } else {
      // A February 29 always exists in the picked year too: the year keeps
      // its value modulo 100, hence modulo 4, and a century maps to 2000.
      const std::string parsed = back ? formatted(iso, *back) : std::string("nothing");
      if ((parsed.substr(2) != original.substr(2)) && failures++ < 5)
        FAIL_CHECK(text << " parsed as " << parsed << ", expected the year ending in " << original.substr(2, 2));
    }
  }
  CHECK(failures == 0);
}

TEST_CASE("unit_dates: days_from_civil is exact or refuses, far from today") {
  // The Gregorian calendar repeats every 400 years, which hold exactly 146097
  // days; 2000-01-01 is day 10957 (checked with Python datetime). So
  // 40000-01-01 is 10957 + 95 * 146097 = 13890172, and -36000-01-01 is
  // 10957 - 95 * 146097 = -13868258. Years this far out may be refused, but a
  // date that is returned must be right.
  const auto far = days_from_civil(40000, 1, 1);
  if (far) CHECK(*far == 13890172);
  const auto past = days_from_civil(-36000, 1, 1);
  if (past) CHECK(*past == -13868258);
  CHECK(days_from_civil(2400, 1, 1) == std::optional<int32_t>(10957 + 146097));
}

}  // TEST_SUITE
