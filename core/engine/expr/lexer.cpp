#include "expr/lexer.hpp"

#include <unicode/uchar.h>

#include "utf8.hpp"

namespace tamis::expr {

namespace {

bool is_digit(char c) { return c >= '0' && c <= '9'; }

// Identifier characters follow Unicode's ID_Start / ID_Continue (UAX #31),
// with '_' allowed anywhere as in SQL.
bool starts_name(char32_t c) {
  if (c < 0x80) return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_';
  return u_hasBinaryProperty(static_cast<UChar32>(c), UCHAR_ID_START);
}
bool continues_name(char32_t c) {
  if (c < 0x80) return starts_name(c) || is_digit(static_cast<char>(c));
  return u_hasBinaryProperty(static_cast<UChar32>(c), UCHAR_ID_CONTINUE);
}

}  // namespace

std::string at_character(std::string_view text, size_t byte_offset) {
  return "at character " + std::to_string(utf8::code_point_count(text.substr(0, byte_offset)) + 1) + ": ";
}

Result<std::vector<Token>> tokenize(std::string_view text) {
  if (const size_t bad = utf8::first_invalid(text); bad != std::string_view::npos)
    return usage_error(at_character(text, bad) + "the expression is not valid UTF-8");
  std::vector<Token> tokens;
  auto fail = [&](size_t at, const std::string& message) { return usage_error(at_character(text, at) + message); };
  size_t i = 0;
  while (true) {
    while (i < text.size()) {
      size_t next = i;
      if (!utf8::is_white_space(utf8::next(text, next))) break;
      i = next;
    }
    Token token;
    token.begin = static_cast<uint32_t>(i);
    if (i == text.size()) {
      token.end = token.begin;
      tokens.push_back(std::move(token));
      return tokens;
    }
    const char c = text[i];
    const std::string_view rest = text.substr(i);
    if (rest.starts_with("--") || rest.starts_with("/*"))
      return fail(i, "comments are not allowed in expressions");
    if (is_digit(c) || (c == '.' && i + 1 < text.size() && is_digit(text[i + 1]))) {
      size_t j = i;
      while (j < text.size() && is_digit(text[j])) ++j;
      token.kind = TokenKind::integer;
      if (j < text.size() && text[j] == '.') {
        token.kind = TokenKind::decimal;
        ++j;
        while (j < text.size() && is_digit(text[j])) ++j;
      }
      if (j < text.size() && (text[j] == 'e' || text[j] == 'E'))
        return fail(i, "exponent notation is not supported because numbers are exact; write the number out (1500 "
                       "for 1.5E3)");
      size_t name_end = j;
      while (name_end < text.size()) {
        size_t k = name_end;
        if (!continues_name(utf8::next(text, k))) break;
        name_end = k;
      }
      if (name_end > j)
        return fail(j, "expected an operator or a space after the number, found '" +
                           std::string(text.substr(j, name_end - j)) + "'");
      token.value = std::string(text.substr(i, j - i));
      i = j;
    } else if (c == '\'' || c == '"') {
      token.kind = c == '\'' ? TokenKind::text : TokenKind::quoted_name;
      size_t j = i + 1;
      while (true) {
        if (j >= text.size())
          return fail(i, c == '\'' ? "the text literal starting here has no closing quote (')"
                                   : "the quoted column name starting here has no closing quote (\")");
        if (text[j] == c) {
          if (j + 1 < text.size() && text[j + 1] == c) {
            token.value += c;
            j += 2;
            continue;
          }
          ++j;
          break;
        }
        token.value += text[j++];
      }
      if (token.kind == TokenKind::quoted_name && token.value.empty())
        return fail(i, "a quoted column name cannot be empty");
      i = j;
    } else {
      size_t j = i;
      const char32_t first = utf8::next(text, j);
      if (starts_name(first)) {
        token.kind = TokenKind::word;
        while (j < text.size()) {
          size_t k = j;
          if (!continues_name(utf8::next(text, k))) break;
          j = k;
        }
        token.value = std::string(text.substr(i, j - i));
        i = j;
      } else {
        static constexpr std::string_view kTwoCharacter[] = {"||", "<>", "!=", "<=", ">="};
        token.kind = TokenKind::symbol;
        for (const std::string_view s : kTwoCharacter)
          if (rest.starts_with(s)) token.value = std::string(s);
        if (token.value.empty() && std::string_view("(),+-*/=<>").find(c) != std::string_view::npos)
          token.value = std::string(1, c);
        if (token.value.empty()) {
          const std::string found(text.substr(i, j - i));
          std::string hint;
          if (c == '|') hint = " (|| joins texts)";
          else if (c == '!') hint = " (write <> or != for 'not equal', NOT to negate)";
          else if (c == '%') hint = " (there is no remainder operator)";
          else if (c == ';') hint = " (an expression is not a statement)";
          return fail(i, "unexpected character '" + found + "'" + hint);
        }
        i += token.value.size();
      }
    }
    token.end = static_cast<uint32_t>(i);
    tokens.push_back(std::move(token));
  }
}

}  // namespace tamis::expr
