#include "sql/sql_dates.hpp"

#include <optional>

#include "sql/sql_text.hpp"
#include "utf8.hpp"

namespace tamis::sql {

namespace {

// A format with every one-or-two-digit field at a fixed width: '#' marks a
// digit in `shape`, the fields say where to read year, month and day.
struct Field {
  size_t position = 0;  // 1-based, in characters
  size_t width = 0;
};
struct Layout {
  std::u32string shape;
  Field year, month, day;
  bool two_digit_year = false;
};

// Every fixed layout of a strptime pattern the SQL export handles, or
// nullopt for other directives, missing fields, or a %m/%d that a digit
// follows (its split would depend on the scanner's greed).
std::optional<std::vector<Layout>> sql_layouts(const std::string& pattern) {
  std::vector<Layout> layouts(1);
  bool year = false, month = false, day = false;
  std::u32string chars;
  for (size_t i = 0; i < pattern.size();) chars.push_back(utf8::next(pattern, i));
  for (size_t i = 0; i < chars.size(); ++i) {
    if (chars[i] != U'%') {
      for (Layout& l : layouts) l.shape.push_back(chars[i]);
      continue;
    }
    if (++i == chars.size()) return std::nullopt;
    const char32_t directive = chars[i];
    if (directive == U'%') {
      for (Layout& l : layouts) l.shape.push_back(U'%');
      continue;
    }
    if (directive == U'Y' || directive == U'y') {
      if (year) return std::nullopt;
      year = true;
      const size_t width = directive == U'Y' ? 4 : 2;
      for (Layout& l : layouts) {
        l.year = {l.shape.size() + 1, width};
        l.two_digit_year = directive == U'y';
        l.shape.append(width, U'#');
      }
      continue;
    }
    if (directive != U'm' && directive != U'd') return std::nullopt;
    if (i + 1 < chars.size() && (chars[i + 1] == U'%' || (chars[i + 1] >= U'0' && chars[i + 1] <= U'9')))
      return std::nullopt;
    bool& seen = directive == U'm' ? month : day;
    if (seen) return std::nullopt;
    seen = true;
    std::vector<Layout> grown;
    for (const Layout& l : layouts)
      for (const size_t width : {size_t{1}, size_t{2}}) {
        Layout next = l;
        (directive == U'm' ? next.month : next.day) = {next.shape.size() + 1, width};
        next.shape.append(width, U'#');
        grown.push_back(std::move(next));
      }
    layouts = std::move(grown);
  }
  if (!year || !month || !day) return std::nullopt;
  return layouts;
}

}  // namespace

bool reads_date_format(const std::string& pattern) { return sql_layouts(pattern).has_value(); }

// Every split of the one-or-two-digit fields is a fixed layout, tested by
// its length in code points and a digit pattern (GLOB in SQLite) before the
// fields are read, then by the calendar. The engine's year 0000 (1 BC) is an
// error in PostgreSQL, DuckDB and Spark, text in SQLite, and MySQL's DATE
// holds it.
std::string date_of(Dialect d, const std::string& x, const std::vector<std::string>& patterns) {
  std::string cases = "CASE";
  for (const std::string& pattern : patterns) {
    const auto layouts = sql_layouts(pattern);
    if (!layouts) continue;  // callers check reads_date_format first
    for (const Layout& layout : *layouts) {
      std::string shape;
      for (const char32_t c : layout.shape) {
        if (c == U'#') shape += "[0-9]";
        else if (d == Dialect::sqlite) {
          std::string ch;
          utf8::append(ch, c);
          shape += c == U'*' || c == U'?' || c == U'[' ? std::string("[") + ch + "]" : ch;
        } else {
          shape += regex_class(d, std::u32string(1, c));
        }
      }
      std::string test = char_length(d, x) + std::string(" = ") + std::to_string(layout.shape.size()) + " AND ";
      if (d == Dialect::sqlite) test += x + std::string(" GLOB ") + literal(d, shape);
      else test += regex_matches(d, x, regex_whole(d, shape));
      const char* integer = d == Dialect::mysql ? " AS SIGNED)" : " AS INTEGER)";
      auto field = [&](const Field& at) {
        return std::string("CAST(") + substring(d, x, std::to_string(at.position), std::to_string(at.width)) + integer;
      };
      const std::string y = layout.two_digit_year ? std::string("(CASE WHEN ") + field(layout.year) + " >= 69 THEN 1900 ELSE 2000 END + " +
                                                        field(layout.year) + ")"
                                                  : field(layout.year);
      const std::string m = field(layout.month), day = field(layout.day);
      const std::string valid =
          m + std::string(" BETWEEN 1 AND 12 AND ") + day + std::string(" BETWEEN 1 AND CASE WHEN ") + m + std::string(" IN (4, 6, 9, 11) THEN 30 WHEN ") + m +
          std::string(" = 2 THEN CASE WHEN (") + y + std::string(" % 4 = 0 AND ") + y + std::string(" % 100 <> 0) OR ") + y + " % 400 = 0 THEN 29 ELSE 28 END ELSE 31 END";
      std::string date;
      switch (d) {
        case Dialect::sqlite: date = std::string("printf('%04d-%02d-%02d', ") + y + std::string(", ") + m + std::string(", ") + day + ")"; break;
        case Dialect::duckdb:
          date = std::string("CASE WHEN ") + y + std::string(" = 0 THEN error('year 0000 has no DuckDB date') ELSE make_date(") + y +
                 std::string(", ") + m + std::string(", ") + day + ") END";
          break;
        case Dialect::spark:
          date = std::string("CASE WHEN ") + y + std::string(" = 0 THEN raise_error('year 0000 has no Spark date') ELSE make_date(") +
                 y + std::string(", ") + m + std::string(", ") + day + ") END";
          break;
        case Dialect::mysql:
          date = std::string("CAST(CONCAT(LPAD(") + y + std::string(", 4, '0'), '-', ") + m + std::string(", '-', ") + day + ") AS DATE)";
          break;
        case Dialect::postgres: date = std::string("make_date(") + y + std::string(", ") + m + std::string(", ") + day + ")"; break;
      }
      // The fields are read only once the layout matched (CASE is lazy).
      cases += std::string("\n         WHEN CASE WHEN ") + test + std::string(" THEN ") + valid + std::string(" ELSE FALSE END\n           THEN ") + date;
    }
  }
  return cases + "\n         ELSE NULL END";
}

}  // namespace tamis::sql
