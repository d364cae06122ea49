#include "expr/text_functions.hpp"

#include <unicode/casemap.h>

#include "utf8.hpp"

namespace tamis::expr {

namespace {

bool is_ascii(std::string_view s) {
  for (const char ch : s)
    if (static_cast<unsigned char>(ch) >= 0x80) return false;
  return true;
}

template <class Map>
bool append_mapped(std::string_view value, std::string& out, Map map) {
  const size_t at = out.size();
  // Full case mapping can grow a value (ß -> SS); the first guess leaves room
  // for that and ICU says how much it needs when a value grows more.
  out.resize(at + value.size() + value.size() / 2 + 8);
  UErrorCode status = U_ZERO_ERROR;
  int32_t length = map(value.data(), static_cast<int32_t>(value.size()), out.data() + at,
                       static_cast<int32_t>(out.size() - at), status);
  if (status == U_BUFFER_OVERFLOW_ERROR) {
    out.resize(at + static_cast<size_t>(length));
    status = U_ZERO_ERROR;
    length = map(value.data(), static_cast<int32_t>(value.size()), out.data() + at, length, status);
  }
  if (U_FAILURE(status)) {
    out.resize(at);
    return false;
  }
  out.resize(at + static_cast<size_t>(length));
  return true;
}

}  // namespace

bool append_upper(std::string_view value, std::string& out) {
  if (is_ascii(value)) {
    for (const char ch : value) out += (ch >= 'a' && ch <= 'z') ? static_cast<char>(ch - 'a' + 'A') : ch;
    return true;
  }
  return append_mapped(value, out, [](const char* src, int32_t n, char* dest, int32_t cap, UErrorCode& status) {
    return icu::CaseMap::utf8ToUpper("", 0, src, n, dest, cap, nullptr, status);
  });
}

bool append_lower(std::string_view value, std::string& out) {
  if (is_ascii(value)) {
    for (const char ch : value) out += (ch >= 'A' && ch <= 'Z') ? static_cast<char>(ch - 'A' + 'a') : ch;
    return true;
  }
  return append_mapped(value, out, [](const char* src, int32_t n, char* dest, int32_t cap, UErrorCode& status) {
    return icu::CaseMap::utf8ToLower("", 0, src, n, dest, cap, nullptr, status);
  });
}

std::string_view trim_characters(std::string_view value, std::u32string_view characters, bool leading,
                                 bool trailing) {
  size_t begin = 0, end = value.size();
  if (leading)
    while (begin < end) {
      size_t i = begin;
      if (characters.find(utf8::next(value, i)) == std::u32string_view::npos) break;
      begin = i;
    }
  if (trailing)
    while (end > begin) {
      size_t i = end;
      if (characters.find(utf8::previous(value, i)) == std::u32string_view::npos) break;
      end = i;
    }
  return value.substr(begin, end - begin);
}

std::string_view substring(std::string_view value, int64_t start, bool has_length, int64_t length) {
  // Positions [first, last) in code points, 1-based, clipped to the value.
  const int64_t first = start < 1 ? 1 : start;
  int64_t last = INT64_MAX;
  if (has_length) last = start > INT64_MAX - length ? INT64_MAX : start + length;
  if (last <= first) return {};
  size_t i = 0;
  int64_t position = 1;
  while (position < first && i < value.size()) {
    utf8::next(value, i);
    ++position;
  }
  const size_t begin = i;
  while (position < last && i < value.size()) {
    utf8::next(value, i);
    ++position;
  }
  return value.substr(begin, i - begin);
}

}  // namespace tamis::expr
