#include "sql/sql_text.hpp"

#include <algorithm>
#include <cstdio>

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
      // MySQL's TRIM removes a whole string, not a set of characters.
      const std::string set = regex_class(dialect, characters) + "+";
      const std::string pattern = side == "both"      ? std::string("^") + set + std::string("|") + set + "$"
                                  : side == "leading" ? std::string("^") + set
                                                      : set + "$";
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
