#include "steps/require.hpp"

#include <unicode/regex.h>
#include <unicode/utext.h>

#include <memory>
#include <set>

#include "dates.hpp"
#include "sql/sql_step.hpp"
#include "expr/numeric.hpp"
#include "steps/row_filter.hpp"
#include "steps/row_key.hpp"
#include "steps/typed_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

using expr::Wide;

enum class Rule : uint8_t { not_null, unique, in_set, pattern, range, row_count };
enum class OnFail : uint8_t { stop, reject, warn };

constexpr std::string_view kRuleNames[] = {"not_null", "unique", "in_set", "pattern", "range", "row_count"};
constexpr std::string_view kOnFailNames[] = {"stop", "reject", "warn"};
constexpr size_t kListedFailures = 20;
// Recipes are untrusted: a pattern gets ICU's match time limit (in ICU's
// units, RegexMatcher::setTimeLimit) and backtracking stack (bytes) per
// value.
constexpr int32_t kPatternTimeLimit = 1000;
constexpr int32_t kPatternStackLimit = 8 << 20;
// Range bounds of number columns are held exactly at this scale.
constexpr int kBoundScale = 18;

// A bound of a range: a number at kBoundScale, or a date.
struct Bound {
  Wide scaled = 0;
  int64_t days = 0;
  std::string written;  // as the recipe wrote it, for messages and parameters()
  nlohmann::ordered_json json;
};

// Reads the text of a JSON number exactly ([-]digits[.digits][e[+-]digits])
// at kBoundScale; nullopt beyond 18 decimals or 20 integer digits.
std::optional<Wide> exact_number(std::string_view text) {
  size_t i = 0;
  const bool negative = i < text.size() && text[i] == '-';
  if (negative) ++i;
  std::string digits;
  int fraction = 0;
  for (; i < text.size() && text[i] >= '0' && text[i] <= '9'; ++i) digits += text[i];
  if (i < text.size() && text[i] == '.')
    for (++i; i < text.size() && text[i] >= '0' && text[i] <= '9'; ++i, ++fraction) digits += text[i];
  int exponent = 0;
  if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
    ++i;
    const bool down = i < text.size() && text[i] == '-';
    if (i < text.size() && (text[i] == '+' || text[i] == '-')) ++i;
    for (; i < text.size() && text[i] >= '0' && text[i] <= '9' && exponent < 1000; ++i)
      exponent = exponent * 10 + (text[i] - '0');
    if (down) exponent = -exponent;
  }
  if (i != text.size() || digits.empty()) return std::nullopt;
  int shift = exponent - fraction + kBoundScale;
  while (shift < 0) {
    if (digits.back() != '0') return std::nullopt;
    digits.pop_back();
    ++shift;
    if (digits.empty()) return Wide{0};
  }
  const size_t first = digits.find_first_not_of('0');
  if (first == std::string::npos) return Wide{0};
  if (digits.size() - first + static_cast<size_t>(shift) > 20 + kBoundScale) return std::nullopt;
  Wide value = 0;
  for (size_t k = first; k < digits.size(); ++k) value = value * 10 + (digits[k] - '0');
  value *= expr::pow10_wide(shift);
  return negative ? -value : value;
}

// The parameters that belong to one rule or another.
struct RuleParameters {
  std::set<std::string, std::less<>> values;   // in_set
  std::vector<std::string> values_written;     // in_set, in the recipe's order
  std::string pattern_text;                    // pattern
  std::unique_ptr<icu::RegexPattern> pattern;  // pattern
  std::optional<Bound> min, max;               // range
  std::optional<int64_t> min_rows, max_rows;   // row_count
};

struct RequireState final : StepState {
  std::unique_ptr<RowIndex> index;  // rule unique
  std::unique_ptr<icu::RegexMatcher> matcher;  // rule pattern
  uint64_t rows = 0;
  uint64_t failed = 0;
  std::vector<std::pair<uint64_t, std::string>> listed;  // the first failures: line, reason
};

class Require final : public Step {
 public:
  Require(Rule rule, OnFail on_fail, std::vector<size_t> columns, RuleParameters parameters, Schema input)
      : rule_(rule), on_fail_(on_fail), columns_(std::move(columns)), p_(std::move(parameters)),
        input_(std::move(input)) {}

