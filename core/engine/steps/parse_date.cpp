#include "steps/parse_date.hpp"

#include "dates.hpp"
#include "sql/sql_dates.hpp"
#include "sql/sql_step.hpp"
#include "steps/typed_support.hpp"

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

  // Exact wherever sql::date_of reads every format (sql/sql_dates.hpp).
  SqlSupport sql_support(Dialect) const override {
    for (const DateFormat& f : formats_)
      if (!sql::reads_date_format(f.pattern())) return SqlSupport::unsupported;
    return SqlSupport::exact;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const Dialect d = sql.dialect;
    std::vector<std::string> patterns;
    for (const DateFormat& f : formats_) patterns.push_back(f.pattern());
    return conversion_sql(sql, column_, sql::date_of(d, sql.column(column_), patterns),
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
