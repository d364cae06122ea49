#include "steps/text_step_support.hpp"

#include <new>

#include "utf8.hpp"

namespace tamis {

Result<std::vector<size_t>> text_columns(StepParams& params, std::string_view key) {
  auto columns = params.columns(key);
  if (!columns) return columns.take_error();
  for (const size_t c : *columns)
    if (params.input()[c].type != Type::text)
      return params.error(key, "'" + params.input()[c].name + "' is " +
                                   std::string(type_name(params.input()[c].type)) + ", and this step works on text");
  return columns;
}

Result<size_t> text_column(StepParams& params, std::string_view key) {
  auto column = params.column(key);
  if (!column) return column.take_error();
  if (params.input()[*column].type != Type::text)
    return params.error(key, "'" + params.input()[*column].name + "' is " +
                                 std::string(type_name(params.input()[*column].type)) +
                                 ", and this step works on text");
  return column;
}

Result<std::string> utf8_text(StepParams& params, std::string_view key, bool allow_empty) {
  auto text = params.text(key);
  if (!text) return text.take_error();
  if (!allow_empty && text->empty()) return params.error(key, "must not be empty");
  if (utf8::first_invalid(*text) != std::string_view::npos) return params.error(key, "is not valid UTF-8");
  return text;
}

nlohmann::ordered_json column_list(const Schema& schema, const std::vector<size_t>& columns) {
  auto list = nlohmann::ordered_json::array();
  for (const size_t c : columns) list.push_back(schema[c].name);
  return list;
}

std::string fold_case(std::string_view value) {
  std::string out(value);
  if (is_ascii(value)) {
    // CaseFolding.txt folds exactly A-Z among ASCII characters, to a-z.
    for (char& ch : out)
      if (ch >= 'A' && ch <= 'Z') ch = static_cast<char>(ch - 'A' + 'a');
    return out;
  }
  static const CaseMapPtr root = [] {
    UErrorCode status = U_ZERO_ERROR;
    return CaseMapPtr(ucasemap_open("", U_FOLD_CASE_DEFAULT, &status));
  }();
  // Cells and parameters are valid UTF-8 (checked on the way in), so ICU can
  // only fail here for want of memory.
  const bool folded = icu_utf8_into(out, value.size() + 16, [&](char* dest, int32_t capacity, UErrorCode* status) {
    return ucasemap_utf8FoldCase(root.get(), dest, capacity, value.data(), static_cast<int32_t>(value.size()),
                                 status);
  });
  if (!folded) throw std::bad_alloc();
  return out;
}

}  // namespace tamis