  std::string_view op() const override { return "require"; }

  std::string describe() const override {
    const std::string names = join_names(input_, columns_);
    std::string what;
    switch (rule_) {
      case Rule::not_null: what = "Require " + names + " to be present (not NULL)"; break;
      case Rule::unique:
        what = columns_.size() == 1 ? "Require " + names + " to be unique"
                                    : "Require each combination of " + names + " to be unique";
        break;
      case Rule::in_set: {
        std::string listed;
        for (size_t i = 0; i < p_.values_written.size() && i < 5; ++i)
          listed += (i ? ", " : "") + quoted_value(p_.values_written[i]);
        if (p_.values_written.size() > 5) listed += ", …";
        what = "Require " + names + " to be one of " + listed;
        break;
      }
      case Rule::pattern: what = "Require " + names + " to match the pattern " + p_.pattern_text; break;
      case Rule::range: what = "Require " + names + " to be " + bounds_text(); break;
      case Rule::row_count: {
        const bool one = (p_.max_rows ? *p_.max_rows : *p_.min_rows) == 1;
        what = "Require " + row_bounds_text() + (one ? " row" : " rows");
        break;
      }
    }
    switch (on_fail_) {
      case OnFail::stop: return what + "; stop the run if " + (rule_ == Rule::row_count ? "not." : "a row fails.");
      case OnFail::reject: return what + "; reject the rows that fail.";
      case OnFail::warn: return what + "; warn if " + (rule_ == Rule::row_count ? "not." : "rows fail.");
    }
    return what;
  }

  std::unique_ptr<StepState> start() const override {
    auto state = std::make_unique<RequireState>();
    if (rule_ == Rule::unique) state->index = std::make_unique<RowIndex>(default_row_index_tuning());
    return state;
  }

  Result<Table> apply(const Table& batch, StepState* state_base, ChangeRecord& change) const override {
    auto& state = *static_cast<RequireState*>(state_base);
    const size_t rows = batch.row_count();
    change.rows_in += rows;
    state.rows += rows;
    if (rule_ == Rule::row_count) {
      change.rows_out += rows;
      return batch;
    }
    std::vector<std::string> reasons(rows);
    if (Status s = check(batch, state, reasons); !s) return s.take_error();
    std::vector<uint8_t> keep;
    size_t rejected = 0;
    ColumnCursor lines(batch.source_lines());
    for (size_t r = 0; r < rows; ++r, lines.next()) {
      if (reasons[r].empty()) continue;
      const auto line = static_cast<uint64_t>(lines.number());
      if (on_fail_ == OnFail::reject) {
        if (keep.empty()) keep.assign(rows, 1);
        keep[r] = 0;
        ++rejected;
        change.note_rejected(line, "require " + std::string(kRuleNames[static_cast<size_t>(rule_)]) + ": " +
                                       reasons[r]);
        continue;
      }
      if (state.failed++ < kListedFailures) state.listed.emplace_back(line, std::move(reasons[r]));
    }
    change.rows_out += rows - rejected;
    if (rejected == 0) return batch;
    return select_rows(batch, keep);
  }

  Status finish(StepState* state_base, ChangeRecord& change) const override {
    auto& state = *static_cast<RequireState*>(state_base);
    std::string message;
    if (rule_ == Rule::row_count) {
      const auto n = static_cast<int64_t>(state.rows);
      if ((p_.min_rows && n < *p_.min_rows) || (p_.max_rows && n > *p_.max_rows))
        message = "rule row_count failed: " + std::to_string(n) + (n == 1 ? " row" : " rows") +
                  " reached this step; the rule requires " + row_bounds_text();
    } else if (state.failed > 0) {
      message = "rule " + std::string(kRuleNames[static_cast<size_t>(rule_)]) + " on " +
                join_names(input_, columns_) + " failed on " + std::to_string(state.failed) +
                (state.failed == 1 ? " row: " : " rows: ");
      for (size_t i = 0; i < state.listed.size(); ++i)
        message += (i ? "; " : "") + std::string("line ") + std::to_string(state.listed[i].first) + " (" +
                   state.listed[i].second + ")";
      if (state.failed > state.listed.size())
        message += "; and " + std::to_string(state.failed - state.listed.size()) + " more";
    }
    if (message.empty()) return Ok{};
    if (on_fail_ == OnFail::warn) {
      change.warnings.push_back(message + (rule_ == Rule::row_count ? "" : " (the rows were kept)"));
      return Ok{};
    }
    Error e;
    e.kind = ErrorKind::rule_failed;
    e.message = "(require) " + message;
    return e;
  }

