#include "dates.hpp"

#include <date/date.h>

#include <array>

namespace tamis {

namespace {

constexpr std::array<std::string_view, 12> kMonthNames = {
    "january", "february", "march", "april", "may", "june", "july",
    "august", "september", "october", "november", "december"};

char ascii_lower(char c) { return (c >= 'A' && c <= 'Z') ? static_cast<char>(c - 'A' + 'a') : c; }

bool is_digit(char c) { return c >= '0' && c <= '9'; }

// Reads exactly `min..max` digits at text[i].
std::optional<unsigned> read_digits(std::string_view text, size_t& i, size_t min, size_t max) {
  unsigned value = 0;
  size_t n = 0;
  while (n < max && i < text.size() && is_digit(text[i])) {
    value = value * 10 + static_cast<unsigned>(text[i] - '0');
    ++i, ++n;
  }
  if (n < min) return std::nullopt;
  return value;
}

// Matches an English month name (whole or its first three letters).
std::optional<unsigned> read_month_name(std::string_view text, size_t& i, bool abbreviated) {
  for (unsigned m = 0; m < 12; ++m) {
    const std::string_view name = abbreviated ? kMonthNames[m].substr(0, 3) : kMonthNames[m];
    if (text.size() - i < name.size()) continue;
    bool same = true;
    for (size_t k = 0; k < name.size() && same; ++k) same = ascii_lower(text[i + k]) == name[k];
    if (same) {
      i += name.size();
      return m + 1;
    }
  }
  return std::nullopt;
}

void append_padded(std::string& out, unsigned value, int width) {
  char digits[8];
  for (int k = width - 1; k >= 0; --k, value /= 10) digits[k] = static_cast<char>('0' + value % 10);
  out.append(digits, static_cast<size_t>(width));
}

}  // namespace

std::optional<int32_t> days_from_civil(int year, unsigned month, unsigned day) {
  // date::year holds a short; outside its range a year would wrap silently.
  if (year < static_cast<int>(date::year::min()) || year > static_cast<int>(date::year::max())) return std::nullopt;
  const date::year_month_day ymd{date::year{year}, date::month{month}, date::day{day}};
  if (!ymd.ok()) return std::nullopt;
  return static_cast<int32_t>(date::sys_days{ymd}.time_since_epoch().count());
}

std::string iso_date(int32_t days) {
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  std::string out;
  iso.format(days, out);
  return out;
}

Result<DateFormat> DateFormat::compile(std::string_view pattern) {
  DateFormat f;
  f.pattern_ = std::string(pattern);
  for (size_t i = 0; i < pattern.size(); ++i) {
    if (pattern[i] != '%') {
      f.tokens_.push_back({Directive::literal, pattern[i]});
      continue;
    }
    if (++i == pattern.size())
      return usage_error("date format '" + f.pattern_ + "' ends with a lone '%'");
    Directive d;
    switch (pattern[i]) {
      case 'Y': d = Directive::year4; break;
      case 'y': d = Directive::year2; break;
      case 'm': d = Directive::month; break;
      case 'd': d = Directive::day; break;
      case 'b': d = Directive::month_abbr; break;
      case 'B': d = Directive::month_name; break;
      case 'H': d = Directive::hour; break;
      case 'M': d = Directive::minute; break;
      case 'S': d = Directive::second; break;
      case '%': d = Directive::literal; break;
      default:
        return usage_error("date format '" + f.pattern_ + "': unknown directive %" + std::string(1, pattern[i]) +
                           " (known: %Y %y %m %d %b %B %H %M %S %%)");
    }
    f.tokens_.push_back({d, '%'});
  }
  return f;
}

std::optional<int32_t> DateFormat::parse(std::string_view text) const {
  int year = 1970;
  unsigned month = 1, day = 1;
  size_t i = 0;
  for (const Token& t : tokens_) {
    std::optional<unsigned> v;
    switch (t.directive) {
      case Directive::literal:
        if (i >= text.size() || text[i] != t.literal) return std::nullopt;
        ++i;
        continue;
      case Directive::year4:
        if (!(v = read_digits(text, i, 4, 4))) return std::nullopt;
        year = static_cast<int>(*v);
        continue;
      case Directive::year2:
        if (!(v = read_digits(text, i, 2, 2))) return std::nullopt;
        year = static_cast<int>(*v) + (*v >= 69 ? 1900 : 2000);
        continue;
      case Directive::month: v = read_digits(text, i, 1, 2); break;
      case Directive::day: v = read_digits(text, i, 1, 2); break;
      case Directive::month_abbr: v = read_month_name(text, i, true); break;
      case Directive::month_name: v = read_month_name(text, i, false); break;
      case Directive::hour:
        if (!(v = read_digits(text, i, 1, 2)) || *v > 23) return std::nullopt;
        continue;
      case Directive::minute:
      case Directive::second:
        if (!(v = read_digits(text, i, 1, 2)) || *v > 59) return std::nullopt;
        continue;
    }
    if (!v) return std::nullopt;
    if (t.directive == Directive::day) day = *v;
    else month = *v;
  }
  if (i != text.size()) return std::nullopt;
  return days_from_civil(year, month, day);
}

void DateFormat::format(int32_t days, std::string& out) const {
  const date::year_month_day ymd{date::sys_days{date::days{days}}};
  const int year = static_cast<int>(ymd.year());
  const unsigned month = static_cast<unsigned>(ymd.month());
  const unsigned day = static_cast<unsigned>(ymd.day());
  for (const Token& t : tokens_) {
    switch (t.directive) {
      case Directive::literal: out += t.literal; break;
      case Directive::year4:
        if (year < 0) out += '-';
        append_padded(out, static_cast<unsigned>(year < 0 ? -year : year), 4);
        break;
      case Directive::year2: append_padded(out, static_cast<unsigned>((year % 100 + 100) % 100), 2); break;
      case Directive::month: append_padded(out, month, 2); break;
      case Directive::day: append_padded(out, day, 2); break;
      case Directive::month_abbr:
      case Directive::month_name: {
        std::string name(t.directive == Directive::month_abbr ? kMonthNames[month - 1].substr(0, 3)
                                                              : kMonthNames[month - 1]);
        name[0] = static_cast<char>(name[0] - 'a' + 'A');
        out += name;
        break;
      }
      case Directive::hour:
      case Directive::minute:
      case Directive::second: out += "00"; break;
    }
  }
}

const std::vector<DateFormat>& common_date_formats() {
  static const std::vector<DateFormat> formats = [] {
    std::vector<DateFormat> v;
    for (const char* p : {"%Y-%m-%d", "%m/%d/%Y", "%d/%m/%Y", "%d.%m.%Y", "%Y/%m/%d", "%m/%d/%y",
                          "%d/%m/%y", "%d.%m.%y", "%d-%b-%Y", "%d %B %Y", "%B %d, %Y", "%b %d, %Y",
                          "%Y-%m-%d %H:%M:%S", "%Y-%m-%dT%H:%M:%S"})
      v.push_back(DateFormat::compile(p).value());
    return v;
  }();
  return formats;
}

}  // namespace tamis
