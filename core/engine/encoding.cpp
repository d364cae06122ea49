#include "encoding.hpp"

#include <unicode/ucnv.h>
#include <unicode/ucnv_err.h>

#include <algorithm>
#include <cctype>

#include "utf8.hpp"

namespace tamis {

namespace {

struct EncodingSpelling {
  std::string_view name;
  Encoding encoding;
};
constexpr EncodingSpelling kSpellings[] = {
    {"utf-8", Encoding::utf8},          {"utf8", Encoding::utf8},
    {"utf-16le", Encoding::utf16le},    {"utf-16be", Encoding::utf16be},
    {"windows-1252", Encoding::windows1252}, {"cp1252", Encoding::windows1252},
    {"iso-8859-1", Encoding::iso8859_1}, {"latin1", Encoding::iso8859_1},
};

const char* icu_name(Encoding encoding) {
  switch (encoding) {
    case Encoding::utf8: return "UTF-8";
    case Encoding::utf16le: return "UTF-16LE";
    case Encoding::utf16be: return "UTF-16BE";
    case Encoding::windows1252: return "windows-1252";
    case Encoding::iso8859_1: return "ISO-8859-1";
  }
  return "UTF-8";
}

bool looks_like_utf16(std::string_view sample, size_t zero_parity) {
  if (sample.size() < 4) return false;
  size_t zeros_here = 0, zeros_other = 0, pairs = sample.size() / 2;
  for (size_t i = 0; i + 1 < sample.size(); i += 2) {
    zeros_here += sample[i + zero_parity] == 0;
    zeros_other += sample[i + 1 - zero_parity] == 0;
  }
  // Common practice: Latin-script text in UTF-16 has a zero high byte in
  // nearly every code unit; real UTF-8 or single-byte text has no NULs.
  return zeros_here * 10 >= pairs * 3 && zeros_other * 100 <= pairs;
}

}  // namespace

std::string_view encoding_name(Encoding encoding) {
  switch (encoding) {
    case Encoding::utf8: return "utf-8";
    case Encoding::utf16le: return "utf-16le";
    case Encoding::utf16be: return "utf-16be";
    case Encoding::windows1252: return "windows-1252";
    case Encoding::iso8859_1: return "iso-8859-1";
  }
  return "utf-8";
}

std::optional<Encoding> encoding_from_name(std::string_view name) {
  std::string lower(name);
  std::transform(lower.begin(), lower.end(), lower.begin(),
                 [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  for (const auto& s : kSpellings)
    if (s.name == lower) return s.encoding;
  return std::nullopt;
}

size_t bom_length(std::string_view s, Encoding encoding) {
  switch (encoding) {
    case Encoding::utf8: return s.substr(0, 3) == "\xEF\xBB\xBF" ? 3 : 0;
    case Encoding::utf16le: return s.substr(0, 2) == "\xFF\xFE" ? 2 : 0;
    case Encoding::utf16be: return s.substr(0, 2) == "\xFE\xFF" ? 2 : 0;
    default: return 0;
  }
}

EncodingGuess detect_encoding(std::string_view sample, bool sample_is_whole_input) {
  // Byte order marks: Unicode Standard §23.8 (U+FEFF in each encoding form).
  for (Encoding e : {Encoding::utf8, Encoding::utf16le, Encoding::utf16be})
    if (size_t n = bom_length(sample, e)) return {e, n, "byte order mark"};
  if (looks_like_utf16(sample, 1)) return {Encoding::utf16le, 0, "zero high bytes (UTF-16LE without BOM)"};
  if (looks_like_utf16(sample, 0)) return {Encoding::utf16be, 0, "zero high bytes (UTF-16BE without BOM)"};
  if (utf8::first_invalid(sample, !sample_is_whole_input) == std::string_view::npos)
    return {Encoding::utf8, 0, "well-formed UTF-8"};
  return {Encoding::windows1252, 0, "not UTF-8; read as windows-1252"};
}

size_t count_windows1252_undefined(std::string_view raw, std::optional<uint64_t>* first_offset,
                                   uint64_t base_offset) {
  size_t n = 0;
  for (size_t i = 0; i < raw.size(); ++i) {
    const auto b = static_cast<unsigned char>(raw[i]);
    if (b == 0x81 || b == 0x8D || b == 0x8F || b == 0x90 || b == 0x9D) {
      if (n++ == 0 && first_offset && !*first_offset) *first_offset = base_offset + i;
    }
  }
  return n;
}

Result<std::unique_ptr<Transcoder>> Transcoder::open(Encoding encoding) {
  std::unique_ptr<Transcoder> t(new Transcoder());
  UErrorCode status = U_ZERO_ERROR;
  t->from_ = ucnv_open(icu_name(encoding), &status);
  if (U_SUCCESS(status)) t->to_utf8_ = ucnv_open("UTF-8", &status);
  if (U_FAILURE(status))
    return io_error("", std::string("cannot load the ICU converter for ") + std::string(encoding_name(encoding)) +
                            ": " + u_errorName(status));
  // Ill-formed input stops the conversion so it can be reported, never
  // silently replaced.
  ucnv_setToUCallBack(t->from_, UCNV_TO_U_CALLBACK_STOP, nullptr, nullptr, nullptr, &status);
  return t;
}

Transcoder::~Transcoder() {
  if (from_) ucnv_close(from_);
  if (to_utf8_) ucnv_close(to_utf8_);
}

Status Transcoder::convert(std::string_view raw, bool flush, std::string& out, uint64_t base_offset) {
  const char* source = raw.data();
  const char* source_limit = raw.data() + raw.size();
  for (;;) {
    const size_t old_size = out.size();
    out.resize(old_size + raw.size() * 2 + 1024);
    char* target = out.data() + old_size;
    UErrorCode status = U_ZERO_ERROR;
    ucnv_convertEx(to_utf8_, from_, &target, out.data() + out.size(), &source, source_limit,
                   pivot_, &pivot_source_, &pivot_target_, pivot_ + std::size(pivot_),
                   false, flush, &status);
    out.resize(static_cast<size_t>(target - out.data()));
    if (status == U_BUFFER_OVERFLOW_ERROR) continue;
    if (U_FAILURE(status)) {
      // ICU leaves source just past the offending bytes; step back over them.
      char invalid[32];
      int8_t invalid_length = sizeof invalid;
      UErrorCode ignored = U_ZERO_ERROR;
      ucnv_getInvalidChars(from_, invalid, &invalid_length, &ignored);
      Error e = input_error("", 0, "ill-formed byte sequence for this encoding");
      e.byte_offset = base_offset + static_cast<uint64_t>(source - raw.data()) -
                      static_cast<uint64_t>(U_SUCCESS(ignored) ? invalid_length : 0);
      return e;
    }
    return Ok{};
  }
}

}  // namespace tamis