  SqlSupport sql_support(Dialect dialect) const override {
    // No SQL script writes a rejects file or a warning into a report; each
    // engine has its own regular expression flavour, and SQLite none.
    // A stopping rule is a CHECK constraint that the count of failing rows
    // must pass (raise_error in Spark); pattern and range are not written.
    (void)dialect;
    if (on_fail_ == OnFail::reject || rule_ == Rule::pattern || rule_ == Rule::range) return SqlSupport::unsupported;
    if (rule_ == Rule::in_set)
      for (const size_t c : columns_)
        if (input_[c].type != Type::text) return SqlSupport::unsupported;
    if (on_fail_ == OnFail::warn) return SqlSupport::approximate;
    return SqlSupport::exact;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    if (on_fail_ == OnFail::warn) {
      out.approximation = "the script checks nothing: a warning has no place to go";
      return out;
    }
    std::string failing;  // a query giving the number of failing rows (or 1 for row_count)
    auto any_of = [&](auto&& test) {
      std::string where;
      for (const size_t c : columns_) where += (where.empty() ? "" : " OR ") + test(c);
      return where;
    };
    switch (rule_) {
      case Rule::not_null:
        failing = std::string("SELECT COUNT(*) FROM ") + sql.from + " WHERE " +
                  any_of([&](size_t c) { return sql.column(c) + " IS NULL"; });
        break;
      case Rule::in_set: {
        std::string listed;
        for (const std::string& v : p_.values_written)
          listed += (listed.empty() ? "" : ", ") + sql::exact_key(sql.dialect, sql.text(v), Type::text);
        failing = std::string("SELECT COUNT(*) FROM ") + sql.from + std::string(" WHERE ") + any_of([&](size_t c) {
                    std::string test = "(";
                    test += sql.column(c) + std::string(" IS NOT NULL AND ") + sql.key(c) + std::string(" NOT IN (") + listed + "))";
                    return test;
                  });
        break;
      }
      case Rule::unique: {
        std::string keys, present;
        for (const size_t c : columns_) {
          keys += (keys.empty() ? "" : ", ") + sql.key(c);
          present += (present.empty() ? "" : " AND ") + sql.column(c) + " IS NOT NULL";
        }
        failing = std::string("SELECT COUNT(*) FROM (SELECT COUNT(*) AS copies FROM ") + sql.from + std::string(" WHERE ") + present +
                  std::string(" GROUP BY ") + keys + " HAVING COUNT(*) > 1) AS repeated";
        break;
      }
      case Rule::row_count: {
        std::string within;
        if (p_.min_rows) within += std::string("COUNT(*) >= ") + std::to_string(*p_.min_rows);
        if (p_.max_rows) within += (within.empty() ? "" : " AND ") + std::string("COUNT(*) <= ") + std::to_string(*p_.max_rows);
        failing = std::string("SELECT CASE WHEN ") + within + std::string(" THEN 0 ELSE 1 END FROM ") + sql.from;
        break;
      }
      case Rule::pattern:
      case Rule::range: return usage_error("this rule is not exported");
    }
    const std::string guard_name = sql.table_prefix + std::string("_step_") + std::to_string(sql.step_number) + "_require";
    const std::string message = std::string("step ") + std::to_string(sql.step_number) + " (require " +
                                std::string(kRuleNames[static_cast<size_t>(rule_)]) + ") failed";
    if (sql.dialect == Dialect::spark) {
      out.statements.push_back(std::string("SELECT CASE WHEN (") + failing + std::string(") > 0 THEN raise_error(") + sql.text(message) +
                               ") END AS tamis_require");
      return out;
    }
    const std::string guard = sql.name(guard_name);
    out.statements.push_back(std::string("DROP TABLE IF EXISTS ") + guard);
    out.statements.push_back(std::string("CREATE TABLE ") + guard + " (\n  failing_rows BIGINT,\n  CONSTRAINT " +
                             sql.name(guard_name + "_passes") + " CHECK (failing_rows = 0)\n)");
    out.statements.push_back(std::string("INSERT INTO ") + guard + std::string(" (failing_rows)\n") + failing);
    out.statements.push_back(std::string("DROP TABLE ") + guard);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["rule"] = kRuleNames[static_cast<size_t>(rule_)];
    if (rule_ != Rule::row_count) {
      p["columns"] = nlohmann::ordered_json::array();
      for (const size_t c : columns_) p["columns"].push_back(input_[c].name);
    }
    p["on_fail"] = kOnFailNames[static_cast<size_t>(on_fail_)];
    if (rule_ == Rule::in_set) p["values"] = p_.values_written;
    if (rule_ == Rule::pattern) p["pattern"] = p_.pattern_text;
    if (p_.min) p["min"] = p_.min->json;
    if (p_.max) p["max"] = p_.max->json;
    if (p_.min_rows) p["min"] = *p_.min_rows;
    if (p_.max_rows) p["max"] = *p_.max_rows;
    return p;
  }

