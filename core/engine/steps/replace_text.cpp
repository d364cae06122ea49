#include "steps/replace_text.hpp"

#include <unicode/regex.h>
#include <unicode/uchar.h>
#include <unicode/utext.h>

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

enum class Match : uint8_t { literal, regex, entire };

std::string regex_problem(UErrorCode status) {
  switch (status) {
    case U_REGEX_MISMATCHED_PAREN: return "unbalanced parentheses";
    case U_REGEX_MISSING_CLOSE_BRACKET: return "a [ without its ]";
    case U_REGEX_BAD_ESCAPE_SEQUENCE: return "an unknown backslash escape (write \\\\ for a backslash)";
    case U_REGEX_RULE_SYNTAX: return "a syntax error";
    case U_REGEX_BAD_INTERVAL: return "a malformed {min,max} repeat";
    case U_REGEX_MAX_LT_MIN: return "a {min,max} repeat with max below min";
    case U_REGEX_INVALID_BACK_REF: return "a back reference to a group that does not exist";
    case U_REGEX_INVALID_RANGE: return "a character range that runs backwards";
    case U_REGEX_LOOK_BEHIND_LIMIT: return "a look-behind without a bounded length";
    case U_REGEX_PROPERTY_SYNTAX: return "an unknown \\p{...} property";
    case U_REGEX_INVALID_CAPTURE_GROUP_NAME: return "an invalid group name";
    case U_REGEX_TIME_OUT: return "the match took longer than ICU's time limit";
    case U_REGEX_STACK_OVERFLOW: return "the match needed more backtracking memory than ICU's stack limit";
    case U_FILE_ACCESS_ERROR:
    case U_MISSING_RESOURCE_ERROR:
      return "it needs ICU data this build does not carry (\\N{character name} in the browser build)";
    default: return std::string("ICU error ") + u_errorName(status);
  }
}

// Checks `replace` against ICU's replacement syntax for this pattern
// (RegexMatcher::appendReplacement): \x is a literal x; $ takes the longest
// run of digits that still names an existing group, or ${name} with the
// letters and digits 1-9 ICU accepts there. ICU would only report these
// mistakes at the first match; a recipe should fail when it is loaded.
std::optional<std::string> replacement_problem(const icu::RegexPattern& pattern, const std::string& replace) {
  UErrorCode status = U_ZERO_ERROR;
  std::unique_ptr<icu::RegexMatcher> matcher(pattern.matcher(status));
  const int32_t groups = U_SUCCESS(status) ? matcher->groupCount() : 0;
  const std::string_view r = replace;
  for (size_t i = 0; i < r.size();) {
    const char32_t c = utf8::next(r, i);
    if (c == '\\') {
      if (i == r.size()) return "ends with a lone backslash (write \\\\ for a backslash)";
      utf8::next(r, i);
      continue;
    }
    if (c != '$') continue;
    if (i == r.size()) return "ends with a lone $ (write \\$ for a dollar sign)";
    size_t after = i;
    const char32_t first = utf8::next(r, after);
    if (first == '{') {
      const size_t close = r.find('}', after);
      if (close == std::string_view::npos) return "has ${ without its closing }";
      const std::string name(r.substr(after, close - after));
      for (const char ch : name)
        if (!((ch >= 'A' && ch <= 'Z') || (ch >= 'a' && ch <= 'z') || (ch >= '1' && ch <= '9')))
          return "${" + name + "}: ICU reads only letters and the digits 1-9 in a group name here";
      status = U_ZERO_ERROR;
      if (name.empty() || pattern.groupNumberFromName(icu::UnicodeString::fromUTF8(name), status) <= 0 ||
          U_FAILURE(status))
        return "${" + name + "} names no group of the pattern";
      i = close + 1;
    } else if (u_isdigit(static_cast<UChar32>(first))) {
      int32_t number = 0, digits = 0;
      for (size_t next = i; next < r.size(); i = next) {
        const UChar32 d = static_cast<UChar32>(utf8::next(r, next));
        if (!u_isdigit(d) || number * 10 + u_charDigitValue(d) > groups) break;
        number = number * 10 + u_charDigitValue(d);
        ++digits;
      }
      if (digits == 0)
        return std::string(r.substr(i - 1, after - i + 1))
            .append(" refers to a group the pattern does not have (it has ")
            .append(std::to_string(groups))
            .append(")");
    } else {
      return "a $ must be followed by a group number or {name} (write \\$ for a dollar sign)";
    }
  }
  return std::nullopt;
}

