#include "steps/change_case.hpp"

#include <unicode/ubrk.h>
#include <unicode/uloc.h>

#include <cstring>

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "steps/text_step_support.hpp"

namespace tamis {

namespace {

enum class Target : uint8_t { lower, upper, title };

// The case rules that differ from the locale-independent ones on ASCII
// letters are the Turkic ones (I/i, ICU ucase.cpp); Lithuanian and Greek
// rules only touch other letters, and Dutch only title case (IJ).
bool ascii_maps_as_root(const std::string& icu_locale) {
  char language[ULOC_LANG_CAPACITY] = "";
  UErrorCode status = U_ZERO_ERROR;
  uloc_getLanguage(icu_locale.c_str(), language, sizeof language, &status);
  return std::strcmp(language, "tr") != 0 && std::strcmp(language, "az") != 0;
}

class ChangeCase final : public Step {
 public:
  ChangeCase(std::vector<size_t> columns, Target to, std::string locale_tag, std::string icu_locale,
             CaseMapPtr case_map, Schema input)
      : columns_(std::move(columns)),
        to_(to),
        locale_tag_(std::move(locale_tag)),
        icu_locale_(std::move(icu_locale)),
        case_map_(std::move(case_map)),
        ascii_fast_path_(to != Target::title && ascii_maps_as_root(icu_locale_)),
        input_(std::move(input)) {}

  std::string_view op() const override { return "change_case"; }

  std::string describe() const override {
    const std::string what = to_ == Target::lower   ? "lower case"
                             : to_ == Target::upper ? "upper case"
                                                    : "title case (each word capitalised, the rest lower case)";
    const std::string rules = locale_tag_.empty() ? "" : ", with the case rules of " + locale_tag_;
    return "Convert " + join_names(input_, columns_) + " to " + what + rules + ".";
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    // Title casing moves a break iterator inside its UCaseMap, so each call
    // gets its own map; lower and upper casing only read the shared one.
    CaseMapPtr title_map;
    if (to_ == Target::title) {
      auto map = title_case_map(icu_locale_);
      if (!map) return map.take_error();
      title_map = std::move(*map);
    }
    bool failed = false;
    Table out = map_text_cells(batch, columns_, change, [&](std::string_view v, std::string& result) {
      if (failed) return CellResult::unchanged;
      if (ascii_fast_path_ && is_ascii(v)) {
        result.assign(v);
        const char from = to_ == Target::lower ? 'A' : 'a';
        const char to = to_ == Target::lower ? 'a' : 'A';
        for (char& ch : result)
          if (ch >= from && ch <= from + 25) ch = static_cast<char>(ch - from + to);
        return result == v ? CellResult::unchanged : CellResult::replaced;
      }
      const bool ok = icu_utf8_into(result, v.size() + 16, [&](char* dest, int32_t capacity, UErrorCode* status) {
        const auto length = static_cast<int32_t>(v.size());
        switch (to_) {
          case Target::lower: return ucasemap_utf8ToLower(case_map_.get(), dest, capacity, v.data(), length, status);
          case Target::upper: return ucasemap_utf8ToUpper(case_map_.get(), dest, capacity, v.data(), length, status);
          case Target::title: return ucasemap_utf8ToTitle(title_map.get(), dest, capacity, v.data(), length, status);
        }
        return 0;
      });
      if (!ok) {
        failed = true;
        return CellResult::unchanged;
      }
      return result == v ? CellResult::unchanged : CellResult::replaced;
    });
    if (failed) return usage_error("(change_case) ICU could not map the case of a value");
    return out;
  }