 private:
  std::string bounds_text() const {
    if (p_.min && p_.max) return "between " + p_.min->written + " and " + p_.max->written;
    return p_.min ? "at least " + p_.min->written : "at most " + p_.max->written;
  }
  std::string row_bounds_text() const {
    if (p_.min_rows && p_.max_rows) return "between " + std::to_string(*p_.min_rows) + " and " + std::to_string(*p_.max_rows);
    return p_.min_rows ? "at least " + std::to_string(*p_.min_rows) : "at most " + std::to_string(*p_.max_rows);
  }

  // Writes why each failing row fails (the first failing column) into reasons.
  Status check(const Table& batch, RequireState& state, std::vector<std::string>& reasons) const {
    const size_t rows = batch.row_count();
    if (rule_ == Rule::unique) {
      const RowKeys keys(batch, columns_);
      ColumnCursor lines(batch.source_lines());
      for (size_t r = 0; r < rows; ++r, lines.next()) {
        if (keys.has_null(r)) continue;
        const std::string_view key = keys.key(r);
        auto stored = state.index->insert(key, state.index->hash_of(key), static_cast<uint64_t>(lines.number()));
        if (!stored) return stored.take_error();
        if (!stored->second)
          reasons[r] = "the values of " + join_names(input_, columns_) + " repeat line " +
                       std::to_string(stored->first.line);
      }
      return Ok{};
    }
    std::string text;
    for (const size_t c : columns_) {
      const Column& column = batch.column(c);
      const std::string& name = batch.name(c);
      ColumnCursor cell(column);
      ColumnCursor lines(batch.source_lines());
      for (size_t r = 0; r < rows; ++r, cell.next(), lines.next()) {
        if (!reasons[r].empty()) continue;
        if (cell.is_null()) {
          if (rule_ == Rule::not_null) reasons[r] = name + " is NULL";
          continue;
        }
        if (rule_ == Rule::not_null) continue;
        if (rule_ == Rule::range) {
          if (auto why = out_of_range(column, cell.number())) reasons[r] = name + " " + *why;
          continue;
        }
        std::string_view value;
        if (column.type() == Type::text) {
          value = cell.text();
        } else {
          text.clear();
          append_canonical_value(column.type(), column.scale(), cell.number(), text);
          value = text;
        }
        if (rule_ == Rule::in_set) {
          if (!p_.values.count(value)) reasons[r] = name + " " + quoted_value(value) + " is not one of the allowed values";
          continue;
        }
        auto matched = matches(state, value);
        if (!matched) {
          Error e = matched.take_error();
          e.line = static_cast<uint64_t>(lines.number());
          e.message = "(require) the pattern failed on the value of " + name + " at line " + std::to_string(e.line) +
                      ": " + e.message;
          return e;
        }
        if (!*matched) reasons[r] = name + " " + quoted_value(value) + " does not match the pattern " + p_.pattern_text;
      }
    }
    return Ok{};
  }

