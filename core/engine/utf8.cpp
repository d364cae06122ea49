#include "utf8.hpp"

#include <unicode/uchar.h>

#include <string>

namespace tamis::utf8 {

int sequence_length(const unsigned char* p, const unsigned char* end) {
  const unsigned char b0 = p[0];
  if (b0 < 0x80) return 1;
  int len;
  unsigned char lo = 0x80, hi = 0xBF;  // allowed range of the second byte
  if (b0 >= 0xC2 && b0 <= 0xDF) len = 2;
  else if (b0 == 0xE0) len = 3, lo = 0xA0;
  else if (b0 >= 0xE1 && b0 <= 0xEC) len = 3;
  else if (b0 == 0xED) len = 3, hi = 0x9F;  // no UTF-16 surrogates
  else if (b0 >= 0xEE && b0 <= 0xEF) len = 3;
  else if (b0 == 0xF0) len = 4, lo = 0x90;
  else if (b0 >= 0xF1 && b0 <= 0xF3) len = 4;
  else if (b0 == 0xF4) len = 4, hi = 0x8F;  // nothing above U+10FFFF
  else return 0;
  for (int k = 1; k < len; ++k) {
    if (p + k >= end) return -1;
    const unsigned char b = p[k];
    if (k == 1 ? (b < lo || b > hi) : (b < 0x80 || b > 0xBF)) return 0;
  }
  return len;
}

size_t first_invalid(std::string_view s, bool allow_truncated_tail) {
  const auto* begin = reinterpret_cast<const unsigned char*>(s.data());
  const auto* end = begin + s.size();
  const auto* p = begin;
  while (p < end) {
    if (*p < 0x80) {
      ++p;
      continue;
    }
    const int len = sequence_length(p, end);
    if (len > 0) {
      p += len;
      continue;
    }
    if (len < 0 && allow_truncated_tail) return std::string_view::npos;
    return static_cast<size_t>(p - begin);
  }
  return std::string_view::npos;
}

char32_t next(std::string_view s, size_t& i) {
  const auto b0 = static_cast<unsigned char>(s[i]);
  if (b0 < 0x80) {
    ++i;
    return b0;
  }
  const int len = b0 >= 0xF0 ? 4 : b0 >= 0xE0 ? 3 : 2;
  char32_t c = b0 & (0x7F >> len);
  for (int k = 1; k < len; ++k) c = (c << 6) | (static_cast<unsigned char>(s[i + k]) & 0x3F);
  i += len;
  return c;
}

char32_t previous(std::string_view s, size_t& end) {
  size_t start = end - 1;
  while (start > 0 && (static_cast<unsigned char>(s[start]) & 0xC0) == 0x80) --start;
  size_t i = start;
  const char32_t c = next(s, i);
  end = start;
  return c;
}

size_t code_point_count(std::string_view s) {
  size_t n = 0;
  for (const char ch : s) n += (static_cast<unsigned char>(ch) & 0xC0) != 0x80;
  return n;
}

bool is_white_space(char32_t c) {
  if (c < 0x80) return c == ' ' || (c >= 0x09 && c <= 0x0D);
  return u_isUWhiteSpace(static_cast<UChar32>(c));
}

bool is_punctuation(char32_t c) {
  // ASCII members of general category P (UnicodeData.txt); $ + < = > ^ ` | ~ are symbols (S).
  constexpr std::string_view kAsciiPunctuation = "!\"#%&'()*,-./:;?@[\\]_{}";
  if (c < 0x80) return kAsciiPunctuation.find(static_cast<char>(c)) != std::string_view::npos;
  return u_ispunct(static_cast<UChar32>(c));
}

bool starts_with_white_space(std::string_view s) {
  if (s.empty()) return false;
  size_t i = 0;
  return is_white_space(next(s, i));
}

bool ends_with_white_space(std::string_view s) {
  if (s.empty()) return false;
  size_t end = s.size();
  return is_white_space(previous(s, end));
}

bool is_blank(std::string_view s) {
  size_t i = 0;
  while (i < s.size())
    if (!is_white_space(next(s, i))) return false;
  return true;
}

std::string_view trim_white_space(std::string_view s) {
  size_t begin = 0, end = s.size();
  while (begin < end) {
    size_t i = begin;
    if (!is_white_space(next(s, i))) break;
    begin = i;
  }
  while (end > begin) {
    size_t i = end;
    if (!is_white_space(previous(s, i))) break;
    end = i;
  }
  return s.substr(begin, end - begin);
}

bool equals_ascii_ignoring_case(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  const auto lower = [](char c) { return c >= 'A' && c <= 'Z' ? static_cast<char>(c - 'A' + 'a') : c; };
  for (size_t i = 0; i < a.size(); ++i)
    if (lower(a[i]) != lower(b[i])) return false;
  return true;
}

void append(std::string& out, char32_t c) {
  if (c < 0x80) {
    out += static_cast<char>(c);
  } else if (c < 0x800) {
    out += static_cast<char>(0xC0 | (c >> 6));
    out += static_cast<char>(0x80 | (c & 0x3F));
  } else if (c < 0x10000) {
    out += static_cast<char>(0xE0 | (c >> 12));
    out += static_cast<char>(0x80 | ((c >> 6) & 0x3F));
    out += static_cast<char>(0x80 | (c & 0x3F));
  } else {
    out += static_cast<char>(0xF0 | (c >> 18));
    out += static_cast<char>(0x80 | ((c >> 12) & 0x3F));
    out += static_cast<char>(0x80 | ((c >> 6) & 0x3F));
    out += static_cast<char>(0x80 | (c & 0x3F));
  }
}

}  // namespace tamis::utf8