  // Engines map case by their own tables: SQLite only ASCII, DuckDB upper
  // 'ß' to 'ẞ', PostgreSQL and MySQL per code point without the final-sigma
  // and multi-letter rules of SpecialCasing.txt. Title case exists as
  // initcap in PostgreSQL and Spark, with other word rules.
  SqlSupport sql_support(Dialect dialect) const override {
    if (to_ != Target::title) return SqlSupport::approximate;
    return dialect == Dialect::postgres || dialect == Dialect::spark ? SqlSupport::approximate
                                                                    : SqlSupport::unsupported;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const char* function = to_ == Target::lower ? "LOWER" : to_ == Target::upper ? "UPPER" : "initcap";
    std::vector<std::pair<size_t, std::string>> replaced;
    for (const size_t c : columns_) replaced.emplace_back(c, std::string(function) + std::string("(") + sql.column(c) + ")");
    SqlStepText out;
    out.select = sql.select_replacing(replaced);
    out.approximation = to_ == Target::title
                            ? "initcap has its own word rules and maps case letter by letter"
                            : "the engine's case tables replace ICU's full case mapping (e.g. for ß, final sigma)";
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = column_list(input_, columns_);
    p["to"] = to_ == Target::lower ? "lower" : to_ == Target::upper ? "upper" : "title";
    if (!locale_tag_.empty()) p["locale"] = locale_tag_;
    return p;
  }

  static Result<CaseMapPtr> title_case_map(const std::string& icu_locale) {
    UErrorCode status = U_ZERO_ERROR;
    CaseMapPtr map(ucasemap_open(icu_locale.c_str(), 0, &status));
    if (U_SUCCESS(status)) ucasemap_setBreakIterator(map.get(), ubrk_open(UBRK_WORD, "", nullptr, 0, &status), &status);
    if (U_FAILURE(status))
      return usage_error(std::string("(change_case) ICU could not load the word break rules for title case: ") +
                         u_errorName(status));
    return map;
  }

 private:
  std::vector<size_t> columns_;
  Target to_;
  std::string locale_tag_;  // as written in the recipe; empty = locale-independent
  std::string icu_locale_;  // ICU's form of locale_tag_ ("" = root)
  CaseMapPtr case_map_;
  bool ascii_fast_path_;
  Schema input_;
};

// A BCP 47 tag whose language ICU knows, converted to ICU's locale ID.
Result<std::string> icu_locale_of(StepParams& params, const std::string& tag) {
  if (tag.empty()) return params.error("locale", "must not be empty (leave it out for locale-independent case mapping)");
  char id[ULOC_FULLNAME_CAPACITY] = "";
  int32_t parsed = 0;
  UErrorCode status = U_ZERO_ERROR;
  uloc_forLanguageTag(tag.c_str(), id, sizeof id, &parsed, &status);
  if (U_FAILURE(status) || status == U_STRING_NOT_TERMINATED_WARNING || parsed != static_cast<int32_t>(tag.size()))
    return params.error("locale", "'" + tag + "' is not a BCP 47 language tag (e.g. \"tr\", \"de-CH\")");
  char language[ULOC_LANG_CAPACITY] = "";
  uloc_getLanguage(id, language, sizeof language, &status);
  bool known = false;
  for (const char* const* code = uloc_getISOLanguages(); *code && !known; ++code) known = std::strcmp(*code, language) == 0;
  if (U_FAILURE(status) || !known)
    return params.error("locale", "'" + tag + "' does not start with a known ISO 639 language code");
  return std::string(id);
}

}  // namespace

Result<std::unique_ptr<Step>> parse_change_case(StepParams& params) {
  auto columns = text_columns(params, "columns");
  if (!columns) return columns.take_error();
  auto to = params.choice("to", {"lower", "upper", "title"}, std::nullopt);
  if (!to) return to.take_error();
  std::string tag, icu_locale;
  if (params.raw("locale")) {
    auto text = params.text("locale");
    if (!text) return text.take_error();
    auto id = icu_locale_of(params, *text);
    if (!id) return id.take_error();
    tag = std::move(*text);
    icu_locale = std::move(*id);
  }
  if (Status s = params.finish(); !s) return s.take_error();
  const Target target = *to == "lower" ? Target::lower : *to == "upper" ? Target::upper : Target::title;
  UErrorCode status = U_ZERO_ERROR;
  CaseMapPtr case_map(ucasemap_open(icu_locale.c_str(), 0, &status));
  if (U_FAILURE(status)) return params.error("locale", std::string("ICU could not open it: ") + u_errorName(status));
  if (target == Target::title)
    if (auto probe = ChangeCase::title_case_map(icu_locale); !probe) return probe.take_error();
  return std::unique_ptr<Step>(
      new ChangeCase(std::move(*columns), target, std::move(tag), std::move(icu_locale), std::move(case_map),
                     params.input()));
}

}  // namespace tamis
