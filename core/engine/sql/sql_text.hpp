// Writing SQL text per dialect: identifiers, string literals, regular
// expressions and the few functions whose spelling differs. Every step's SQL
// generation goes through these, so quoting rules live in one place.
//
// Literals keep printable characters as they are (readable scripts); control
// characters and the invisible White_Space characters are written as code
// points (chr(9), char(160), _utf8mb4 X'C2A0', '\u00A0' in Spark), joined
// with the dialect's concatenation (CONCAT in MySQL, where || means OR).
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <utility>
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
// A pattern matching the whole text when `body` does: ^(?:body) and the end
// of text ($ in PostgreSQL's AREs and RE2; \z in PCRE, ICU and Java, whose $
// also matches before a final line break).
std::string regex_whole(Dialect dialect, const std::string& body);
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

// x with every (from, to) pair replaced in turn: nested REPLACE calls, which
// in every dialect replace a text exactly, code point by code point. Where
// the dialect has translate() (PostgreSQL, DuckDB, Spark), a run of pairs of
// one character each becomes one translate call when no pair of the run
// makes a character that another pair of the run replaces: replacing them
// all at once is then the same as in turn, in one pass over the text
// instead of one per pair (case folding maps some thirty letters).
std::string replace_each(Dialect dialect, const std::string& x,
                         const std::vector<std::pair<std::string, std::string>>& pairs);

// The (character, folded form) pairs of Unicode full case folding (as the
// engine's fold_case) needed to compare a value with texts made of the
// characters of `alphabet`: every character whose folded form lies in the
// alphabet. Any other character that folding changes is left as it is; such
// a character never occurs in a folded text, so the value still differs from
// every folded text of the alphabet, as its full folding would. Nullopt when
// a character of the alphabet is itself changed by folding (the alphabet is
// not folded text). Applied with replace_each; the pairs whose folded form
// is one character come first.
std::optional<std::vector<std::pair<std::string, std::string>>> case_folding_for(const std::u32string& alphabet);

// The number of code points of x (LENGTH counts bytes in MySQL).
std::string char_length(Dialect dialect, const std::string& x);
// The 1-based code point position of the first `needle` in x, 0 when none.
std::string position(Dialect dialect, const std::string& needle, const std::string& x);
// The code points of x from `start` (1-based), to the end or `length` of them.
std::string substring(Dialect dialect, const std::string& x, const std::string& start,
                      const std::string& length = {});

// The text type's name in CAST (TEXT, CHAR in MySQL, VARCHAR, STRING).
std::string text_type(Dialect dialect);
// The value in its canonical text (design §3) in dialects whose CAST to text
// writes BIGINT, DECIMAL(p, s) at its scale and DATE as ISO 8601.
std::string as_text(Dialect dialect, const std::string& x);

// The number the text `plain` holds ([sign] digits [. digits], at least one
// digit: the caller checks the shape), divided by 100 when `hundredths`,
// rounded half away from zero to `scale` decimals from the first dropped
// digit (as expr::read_scaled), as BIGINT (scale 0) or DECIMAL(19, scale);
// NULL when it falls outside a 64-bit integer at that scale. Needs regular
// expressions (not SQLite).
std::string scaled_number(Dialect dialect, const std::string& plain, int scale, bool hundredths);

// NULL-safe equality (IS NOT DISTINCT FROM, <=> in MySQL and Spark, IS in SQLite).
std::string same_or_both_null(Dialect dialect, const std::string& a, const std::string& b);

}  // namespace tamis::sql
