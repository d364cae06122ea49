#include "sql/sql_text.hpp"

#include <unicode/uchar.h>

#include <algorithm>
#include <cstdio>

#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis::sql {

namespace {

// Characters a reader of the script could not see or that some client
// would mangle: C0 and C1 controls, DEL, and every White_Space character
// but the plain space.
bool written_as_code_point(char32_t c) {
  if (c < 0x20 || c == 0x7F || (c >= 0x80 && c < 0xA0)) return true;
  return c != U' ' && utf8::is_white_space(c);
}

std::string hex(uint32_t value, int width) {
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%0*X", width, value);
  return buffer;
}

void append_quoted_character(Dialect dialect, char32_t c, std::string& out) {
  switch (dialect) {
    case Dialect::mysql:
      if (c == U'\\') out += "\\\\";
      else if (c == U'\'') out += "''";
      else utf8::append(out, c);
      return;
    case Dialect::spark:
      if (c == U'\\') out += "\\\\";
      else if (c == U'\'') out += "\\'";
      else utf8::append(out, c);
      return;
    default:
      if (c == U'\'') out += "''";
      else utf8::append(out, c);
  }
}

std::string code_point_expression(Dialect dialect, char32_t c) {
  switch (dialect) {
    case Dialect::postgres:
    case Dialect::duckdb: return std::string("chr(") + std::to_string(c) + ")";
    case Dialect::sqlite: return std::string("char(") + std::to_string(c) + ")";
    case Dialect::mysql: {
      std::string bytes;
      utf8::append(bytes, c);
      std::string out = "_utf8mb4 X'";
      for (unsigned char b : bytes) out += hex(b, 2);
      return out + "' COLLATE utf8mb4_bin";
    }
    case Dialect::spark: break;
  }
  return {};
}

bool is_ascii_alnum(char32_t c) {
  return (c >= U'0' && c <= U'9') || (c >= U'a' && c <= U'z') || (c >= U'A' && c <= U'Z');
}

std::string regex_character(Dialect dialect, char32_t c) {
  if (is_ascii_alnum(c)) return std::string(1, static_cast<char>(c));
  if (dialect == Dialect::postgres) return c > 0xFFFF ? std::string("\\U") + hex(c, 8) : std::string("\\u") + hex(c, 4);
  return std::string("\\x{") + hex(c, 1) + "}";
}

}  // namespace

std::string identifier(Dialect dialect, std::string_view name) {
  const char quote = dialect == Dialect::mysql || dialect == Dialect::spark ? '`' : '"';
  std::string out(1, quote);
  for (const char ch : name) {
    out += ch;
    if (ch == quote) out += quote;
  }
  return out + quote;
}

std::string literal_problem(std::string_view text) {
  if (utf8::first_invalid(text) != std::string_view::npos) return "is not valid UTF-8";
  if (text.find('\0') != std::string_view::npos) return "holds a NUL character, which SQL text cannot hold";
  return {};
}

std::string literal(Dialect dialect, std::string_view text) {
  if (dialect == Dialect::spark) {
    std::string out = "'";
    for (size_t i = 0; i < text.size();) {
      const char32_t c = utf8::next(text, i);
      if (written_as_code_point(c)) out += std::string("\\u") + hex(c, 4);
      else append_quoted_character(dialect, c, out);
    }
    return out + "'";
  }
  std::vector<std::string> parts;
  std::string run;
  bool in_run = false;
  for (size_t i = 0; i < text.size();) {
    const char32_t c = utf8::next(text, i);
    if (written_as_code_point(c)) {
      if (in_run) parts.push_back(std::string("'") + run + "'");
      run.clear();
      in_run = false;
      parts.push_back(code_point_expression(dialect, c));
    } else {
      append_quoted_character(dialect, c, run);
      in_run = true;
    }
  }
  if (in_run || parts.empty()) parts.push_back(std::string("'") + run + "'");
  if (parts.size() == 1) return parts[0];
  return std::string("(") + concat(dialect, parts) + ")";
}

std::string concat(Dialect dialect, const std::vector<std::string>& parts) {
  std::string out = dialect == Dialect::mysql ? "CONCAT(" : "";
  const char* separator = dialect == Dialect::mysql ? ", " : " || ";
  for (size_t i = 0; i < parts.size(); ++i) {
    if (i) out += separator;
    out += parts[i];
  }
  return dialect == Dialect::mysql ? out + ")" : out;
}

const std::u32string& white_space_characters() {
  static const std::u32string characters = [] {
    std::u32string out;
    for (char32_t c = 0; c <= 0x3000; ++c)
      if (utf8::is_white_space(c)) out += c;
    return out;
  }();
  return characters;
}

