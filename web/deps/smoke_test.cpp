// Checks that the WebAssembly ICU build and its reduced data (icu-data.txt)
// provide every ICU service the engine relies on. web/deps/build.sh runs it
// under node before it marks the build complete, so a missing data item fails
// the dependency build instead of surfacing later as a wrong result.
#include <unicode/normalizer2.h>
#include <unicode/regex.h>
#include <unicode/ucasemap.h>
#include <unicode/ucnv.h>
#include <unicode/ucsdet.h>
#include <unicode/unistr.h>

#include <cstdio>
#include <string>

namespace {

int failures = 0;

void check(const char* what, bool ok, const std::string& detail) {
  std::printf("%s %s%s%s\n", ok ? "PASS" : "FAIL", what, detail.empty() ? "" : ": ", detail.c_str());
  if (!ok) ++failures;
}

std::string status_text(UErrorCode status) { return U_SUCCESS(status) ? std::string() : u_errorName(status); }

void check_normalization() {
  UErrorCode status = U_ZERO_ERROR;
  const icu::Normalizer2* nfc = icu::Normalizer2::getNFCInstance(status);
  std::string nfc_result;
  if (U_SUCCESS(status)) {
    // UnicodeData.txt: 00E9 decomposes canonically to 0065 0301.
    nfc->normalize(icu::UnicodeString::fromUTF8("e\xCC\x81"), status).toUTF8String(nfc_result);
  }
  check("NFC e+U+0301 -> U+00E9", U_SUCCESS(status) && nfc_result == "\xC3\xA9", status_text(status));

  status = U_ZERO_ERROR;
  const icu::Normalizer2* nfkc = icu::Normalizer2::getNFKCInstance(status);
  std::string nfkc_result;
  if (U_SUCCESS(status)) {
    // UnicodeData.txt: FB01 LATIN SMALL LIGATURE FI has <compat> 0066 0069.
    nfkc->normalize(icu::UnicodeString::fromUTF8("\xEF\xAC\x81"), status).toUTF8String(nfkc_result);
  }
  check("NFKC U+FB01 -> fi", U_SUCCESS(status) && nfkc_result == "fi", status_text(status));
}

std::string map_case(const char* locale, const char* input, bool title) {
  UErrorCode status = U_ZERO_ERROR;
  UCaseMap* map = ucasemap_open(locale, 0, &status);
  char output[64] = {};
  if (U_SUCCESS(status)) {
    if (title) {
      ucasemap_utf8ToTitle(map, output, sizeof output, input, -1, &status);
    } else {
      ucasemap_utf8ToUpper(map, output, sizeof output, input, -1, &status);
    }
  }
  ucasemap_close(map);
  return U_SUCCESS(status) ? output : std::string("error ") + u_errorName(status);
}

void check_case_mapping() {
  // SpecialCasing.txt: 00DF uppercases to 0053 0053.
  std::string upper = map_case("", "stra\xC3\x9F" "e", false);
  check("full upper case straße -> STRASSE", upper == "STRASSE", upper);
  // SpecialCasing.txt: 0069 uppercases to 0130 in the tr locale.
  std::string turkish = map_case("tr", "i", false);
  check("tr upper case i -> U+0130", turkish == "\xC4\xB0", turkish);
  // Title casing needs the word break iterator (brkitr data items).
  std::string title = map_case("", "oak street north", true);
  check("title case by words", title == "Oak Street North", title);
  // Text that needs a word-break dictionary left out of icu-data.txt still maps.
  std::string without_dictionary = map_case("", "\xE6\x9D\xB1\xE4\xBA\xAC oak", true);
  check("title case next to CJK text", without_dictionary == "\xE6\x9D\xB1\xE4\xBA\xAC Oak", without_dictionary);
}

std::string convert_to_utf8(const char* converter_name, const std::string& bytes) {
  UErrorCode status = U_ZERO_ERROR;
  icu::UnicodeString text(bytes.data(), static_cast<int32_t>(bytes.size()), converter_name);
  std::string utf8;
  text.toUTF8String(utf8);
  UConverter* converter = ucnv_open(converter_name, &status);
  ucnv_close(converter);
  return U_SUCCESS(status) ? utf8 : std::string("error ") + u_errorName(status);
}

void check_converters() {
  // Unicode's CP1252.TXT mapping: 0x80 -> U+20AC, 0x93 -> U+201C, 0x94 -> U+201D, 0xE9 -> U+00E9.
  std::string windows_1252 = convert_to_utf8("windows-1252", "\x80\x93Hi\x94\xE9");
  check("windows-1252 decoding", windows_1252 == "\xE2\x82\xAC\xE2\x80\x9CHi\xE2\x80\x9D\xC3\xA9", windows_1252);
  // ISO/IEC 8859-1 bytes are the first 256 code points.
  std::string latin1 = convert_to_utf8("ISO-8859-1", "caf\xE9");
  check("ISO-8859-1 decoding", latin1 == "caf\xC3\xA9", latin1);
  // RFC 2781: the "UTF-16" charset consumes a byte order mark.
  std::string utf16 = convert_to_utf8("UTF-16", std::string("\xFF\xFE" "A\0" "\xE9\0", 6));
  check("UTF-16 with little-endian BOM", utf16 == "A\xC3\xA9", utf16);
}

void check_regex_and_detection() {
  UErrorCode status = U_ZERO_ERROR;
  // The matcher keeps a reference to its input, which must outlive it.
  const icu::UnicodeString input = icu::UnicodeString::fromUTF8("x\xC3\x84" "By");
  icu::RegexMatcher matcher(icu::UnicodeString::fromUTF8("\\p{Lu}+"), input, 0, status);
  std::string match;
  if (U_SUCCESS(status) && matcher.find(status)) {
    matcher.group(status).toUTF8String(match);
  }
  check("regex \\p{Lu}+ finds ÄB", U_SUCCESS(status) && match == "\xC3\x84" "B", status_text(status) + match);

  status = U_ZERO_ERROR;
  UCharsetDetector* detector = ucsdet_open(&status);
  const char sample[] = "Stra\xC3\x9F" "e, Caf\xC3\xA9, na\xC3\xAFve r\xC3\xA9sum\xC3\xA9";
  ucsdet_setText(detector, sample, sizeof sample - 1, &status);
  const UCharsetMatch* best = ucsdet_detect(detector, &status);
  std::string name = U_SUCCESS(status) && best ? ucsdet_getName(best, &status) : "";
  ucsdet_close(detector);
  check("charset detection of UTF-8", U_SUCCESS(status) && name == "UTF-8", status_text(status) + name);
}

}  // namespace

int main() {
  check_normalization();
  check_case_mapping();
  check_converters();
  check_regex_and_detection();
  std::printf("%d ICU checks failed\n", failures);
  return failures == 0 ? 0 : 1;
}
