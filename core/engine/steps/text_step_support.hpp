// What the text steps (collapse_spaces, change_case, normalize_unicode,
// replace_text, map_values, to_null, split_column) share: reading columns
// that must hold text, parameters that must be valid UTF-8, writing column
// lists back into parameters, and the ICU handles they keep.
#pragma once

#include <unicode/ucasemap.h>

#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "steps/step_params.hpp"

namespace tamis {

// The listed columns ("*" = all); each must be a text column.
Result<std::vector<size_t>> text_columns(StepParams& params, std::string_view key);
// One column by name; it must be a text column.
Result<size_t> text_column(StepParams& params, std::string_view key);
// A text parameter that must be valid UTF-8 (allow_empty: whether "" is allowed).
Result<std::string> utf8_text(StepParams& params, std::string_view key, bool allow_empty);

// Column names as the JSON list a recipe writes.
nlohmann::ordered_json column_list(const Schema& schema, const std::vector<size_t>& columns);

inline bool is_ascii(std::string_view s) {
  for (const char ch : s)
    if (static_cast<unsigned char>(ch) >= 0x80) return false;
  return true;
}

struct CaseMapCloser {
  void operator()(UCaseMap* map) const { ucasemap_close(map); }
};
using CaseMapPtr = std::unique_ptr<UCaseMap, CaseMapCloser>;

// Runs one of ICU's ucasemap_utf8* functions into out, growing it once if
// the first guess was too small. Returns false on an ICU error.
template <class F>
bool icu_utf8_into(std::string& out, size_t guess, F&& map) {
  out.resize(guess);
  UErrorCode status = U_ZERO_ERROR;
  int32_t length = map(out.data(), static_cast<int32_t>(out.size()), &status);
  if (status == U_BUFFER_OVERFLOW_ERROR) {
    out.resize(static_cast<size_t>(length));
    status = U_ZERO_ERROR;
    length = map(out.data(), static_cast<int32_t>(out.size()), &status);
  }
  if (U_FAILURE(status)) return false;
  out.resize(static_cast<size_t>(length));
  return true;
}

// Unicode full case folding (CaseFolding.txt, status C and F) with ICU,
// locale-independent; ASCII values take a fast path.
std::string fold_case(std::string_view value);

}  // namespace tamis
