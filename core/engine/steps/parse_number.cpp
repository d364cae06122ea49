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

  // A scale left to the data cannot be declared ahead; with a scale, every
  // dialect reads the rules of normalize(): with regular expressions where
  // it has them, with text functions in SQLite (sqlite_sql).
  SqlSupport sql_support(Dialect) const override { return scale_ ? SqlSupport::exact : SqlSupport::unsupported; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    if (!scale_) return usage_error("without a scale the number of decimals depends on the data");
    if (sql.dialect == Dialect::sqlite) return sqlite_sql(sql);
    return regex_sql(sql);
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

  // The characters normalize() drops wherever they are: the strip
  // characters, and the '%' when percent is set (it counts them apart).
  std::vector<std::pair<std::string, std::string>> removed_characters() const {
    std::vector<std::pair<std::string, std::string>> removed;
    for (const char32_t c : form_.strip) {
      std::string one;
      utf8::append(one, c);
      removed.emplace_back(std::move(one), "");
    }
    if (form_.percent) removed.emplace_back("%", "");
    return removed;
  }

  // The rules of normalize() as regular expressions: at most one '%', the
  // strip characters and the '%' removed by nested REPLACE, the shape (sign,
  // digits grouped 1-3 then 3 by 3, or not grouped, a decimal mark and
  // digits, at least one digit) checked whole, group marks dropped and the
  // decimal mark made '.', then sql::scaled_number.
  Result<SqlStepText> regex_sql(const SqlContext& sql) const {
    const Dialect d = sql.dialect;
    const std::string x = sql.column(column_);
    const std::string bare = sql::replace_each(d, x, removed_characters());
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

  // SQLite has no regular expressions: there the value is taken apart with
  // text functions, in stages (common table expressions), each adding
  // columns to the one before:
  //   1. the text without the strip characters and the '%', and the number
  //      of '%' signs;
  //   2. whether it is negative, and the integer and fraction parts around
  //      the first decimal mark after the sign;
  //   3. whether it has the shape (sqlite_integer_shape; the fraction part
  //      digits only; one digit at least), and its digits (after the
  //      percent's two zeros) cut at the scale: the kept ones without
  //      leading zeros, and the first dropped one;
  //   4. the scaled integer (sqlite_scaled).
  // At a scale above 0 the integer is then written as its canonical decimal
  // text, which a decimal column holds in SQLite (no decimal type). Each
  // stage is MATERIALIZED (SQLite 3.35 and later): SQLite would otherwise
  // merge it into the next one, copying its expressions into every use
  // there, and the copies multiply from stage to stage (minutes instead of
  // seconds on a million rows).
  Result<SqlStepText> sqlite_sql(const SqlContext& sql) const {
    const std::string prefix = sql.helper("tamis_number");
    auto helper = [&](std::string_view name) { return prefix + "_" + std::string(name); };
    auto column = [](const std::string& expression, const std::string& name) {
      return std::string(",\n         ") + expression + " AS " + name;
    };
    const std::string x = sql.column(column_);
    const auto removed = removed_characters();
    const ReplacedValues bare = replaced_values(sql, {x}, removed, prefix + "_strip");
    std::string with = bare.with.empty() ? std::string("WITH ") : bare.with.substr(0, bare.with.size() - 1) + ",\n";
    SqlContext staged = sql;
    staged.from = bare.from;
    int stages = 0;
    auto stage = [&](const std::string& columns) {
      const std::string table = helper(std::to_string(++stages));
      with += std::string(stages > 1 ? ",\n" : "") + table + " AS MATERIALIZED (\n  SELECT *" + columns + "\n  FROM " +
              staged.from + ")";
      staged.from = table;
    };

    std::string text = x;
    const std::string percent_signs = helper("percent_signs");
    if (!removed.empty()) {
      text = helper("text");
      stage(column(bare.results[0], text) +
            (form_.percent ? column(std::string("length(") + x + ") - length(replace(" + x + ", '%', ''))", percent_signs)
                           : std::string()));
    }

    const std::string negative = helper("negative"), integer = helper("integer"), fraction = helper("fraction");
    const std::string sign_length = std::string("(substr(") + text + ", 1, 1) IN ('+', '-'))";
    const std::string mark = sql.text(std::string(1, form_.decimal_mark));
    const std::string cut = std::string("instr(") + text + " || " + mark + ", " + mark + ")";
    stage(column(std::string("substr(") + text + ", 1, 1) = '-'", negative) +
          column(std::string("substr(") + text + ", 1 + " + sign_length + ", " + cut + " - 1 - " + sign_length + ")", integer) +
          column(std::string("substr(") + text + ", " + cut + " + 1)", fraction));

    const std::string valid = helper("valid"), kept = helper("kept"), dropped = helper("dropped");
    std::string shape = std::string("(") + sqlite_integer_shape(sql, integer) + ") AND " + fraction +
                        " NOT GLOB '*[^0-9]*' AND (" + integer + " <> '' OR " + fraction + " <> '')";
    if (form_.percent) shape = percent_signs + " <= 1 AND " + shape;
    const std::string integer_digits =
        form_.group_mark ? std::string("replace(") + integer + ", " + sql.text(std::string(1, form_.group_mark)) + ", '')" : integer;
    const std::string digits =
        (form_.percent ? std::string("CASE WHEN ") + percent_signs + " = 1 THEN '00' ELSE '' END || " : std::string()) +
        integer_digits + " || " + fraction + " || '" + std::string(static_cast<size_t>(*scale_) + 1, '0') + "'";
    const std::string point = std::string("length(") + integer_digits + ")";
    stage(column(shape, valid) +
          column(std::string("ltrim(substr(") + digits + ", 1, " + point + " + " + std::to_string(*scale_) + "), '0')", kept) +
          column(std::string("substr(") + digits + ", " + point + " + " + std::to_string(*scale_ + 1) + ", 1)", dropped));

    std::string converted = sqlite_scaled(valid, negative, kept, dropped);
    if (*scale_ > 0) {
      const std::string scaled = helper("scaled");
      stage(column(converted, scaled));
      converted = sqlite_decimal_text(scaled, *scale_);
    }
    return conversion_sql(staged, column_, converted,
                          [](const std::string& v) { return sql::as_text(Dialect::sqlite, v); }, on_error_, op(),
                          with + "\n");
  }

  // Whether the integer part (possibly empty) is digits only or, with a
  // group mark, matches the GLOB pattern built for its own number g of
  // marks: 1-3 digits, then g times the mark and three digits. (The group
  // marks , . space and ' are no GLOB syntax.)
  std::string sqlite_integer_shape(const SqlContext& sql, const std::string& integer) const {
    const std::string digits_only = integer + " NOT GLOB '*[^0-9]*'";
    if (!form_.group_mark) return digits_only;
    const std::string group = std::string(1, form_.group_mark);
    const std::string marks = std::string("(length(") + integer + ") - length(replace(" + integer + ", " + sql.text(group) + ", '')))";
    const std::string head = std::string("(length(") + integer + ") - 4 * " + marks + ")";
    return std::string("CASE WHEN ") + digits_only + " THEN 1\n              ELSE " + head + " BETWEEN 1 AND 3 AND " + integer +
           " GLOB substr('[0-9][0-9][0-9]', 1, 5 * " + head + ")\n                   || replace(hex(zeroblob(" + marks +
           ")), '00', " + sql.text(group + "[0-9][0-9][0-9]") + ") END";
  }

  // The scaled integer as expr::read_scaled makes it: the kept digits read
  // by CAST, one more away from zero when the first dropped digit is 5 or
  // more; NULL when the value is no number or does not fit 64 bits: more
  // than 19 kept digits, or 19 that, followed by the dropped digit, exceed
  // 2^63 - 1 (2^63 when negative) followed by 4 (digit strings of one
  // length compare as numbers).
  static std::string sqlite_scaled(const std::string& valid, const std::string& negative, const std::string& kept,
                                   const std::string& dropped) {
    const std::string fits = std::string("length(") + kept + ") < 19 OR (length(" + kept + ") = 19 AND " + kept + " || " +
                             dropped + " <= CASE WHEN " + negative +
                             " THEN '92233720368547758084' ELSE '92233720368547758074' END)";
    return std::string("CASE WHEN ") + valid + " AND (" + fits + ")\n         THEN CAST(CASE WHEN " + negative +
           " THEN '-' ELSE '' END || " + kept + " AS INTEGER)\n              + CASE WHEN " + dropped + " < '5' THEN 0 WHEN " +
           negative + " THEN -1 ELSE 1 END END";
  }

  // The canonical text of the integer `scaled` at `scale` (above 0)
  // decimals: SQLite divides integers toward zero and its % keeps the
  // dividend's sign, so a negative value's parts are negated, and -2^63
  // never has to be.
  static std::string sqlite_decimal_text(const std::string& scaled, int scale) {
    const std::string unit = std::string("1") + std::string(static_cast<size_t>(scale), '0');
    const std::string format = std::string("%d.%0") + std::to_string(scale) + "d";
    return std::string("CASE WHEN ") + scaled + " < 0 THEN printf('-" + format + "', -(" + scaled + " / " + unit + "), -(" +
           scaled + " % " + unit + "))\n              WHEN " + scaled + " >= 0 THEN printf('" + format + "', " + scaled +
           " / " + unit + ", " + scaled + " % " + unit + ") END";
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
