#include "steps/to_null.hpp"

#include <set>

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

class ToNull final : public Step {
 public:
  ToNull(std::vector<size_t> columns, std::vector<std::string> values, bool blank, Schema input)
      : columns_(std::move(columns)),
        values_(std::move(values)),
        sentinels_(values_.begin(), values_.end()),
        blank_(blank),
        input_(std::move(input)) {}

  std::string_view op() const override { return "to_null"; }

  std::string describe() const override {
    std::string listed;
    for (size_t i = 0; i < values_.size(); ++i) {
      if (i) listed += i + 1 == values_.size() ? " or " : ", ";
      listed += "\"" + values_[i] + "\"";
    }
    std::string when = listed.empty() ? "" : "they are " + listed;
    if (blank_) when += (when.empty() ? "" : ", and when ") + std::string("they are empty or only white space");
    return "Set values of " + join_names(input_, columns_) + " to NULL when " + when + ".";
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    return map_text_cells(batch, columns_, change, [&](std::string_view v, std::string&) {
      if ((blank_ && utf8::is_blank(v)) || is_sentinel(v)) return CellResult::null;
      return CellResult::unchanged;
    });
  }

  // CASE WHEN x IN (...) THEN NULL, compared byte for byte; blank is TRIM
  // with the White_Space characters listed (a regular expression in MySQL,
  // whose TRIM removes one string, not a set) leaving ''.
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    std::vector<std::pair<size_t, std::string>> replaced;
    for (const size_t c : columns_) {
      std::vector<std::string> tests;
      if (!values_.empty()) {
        std::string listed;
        for (const std::string& v : values_)
          listed += (listed.empty() ? "" : ", ") + sql::exact_key(sql.dialect, sql.text(v), Type::text);
        tests.push_back(sql.key(c) + std::string(" IN (") + listed + ")");
      }
      if (blank_)
        tests.push_back(sql::trim_characters(sql.dialect, sql.column(c), sql::white_space_characters(), "both") +
                        " = ''");
      std::string when;
      for (const std::string& t : tests) when += (when.empty() ? "" : " OR ") + t;
      replaced.emplace_back(c, std::string("CASE WHEN ") + when + std::string(" THEN NULL ELSE ") + sql.column(c) + " END");
    }
    SqlStepText out;
    out.select = sql.select_replacing(replaced);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = column_list(input_, columns_);
    p["values"] = values_;
    p["blank"] = blank_;
    return p;
  }

 private:
  // Recipes usually list a handful of sentinels, which a plain scan checks
  // faster than a tree lookup; long lists use the set.
  bool is_sentinel(std::string_view v) const {
    if (values_.size() > 8) return sentinels_.count(v) > 0;
    for (const std::string& s : values_)
      if (v == s) return true;
    return false;
  }

  std::vector<size_t> columns_;
  std::vector<std::string> values_;
  std::set<std::string, std::less<>> sentinels_;
  bool blank_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_to_null(StepParams& params) {
  auto columns = text_columns(params, "columns");
  if (!columns) return columns.take_error();
  auto values = params.text_list_or("values", {});
  if (!values) return values.take_error();
  for (const std::string& v : *values)
    if (utf8::first_invalid(v) != std::string_view::npos) return params.error("values", "must be valid UTF-8");
  auto blank = params.boolean_or("blank", false);
  if (!blank) return blank.take_error();
  if (values->empty() && !*blank)
    return params.error("values", "lists nothing and blank is false, so the step would do nothing "
                                  "(list sentinel values such as \"n/a\", or set \"blank\": true)");
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new ToNull(std::move(*columns), std::move(*values), *blank, params.input()));
}

}  // namespace tamis
