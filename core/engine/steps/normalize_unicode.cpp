#include "steps/normalize_unicode.hpp"

#include <unicode/bytestream.h>
#include <unicode/normalizer2.h>
#include <unicode/uchar.h>

#include "sql/sql_step.hpp"
#include "steps/cell_map.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

// Each ASCII letter followed by a combining mark of U+0300-U+036F that NFC
// composes into one letter of U+00C0-U+017F, with that letter.
const std::vector<std::pair<std::string, std::string>>& latin_compositions() {
  static const std::vector<std::pair<std::string, std::string>> pairs = [] {
    std::vector<std::pair<std::string, std::string>> out;
    UErrorCode status = U_ZERO_ERROR;
    const icu::Normalizer2* nfc = icu::Normalizer2::getNFCInstance(status);
    if (U_FAILURE(status)) return out;
    for (char32_t base = U'A'; base <= U'z'; ++base) {
      if (base > U'Z' && base < U'a') continue;
      for (char32_t mark = 0x300; mark <= 0x36F; ++mark) {
        const UChar32 composed = nfc->composePair(static_cast<UChar32>(base), static_cast<UChar32>(mark));
        if (composed < 0xC0 || composed > 0x17F) continue;
        std::string from, to;
        utf8::append(from, base);
        utf8::append(from, mark);
        utf8::append(to, static_cast<char32_t>(composed));
        out.emplace_back(std::move(from), std::move(to));
      }
    }
    return out;
  }();
  return pairs;
}

class NormalizeUnicode final : public Step {
 public:
  // Normalizer2 instances are ICU singletons, immutable and thread-safe.
  NormalizeUnicode(std::vector<size_t> columns, bool compatibility, bool strip_accents,
                   const icu::Normalizer2* compose, const icu::Normalizer2* decompose, Schema input)
      : columns_(std::move(columns)),
        compatibility_(compatibility),
        strip_accents_(strip_accents),
        compose_(compose),
        decompose_(decompose),
        input_(std::move(input)) {}

  std::string_view op() const override { return "normalize_unicode"; }

  std::string describe() const override {
    return std::string("Normalize ") + join_names(input_, columns_) + " to Unicode " + form() +
           (strip_accents_ ? ", removing accents and other nonspacing marks." : ".");
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    UErrorCode failure = U_ZERO_ERROR;
    std::string decomposed;
    Table out = map_text_cells(batch, columns_, change, [&](std::string_view v, std::string& result) {
      // Every ASCII character is its own NFC, NFKC and NFD, and none is a mark.
      if (U_FAILURE(failure) || is_ascii(v)) return CellResult::unchanged;
      UErrorCode status = U_ZERO_ERROR;
      const icu::StringPiece piece(v.data(), static_cast<int32_t>(v.size()));
      if (!strip_accents_) {
        if (compose_->isNormalizedUTF8(piece, status) && U_SUCCESS(status)) return CellResult::unchanged;
        icu::StringByteSink<std::string> sink(&result, static_cast<int32_t>(v.size()));
        compose_->normalizeUTF8(0, piece, sink, nullptr, status);
      } else {
        decomposed.clear();
        icu::StringByteSink<std::string> decomposed_sink(&decomposed, static_cast<int32_t>(v.size() * 2));
        decompose_->normalizeUTF8(0, piece, decomposed_sink, nullptr, status);
        std::string unmarked;
        unmarked.reserve(decomposed.size());
        const std::string_view d = decomposed;
        for (size_t i = 0; i < d.size();) {
          const size_t start = i;
          const char32_t c = utf8::next(d, i);
          if (u_charType(static_cast<UChar32>(c)) != U_NON_SPACING_MARK) unmarked.append(d.substr(start, i - start));
        }
        icu::StringByteSink<std::string> sink(&result, static_cast<int32_t>(unmarked.size()));
        compose_->normalizeUTF8(0, unmarked, sink, nullptr, status);
      }
      if (U_FAILURE(status)) {
        failure = status;
        return CellResult::unchanged;
      }
      return result == v ? CellResult::unchanged : CellResult::replaced;
    });
    if (U_FAILURE(failure))
      return usage_error(std::string("(normalize_unicode) ICU could not normalize a value: ") + u_errorName(failure));
    return out;
  }