// The first row holding a value (the expression fails on the value, so its
// first row is where a row-by-row pass stops).
size_t first_row_of(const Column& column, std::string_view value) {
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    for (size_t i = 0; i < chunk.rows; ++i)
      if (!chunk.is_null(i) && chunk.text(i) == value) return column.chunk_start(k) + i;
  }
  return column.size();
}

class ReplaceText final : public Step {
 public:
  ReplaceText(std::vector<size_t> columns, std::string find, std::string replace, Match match,
              std::unique_ptr<icu::RegexPattern> pattern, Schema input)
      : columns_(std::move(columns)),
        find_(std::move(find)),
        replace_(std::move(replace)),
        match_(match),
        pattern_(std::move(pattern)),
        replacement_(icu::UnicodeString::fromUTF8(replace_)),
        input_(std::move(input)) {}

  std::string_view op() const override { return "replace_text"; }

  std::string describe() const override {
    const std::string names = join_names(input_, columns_);
    const std::string with = "\"" + replace_ + "\"";
    const std::string action = replace_.empty() ? "delete" : "replace";
    const std::string result = replace_.empty() ? "." : " with " + with + ".";
    switch (match_) {
      case Match::literal: return "In " + names + ", " + action + " every \"" + find_ + "\"" + result;
      case Match::entire: return "In " + names + ", replace values that are exactly \"" + find_ + "\" with " + with + ".";
      case Match::regex: return "In " + names + ", " + action + " every match of the regular expression " + find_ + result;
    }
    return "";
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    switch (match_) {
      case Match::literal:
        return map_text_cells(batch, columns_, change, [&](std::string_view v, std::string& out) {
          size_t at = v.find(find_);
          if (at == std::string_view::npos) return CellResult::unchanged;
          size_t copied = 0;
          for (; at != std::string_view::npos; at = v.find(find_, copied)) {
            out.append(v.substr(copied, at - copied)).append(replace_);
            copied = at + find_.size();
          }
          out.append(v.substr(copied));
          return out == v ? CellResult::unchanged : CellResult::replaced;
        });
      case Match::entire:
        return map_text_cells(batch, columns_, change, [&](std::string_view v, std::string& out) {
          if (v != find_ || find_ == replace_) return CellResult::unchanged;
          out = replace_;
          return CellResult::replaced;
        });
      case Match::regex: return apply_regex(batch, change);
    }
    return batch;
  }

  SqlSupport sql_support(Dialect dialect) const override {
    if (match_ != Match::regex) return SqlSupport::exact;  // REPLACE(x, find, replace) / CASE WHEN x = find
    // Each engine has its own regex dialect (POSIX ARE, RE2, Java, ICU or
    // PCRE2 for MySQL/MariaDB) and SQLite has no regexp_replace; a pattern
    // is not translated between them.
    (void)dialect;
    return SqlSupport::unsupported;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    if (match_ == Match::regex) return usage_error("regular expressions are not exported");
    std::vector<std::pair<size_t, std::string>> replaced;
    for (const size_t c : columns_) {
      const std::string x = sql.column(c);
      if (match_ == Match::literal)
        replaced.emplace_back(c, std::string("REPLACE(") + x + std::string(", ") + sql.text(find_) + std::string(", ") + sql.text(replace_) + ")");
      else
        replaced.emplace_back(c, std::string("CASE WHEN ") + sql.key(c) + std::string(" = ") + sql::exact_key(sql.dialect, sql.text(find_), Type::text) +
                                     std::string(" THEN ") + sql.text(replace_) + std::string(" ELSE ") + x + " END");
    }
    SqlStepText out;
    out.select = sql.select_replacing(replaced);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = column_list(input_, columns_);
    p["find"] = find_;
    p["replace"] = replace_;
    p["match"] = match_ == Match::literal ? "literal" : match_ == Match::regex ? "regex" : "entire";
    return p;
  }

