// UTF-8 helpers against the Unicode Standard: well-formed byte sequences
// (§3.9 Table 3-7), the White_Space property (PropList.txt) and the
// punctuation categories (UnicodeData.txt).
#include <doctest/doctest.h>

#include <string>
#include <string_view>
#include <vector>

#include "utf8.hpp"

using namespace tamis;

namespace {

int length_of(std::string_view bytes) {
  const auto* p = reinterpret_cast<const unsigned char*>(bytes.data());
  return utf8::sequence_length(p, p + bytes.size());
}

std::string encoded(char32_t c) {
  std::string out;
  utf8::append(out, c);
  return out;
}

}  // namespace

TEST_SUITE("unit_utf8") {

TEST_CASE("unit_utf8: well-formed sequences of Table 3-7") {
  // Unicode Standard §3.9, Table 3-7 "Well-Formed UTF-8 Byte Sequences": the
  // first and last byte values of every row.
  CHECK(length_of(std::string_view("\0", 1)) == 1);
  CHECK(length_of("\x7F") == 1);
  CHECK(length_of("\xC2\x80") == 2);   // C2..DF 80..BF
  CHECK(length_of("\xDF\xBF") == 2);
  CHECK(length_of("\xE0\xA0\x80") == 3);  // E0 A0..BF 80..BF
  CHECK(length_of("\xE0\xBF\xBF") == 3);
  CHECK(length_of("\xE1\x80\x80") == 3);  // E1..EC 80..BF 80..BF
  CHECK(length_of("\xEC\xBF\xBF") == 3);
  CHECK(length_of("\xED\x80\x80") == 3);  // ED 80..9F 80..BF
  CHECK(length_of("\xED\x9F\xBF") == 3);
  CHECK(length_of("\xEE\x80\x80") == 3);  // EE..EF 80..BF 80..BF
  CHECK(length_of("\xEF\xBF\xBF") == 3);
  CHECK(length_of("\xF0\x90\x80\x80") == 4);  // F0 90..BF 80..BF 80..BF
  CHECK(length_of("\xF0\xBF\xBF\xBF") == 4);
  CHECK(length_of("\xF1\x80\x80\x80") == 4);  // F1..F3 80..BF 80..BF 80..BF
  CHECK(length_of("\xF3\xBF\xBF\xBF") == 4);
  CHECK(length_of("\xF4\x80\x80\x80") == 4);  // F4 80..8F 80..BF 80..BF
  CHECK(length_of("\xF4\x8F\xBF\xBF") == 4);
  // Only the sequence at the start is judged; what follows does not matter.
  CHECK(length_of("\xC3\xA9xyz") == 2);
}

TEST_CASE("unit_utf8: ill-formed sequences of Table 3-7") {
  // Overlong forms (§3.9 D92 / Table 3-7: C0, C1 and E0 80..9F, F0 80..8F are
  // not in any row).
  CHECK(length_of("\xC0\x80") == 0);
  CHECK(length_of("\xC1\xBF") == 0);
  CHECK(length_of("\xE0\x80\x80") == 0);
  CHECK(length_of("\xE0\x9F\xBF") == 0);
  CHECK(length_of("\xF0\x80\x80\x80") == 0);
  CHECK(length_of("\xF0\x8F\xBF\xBF") == 0);
  // Surrogates U+D800..U+DFFF (ED A0..BF) are not scalar values.
  CHECK(length_of("\xED\xA0\x80") == 0);
  CHECK(length_of("\xED\xBF\xBF") == 0);
  // Above U+10FFFF: F4 90.., and F5..FF never occur.
  CHECK(length_of("\xF4\x90\x80\x80") == 0);
  CHECK(length_of("\xF5\x80\x80\x80") == 0);
  CHECK(length_of("\xFF") == 0);
  CHECK(length_of("\xFE") == 0);
  // A continuation byte cannot start a sequence.
  CHECK(length_of("\x80") == 0);
  CHECK(length_of("\xBF") == 0);
  // A lead byte followed by a non-continuation byte.
  CHECK(length_of("\xC3" "A") == 0);
  CHECK(length_of("\xE2\x82" "A") == 0);
  CHECK(length_of("\xF0\x9F\x8C" "A") == 0);
}

TEST_CASE("unit_utf8: truncated sequences") {
  // The bytes end before the sequence is complete: -1 (judged later, when
  // more input arrives), unless the bytes seen are already ill-formed.
  CHECK(length_of("\xC3") == -1);
  CHECK(length_of("\xE2\x82") == -1);
  CHECK(length_of("\xE2") == -1);
  CHECK(length_of("\xF0\x9F\x8C") == -1);
  CHECK(length_of("\xE0\x80") == 0);
  CHECK(length_of("\xF4\x90") == 0);

  CHECK(utf8::first_invalid("ab\xE2\x82") == 2);
  CHECK(utf8::first_invalid("ab\xE2\x82", true) == std::string_view::npos);
  CHECK(utf8::first_invalid("ab\xE2\x82" "c", true) == 2);
}

TEST_CASE("unit_utf8: first_invalid finds the first ill-formed byte") {
  CHECK(utf8::first_invalid("") == std::string_view::npos);
  CHECK(utf8::first_invalid("plain ascii") == std::string_view::npos);
  CHECK(utf8::first_invalid("caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x8C\xB3") == std::string_view::npos);
  CHECK(utf8::first_invalid("abc\xC3\xA9\xFF") == 5);
  CHECK(utf8::first_invalid("\xC0\x80") == 0);
  CHECK(utf8::first_invalid("ok\xED\xA0\x80") == 2);
  CHECK(utf8::first_invalid("ok\xF4\x90\x80\x80") == 2);
}

TEST_CASE("unit_utf8: encoding examples of RFC 3629") {
  // RFC 3629 §7 examples (from memory, checked with Python's codecs):
  // U+0041 U+2262 U+0391 U+002E -> 41 E2 89 A2 CE 91 2E;
  // U+D55C U+AD6D U+C5B4 -> ED 95 9C EA B5 AD EC 96 B4;
  // U+65E5 U+672C U+8A9E -> E6 97 A5 E6 9C AC E8 AA 9E; U+233B4 -> F0 A3 8E B4.
  std::string out;
  for (const char32_t c : {U'\u0041', U'\u2262', U'\u0391', U'\u002E'}) utf8::append(out, c);
  CHECK(out == "\x41\xE2\x89\xA2\xCE\x91\x2E");
  out.clear();
  for (const char32_t c : {U'\uD55C', U'\uAD6D', U'\uC5B4'}) utf8::append(out, c);
  CHECK(out == "\xED\x95\x9C\xEA\xB5\xAD\xEC\x96\xB4");
  out.clear();
  for (const char32_t c : {U'\u65E5', U'\u672C', U'\u8A9E'}) utf8::append(out, c);
  CHECK(out == "\xE6\x97\xA5\xE6\x9C\xAC\xE8\xAA\x9E");
  CHECK(encoded(0x233B4) == "\xF0\xA3\x8E\xB4");
  // The boundaries of each length.
  CHECK(encoded(0x7F) == "\x7F");
  CHECK(encoded(0x80) == "\xC2\x80");
  CHECK(encoded(0x7FF) == "\xDF\xBF");
  CHECK(encoded(0x800) == "\xE0\xA0\x80");
  CHECK(encoded(0xFFFF) == "\xEF\xBF\xBF");
  CHECK(encoded(0x10000) == "\xF0\x90\x80\x80");
  CHECK(encoded(0x10FFFF) == "\xF4\x8F\xBF\xBF");
}

TEST_CASE("unit_utf8: next and previous walk code points both ways") {
  const std::string s = "a\xC3\xA9\xE2\x82\xAC\xF0\x9F\x8C\xB3z";
  const std::vector<char32_t> expected{U'a', 0xE9, 0x20AC, 0x1F333, U'z'};
  std::vector<char32_t> forward;
  for (size_t i = 0; i < s.size();) forward.push_back(utf8::next(s, i));
  CHECK(forward == expected);
  std::vector<char32_t> backward;
  for (size_t end = s.size(); end > 0;) backward.insert(backward.begin(), utf8::previous(s, end));
  CHECK(backward == expected);

  size_t i = 1;
  CHECK(utf8::next(s, i) == 0xE9);
  CHECK(i == 3);
  size_t end = 10;
  CHECK(utf8::previous(s, end) == 0x1F333);
  CHECK(end == 6);

  // Every scalar value in a sample of each plane encodes and decodes back.
  for (char32_t c = 0; c <= 0x10FFFF; c += (c < 0x3000 ? 1 : 97)) {
    if (c >= 0xD800 && c <= 0xDFFF) continue;  // surrogates are not scalar values
    const std::string bytes = encoded(c);
    REQUIRE(utf8::first_invalid(bytes) == std::string_view::npos);
    size_t at = 0, back = bytes.size();
    CHECK(utf8::next(bytes, at) == c);
    CHECK(at == bytes.size());
    CHECK(utf8::previous(bytes, back) == c);
    CHECK(back == 0);
  }
}

TEST_CASE("unit_utf8: code_point_count") {
  CHECK(utf8::code_point_count("") == 0);
  CHECK(utf8::code_point_count("abc") == 3);
  CHECK(utf8::code_point_count("a\xC3\xA9\xE2\x82\xAC\xF0\x9F\x8C\xB3") == 4);
  // A combining sequence is two code points (e + U+0301 COMBINING ACUTE ACCENT).
  CHECK(utf8::code_point_count("e\xCC\x81") == 2);
}

TEST_CASE("unit_utf8: is_white_space matches PropList.txt White_Space over all code points") {
  // PropList.txt (Unicode 15.0.0, Debian unicode-data), property White_Space:
  // 0009..000D, 0020, 0085, 00A0, 1680, 2000..200A, 2028, 2029, 202F, 205F, 3000.
  const auto listed = [](char32_t c) {
    return (c >= 0x09 && c <= 0x0D) || c == 0x20 || c == 0x85 || c == 0xA0 || c == 0x1680 ||
           (c >= 0x2000 && c <= 0x200A) || c == 0x2028 || c == 0x2029 || c == 0x202F || c == 0x205F ||
           c == 0x3000;
  };
  size_t mismatches = 0;
  for (char32_t c = 0; c <= 0x10FFFF; ++c) {
    if (utf8::is_white_space(c) != listed(c) && mismatches++ < 5)
      FAIL_CHECK("White_Space differs at U+" << static_cast<unsigned>(c));
  }
  CHECK(mismatches == 0);
  // Not White_Space although often taken for it: U+001C..U+001F (separators
  // that some libraries count as space), U+200B ZERO WIDTH SPACE, U+FEFF, and
  // U+180E MONGOLIAN VOWEL SEPARATOR (removed from White_Space in Unicode 6.3).
  for (const char32_t c : {char32_t{0x1C}, char32_t{0x1F}, char32_t{0x200B}, char32_t{0xFEFF}, char32_t{0x180E}})
    CHECK_FALSE(utf8::is_white_space(c));
}

TEST_CASE("unit_utf8: is_blank, starts_with_white_space, ends_with_white_space") {
  CHECK(utf8::is_blank(""));
  CHECK(utf8::is_blank(" \t\r\n"));
  CHECK(utf8::is_blank("\xC2\xA0\xE3\x80\x80"));  // U+00A0, U+3000
  CHECK(utf8::is_blank("\xE2\x80\xA8"));           // U+2028 LINE SEPARATOR
  CHECK_FALSE(utf8::is_blank(" a "));
  CHECK_FALSE(utf8::is_blank("\xE2\x80\x8B"));     // U+200B is not White_Space
  CHECK(utf8::starts_with_white_space("\xC2\xA0x"));
  CHECK_FALSE(utf8::starts_with_white_space("x "));
  CHECK_FALSE(utf8::starts_with_white_space(""));
  CHECK(utf8::ends_with_white_space("x\xE3\x80\x80"));
  CHECK_FALSE(utf8::ends_with_white_space(" x"));
  CHECK_FALSE(utf8::ends_with_white_space(""));
  CHECK_FALSE(utf8::ends_with_white_space("\xC3\xA9"));
}

TEST_CASE("unit_utf8: is_punctuation follows the P categories of UnicodeData.txt") {
  // UnicodeData.txt (Unicode 15.0.0): the ASCII code points of category P*
  // are exactly ! " # % & ' ( ) * , - . / : ; ? @ [ \ ] _ { }.
  const std::string_view ascii_punctuation = "!\"#%&'()*,-./:;?@[\\]_{}";
  for (char32_t c = 0; c < 0x80; ++c) {
    CAPTURE(static_cast<unsigned>(c));
    CHECK(utf8::is_punctuation(c) == (ascii_punctuation.find(static_cast<char>(c)) != std::string_view::npos));
  }
  // Latin-1 P*: 00A1 Po, 00A7 Po, 00AB Pi, 00B6 Po, 00B7 Po, 00BB Pf, 00BF Po.
  for (char32_t c = 0x80; c < 0x100; ++c) {
    CAPTURE(static_cast<unsigned>(c));
    const bool listed = c == 0xA1 || c == 0xA7 || c == 0xAB || c == 0xB6 || c == 0xB7 || c == 0xBB || c == 0xBF;
    CHECK(utf8::is_punctuation(c) == listed);
  }
  // 3002 IDEOGRAPHIC FULL STOP Po, 2014 EM DASH Pd, 201C Pi, FF0C FULLWIDTH
  // COMMA Po; 1F333 DECIDUOUS TREE So and FF12 FULLWIDTH DIGIT TWO Nd are not.
  CHECK(utf8::is_punctuation(0x3002));
  CHECK(utf8::is_punctuation(0x2014));
  CHECK(utf8::is_punctuation(0x201C));
  CHECK(utf8::is_punctuation(0xFF0C));
  CHECK_FALSE(utf8::is_punctuation(0x1F333));
  CHECK_FALSE(utf8::is_punctuation(0xFF12));
}

}  // TEST_SUITE
