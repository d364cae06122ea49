#include "steps/parse_number.hpp"

#include <algorithm>

#include "expr/numeric.hpp"
#include "sql/sql_step.hpp"
#include "steps/typed_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

constexpr int kMaxScale = expr::kMaxScale;

bool is_digit(char c) { return c >= '0' && c <= '9'; }

struct ParseNumberState final : StepState {
  ConversionTally tally;
  bool observed = false;
  int scale = 0;  // the largest fraction-digit count seen (scale absent)
};

struct NumberForm {
  char decimal_mark = '.';
  char group_mark = 0;  // 0: no grouping
  std::u32string strip;
  bool percent = false;
};

// Reads one value by the rules in parse_number.hpp into plain SQL numeric
// text ("-1234.5", with "E-2" for a percentage), which expr::read_scaled
// turns into a scaled integer. Returns the number of fraction digits the
// value carries (percent included), or -1 when it is not a number.
int normalize(const NumberForm& form, std::string_view value, std::string& plain) {
  plain.clear();
  bool had_percent = false;
  std::string_view rest = value;
  std::string cleaned;
  if (!form.strip.empty() || form.percent) {
    for (size_t i = 0; i < value.size();) {
      const char32_t c = utf8::next(value, i);
      if (form.percent && c == U'%') {
        if (had_percent) return -1;
        had_percent = true;
        continue;
      }
      if (form.strip.find(c) != std::u32string::npos) continue;
      utf8::append(cleaned, c);
    }
    rest = cleaned;
  }
  size_t i = 0;
  if (i < rest.size() && (rest[i] == '+' || rest[i] == '-')) {
    if (rest[i] == '-') plain += '-';
    ++i;
  }
  size_t integer_digits = 0, run = 0;
  bool grouped = false;
  for (; i < rest.size(); ++i) {
    if (is_digit(rest[i])) {
      plain += rest[i];
      ++integer_digits, ++run;
      continue;
    }
    if (form.group_mark == 0 || rest[i] != form.group_mark) break;
    // A group mark closes a group: the first of 1-3 digits, later ones of 3.
    if (run == 0 || run > 3 || (grouped && run != 3)) return -1;
    grouped = true;
    run = 0;
  }
  if (grouped && run != 3) return -1;
  int fraction_digits = 0;
  if (i < rest.size() && rest[i] == form.decimal_mark) {
    plain += '.';
    for (++i; i < rest.size() && is_digit(rest[i]); ++i, ++fraction_digits) plain += rest[i];
  }
  if (i != rest.size() || integer_digits + static_cast<size_t>(fraction_digits) == 0) return -1;
  if (had_percent) {
    plain += "E-2";
    fraction_digits += 2;
  }
  return fraction_digits;
}

std::string shown_mark(char mark) {
  if (mark == ' ') return "a space";
  std::string shown = "'";
  shown += mark;
  shown += '\'';
  return shown;
}

class ParseNumber final : public Step {
 public:
  ParseNumber(size_t column, NumberForm form, std::optional<int> scale, OnError on_error, Schema input)
      : column_(column), form_(std::move(form)), scale_(scale), on_error_(on_error), input_(std::move(input)) {}

  std::string_view op() const override { return "parse_number"; }

  std::string describe() const override {
    const std::string& name = input_[column_].name;
    std::string how = "with decimal mark " + shown_mark(form_.decimal_mark);
    if (form_.group_mark) how += " and group mark " + shown_mark(form_.group_mark);
    if (!form_.strip.empty()) {
      std::string chars;
      for (const char32_t c : form_.strip) {
        chars += chars.empty() ? "'" : " '";
        utf8::append(chars, c);
        chars += "'";
      }
      how += ", ignoring " + chars;
    }
    if (form_.percent) how += ", a % sign dividing by 100";
    const std::string kind = !scale_      ? "numbers"
                             : *scale_ == 0 ? "whole numbers"
                             : *scale_ == 1 ? "numbers with 1 decimal"
                                            : "numbers with " + std::to_string(*scale_) + " decimals";
    switch (on_error_) {
      case OnError::null:
        return "Read " + name + " as " + kind + " (" + how + "); values that are not numbers become NULL.";
      case OnError::reject:
        return "Read " + name + " as " + kind + " (" + how + "); reject the rows whose value is not a number.";
      case OnError::keep:
        return "Rewrite the values of " + name + " that are " + kind + " (" + how +
               ") in plain form and leave the others as they are.";
    }
    return "";
  }

