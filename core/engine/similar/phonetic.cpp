#include "similar/phonetic.hpp"

namespace tamis {

namespace {

// '0' vowel (separates equal digits), 'h' h or w (does not), else the digit.
char soundex_class(char lower) {
  switch (lower) {
    case 'b': case 'f': case 'p': case 'v': return '1';
    case 'c': case 'g': case 'j': case 'k': case 'q': case 's': case 'x': case 'z': return '2';
    case 'd': case 't': return '3';
    case 'l': return '4';
    case 'm': case 'n': return '5';
    case 'r': return '6';
    case 'h': case 'w': return 'h';
    default: return '0';
  }
}

}  // namespace

std::string american_soundex(std::string_view word) {
  std::string code;
  char last = 0;
  for (const char ch : word) {
    char lower = ch;
    if (ch >= 'A' && ch <= 'Z') lower = static_cast<char>(ch - 'A' + 'a');
    if (lower < 'a' || lower > 'z') continue;
    const char cls = soundex_class(lower);
    if (code.empty()) {
      code.push_back(static_cast<char>(lower - 'a' + 'A'));
      last = cls;
      continue;
    }
    if (cls == 'h') continue;
    if (cls != '0' && cls != last) {
      code.push_back(cls);
      if (code.size() == 4) return code;
    }
    last = cls;
  }
  if (code.empty()) return code;
  code.resize(4, '0');
  return code;
}

}  // namespace tamis
