// Source encodings and their conversion to UTF-8. UTF-8 input is validated
// in place by the CSV reader (no copy); every other encoding goes through an
// ICU converter, streaming, block by block.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <string_view>

#include "error.hpp"

struct UConverter;

namespace tamis {

enum class Encoding : uint8_t { utf8, utf16le, utf16be, windows1252, iso8859_1 };

std::string_view encoding_name(Encoding encoding);
// Accepts the WHATWG/IANA spellings people type: utf-8, utf8, utf-16le,
// windows-1252, cp1252, iso-8859-1, latin1 (case-insensitive).
std::optional<Encoding> encoding_from_name(std::string_view name);

struct EncodingGuess {
  Encoding encoding = Encoding::utf8;
  size_t bom_length = 0;  // bytes to skip at the start of the input
  std::string reason;     // how it was decided, for reports
};

// Decides from the first bytes of the input: a byte order mark wins; then
// UTF-16 without BOM when one byte of each pair is mostly zero; then UTF-8 if
// the sample is well-formed; otherwise Windows-1252 (the WHATWG Encoding
// Standard decodes "latin1"/"iso-8859-1" labels as windows-1252 too).
EncodingGuess detect_encoding(std::string_view sample, bool sample_is_whole_input);

// Length of a byte order mark for this encoding at the start of sample, or 0.
size_t bom_length(std::string_view sample, Encoding encoding);

// Windows-1252 leaves 0x81, 0x8D, 0x8F, 0x90 and 0x9D undefined; the WHATWG
// Encoding Standard (and ICU's table) decodes each to the C1 control of the
// same value. Counted so the reader can report them.
size_t count_windows1252_undefined(std::string_view raw, std::optional<uint64_t>* first_offset,
                                   uint64_t base_offset);

// Converts one non-UTF-8 encoding to UTF-8, keeping partial sequences between
// calls.
class Transcoder {
 public:
  static Result<std::unique_ptr<Transcoder>> open(Encoding encoding);
  ~Transcoder();
  Transcoder(const Transcoder&) = delete;
  Transcoder& operator=(const Transcoder&) = delete;

  // Appends the UTF-8 form of raw to out. base_offset is the source offset of
  // raw[0], used in the error for an ill-formed sequence. flush = end of input.
  Status convert(std::string_view raw, bool flush, std::string& out, uint64_t base_offset);

 private:
  Transcoder() = default;
  UConverter* from_ = nullptr;
  UConverter* to_utf8_ = nullptr;
  char16_t pivot_[4096];
  char16_t* pivot_source_ = pivot_;
  char16_t* pivot_target_ = pivot_;
};

}  // namespace tamis
