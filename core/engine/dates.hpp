// The one compiled date scanner used by profiling, findings and parse_date.
//
// A pattern is compiled once into tokens; scanning a value is a tight loop
// with no allocation. Directives (a documented subset of POSIX strptime, with
// widths fixed so the classic two-digit-year mistakes cannot slip through):
//   %Y  exactly four digits            %y  exactly two digits: 69-99 -> 19yy,
//   %m  month, one or two digits           00-68 -> 20yy (POSIX strptime)
//   %d  day, one or two digits         %b  English month abbreviation (Jan)
//   %B  English month name (January)   %H %M %S  hour/minute/second, one or
//   %%  a literal percent sign             two digits, checked and dropped
// Any other character must match itself. No sign, no skipped white space,
// and the whole value must be consumed. Calendar validity (no 2/30) is
// checked with Howard Hinnant's date library.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"

namespace tamis {

class DateFormat {
 public:
  static Result<DateFormat> compile(std::string_view pattern);

  // Days since 1970-01-01, or nullopt when the whole value does not match.
  std::optional<int32_t> parse(std::string_view text) const;
  // Writes the date in this pattern (time directives print as 00).
  void format(int32_t days, std::string& out) const;
  const std::string& pattern() const { return pattern_; }

 private:
  enum class Directive : uint8_t { literal, year4, year2, month, day, month_abbr, month_name, hour, minute, second };
  struct Token {
    Directive directive;
    char literal;
  };
  std::string pattern_;
  std::vector<Token> tokens_;
};

// Days since 1970-01-01 from a civil date, nullopt when not a real date.
std::optional<int32_t> days_from_civil(int year, unsigned month, unsigned day);
// ISO 8601 calendar date (YYYY-MM-DD).
std::string iso_date(int32_t days);

// The formats profiling tries when it asks "is this text a date?".
const std::vector<DateFormat>& common_date_formats();

}  // namespace tamis