  Schema output_schema(const Schema& input) const override {
    Schema out = input;
    if (on_error_ != OnError::keep) out[column_] = {input[column_].name, result_type(), scale_.value_or(0)};
    return out;
  }

  std::unique_ptr<StepState> start() const override { return std::make_unique<ParseNumberState>(); }
  bool needs_first_pass() const override { return !scale_; }

  Status observe(const Table& batch, StepState* state) const override {
    auto& s = *static_cast<ParseNumberState*>(state);
    s.observed = true;
    std::string plain;
    const Column& column = batch.column(column_);
    for (size_t k = 0; k < column.chunk_count(); ++k) {
      const ColumnChunk& chunk = column.chunk(k);
      for (size_t i = 0; i < chunk.rows; ++i)
        if (!chunk.is_null(i)) s.scale = std::max(s.scale, std::min(normalize(form_, chunk.text(i), plain), kMaxScale));
    }
    return Ok{};
  }

  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const override {
    auto& s = *static_cast<ParseNumberState*>(state);
    if (!scale_ && !s.observed) return usage_error("(parse_number) was applied before its first pass over the input");
    const int scale = scale_.value_or(s.scale);
    std::string plain;
    return convert_text_column(batch, column_, result_type(), scale, on_error_, "is not a number " + form_text(),
                               s.tally, change, [&](std::string_view value, uint64_t, int64_t& out) {
                                 if (normalize(form_, value, plain) < 0) return Converted::failed;
                                 return expr::read_scaled(plain, scale, out) == expr::NumberRead::ok
                                            ? Converted::value
                                            : Converted::failed;
                               });
  }

  Status finish(StepState* state, ChangeRecord& change) const override {
    const auto& s = *static_cast<ParseNumberState*>(state);
    if (!s.tally.belongs_to(change)) return Ok{};
    if (const std::string w = failure_warning(s.tally, input_[column_].name, "read as numbers " + form_text(), on_error_);
        !w.empty())
      change.warnings.push_back(w);
    return Ok{};
  }

  // The rules of normalize() as regular expressions: at most one '%', the
  // strip characters and the '%' removed by nested REPLACE, the shape (sign,
  // digits grouped 1-3 then 3 by 3, or not grouped, a decimal mark and
  // digits, at least one digit) checked whole, group marks dropped and the
  // decimal mark made '.', then sql::scaled_number. SQLite has no regular
  // expressions; a scale left to the data cannot be declared ahead.
  SqlSupport sql_support(Dialect dialect) const override {
    return scale_ && dialect != Dialect::sqlite ? SqlSupport::exact : SqlSupport::unsupported;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    if (!scale_) return usage_error("without a scale the number of decimals depends on the data");
    const Dialect d = sql.dialect;
    const std::string x = sql.column(column_);
    std::vector<std::pair<std::string, std::string>> removed;
    for (const char32_t c : form_.strip) {
      std::string one;
      utf8::append(one, c);
      removed.emplace_back(std::move(one), "");
    }
    if (form_.percent) removed.emplace_back("%", "");
    const std::string bare = sql::replace_each(d, x, removed);
    const std::string digit = "[0-9]";
    const std::string mark = sql::regex_class(d, std::u32string(1, static_cast<char32_t>(form_.decimal_mark)));
    const std::string integer =
        form_.group_mark ? std::string("(?:[0-9]{1,3}(?:") + sql::regex_class(d, std::u32string(1, static_cast<char32_t>(form_.group_mark))) +
                               "[0-9]{3})+|[0-9]+)"
                         : std::string("[0-9]+");
    std::string shape = sql::regex_matches(
        d, bare, sql::regex_whole(d, std::string("[+-]?(?:") + integer + std::string("(?:") + mark + std::string("[0-9]*)?|") + mark + "[0-9]+)"));
    if (form_.percent)
      shape = sql::char_length(d, x) + std::string(" - ") + sql::char_length(d, sql::replace_each(d, x, {{"%", ""}})) + " <= 1 AND " + shape;
    std::vector<std::pair<std::string, std::string>> to_plain;
    if (form_.group_mark) to_plain.emplace_back(std::string(1, form_.group_mark), "");
    if (form_.decimal_mark != '.') to_plain.emplace_back(std::string(1, form_.decimal_mark), ".");
    const std::string plain = sql::replace_each(d, bare, to_plain);
    std::string value = sql::scaled_number(d, plain, *scale_, false);
    if (form_.percent)  // only a value with its % sign is a percentage
      value = std::string("CASE WHEN ") + sql::position(d, "'%'", x) + " > 0\n         THEN " +
              sql::scaled_number(d, plain, *scale_, true) + "\n         ELSE " + value + " END";
    return conversion_sql(sql, column_, std::string("CASE WHEN ") + shape + "\n         THEN " + value + " END",
                          [&](const std::string& v) { return sql::as_text(d, v); }, on_error_, op());
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    p["decimal_mark"] = std::string(1, form_.decimal_mark);
    if (form_.group_mark) p["group_mark"] = std::string(1, form_.group_mark);
    std::string strip;
    for (const char32_t c : form_.strip) utf8::append(strip, c);
    if (!strip.empty()) p["strip"] = strip;
    if (form_.percent) p["percent"] = true;
    if (scale_) p["scale"] = *scale_;
    p["on_error"] = on_error_name(on_error_);
    return p;
  }

