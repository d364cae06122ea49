// SQL LIKE patterns (ISO/IEC 9075 <like predicate>): '%' matches any run of
// characters, '_' exactly one character (a Unicode code point), everything
// else itself, case-sensitively. With ESCAPE c, the escape character makes
// the next '%', '_' or c literal; any other character after it, or a pattern
// ending in it, is an error, as the standard says.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace tamis::expr {

class LikePattern {
 public:
  // error receives what is wrong when the pattern is invalid.
  static std::optional<LikePattern> compile(std::string_view pattern, std::optional<char32_t> escape,
                                            std::string& error);
  bool matches(std::string_view text) const;

 private:
  enum class Shape : uint8_t { exact, prefix, suffix, contains, general };
  enum class Piece : uint8_t { literal, one, any };
  struct Token {
    Piece piece;
    std::string literal;
  };
  bool match_general(std::string_view text) const;

  Shape shape_ = Shape::general;
  std::string literal_;  // for the exact/prefix/suffix/contains shapes
  std::vector<Token> tokens_;
};

}  // namespace tamis::expr
