// Splits an expression into tokens. Positions are byte offsets into the
// expression text; messages turn them into character numbers.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"

namespace tamis::expr {

enum class TokenKind : uint8_t {
  end,
  word,         // keyword, function or plain column name, as written
  quoted_name,  // "name", value without the quotes and with "" undone
  integer,      // digits
  decimal,      // digits with a point
  text,         // 'text', value without the quotes and with '' undone
  symbol,       // ( ) , + - * / || = <> != < <= > >=
};

struct Token {
  TokenKind kind = TokenKind::end;
  uint32_t begin = 0, end = 0;
  std::string value;
};

// Ends with one TokenKind::end token.
Result<std::vector<Token>> tokenize(std::string_view text);

// "at character N: " for a byte offset of text.
std::string at_character(std::string_view text, size_t byte_offset);

}  // namespace tamis::expr