 private:
  Type result_type() const { return scale_ && *scale_ == 0 ? Type::integer : Type::decimal; }
  std::string form_text() const {
    std::string t = "with decimal mark " + shown_mark(form_.decimal_mark);
    if (form_.group_mark) t += " and group mark " + shown_mark(form_.group_mark);
    return t;
  }

  size_t column_;
  NumberForm form_;
  std::optional<int> scale_;
  OnError on_error_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_parse_number(StepParams& params) {
  auto column = params.column("column");
  if (!column) return column.take_error();
  if (params.input()[*column].type != Type::text)
    return params.error("column", "'" + params.input()[*column].name + "' is " +
                                      std::string(type_name(params.input()[*column].type)) +
                                      ", and parse_number reads text");
  NumberForm form;
  auto decimal = params.choice("decimal_mark", {".", ","}, ".");
  if (!decimal) return decimal.take_error();
  form.decimal_mark = (*decimal)[0];
  if (params.raw("group_mark")) {
    auto group = params.choice("group_mark", {",", ".", " ", "'"}, std::nullopt);
    if (!group) return group.take_error();
    if ((*group)[0] == form.decimal_mark)
      return params.error("group_mark", "must differ from the decimal mark '" + *decimal + "'");
    form.group_mark = (*group)[0];
  }
  auto strip = params.text_or("strip", "");
  if (!strip) return strip.take_error();
  if (utf8::first_invalid(*strip) != std::string_view::npos) return params.error("strip", "is not valid UTF-8");
  for (size_t i = 0; i < strip->size();) {
    const char32_t c = utf8::next(*strip, i);
    if ((c >= U'0' && c <= U'9') || c == U'+' || c == U'-' || c == static_cast<char32_t>(form.decimal_mark) ||
        c == static_cast<char32_t>(form.group_mark))
      return params.error("strip", "must not list digits, signs, the decimal mark or the group mark");
    if (form.strip.find(c) == std::u32string::npos) form.strip.push_back(c);
  }
  auto percent = params.boolean_or("percent", false);
  if (!percent) return percent.take_error();
  form.percent = *percent;
  if (form.percent && form.strip.find(U'%') != std::u32string::npos)
    return params.error("strip", "lists '%', which percent: true already reads (and divides by 100)");
  std::optional<int> scale;
  if (params.raw("scale")) {
    auto s = params.integer_or("scale", 0);
    if (!s) return s.take_error();
    if (*s < 0 || *s > kMaxScale)
      return params.error("scale", "expected a whole number from 0 to " + std::to_string(kMaxScale));
    scale = static_cast<int>(*s);
  }
  auto on_error = read_on_error(params);
  if (!on_error) return on_error.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new ParseNumber(*column, std::move(form), scale, *on_error, params.input()));
}

}  // namespace tamis
