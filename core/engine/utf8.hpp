// UTF-8 helpers with ASCII fast paths; ICU answers only for non-ASCII code
// points. UTF-8 validity follows RFC 3629 / Unicode §3.9 Table 3-7
// (well-formed byte sequences: no overlongs, no surrogates, max U+10FFFF).
#pragma once

#include <cstddef>
#include <cstdint>
#include <string_view>

namespace tamis::utf8 {

// Length of the well-formed sequence starting at p: 1..4, 0 if ill-formed,
// -1 if the bytes end before the sequence could be judged complete.
int sequence_length(const unsigned char* p, const unsigned char* end);

// Offset of the first ill-formed byte, or npos. A truncated sequence at the
// very end counts as ill-formed unless allow_truncated_tail.
size_t first_invalid(std::string_view s, bool allow_truncated_tail = false);

// Decodes the code point at s[i] (s must be valid UTF-8) and advances i.
char32_t next(std::string_view s, size_t& i);
// Decodes the code point that ends at s[end) (valid UTF-8) and moves end back.
char32_t previous(std::string_view s, size_t& end);

size_t code_point_count(std::string_view s);

// Unicode White_Space property (PropList.txt).
bool is_white_space(char32_t c);
// Unicode general category P* (punctuation).
bool is_punctuation(char32_t c);

bool starts_with_white_space(std::string_view s);
bool ends_with_white_space(std::string_view s);
// True when s is empty or only Unicode white space.
bool is_blank(std::string_view s);
// s without the Unicode white space at both ends.
std::string_view trim_white_space(std::string_view s);
// a == b when ASCII letters are compared without case (keywords, format names).
bool equals_ascii_ignoring_case(std::string_view a, std::string_view b);

void append(std::string& out, char32_t c);

}  // namespace tamis::utf8