std::string regex_class(Dialect dialect, const std::u32string& characters) {
  std::u32string sorted = characters;
  std::sort(sorted.begin(), sorted.end());
  sorted.erase(std::unique(sorted.begin(), sorted.end()), sorted.end());
  std::string out = "[";
  for (size_t i = 0; i < sorted.size();) {
    size_t j = i;
    while (j + 1 < sorted.size() && sorted[j + 1] == sorted[j] + 1) ++j;
    out += regex_character(dialect, sorted[i]);
    if (j > i + 1) {
      out += std::string("-") + regex_character(dialect, sorted[j]);
    } else if (j == i + 1) {
      out += regex_character(dialect, sorted[j]);
    }
    i = j + 1;
  }
  return out + "]";
}

bool has_regex(Dialect dialect) { return dialect != Dialect::sqlite; }

std::string regex_whole(Dialect dialect, const std::string& body) {
  const bool dollar_ends = dialect == Dialect::postgres || dialect == Dialect::duckdb;
  std::string out = "^(?:";
  out += body;
  out += dollar_ends ? ")$" : ")\\z";
  return out;
}

std::string regex_matches(Dialect dialect, const std::string& x, const std::string& pattern) {
  const std::string p = literal(dialect, pattern);
  switch (dialect) {
    case Dialect::postgres: return std::string("(") + x + std::string(" ~ ") + p + ")";
    case Dialect::duckdb: return std::string("regexp_full_match(") + x + std::string(", ") + p + ")";
    case Dialect::mysql: return std::string("(") + x + std::string(" REGEXP ") + p + ")";
    case Dialect::spark: return std::string("(") + x + std::string(" RLIKE ") + p + ")";
    case Dialect::sqlite: break;
  }
  return {};
}

std::string regex_replace_all(Dialect dialect, const std::string& x, const std::string& pattern,
                              const std::string& replacement) {
  const std::string p = literal(dialect, pattern), r = literal(dialect, replacement);
  switch (dialect) {
    case Dialect::postgres:
    case Dialect::duckdb: return std::string("regexp_replace(") + x + std::string(", ") + p + std::string(", ") + r + ", 'g')";
    case Dialect::mysql: return std::string("REGEXP_REPLACE(") + x + std::string(", ") + p + std::string(", ") + r + ")";
    case Dialect::spark: return std::string("regexp_replace(") + x + std::string(", ") + p + std::string(", ") + r + ")";
    case Dialect::sqlite: break;
  }
  return {};
}

std::string regex_first_match(Dialect dialect, const std::string& x, const std::string& pattern) {
  const std::string p = literal(dialect, pattern);
  switch (dialect) {
    case Dialect::postgres: return std::string("COALESCE(substring(") + x + std::string(" FROM ") + p + "), '')";
    case Dialect::duckdb: return std::string("regexp_extract(") + x + std::string(", ") + p + ")";
    case Dialect::mysql: return std::string("COALESCE(REGEXP_SUBSTR(") + x + std::string(", ") + p + "), '')";
    case Dialect::spark: return std::string("regexp_extract(") + x + std::string(", ") + p + ", 0)";
    case Dialect::sqlite: break;
  }
  return {};
}

std::string trim_characters(Dialect dialect, const std::string& x, const std::u32string& characters,
                            std::string_view side) {
  std::string utf8_characters;
  for (const char32_t c : characters) utf8::append(utf8_characters, c);
  const std::string chars = literal(dialect, utf8_characters);
  switch (dialect) {
    case Dialect::postgres:
    case Dialect::spark: {
      const char* where = side == "both" ? "BOTH" : side == "leading" ? "LEADING" : "TRAILING";
      return std::string("TRIM(") + where + std::string(" ") + chars + std::string(" FROM ") + x + ")";
    }
    case Dialect::duckdb:
    case Dialect::sqlite: {
      const char* function = side == "both" ? "trim" : side == "leading" ? "ltrim" : "rtrim";
      return std::string(function) + std::string("(") + x + std::string(", ") + chars + ")";
    }
    case Dialect::mysql: {
      // MySQL's TRIM removes a whole string, not a set of characters. The
      // end of the text is \z: PCRE's $ also matches before a final line
      // break, which is not in every set.
      const std::string set = regex_class(dialect, characters) + "+";
      const std::string pattern = side == "both"      ? std::string("^") + set + std::string("|") + set + "\\z"
                                  : side == "leading" ? std::string("^") + set
                                                      : set + "\\z";
      return regex_replace_all(dialect, x, pattern, "");
    }
  }
  return {};
}

