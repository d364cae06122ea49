#include "expr/like.hpp"

#include "utf8.hpp"

namespace tamis::expr {

namespace {
size_t code_point_length(unsigned char lead) { return lead < 0x80 ? 1 : lead >= 0xF0 ? 4 : lead >= 0xE0 ? 3 : 2; }
}  // namespace

std::optional<LikePattern> LikePattern::compile(std::string_view pattern, std::optional<char32_t> escape,
                                                std::string& error) {
  LikePattern p;
  for (size_t i = 0; i < pattern.size();) {
    const size_t start = i;
    char32_t c = utf8::next(pattern, i);
    if (escape && c == *escape) {
      if (i == pattern.size()) {
        error = "the pattern ends with the escape character";
        return std::nullopt;
      }
      const size_t escaped_start = i;
      c = utf8::next(pattern, i);
      if (c != U'%' && c != U'_' && c != *escape) {
        error = "the escape character must be followed by '%', '_' or itself, found '" +
                std::string(pattern.substr(escaped_start, i - escaped_start)) + "'";
        return std::nullopt;
      }
      if (p.tokens_.empty() || p.tokens_.back().piece != Piece::literal) p.tokens_.push_back({Piece::literal, {}});
      p.tokens_.back().literal.append(pattern.substr(escaped_start, i - escaped_start));
      continue;
    }
    if (c == U'%') {
      // Consecutive '%' mean the same as one.
      if (p.tokens_.empty() || p.tokens_.back().piece != Piece::any) p.tokens_.push_back({Piece::any, {}});
    } else if (c == U'_') {
      p.tokens_.push_back({Piece::one, {}});
    } else {
      if (p.tokens_.empty() || p.tokens_.back().piece != Piece::literal) p.tokens_.push_back({Piece::literal, {}});
      p.tokens_.back().literal.append(pattern.substr(start, i - start));
    }
  }
  // The common shapes get a direct test instead of the general matcher.
  const auto& t = p.tokens_;
  auto is = [&](size_t k, Piece piece) { return k < t.size() && t[k].piece == piece; };
  if (t.empty()) {
    p.shape_ = Shape::exact;
  } else if (t.size() == 1 && is(0, Piece::literal)) {
    p.shape_ = Shape::exact, p.literal_ = t[0].literal;
  } else if (t.size() == 2 && is(0, Piece::literal) && is(1, Piece::any)) {
    p.shape_ = Shape::prefix, p.literal_ = t[0].literal;
  } else if (t.size() == 2 && is(0, Piece::any) && is(1, Piece::literal)) {
    p.shape_ = Shape::suffix, p.literal_ = t[1].literal;
  } else if (t.size() == 3 && is(0, Piece::any) && is(1, Piece::literal) && is(2, Piece::any)) {
    p.shape_ = Shape::contains, p.literal_ = t[1].literal;
  } else if (t.size() == 1 && is(0, Piece::any)) {
    p.shape_ = Shape::contains;  // '%' matches everything: contains ""
  }
  return p;
}

bool LikePattern::matches(std::string_view text) const {
  switch (shape_) {
    case Shape::exact: return text == literal_;
    case Shape::prefix: return text.starts_with(literal_);
    case Shape::suffix: return text.ends_with(literal_);
    case Shape::contains: return text.find(literal_) != std::string_view::npos;
    case Shape::general: return match_general(text);
  }
  return false;
}

// Wildcard matching with one backtrack point: when a piece fails, the last
// '%' takes one more character and matching resumes after it. Literal pieces
// compare bytes, which for valid UTF-8 starting at a code point boundary is
// the same as comparing code points.
bool LikePattern::match_general(std::string_view text) const {
  size_t ti = 0, pi = 0;
  size_t star_piece = SIZE_MAX, star_text = 0;
  const size_t pieces = tokens_.size();
  while (true) {
    if (pi < pieces) {
      const Token& token = tokens_[pi];
      if (token.piece == Piece::any) {
        star_piece = ++pi;
        star_text = ti;
        continue;
      }
      if (token.piece == Piece::one && ti < text.size()) {
        ti += code_point_length(static_cast<unsigned char>(text[ti]));
        ++pi;
        continue;
      }
      if (token.piece == Piece::literal && text.substr(ti).starts_with(token.literal)) {
        ti += token.literal.size();
        ++pi;
        continue;
      }
    } else if (ti == text.size()) {
      return true;
    }
    if (star_piece == SIZE_MAX || star_text >= text.size()) return false;
    star_text += code_point_length(static_cast<unsigned char>(text[star_text]));
    ti = star_text;
    pi = star_piece;
  }
}

}  // namespace tamis::expr