  std::optional<std::string> out_of_range(const Column& column, int64_t value) const {
    auto shown = [&] {
      std::string s;
      append_canonical_value(column.type(), column.scale(), value, s);
      return s;
    };
    if (column.type() == Type::date) {
      if (p_.min && value < p_.min->days) return shown() + " is before " + p_.min->written;
      if (p_.max && value > p_.max->days) return shown() + " is after " + p_.max->written;
      return std::nullopt;
    }
    const Wide at_bound_scale = Wide{value} * expr::pow10_wide(kBoundScale - column.scale());
    if (p_.min && at_bound_scale < p_.min->scaled) return shown() + " is below the minimum " + p_.min->written;
    if (p_.max && at_bound_scale > p_.max->scaled) return shown() + " is above the maximum " + p_.max->written;
    return std::nullopt;
  }

  Result<bool> matches(RequireState& state, std::string_view value) const {
    UErrorCode status = U_ZERO_ERROR;
    if (!state.matcher) {
      state.matcher.reset(p_.pattern->matcher(status));
      if (U_SUCCESS(status)) state.matcher->setTimeLimit(kPatternTimeLimit, status);
      if (U_SUCCESS(status)) state.matcher->setStackLimit(kPatternStackLimit, status);
      if (U_FAILURE(status)) {
        state.matcher.reset();
        return usage_error("ICU could not start the regular expression: " + std::string(u_errorName(status)));
      }
    }
    UText text = UTEXT_INITIALIZER;
    utext_openUTF8(&text, value.data(), static_cast<int64_t>(value.size()), &status);
    state.matcher->reset(&text);
    const bool whole = state.matcher->matches(status);
    utext_close(&text);
    if (status == U_REGEX_TIME_OUT) return input_error("", 0, "the match took longer than ICU's time limit");
    if (status == U_REGEX_STACK_OVERFLOW)
      return input_error("", 0, "the match needed more backtracking memory than ICU's stack limit");
    if (U_FAILURE(status)) return input_error("", 0, std::string("ICU reported ") + u_errorName(status));
    return whole;
  }

  Rule rule_;
  OnFail on_fail_;
  std::vector<size_t> columns_;
  RuleParameters p_;
  Schema input_;
};

Result<Bound> read_bound(StepParams& params, std::string_view key, bool dates) {
  const nlohmann::json& v = *params.raw(key);
  Bound b;
  b.json = nlohmann::ordered_json::parse(v.dump());
  if (dates) {
    static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
    const auto days = v.is_string() && v.get<std::string>().size() == 10 ? iso.parse(v.get<std::string>()) : std::nullopt;
    if (!days) return params.error(key, "expected an ISO 8601 date such as \"2024-03-09\" for date columns, found " + v.dump());
    b.days = *days;
    b.written = v.get<std::string>();
    return b;
  }
  const auto scaled = v.is_number() ? exact_number(v.dump()) : std::nullopt;
  if (!scaled)
    return params.error(key, "expected a number (at most 20 digits before the point and 18 after) for number "
                             "columns, found " + v.dump());
  b.scaled = *scaled;
  b.written = v.dump();
  return b;
}

}  // namespace