std::string exact_key(Dialect dialect, const std::string& x, Type type) {
  if (type != Type::text) return x;
  if (dialect == Dialect::mysql) return std::string("CAST(") + x + " AS BINARY)";
  if (dialect == Dialect::postgres) return std::string("(") + x + " COLLATE \"C\")";
  return x;
}

namespace {

bool one_character(const std::string& text) {
  size_t i = 0;
  return !text.empty() && (utf8::next(text, i), i == text.size());
}

}  // namespace

std::string replace_each(Dialect dialect, const std::string& x,
                         const std::vector<std::pair<std::string, std::string>>& pairs) {
  const bool translates = dialect == Dialect::postgres || dialect == Dialect::duckdb || dialect == Dialect::spark;
  std::string out = x;
  for (size_t i = 0; i < pairs.size();) {
    std::string from, to;  // the run's characters, in order
    size_t end = i;
    for (; translates && end < pairs.size(); ++end) {
      const auto& [f, t] = pairs[end];
      if (!one_character(f) || !one_character(t) || from.find(t) != std::string::npos ||
          to.find(f) != std::string::npos || t == f)
        break;
      if (from.find(f) != std::string::npos) continue;  // replaced already: the later pair finds none
      from += f;
      to += t;
    }
    if (end - i > 1) {
      out = std::string("translate(") + out + ", " + literal(dialect, from) + ", " + literal(dialect, to) + ")";
      i = end;
      continue;
    }
    out = std::string(dialect == Dialect::mysql ? "REPLACE(" : "replace(") + out + ", " + literal(dialect, pairs[i].first) +
          ", " + literal(dialect, pairs[i].second) + ")";
    ++i;
  }
  return out;
}

namespace {

// Every code point that full case folding changes, with its folded form
// (CaseFolding.txt statuses C and F, through ICU like fold_case).
const std::vector<std::pair<char32_t, std::u32string>>& case_foldings() {
  static const std::vector<std::pair<char32_t, std::u32string>> foldings = [] {
    std::vector<std::pair<char32_t, std::u32string>> out;
    for (char32_t c = 0; c <= 0x10FFFF; ++c) {
      if (!u_hasBinaryProperty(static_cast<UChar32>(c), UCHAR_CHANGES_WHEN_CASEFOLDED)) continue;
      std::string one;
      utf8::append(one, c);
      const std::string folded = fold_case(one);
      std::u32string code_points;
      for (size_t i = 0; i < folded.size();) code_points.push_back(utf8::next(folded, i));
      if (code_points != std::u32string(1, c)) out.emplace_back(c, std::move(code_points));
    }
    return out;
  }();
  return foldings;
}

}  // namespace

std::optional<std::vector<std::pair<std::string, std::string>>> case_folding_for(const std::u32string& alphabet) {
  const auto& foldings = case_foldings();
  auto changed_by_folding = [&](char32_t c) {
    return std::binary_search(foldings.begin(), foldings.end(), std::make_pair(c, std::u32string()),
                              [](const auto& a, const auto& b) { return a.first < b.first; });
  };
  for (const char32_t c : alphabet)
    if (changed_by_folding(c)) return std::nullopt;
  std::vector<std::pair<std::string, std::string>> pairs;
  for (const auto& [c, folded] : foldings) {
    if (!std::all_of(folded.begin(), folded.end(), [&](char32_t f) { return alphabet.find(f) != alphabet.npos; }))
      continue;
    std::string from, to;
    utf8::append(from, c);
    for (const char32_t f : folded) utf8::append(to, f);
    pairs.emplace_back(std::move(from), std::move(to));
  }
  // The pairs apply in any order (no folded form holds a character that
  // folding changes); those of one character each go first, so they form
  // one run for replace_each's translate.
  std::stable_partition(pairs.begin(), pairs.end(), [](const auto& p) { return one_character(p.second); });
  return pairs;
}

std::string char_length(Dialect dialect, const std::string& x) {
  switch (dialect) {
    case Dialect::postgres:
    case Dialect::mysql: return std::string("CHAR_LENGTH(") + x + ")";
    case Dialect::sqlite:
    case Dialect::duckdb:
    case Dialect::spark: return std::string("length(") + x + ")";
  }
  return {};
}

std::string position(Dialect dialect, const std::string& needle, const std::string& x) {
  switch (dialect) {
    case Dialect::postgres: return std::string("strpos(") + x + ", " + needle + ")";
    case Dialect::mysql: return std::string("LOCATE(") + needle + ", " + x + ")";
    case Dialect::sqlite:
    case Dialect::duckdb:
    case Dialect::spark: return std::string("instr(") + x + ", " + needle + ")";
  }
  return {};
}