 private:
  Result<Table> apply_regex(const Table& batch, ChangeRecord& change) const {
    // A RegexPattern may be shared between threads; a matcher may not.
    UErrorCode status = U_ZERO_ERROR;
    std::unique_ptr<icu::RegexMatcher> matcher(pattern_->matcher(status));
    if (U_SUCCESS(status)) matcher->setTimeLimit(kRegexTimeLimit, status);
    if (U_SUCCESS(status)) matcher->setStackLimit(kRegexStackLimit, status);
    if (U_FAILURE(status)) return usage_error("(replace_text) ICU could not start the regular expression: " +
                                              std::string(u_errorName(status)));
    UText text = UTEXT_INITIALIZER;
    icu::UnicodeString replaced;
    Table out = batch;
    for (const size_t c : columns_) {
      std::string_view last_value;  // in the batch, which outlives the loop
      UErrorCode failure = U_ZERO_ERROR;
      ColumnPtr column = map_text_column(batch.column(c), batch.name(c), change, [&](std::string_view v, std::string& result) {
        if (U_FAILURE(failure)) return CellResult::unchanged;
        last_value = v;
        UErrorCode s = U_ZERO_ERROR;
        utext_openUTF8(&text, v.data(), static_cast<int64_t>(v.size()), &s);
        matcher->reset(&text);
        if (!matcher->find(s)) {
          failure = s;
          return CellResult::unchanged;
        }
        replaced.remove();
        do matcher->appendReplacement(replaced, replacement_, s);
        while (U_SUCCESS(s) && matcher->find(s));
        matcher->appendTail(replaced);
        if (U_FAILURE(s)) {
          failure = s;
          return CellResult::unchanged;
        }
        replaced.toUTF8String(result);
        return result == v ? CellResult::unchanged : CellResult::replaced;
      });
      if (U_FAILURE(failure)) {
        utext_close(&text);
        const size_t row = first_row_of(batch.column(c), last_value);
        Error e;
        e.kind = ErrorKind::bad_input;
        e.line = batch.source_line(row);
        e.message = "(replace_text) the regular expression failed on the value of " + batch.name(c) + " at line " +
                    std::to_string(e.line) + ": " + regex_problem(failure);
        return e;
      }
      out = out.with_column(c, std::move(column));
    }
    utext_close(&text);
    change.rows_in += batch.row_count();
    change.rows_out += batch.row_count();
    return out;
  }

  std::vector<size_t> columns_;
  std::string find_;
  std::string replace_;
  Match match_;
  std::unique_ptr<icu::RegexPattern> pattern_;  // match: regex only
  icu::UnicodeString replacement_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_replace_text(StepParams& params) {
  auto columns = text_columns(params, "columns");
  if (!columns) return columns.take_error();
  auto match = params.choice("match", {"literal", "regex", "entire"}, "literal");
  if (!match) return match.take_error();
  const Match kind = *match == "literal" ? Match::literal : *match == "regex" ? Match::regex : Match::entire;
  auto find = utf8_text(params, "find", kind == Match::entire);
  if (!find) return find.take_error();
  // Without `replace`, the matches are deleted.
  auto replace = params.raw("replace") ? utf8_text(params, "replace", true) : Result<std::string>(std::string());
  if (!replace) return replace.take_error();
  std::unique_ptr<icu::RegexPattern> pattern;
  if (kind == Match::regex) {
    UParseError where{};
    UErrorCode status = U_ZERO_ERROR;
    pattern.reset(icu::RegexPattern::compile(icu::UnicodeString::fromUTF8(*find), UREGEX_ERROR_ON_UNKNOWN_ESCAPES,
                                             where, status));
    if (U_FAILURE(status)) {
      // ICU reports the line and the character (counted from 1 within that
      // line) where it noticed the problem.
      std::string at = where.offset >= 0 ? " at character " + std::to_string(where.offset) : "";
      if (where.line > 1) at += " of line " + std::to_string(where.line);
      const bool missing_data = status == U_FILE_ACCESS_ERROR || status == U_MISSING_RESOURCE_ERROR;
      return params.error("find", (missing_data ? "cannot be used here: " : "not a valid regular expression: ") +
                                      regex_problem(status) + at);
    }
    if (auto problem = replacement_problem(*pattern, *replace)) return params.error("replace", *problem);
  }
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new ReplaceText(std::move(*columns), std::move(*find), std::move(*replace), kind,
                                               std::move(pattern), params.input()));
}

}  // namespace tamis