  // PostgreSQL's normalize(x, NFC|NFKC) and DuckDB's nfc_normalize (NFC
  // only) implement the same standard; no dialect strips exactly the Mn
  // marks (DuckDB's strip_accents uses other mark classes). MySQL, SQLite
  // and Spark have no normalization: their nearest form composes, by nested
  // REPLACE, an ASCII letter followed by one combining mark of U+0300-U+036F
  // where NFC makes one letter of Latin-1 or Latin Extended-A of them
  // (Rivie + U+0300 + re -> Rivière); DuckDB's nearest NFKC is its NFC.
  SqlSupport sql_support(Dialect dialect) const override {
    if (strip_accents_) return SqlSupport::unsupported;
    switch (dialect) {
      case Dialect::postgres: return SqlSupport::exact;
      case Dialect::duckdb: return compatibility_ ? SqlSupport::approximate : SqlSupport::exact;
      case Dialect::mysql:
      case Dialect::sqlite:
      case Dialect::spark: return compatibility_ ? SqlSupport::unsupported : SqlSupport::approximate;
    }
    return SqlSupport::unsupported;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    if (strip_accents_) return usage_error("strip_accents is not exported");
    SqlStepText out;
    std::vector<std::pair<size_t, std::string>> replaced;
    std::string from, with;
    if (sql.dialect == Dialect::postgres || sql.dialect == Dialect::duckdb) {
      for (const size_t c : columns_)
        replaced.emplace_back(c, sql.dialect == Dialect::postgres
                                     ? std::string("normalize(") + sql.column(c) + std::string(", ") + form() + ")"
                                     : std::string("nfc_normalize(") + sql.column(c) + ")");
    } else {
      std::vector<std::string> inputs;
      for (const size_t c : columns_) inputs.push_back(sql.column(c));
      const ReplacedValues composed = replaced_values(sql, inputs, latin_compositions(), "tamis_composed");
      for (size_t k = 0; k < columns_.size(); ++k) replaced.emplace_back(columns_[k], composed.results[k]);
      from = composed.from;
      with = composed.with;
    }
    if (sql.dialect == Dialect::duckdb && compatibility_)
      out.approximation = "DuckDB has NFC only, so compatibility characters (ligatures, full-width forms) stay";
    else if (sql.dialect != Dialect::postgres && sql.dialect != Dialect::duckdb)
      out.approximation = "only an ASCII letter followed by one combining mark is composed, into a letter of "
                          "U+00C0-U+017F; other text is left as it is";
    out.select = with + sql.select_replacing(replaced, from);
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["columns"] = column_list(input_, columns_);
    p["form"] = form();
    p["strip_accents"] = strip_accents_;
    return p;
  }

 private:
  const char* form() const { return compatibility_ ? "NFKC" : "NFC"; }

  std::vector<size_t> columns_;
  bool compatibility_;
  bool strip_accents_;
  const icu::Normalizer2* compose_;
  const icu::Normalizer2* decompose_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_normalize_unicode(StepParams& params) {
  auto columns = text_columns(params, "columns");
  if (!columns) return columns.take_error();
  auto form = params.choice("form", {"NFC", "NFKC"}, "NFC");
  if (!form) return form.take_error();
  auto strip_accents = params.boolean_or("strip_accents", false);
  if (!strip_accents) return strip_accents.take_error();
  if (Status s = params.finish(); !s) return s.take_error();
  const bool compatibility = *form == "NFKC";
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* compose =
      compatibility ? icu::Normalizer2::getNFKCInstance(status) : icu::Normalizer2::getNFCInstance(status);
  const icu::Normalizer2* decompose =
      compatibility ? icu::Normalizer2::getNFKDInstance(status) : icu::Normalizer2::getNFDInstance(status);
  if (U_FAILURE(status))
    return params.error("form", std::string("ICU has no data for ") + *form + ": " + u_errorName(status));
  return std::unique_ptr<Step>(new NormalizeUnicode(std::move(*columns), compatibility, *strip_accents, compose,
                                                    decompose, params.input()));
}

}  // namespace tamis
