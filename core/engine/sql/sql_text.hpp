// Writing SQL text per dialect: identifiers, string literals, regular
// expressions and the few functions whose spelling differs. Every step's SQL
// generation goes through these, so quoting rules live in one place.
//
// Literals keep printable characters as they are (readable scripts); control
// characters and the invisible White_Space characters are written as code
// points (chr(9), char(160), _utf8mb4 X'C2A0', '\u00A0' in Spark), joined
// with the dialect's concatenation (CONCAT in MySQL, where || means OR).
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "error.hpp"
#include "steps/step.hpp"

namespace tamis::sql {

// "name" (PostgreSQL, SQLite, DuckDB), `name` (MySQL, Spark); the quote
// character doubled inside.
std::string identifier(Dialect dialect, std::string_view name);
// A text literal for valid UTF-8 text without NUL (callers check with
// literal_problem first).
std::string literal(Dialect dialect, std::string_view text);
// Why `text` cannot be written as a literal (empty when it can).
std::string literal_problem(std::string_view text);
// a || b || c, or CONCAT(a, b, c) in MySQL.
std::string concat(Dialect dialect, const std::vector<std::string>& parts);

// A regular-expression fragment matching exactly these characters as a set:
// every character but ASCII letters and digits is written as a code point
// escape (\uXXXX in PostgreSQL's AREs, \x{X} in RE2, PCRE2, ICU and Java),
// so no character can be taken for syntax. Ranges are merged.
std::string regex_class(Dialect dialect, const std::u32string& characters);
// The characters of Unicode's White_Space property (PropList.txt), in order.
const std::u32string& white_space_characters();

// Whether the dialect has regular expressions in SQL (SQLite has none).
bool has_regex(Dialect dialect);
// x matches the whole regular expression `pattern` (anchors included by the caller).
std::string regex_matches(Dialect dialect, const std::string& x, const std::string& pattern);
// Every match of `pattern` in x replaced by `replacement` (plain text, no references).
std::string regex_replace_all(Dialect dialect, const std::string& x, const std::string& pattern,
                              const std::string& replacement);
// The first match of `pattern` in x ('' when none).
std::string regex_first_match(Dialect dialect, const std::string& x, const std::string& pattern);

// Removes every character of `characters` at the given side(s) of x
// ("both", "leading", "trailing").
std::string trim_characters(Dialect dialect, const std::string& x, const std::u32string& characters,
                            std::string_view side);

// The value that equality, GROUP BY and PARTITION BY must see so text
// compares code point by code point: MySQL/MariaDB's binary collations pad
// with spaces ('a' = 'a '), so there the bytes are compared.
std::string exact_key(Dialect dialect, const std::string& x, Type type);

// NULL-safe equality (IS NOT DISTINCT FROM, <=> in MySQL and Spark, IS in SQLite).
std::string same_or_both_null(Dialect dialect, const std::string& a, const std::string& b);

}  // namespace tamis::sql