std::string substring(Dialect dialect, const std::string& x, const std::string& start, const std::string& length) {
  const char* name = dialect == Dialect::mysql ? "SUBSTRING(" : "substr(";
  return std::string(name) + x + ", " + start + (length.empty() ? std::string() : ", " + length) + ")";
}

std::string text_type(Dialect dialect) {
  switch (dialect) {
    case Dialect::mysql: return "CHAR";
    case Dialect::spark: return "STRING";
    case Dialect::duckdb: return "VARCHAR";
    case Dialect::postgres:
    case Dialect::sqlite: return "TEXT";
  }
  return {};
}

std::string as_text(Dialect dialect, const std::string& x) {
  return std::string("CAST(") + x + " AS " + text_type(dialect) + ")";
}

std::string scaled_number(Dialect dialect, const std::string& plain, int scale, bool hundredths) {
  const int shift = hundredths ? 2 : 0;
  // Beyond these integer digits (leading zeros aside) no value fits 64 bits
  // at the scale; only the first dropped fraction digit decides the rounding.
  const int integer_digits = 19 - scale + shift;
  const int kept_fraction = scale + 1 + shift;
  const std::string decimal_type = dialect == Dialect::postgres ? "NUMERIC" : "DECIMAL";
  const std::string fits =
      regex_matches(dialect, plain,
                    regex_whole(dialect, std::string("[+-]?0*[0-9]{0,") + std::to_string(integer_digits) + "}(?:\\.[0-9]*)?"));
  const std::string kept =
      regex_first_match(dialect, plain, std::string("^[+-]?[0-9]*(?:\\.[0-9]{0,") + std::to_string(kept_fraction) + "})?");
  const std::string type = scale == 0 ? (dialect == Dialect::mysql ? std::string("SIGNED") : std::string("BIGINT"))
                                      : decimal_type + "(19, " + std::to_string(scale) + ")";
  // The kept text read as DECIMAL(width, kept_fraction), rounded to the scale.
  auto rounded = [&](int width) {
    std::string value = std::string("CAST(") + kept + " AS " + decimal_type + "(" + std::to_string(width) + ", " +
                        std::to_string(kept_fraction) + "))";
    if (hundredths) value = std::string("(") + value + " * 0.01)";
    return std::string("ROUND(") + value + ", " + std::to_string(scale) + ")";
  };
  const std::string wide = rounded(integer_digits + kept_fraction);
  // -2^63 and 2^63 - 1 at the scale.
  auto bound = [&](std::string_view magnitude, bool negative) {
    const size_t whole = magnitude.size() - static_cast<size_t>(scale);
    std::string out = negative ? "-" : "";
    out.append(magnitude.substr(0, whole));
    if (scale > 0) {
      out += '.';
      out.append(magnitude.substr(whole));
    }
    return out;
  };
  std::string converted = std::string("CASE WHEN ") + wide + " BETWEEN " + bound("9223372036854775808", true) + " AND " +
                          bound("9223372036854775807", false) + "\n                        THEN CAST(" + wide + " AS " +
                          type + ") END";
  // DuckDB reads text into a DECIMAL wider than 18 digits (a 128-bit
  // integer) some thirty times slower than into DECIMAL(18, s), so text
  // short enough for 18 digits takes the narrow type, whose values always
  // fit 64 bits at the scale. When the kept fraction fills 18 digits no
  // text is that short (and DECIMAL(18, s) needs s <= 18).
  constexpr int kNarrow = 18;
  if (dialect == Dialect::duckdb && integer_digits + kept_fraction > kNarrow && kept_fraction < kNarrow)
    converted = std::string("CASE WHEN ") + char_length(dialect, kept) + " <= " + std::to_string(kNarrow - kept_fraction) +
                "\n                        THEN CAST(" + rounded(kNarrow) + " AS " + type + ")\n                        ELSE " +
                converted + " END";
  return std::string("CASE WHEN ") + fits + "\n              THEN " + converted + " END";
}

std::string same_or_both_null(Dialect dialect, const std::string& a, const std::string& b) {
  switch (dialect) {
    case Dialect::postgres:
    case Dialect::duckdb: return a + std::string(" IS NOT DISTINCT FROM ") + b;
    case Dialect::mysql:
    case Dialect::spark: return a + std::string(" <=> ") + b;
    case Dialect::sqlite: return a + std::string(" IS ") + b;
  }
  return {};
}

}  // namespace tamis::sql