Result<std::unique_ptr<Step>> parse_require(StepParams& params) {
  auto rule_name = params.choice("rule", {"not_null", "unique", "in_set", "pattern", "range", "row_count"}, std::nullopt);
  if (!rule_name) return rule_name.take_error();
  Rule rule = Rule::not_null;
  for (size_t i = 0; i < std::size(kRuleNames); ++i)
    if (kRuleNames[i] == *rule_name) rule = static_cast<Rule>(i);
  auto on_fail_name = params.choice("on_fail", {"stop", "reject", "warn"}, "stop");
  if (!on_fail_name) return on_fail_name.take_error();
  const OnFail on_fail = *on_fail_name == "stop" ? OnFail::stop : *on_fail_name == "reject" ? OnFail::reject : OnFail::warn;
  std::vector<size_t> columns;
  if (rule == Rule::row_count) {
    if (params.raw("columns")) return params.error("columns", "row_count counts rows; it takes no columns");
    if (on_fail == OnFail::reject)
      return params.error("on_fail", "row_count cannot reject single rows; use stop or warn");
  } else {
    auto listed = params.columns("columns");
    if (!listed) return listed.take_error();
    columns = std::move(*listed);
  }
  RuleParameters rp;
  auto refuse = [&](std::string_view key) -> Status {
    if (params.raw(key)) return params.error(key, "is not a parameter of the rule " + *rule_name);
    return Ok{};
  };
  if (rule != Rule::in_set)
    if (Status s = refuse("values"); !s) return s.take_error();
  if (rule != Rule::pattern)
    if (Status s = refuse("pattern"); !s) return s.take_error();
  if (rule != Rule::range && rule != Rule::row_count) {
    if (Status s = refuse("min"); !s) return s.take_error();
    if (Status s = refuse("max"); !s) return s.take_error();
  }
  switch (rule) {
    case Rule::not_null:
    case Rule::unique: break;
    case Rule::in_set: {
      auto values = params.text_list("values");
      if (!values) return values.take_error();
      if (values->empty()) return params.error("values", "must list at least one allowed value");
      rp.values_written = *values;
      rp.values.insert(values->begin(), values->end());
      break;
    }
    case Rule::pattern: {
      auto text = params.text("pattern");
      if (!text) return text.take_error();
      if (text->empty()) return params.error("pattern", "must not be empty");
      if (utf8::first_invalid(*text) != std::string_view::npos) return params.error("pattern", "is not valid UTF-8");
      UParseError where{};
      UErrorCode status = U_ZERO_ERROR;
      rp.pattern.reset(icu::RegexPattern::compile(icu::UnicodeString::fromUTF8(*text),
                                                     UREGEX_ERROR_ON_UNKNOWN_ESCAPES, where, status));
      if (U_FAILURE(status))
        return params.error("pattern", std::string("not a valid ICU regular expression (") + u_errorName(status) +
                                           (where.offset >= 0 ? ") at character " + std::to_string(where.offset) : ")"));
      rp.pattern_text = *text;
      break;
    }
    case Rule::range: {
      bool dates = false, numbers = false;
      for (const size_t c : columns) {
        const Type t = params.input()[c].type;
        dates |= t == Type::date;
        numbers |= t == Type::integer || t == Type::decimal;
        if (t == Type::text || t == Type::boolean)
          return params.error("columns", "'" + params.input()[c].name + "' is " + std::string(type_name(t)) +
                                             "; range checks integer, decimal or date columns");
      }
      if (dates && numbers) return params.error("columns", "mixes date and number columns; use one require for each");
      if (!params.raw("min") && !params.raw("max")) return params.error("min", "range needs min, max or both");
      for (const std::string_view key : {"min", "max"}) {
        if (!params.raw(key)) continue;
        auto bound = read_bound(params, key, dates);
        if (!bound) return bound.take_error();
        (key == "min" ? rp.min : rp.max) = std::move(*bound);
      }
      if (rp.min && rp.max &&
          (dates ? rp.min->days > rp.max->days : rp.min->scaled > rp.max->scaled))
        return params.error("max", "is below min");
      break;
    }
    case Rule::row_count: {
      for (const std::string_view key : {"min", "max"}) {
        if (!params.raw(key)) continue;
        const nlohmann::json& v = *params.raw(key);
        if (!v.is_number_integer() || v.get<int64_t>() < 0)
          return params.error(key, "expected a whole number of rows (0 or more), found " + v.dump());
        (key == "min" ? rp.min_rows : rp.max_rows) = v.get<int64_t>();
      }
      if (!rp.min_rows && !rp.max_rows) return params.error("min", "row_count needs min, max or both");
      if (rp.min_rows && rp.max_rows && *rp.min_rows > *rp.max_rows)
        return params.error("max", "is below min");
      break;
    }
  }
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new Require(rule, on_fail, std::move(columns), std::move(rp), params.input()));
}

}  // namespace tamis
