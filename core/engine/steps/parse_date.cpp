#include "steps/parse_date.hpp"

#include "dates.hpp"
#include "sql/sql_step.hpp"
#include "steps/typed_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

enum class FieldOrder : uint8_t { none, month_first, day_first };

// Where a numeric month (%m) and the day (%d) both appear, which comes first.
FieldOrder field_order(std::string_view pattern) {
  size_t month = std::string_view::npos, day = std::string_view::npos;
  for (size_t i = 0; i + 1 < pattern.size(); ++i) {
    if (pattern[i] != '%') continue;
    if (pattern[i + 1] == 'm' && month == std::string_view::npos) month = i;
    if (pattern[i + 1] == 'd' && day == std::string_view::npos) day = i;
    ++i;  // skips the directive letter, so "%%m" is a literal
  }
  if (month == std::string_view::npos || day == std::string_view::npos) return FieldOrder::none;
  return month < day ? FieldOrder::month_first : FieldOrder::day_first;
}

struct ParseDateState final : StepState {
  ConversionTally tally;
};

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

class ParseDate final : public Step {
 public:
  ParseDate(size_t column, std::vector<DateFormat> formats, OnError on_error, Schema input)
      : column_(column), formats_(std::move(formats)), on_error_(on_error), input_(std::move(input)) {
    bool month_first = false, day_first = false;
    for (const DateFormat& f : formats_) {
      orders_.push_back(field_order(f.pattern()));
      month_first |= orders_.back() == FieldOrder::month_first;
      day_first |= orders_.back() == FieldOrder::day_first;
    }
    both_orders_ = month_first && day_first;
    for (const DateFormat& f : formats_) pattern_list_ += (pattern_list_.empty() ? "" : ", ") + f.pattern();
  }

  std::string_view op() const override { return "parse_date"; }

  std::string describe() const override {
    const std::string& name = input_[column_].name;
    const std::string how = formats_.size() == 1 ? "in the format " + pattern_list_
                                                 : "in the first of the formats " + pattern_list_ + " that matches";
    switch (on_error_) {
      case OnError::null: return "Read " + name + " as dates " + how + "; values that do not match become NULL.";
      case OnError::reject:
        return "Read " + name + " as dates " + how + "; reject the rows whose value does not match.";
      case OnError::keep:
        return "Rewrite the values of " + name + " that are dates " + how +
               " as YYYY-MM-DD and leave the others as they are.";
    }
    return "";
  }

  Schema output_schema(const Schema& input) const override {
    Schema out = input;
    if (on_error_ != OnError::keep) out[column_] = {input[column_].name, Type::date, 0};
    return out;
  }

  std::unique_ptr<StepState> start() const override { return std::make_unique<ParseDateState>(); }

  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const override {
    ConversionTally& tally = static_cast<ParseDateState*>(state)->tally;
    return convert_text_column(
        batch, column_, Type::date, 0, on_error_, "matches none of the date formats " + pattern_list_, tally, change,
        [&](std::string_view value, uint64_t line, int64_t& out) {
          for (size_t f = 0; f < formats_.size(); ++f)
            if (const auto days = formats_[f].parse(value)) {
              if (both_orders_ && orders_[f] != FieldOrder::none && is_ambiguous(f, *days, value))
                tally.note_ambiguous(line, value);
              out = *days;
              return Converted::value;
            }
          return Converted::failed;
        });
  }

  Status finish(StepState* state, ChangeRecord& change) const override {
    const ConversionTally& tally = static_cast<ParseDateState*>(state)->tally;
    if (!tally.belongs_to(change)) return Ok{};
    const std::string& name = input_[column_].name;
    if (const std::string w = failure_warning(tally, name, how_read(),
                                              on_error_);
        !w.empty())
      change.warnings.push_back(w);
    if (tally.ambiguous > 0)
      change.warnings.push_back(
          name + ": " + std::to_string(tally.ambiguous) +
          (tally.ambiguous == 1 ? " value reads" : " values read") +
          " as different dates month-first and day-first (the first on line " +
          std::to_string(tally.first_ambiguous_line) + ": " + tally.first_ambiguous_value +
          "); each took the date of the first listed format that matched it");
    return Ok{};
  }

  // Written for formats of %Y %y %m %d %% and literal characters where each
  // %m and %d ends at a literal or the end: every split of the
  // one-or-two-digit fields is a fixed layout, tested by its length in code
  // points and a digit pattern (GLOB in SQLite) before the fields are read,
  // then by the calendar. The engine's year 0000 (1 BC) is an error in
  // PostgreSQL, DuckDB and Spark, text in SQLite, and MySQL's DATE holds it.
  // SQLite has no DATE type: the date is its ISO 8601 text.
  SqlSupport sql_support(Dialect) const override {
    for (const DateFormat& f : formats_)
      if (!sql_layouts(f.pattern())) return SqlSupport::unsupported;
    return SqlSupport::exact;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const Dialect d = sql.dialect;
    const std::string x = sql.column(column_);
    std::string cases = "CASE";
    for (const DateFormat& f : formats_) {
      auto layouts = sql_layouts(f.pattern());
      if (!layouts) return usage_error(std::string("the format ") + f.pattern() + " is not written as SQL");
      for (const Layout& layout : *layouts) {
        std::string shape;
        for (const char32_t c : layout.shape) {
          if (c == U'#') shape += "[0-9]";
          else if (d == Dialect::sqlite) {
            std::string ch;
            utf8::append(ch, c);
            shape += c == U'*' || c == U'?' || c == U'[' ? std::string("[") + ch + "]" : ch;
          } else {
            shape += sql::regex_class(d, std::u32string(1, c));
          }
        }
        std::string test = sql::char_length(d, x) + std::string(" = ") + std::to_string(layout.shape.size()) + " AND ";
        if (d == Dialect::sqlite) test += x + std::string(" GLOB ") + sql.text(shape);
        else test += sql::regex_matches(d, x, sql::regex_whole(d, shape));
        const char* integer = d == Dialect::mysql ? " AS SIGNED)" : " AS INTEGER)";
        auto field = [&](const Field& at) {
          return std::string("CAST(") + sql::substring(d, x, std::to_string(at.position), std::to_string(at.width)) + integer;
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
            date = std::string("CASE WHEN ") + y + std::string(" = 0 THEN error('parse_date: year 0000 has no DuckDB date') ELSE make_date(") + y +
                   std::string(", ") + m + std::string(", ") + day + ") END";
            break;
          case Dialect::spark:
            date = std::string("CASE WHEN ") + y + std::string(" = 0 THEN raise_error('parse_date: year 0000 has no Spark date') ELSE make_date(") +
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
    cases += "\n         ELSE NULL END";
    return conversion_sql(sql, column_, cases,
                          [&](const std::string& v) { return d == Dialect::sqlite ? v : sql::as_text(d, v); }, on_error_,
                          op());
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    p["formats"] = nlohmann::ordered_json::array();
    for (const DateFormat& f : formats_) p["formats"].push_back(f.pattern());
    p["on_error"] = on_error_name(on_error_);
    return p;
  }

 private:
  std::string how_read() const {
    return (formats_.size() == 1 ? "read as dates in the format " : "read as dates in any of the formats ") +
           pattern_list_;
  }

  // Whether a format of the other day/month order reads the value as another date.
  bool is_ambiguous(size_t matched, int32_t days, std::string_view value) const {
    for (size_t g = 0; g < formats_.size(); ++g) {
      if (orders_[g] == FieldOrder::none || orders_[g] == orders_[matched]) continue;
      const auto other = formats_[g].parse(value);
      if (other && *other != days) return true;
    }
    return false;
  }

  size_t column_;
  std::vector<DateFormat> formats_;
  std::vector<FieldOrder> orders_;
  bool both_orders_ = false;
  OnError on_error_;
  std::string pattern_list_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_parse_date(StepParams& params) {
  auto column = params.column("column");
  if (!column) return column.take_error();
  if (params.input()[*column].type != Type::text)
    return params.error("column", "'" + params.input()[*column].name + "' is " +
                                      std::string(type_name(params.input()[*column].type)) +
                                      ", and parse_date reads text");
  auto patterns = params.text_list("formats");
  if (!patterns) return patterns.take_error();
  if (patterns->empty()) return params.error("formats", "must list at least one date format, such as \"%Y-%m-%d\"");
  std::vector<DateFormat> formats;
  for (const std::string& p : *patterns) {
    auto f = DateFormat::compile(p);
    if (!f) return params.error("formats", f.error().message);
    formats.push_back(std::move(*f));
  }
  auto on_error = read_on_error(params);
  if (!on_error) return on_error.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new ParseDate(*column, std::move(formats), *on_error, params.input()));
}

}  // namespace tamis
