// The text steps: collapse_spaces, change_case, normalize_unicode,
// replace_text, map_values, to_null, split_column. Expected values come from
// the Unicode Character Database files named beside each check (PropList.txt,
// UnicodeData.txt, SpecialCasing.txt, CaseFolding.txt, Unicode 15.0 as in
// Debian's unicode-data and ICU 72), from Python's re module where its
// semantics coincide with ICU's, or from ICU's own RegexMatcher::replaceAll
// as the reference for the replacement loop.
#include <doctest/doctest.h>
#include <unicode/regex.h>
#include <unicode/ucasemap.h>

#include <nlohmann/json.hpp>

#include <optional>
#include <string>
#include <vector>

#include "recipe.hpp"
#include "steps/registry.hpp"
#include "steps/replace_text.hpp"
#include "unit_support.hpp"
#include "utf8.hpp"

namespace tamis {
namespace {

using nlohmann::json;
using Cell = std::optional<std::string>;
using test::Rows;

// A table of text columns; rows are cut into chunks of chunk_rows rows, so
// the steps meet more than one chunk per column.
Table text_table(const std::vector<std::string>& names, const std::vector<std::vector<Cell>>& rows,
                 size_t chunk_rows = 2) {
  std::vector<ColumnPtr> columns;
  for (size_t c = 0; c < names.size(); ++c) {
    auto column = std::make_shared<Column>(Type::text);
    for (size_t start = 0; start < rows.size(); start += chunk_rows) {
      TextChunkBuilder builder;
      for (size_t r = start; r < std::min(rows.size(), start + chunk_rows); ++r)
        if (rows[r][c]) builder.append(*rows[r][c]);
        else builder.append_null();
      column->append_chunk(builder.finish());
    }
    columns.push_back(column);
  }
  auto lines = std::make_shared<Column>(Type::integer);
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = rows.size();
  for (size_t r = 0; r < rows.size(); ++r) chunk->numbers.push_back(static_cast<int64_t>(r + 2));  // line 1: header
  lines->append_chunk(chunk);
  auto table = Table::make(names, columns, lines);
  REQUIRE_MESSAGE(table.ok(), (table.ok() ? "" : table.error().to_string()));
  return std::move(table).value();
}

// One column named "v".
Table values(const std::vector<Cell>& cells) {
  std::vector<std::vector<Cell>> rows;
  for (const Cell& c : cells) rows.push_back({c});
  return text_table({"v"}, rows);
}

std::vector<std::string> column_cells(const Table& table, size_t c = 0) {
  std::vector<std::string> out;
  for (size_t r = 0; r < table.row_count(); ++r)
    out.push_back(table.column(c).is_null(r) ? "<NULL>" : std::string(table.column(c).text(r)));
  return out;
}

std::unique_ptr<Step> parse_ok(const json& step, const Schema& schema) {
  auto parsed = parse_step(step, 0, schema);
  REQUIRE_MESSAGE(parsed.ok(), (parsed.ok() ? "" : parsed.error().to_string()));
  return std::move(parsed).value();
}

struct Applied {
  Table table;
  ChangeRecord change;
};

Applied apply_ok(const json& step, const Table& in) {
  auto parsed = parse_ok(step, schema_of(in));
  ChangeRecord change;
  auto state = parsed->start();
  auto out = parsed->apply(in, state.get(), change);
  REQUIRE_MESSAGE(out.ok(), (out.ok() ? "" : out.error().to_string()));
  return {std::move(out).value(), change};
}

std::vector<std::string> apply_to(const json& step, const std::vector<Cell>& cells) {
  return column_cells(apply_ok(step, values(cells)).table);
}

// The error of a step definition that must not parse (step index 3).
Error parse_error(const json& step, const Schema& schema) {
  auto parsed = parse_step(step, 3, schema);
  REQUIRE_FALSE(parsed.ok());
  Error e = parsed.take_error();
  CHECK(e.kind == ErrorKind::usage);
  REQUIRE(e.step);
  CHECK(*e.step == 3);
  return e;
}

const Schema kTextAndNumber = {{"site", Type::text, 0}, {"count", Type::integer, 0}};

// Every step rejects a misspelt key, an unknown column and a non-text
// column, naming the op and the key in the message.
void check_common_errors(const json& valid, const std::string& column_key) {
  const std::string op = valid["op"];
  REQUIRE(parse_step(valid, 0, kTextAndNumber).ok());
  json extra = valid;
  extra["colour"] = "red";
  Error e = parse_error(extra, kTextAndNumber);
  CHECK(e.message.find("(" + op + ") 'colour'") != std::string::npos);
  CHECK(e.message.find("not a parameter") != std::string::npos);

  json unknown = valid;
  unknown[column_key] = column_key == "column" ? json("plot") : json::array({"plot"});
  e = parse_error(unknown, kTextAndNumber);
  CHECK(e.message.find("'" + column_key + "'") != std::string::npos);
  CHECK(e.message.find("no column named 'plot'") != std::string::npos);

  json typed = valid;
  typed[column_key] = column_key == "column" ? json("count") : json::array({"count"});
  e = parse_error(typed, kTextAndNumber);
  CHECK(e.message.find("'count' is integer") != std::string::npos);

  json wrong_type = valid;
  wrong_type[column_key] = 7;
  e = parse_error(wrong_type, kTextAndNumber);
  CHECK(e.message.find("'" + column_key + "'") != std::string::npos);

  json missing = valid;
  missing.erase(column_key);
  e = parse_error(missing, kTextAndNumber);
  CHECK(e.message.find("is required") != std::string::npos);
}

// parameters() written back with the op parses to the same parameters.
void check_round_trip(const json& definition, const Schema& schema) {
  const auto step = parse_ok(definition, schema);
  json again = json::parse(step->parameters().dump());
  again["op"] = definition["op"];
  const auto reparsed = parse_ok(again, schema);
  CHECK(reparsed->parameters() == step->parameters());
  for (auto it = definition.begin(); it != definition.end(); ++it)
    if (it.key() != "op") CHECK_MESSAGE(again[it.key()] == it.value(), it.key());
}

// ---------------------------------------------------------------- collapse_spaces

// The 25 characters with the White_Space property (PropList.txt, Unicode 15.0).
const char32_t kWhiteSpace[] = {0x09,   0x0A,   0x0B,   0x0C,   0x0D,   0x20,   0x85,   0xA0,   0x1680,
                                0x2000, 0x2001, 0x2002, 0x2003, 0x2004, 0x2005, 0x2006, 0x2007, 0x2008,
                                0x2009, 0x200A, 0x2028, 0x2029, 0x202F, 0x205F, 0x3000};

std::string utf8_of(char32_t c) {
  std::string s;
  utf8::append(s, c);
  return s;
}

// "x" + middle + "y" (built by appending: GCC 12 warns wrongly about
// operator+ chains here, GCC bug 105329).
std::string framed(const std::string& middle) {
  std::string s = "x";
  s += middle;
  s += 'y';
  return s;
}

const json kCollapse = {{"op", "collapse_spaces"}, {"columns", {"v"}}};

TEST_CASE("unit_steps_text: collapse_spaces turns inner runs into one space and leaves the ends") {
  CHECK(apply_to(kCollapse, {"a  b", "a\tb", "a \t\r\n b   c", "  a  b  ", "a b", "", "   ", std::nullopt}) ==
        std::vector<std::string>{"a b", "a b", "a b c", "  a b  ", "a b", "", "   ", "<NULL>"});
  // Non-ASCII text around the runs is copied as it is.
  CHECK(apply_to(kCollapse, {"Ærøskøbing \u3000 Kommune", "東京\u00A0\u00A0都"}) ==
        std::vector<std::string>{"Ærøskøbing Kommune", "東京 都"});
}

TEST_CASE("unit_steps_text: collapse_spaces knows exactly the White_Space characters of PropList.txt") {
  for (const char32_t ws : kWhiteSpace) {
    const std::string inner = framed(utf8_of(ws));
    CHECK_MESSAGE(apply_to(kCollapse, {inner})[0] == (ws == ' ' ? inner : "x y"), static_cast<uint32_t>(ws));
  }
  // Not White_Space (PropList.txt): information separators U+001C..U+001F,
  // zero width space U+200B, word joiner U+2060, BOM U+FEFF, Mongolian vowel
  // separator U+180E (removed from White_Space in Unicode 6.3).
  for (const char32_t other : {0x1C, 0x1F, 0x200B, 0x2060, 0xFEFF, 0x180E}) {
    const std::string inner = framed(utf8_of(other) + utf8_of(other));
    CHECK_MESSAGE(apply_to(kCollapse, {inner})[0] == inner, static_cast<uint32_t>(other));
  }
}

TEST_CASE("unit_steps_text: collapse_spaces records changes and shares untouched chunks") {
  const Table in = text_table({"v", "w"}, {{"a b", "p  q"}, {"c d", "r"}, {"e  f", "s"}, {std::nullopt, "t"}});
  const auto [out, change] = apply_ok({{"op", "collapse_spaces"}, {"columns", {"v", "w"}}}, in);
  CHECK(test::rows_of(out) == Rows{{"a b", "p q"}, {"c d", "r"}, {"e f", "s"}, {"<NULL>", "t"}});
  CHECK(test::lines_of(out) == test::lines_of(in));
  CHECK(out.column(0).chunk_ptr(0) == in.column(0).chunk_ptr(0));  // rows 0-1 of v did not change
  CHECK(out.column(0).chunk_ptr(1) != in.column(0).chunk_ptr(1));
  CHECK(change.cells_changed.at("v") == 1);
  CHECK(change.cells_changed.at("w") == 1);
  CHECK(change.rows_in == 4);
  CHECK(change.rows_out == 4);
  REQUIRE_FALSE(change.samples().empty());
  CHECK(change.samples()[0].before == "e  f");
}

TEST_CASE("unit_steps_text: collapse_spaces on an empty table, describe, parameters, errors") {
  CHECK(apply_ok(kCollapse, values({})).table.row_count() == 0);
  CHECK(parse_ok({{"op", "collapse_spaces"}, {"columns", {"site"}}}, kTextAndNumber)->describe() ==
        "Turn each run of white space inside the values of site into a single space.");
  check_round_trip({{"op", "collapse_spaces"}, {"columns", {"site"}}}, kTextAndNumber);
  check_common_errors({{"op", "collapse_spaces"}, {"columns", {"site"}}}, "columns");
}

// ---------------------------------------------------------------- change_case

json case_step(const std::string& to, std::optional<std::string> locale = std::nullopt) {
  json step = {{"op", "change_case"}, {"columns", {"v"}}, {"to", to}};
  if (locale) step["locale"] = *locale;
  return step;
}

TEST_CASE("unit_steps_text: change_case uses the full case mappings of SpecialCasing.txt") {
  // SpecialCasing.txt: 00DF -> 0053 0053; FB01 -> 0046 0049; 0149 -> 02BC 004E.
  CHECK(apply_to(case_step("upper"), {"straße", "ﬁx", "ŉ", "Ærø", std::nullopt, ""}) ==
        std::vector<std::string>{"STRASSE", "FIX", "ʼN", "ÆRØ", "<NULL>", ""});
  // SpecialCasing.txt: 0130 lowers to 0069 0307 (no locale); 03A3 lowers to
  // 03C2 at the end of a word (Final_Sigma) and to 03C3 elsewhere.
  CHECK(apply_to(case_step("lower"), {"İstanbul", "ΟΔΟΣ ΣΟΦΙΑΣ", "ÀÉÎ"}) ==
        std::vector<std::string>{"i\u0307stanbul", "οδος σοφιας", "àéî"});
}

TEST_CASE("unit_steps_text: change_case with locale tr follows the Turkic rules of SpecialCasing.txt") {
  // SpecialCasing.txt, conditional mappings for tr and az: 0069 uppers to
  // 0130, 0049 lowers to 0131, 0130 lowers to 0069.
  CHECK(apply_to(case_step("upper", "tr"), {"istanbul", "diyarbakır"}) ==
        std::vector<std::string>{"İSTANBUL", "DİYARBAKIR"});
  CHECK(apply_to(case_step("lower", "tr"), {"ISPARTA", "İZMİR"}) == std::vector<std::string>{"ısparta", "izmir"});
  CHECK(apply_to(case_step("upper"), {"istanbul"}) == std::vector<std::string>{"ISTANBUL"});
  CHECK(apply_to(case_step("lower", "az"), {"I"}) == std::vector<std::string>{"ı"});
}

TEST_CASE("unit_steps_text: change_case title case by Unicode word boundaries (UAX #29)") {
  // UnicodeData.txt: U+01C6 (dž) has the title case mapping U+01C5 (ǅ).
  // UAX #29: an apostrophe or full stop between letters (MidNumLet) does not
  // break a word; a hyphen, space or colon does (ICU's root rules).
  CHECK(apply_to(case_step("title"), {"hello wORLD", "o'neil", "ǆemal", "élan vital", "van der BERG-smith",
                                      "a.b c:d", "3rd street", std::nullopt}) ==
        std::vector<std::string>{"Hello World", "O'neil", "ǅemal", "Élan Vital", "Van Der Berg-Smith", "A.b C:D",
                                 "3rd Street", "<NULL>"});
  // Dutch titlecases the digraph IJ at the start of a word (ICU's nl rule,
  // CLDR/ICU user guide "Case Mappings": from memory).
  CHECK(apply_to(case_step("title", "nl"), {"ijsland"}) == std::vector<std::string>{"IJsland"});
  CHECK(apply_to(case_step("title"), {"ijsland"}) == std::vector<std::string>{"Ijsland"});
  // Turkish title case of a word starting with i.
  CHECK(apply_to(case_step("title", "tr"), {"izmir ILICA"}) == std::vector<std::string>{"İzmir Ilıca"});
}

TEST_CASE("unit_steps_text: change_case's ASCII fast path equals ICU on every ASCII character") {
  std::string ascii;
  for (char c = 1; c < 0x7F; ++c) ascii += c;
  for (const char* locale : {"", "de", "lt", "el", "nl", "tr"})
    for (const bool upper : {false, true}) {
      UErrorCode status = U_ZERO_ERROR;
      UCaseMap* map = ucasemap_open(locale, 0, &status);
      char expected[256];
      const int32_t n = upper ? ucasemap_utf8ToUpper(map, expected, 256, ascii.data(), 126, &status)
                              : ucasemap_utf8ToLower(map, expected, 256, ascii.data(), 126, &status);
      ucasemap_close(map);
      REQUIRE(U_SUCCESS(status));
      const auto step = case_step(upper ? "upper" : "lower", *locale ? std::optional<std::string>(locale) : std::nullopt);
      CHECK_MESSAGE(apply_to(step, {ascii})[0] == std::string(expected, n), locale, " ", upper);
    }
}

TEST_CASE("unit_steps_text: change_case leaves unchanged values shared and counts changes") {
  const Table in = values({"OAK", "ELM", "pine", "ASH"});
  const auto [out, change] = apply_ok(case_step("upper"), in);
  CHECK(column_cells(out) == std::vector<std::string>{"OAK", "ELM", "PINE", "ASH"});
  CHECK(out.column(0).chunk_ptr(0) == in.column(0).chunk_ptr(0));
  CHECK(change.cells_changed.at("v") == 1);
  CHECK(apply_ok(case_step("title"), values({})).table.row_count() == 0);
}

TEST_CASE("unit_steps_text: change_case describe, parameters and errors") {
  CHECK(parse_ok({{"op", "change_case"}, {"columns", {"site"}}, {"to", "upper"}, {"locale", "tr"}}, kTextAndNumber)
            ->describe() == "Convert site to upper case, with the case rules of tr.");
  check_round_trip({{"op", "change_case"}, {"columns", {"site"}}, {"to", "title"}}, kTextAndNumber);
  check_round_trip({{"op", "change_case"}, {"columns", {"site"}}, {"to", "lower"}, {"locale", "de-CH"}},
                   kTextAndNumber);
  check_common_errors({{"op", "change_case"}, {"columns", {"site"}}, {"to", "lower"}}, "columns");
  const json base = {{"op", "change_case"}, {"columns", {"site"}}};
  CHECK(parse_error(base, kTextAndNumber).message.find("'to': is required") != std::string::npos);
  json bad = base;
  bad["to"] = "camel";
  CHECK(parse_error(bad, kTextAndNumber).message.find("expected one of lower, upper, title") != std::string::npos);
  bad["to"] = 1;
  CHECK(parse_error(bad, kTextAndNumber).message.find("'to'") != std::string::npos);
  bad["to"] = "lower";
  for (const json& locale : {json("en_US"), json("xx"), json(""), json("tr-"), json(5)}) {
    bad["locale"] = locale;
    CHECK_MESSAGE(parse_error(bad, kTextAndNumber).message.find("'locale'") != std::string::npos, locale.dump());
  }
}

// ---------------------------------------------------------------- normalize_unicode

json normalize_step(const std::string& form, bool strip = false) {
  return {{"op", "normalize_unicode"}, {"columns", {"v"}}, {"form", form}, {"strip_accents", strip}};
}

TEST_CASE("unit_steps_text: normalize_unicode NFC and NFKC") {
  // UnicodeData.txt: 00E9 = 0065 0301 (canonical); FB01 <compat> 0066 0069;
  // FF21 <wide> 0041; 2460 <circle> 0031; 212B (Angstrom sign) = 00C5.
  CHECK(apply_to(normalize_step("NFC"), {"e\u0301te\u0301", "ﬁ", "Ａ", "\u212B", "plain", std::nullopt, ""}) ==
        std::vector<std::string>{"été", "ﬁ", "Ａ", "Å", "plain", "<NULL>", ""});
  CHECK(apply_to(normalize_step("NFKC"), {"e\u0301te\u0301", "ﬁ", "Ａ１", "①", "\u212B"}) ==
        std::vector<std::string>{"été", "fi", "A1", "1", "Å"});
}

TEST_CASE("unit_steps_text: normalize_unicode strip_accents drops nonspacing marks (Mn)") {
  // UnicodeData.txt: 00C5 = 0041 030A, 00F6 = 006F 0308, 00E8 = 0065 0300,
  // 00FB = 0075 0302; the marks 030A, 0308, 0300, 0302 are Mn. 00F8 (ø) and
  // 0142 (ł) have no decomposition. Hangul syllables decompose into jamo (Lo)
  // and compose again.
  CHECK(apply_to(normalize_step("NFC", true), {"Ångström", "crème brûlée", "Øresund Łódź", "한국어", "ﬁancé"}) ==
        std::vector<std::string>{"Angstrom", "creme brulee", "Øresund Łodz", "한국어", "ﬁance"});
  CHECK(apply_to(normalize_step("NFKC", true), {"ﬁancé", "Ｃａｆé"}) == std::vector<std::string>{"fiance", "Cafe"});
}

TEST_CASE("unit_steps_text: normalize_unicode shares unchanged chunks - describe, parameters, errors") {
  const Table in = values({"café", "tea", "cafe\u0301", "x"});
  const auto [out, change] = apply_ok(normalize_step("NFC"), in);
  CHECK(out.column(0).chunk_ptr(0) == in.column(0).chunk_ptr(0));
  CHECK(change.cells_changed.at("v") == 1);
  CHECK(apply_ok(normalize_step("NFKC", true), values({})).table.row_count() == 0);
  CHECK(parse_ok({{"op", "normalize_unicode"}, {"columns", {"site"}}, {"strip_accents", true}}, kTextAndNumber)
            ->describe() == "Normalize site to Unicode NFC, removing accents and other nonspacing marks.");
  check_round_trip({{"op", "normalize_unicode"}, {"columns", {"site"}}, {"form", "NFKC"}, {"strip_accents", false}},
                   kTextAndNumber);
  check_common_errors({{"op", "normalize_unicode"}, {"columns", {"site"}}, {"form", "NFC"}}, "columns");
  json bad = {{"op", "normalize_unicode"}, {"columns", {"site"}}, {"form", "NFD"}};
  CHECK(parse_error(bad, kTextAndNumber).message.find("expected one of NFC, NFKC") != std::string::npos);
  bad["form"] = "NFC";
  bad["strip_accents"] = "yes";
  CHECK(parse_error(bad, kTextAndNumber).message.find("'strip_accents': expected true or false") != std::string::npos);
}

// ---------------------------------------------------------------- replace_text

json replace_step(const std::string& match, const std::string& find, const std::string& replace) {
  return {{"op", "replace_text"}, {"columns", {"v"}}, {"find", find}, {"replace", replace}, {"match", match}};
}

TEST_CASE("unit_steps_text: replace_text literal replaces every occurrence, left to right") {
  CHECK(apply_to(replace_step("literal", "-", "/"), {"a-b-c", "abc", "-", std::nullopt, ""}) ==
        std::vector<std::string>{"a/b/c", "abc", "/", "<NULL>", ""});
  // Python: "aaaaa".replace("aa", "b") == "bba" (non-overlapping, left to right).
  CHECK(apply_to(replace_step("literal", "aa", "b"), {"aaaaa"}) == std::vector<std::string>{"bba"});
  CHECK(apply_to(replace_step("literal", "ß", "ss"), {"Straße, Großweg"}) ==
        std::vector<std::string>{"Strasse, Grossweg"});
  CHECK(apply_to(replace_step("literal", " (approx.)", ""), {"12 (approx.)"}) == std::vector<std::string>{"12"});
  // Without replace, the matches are deleted.
  CHECK(apply_to({{"op", "replace_text"}, {"columns", {"v"}}, {"find", "#"}}, {"#12#"}) ==
        std::vector<std::string>{"12"});
  // Case-sensitive, code point by code point: no match across case or
  // canonical equivalence.
  CHECK(apply_to(replace_step("literal", "é", "e"), {"É", "e\u0301"}) == std::vector<std::string>{"É", "e\u0301"});
  // $ has no meaning outside regex.
  CHECK(apply_to(replace_step("literal", "x", "$1"), {"x"}) == std::vector<std::string>{"$1"});
}

TEST_CASE("unit_steps_text: replace_text entire replaces whole values only") {
  CHECK(apply_to(replace_step("entire", "n/a", "unknown"), {"n/a", "n/a ", "N/A", "n/a/b", std::nullopt}) ==
        std::vector<std::string>{"unknown", "n/a ", "N/A", "n/a/b", "<NULL>"});
  // An empty find fills empty values; NULL is not empty and stays NULL.
  CHECK(apply_to(replace_step("entire", "", "(none)"), {"", std::nullopt, " "}) ==
        std::vector<std::string>{"(none)", "<NULL>", " "});
}

TEST_CASE("unit_steps_text: replace_text regex with groups, flags and Unicode properties") {
  CHECK(apply_to(replace_step("regex", "(\\d+)-(\\d+)", "$2-$1"), {"12-34", "x 1-2 y 3-4", "none"}) ==
        std::vector<std::string>{"34-12", "x 2-1 y 4-3", "none"});
  CHECK(apply_to(replace_step("regex", "(?<day>\\d\\d)/(?<month>\\d\\d)", "${month}/${day}"), {"16/12"}) ==
        std::vector<std::string>{"12/16"});
  CHECK(apply_to(replace_step("regex", "(?i)oak", "Quercus"), {"OAK", "Red oak"}) ==
        std::vector<std::string>{"Quercus", "Red Quercus"});
  CHECK(apply_to(replace_step("regex", "\\p{Lu}", "_"), {"ÅbcDÉ"}) == std::vector<std::string>{"_bc__"});
  CHECK(apply_to(replace_step("regex", "\\s+", " "), {"a\u3000\u00A0b"}) == std::vector<std::string>{"a b"});
  CHECK(apply_to(replace_step("regex", "\\d", "\\$"), {"a1"}) == std::vector<std::string>{"a$"});
  // Python: re.sub("x*", "-", "abc") == "-a-b-c-" (empty matches at every position).
  CHECK(apply_to(replace_step("regex", "x*", "-"), {"abc"}) == std::vector<std::string>{"-a-b-c-"});
  // Python: re.sub("^", ">", "") == ">" (an empty value can match).
  CHECK(apply_to(replace_step("regex", "^", ">"), {"", std::nullopt}) == std::vector<std::string>{">", "<NULL>"});
}

TEST_CASE("unit_steps_text: replace_text regex equals ICU's own replaceAll") {
  const std::vector<std::pair<std::string, std::string>> cases = {
      {"(a)|b", "[$1]"},   {"é+", "\\u00E9"}, {"(\\w+)@(\\w+)", "$2 at $1"}, {"(?m)^", "> "},
      {"\\b", "|"},        {".", "$0$0"},      {"(x)?y", "<$1>"},             {"[\\x{1F600}-\\x{1F64F}]", "☺"},
      {"(?<n>\\d)", "${n}${n}"}, {"(.)(.)(.)(.)(.)(.)(.)(.)(.)(.)(.)", "$11$10$1"}};
  const std::vector<std::string> inputs = {"abba cab", "éé é", "anna@example north@pole", "l1\nl2", "hello world",
                                           "日本語", "xy y xyy", "smile 😀😃!", "a1b22", "abcdefghijklmn"};
  for (const auto& [pattern_text, replacement_text] : cases)
    for (const std::string& input : inputs) {
      // Named copies: clang 14 cannot capture structured bindings in doctest's message lambdas.
      const std::string& find = pattern_text;
      const std::string& replace = replacement_text;
      UErrorCode status = U_ZERO_ERROR;
      UParseError where;
      std::unique_ptr<icu::RegexPattern> pattern(
          icu::RegexPattern::compile(icu::UnicodeString::fromUTF8(find), 0, where, status));
      const icu::UnicodeString text = icu::UnicodeString::fromUTF8(input);  // the matcher keeps a reference
      std::unique_ptr<icu::RegexMatcher> matcher(pattern->matcher(text, status));
      std::string expected;
      matcher->replaceAll(icu::UnicodeString::fromUTF8(replace), status).toUTF8String(expected);
      REQUIRE(U_SUCCESS(status));
      CHECK_MESSAGE(apply_to(replace_step("regex", find, replace), {input})[0] == expected, find, " on ", input);
    }
}

TEST_CASE("unit_steps_text: replace_text checks the replacement when the recipe is loaded, as ICU would") {
  const Schema schema = {{"v", Type::text, 0}};
  const std::string find = "(a)(?<named>b)";
  const std::vector<std::string> replacements = {"$1",   "$2",       "$3",  "$12", "${named}", "${other}", "${}",
                                                 "$x",   "$",        "\\$", "\\",  "${named", "$0",       "$١",
                                                 "${n4med}", "${b0}", "x\\y", "$21"};
  for (const std::string& replace : replacements) {
    // ICU's verdict: run the replacement on a value that matches.
    UErrorCode status = U_ZERO_ERROR;
    UParseError where;
    std::unique_ptr<icu::RegexPattern> pattern(
        icu::RegexPattern::compile(icu::UnicodeString::fromUTF8(find), 0, where, status));
    const icu::UnicodeString text = icu::UnicodeString::fromUTF8("ab");  // the matcher keeps a reference
    std::unique_ptr<icu::RegexMatcher> matcher(pattern->matcher(text, status));
    matcher->replaceAll(icu::UnicodeString::fromUTF8(replace), status);
    const bool icu_accepts = U_SUCCESS(status);
    const auto parsed = parse_step(replace_step("regex", find, replace), 0, schema);
    // A lone trailing backslash is dropped silently by ICU; tamis refuses it.
    if (replace == "\\") {
      CHECK(icu_accepts);
      CHECK_FALSE(parsed.ok());
      continue;
    }
    CHECK_MESSAGE(parsed.ok() == icu_accepts, replace, " ICU: ", u_errorName(status));
    if (!parsed.ok()) CHECK(parsed.error().message.find("'replace'") != std::string::npos);
  }
}

TEST_CASE("unit_steps_text: replace_text regex errors point at the pattern") {
  const Schema schema = {{"v", Type::text, 0}};
  auto message = [&](const std::string& find) { return parse_error(replace_step("regex", find, ""), schema).message; };
  CHECK(message("ab(c").find("'find': not a valid regular expression: unbalanced parentheses at character 4") !=
        std::string::npos);
  CHECK(message("ab\\qc").find("unknown backslash escape") != std::string::npos);
  CHECK(message("ab\\qc").find("at character 4") != std::string::npos);
  CHECK(message("[a-").find("'find'") != std::string::npos);
  CHECK(message("a{3,1}").find("max below min") != std::string::npos);
  CHECK(message("(?<=a+)b").find("look-behind") != std::string::npos);
  CHECK(message("x\n(y").find("of line 2") != std::string::npos);
  CHECK(message("").find("must not be empty") != std::string::npos);
}

TEST_CASE("unit_steps_text: replace_text stops a runaway regex with an error naming the line") {
  // (a+)+$ backtracks exponentially on a run of a's that ends otherwise
  // (the classic catastrophic-backtracking example, common practice).
  const Table in = values({"fine", std::nullopt, std::string(40, 'a') + "!"});
  const auto step = parse_ok(replace_step("regex", "(a+)+$", "x"), schema_of(in));
  ChangeRecord change;
  auto out = step->apply(in, nullptr, change);
  REQUIRE_FALSE(out.ok());
  CHECK(out.error().kind == ErrorKind::bad_input);
  CHECK(out.error().line == 4);
  CHECK(out.error().message.find("value of v at line 4") != std::string::npos);
  CHECK(out.error().message.find("time limit") != std::string::npos);

  // (?:a|b)*c keeps a backtracking frame per character: 2 million of them
  // exceed the stack limit.
  const Table long_value = values({std::string(2'000'000, 'a')});
  const auto greedy = parse_ok(replace_step("regex", "(?:a|b)*c", "x"), schema_of(long_value));
  out = greedy->apply(long_value, nullptr, change);
  REQUIRE_FALSE(out.ok());
  CHECK(out.error().line == 2);
  CHECK(out.error().message.find("stack limit") != std::string::npos);
}

TEST_CASE("unit_steps_text: replace_text describe, parameters and errors") {
  CHECK(parse_ok({{"op", "replace_text"}, {"columns", {"site"}}, {"find", "St."}, {"replace", "Street"}},
                 kTextAndNumber)
            ->describe() == "In site, replace every \"St.\" with \"Street\".");
  CHECK(parse_ok({{"op", "replace_text"}, {"columns", {"site"}}, {"find", "\\s*\\(.*\\)"}, {"match", "regex"}},
                 kTextAndNumber)
            ->describe() == "In site, delete every match of the regular expression \\s*\\(.*\\).");
  check_round_trip(
      {{"op", "replace_text"}, {"columns", {"site"}}, {"find", "(\\d)"}, {"replace", "<$1>"}, {"match", "regex"}},
      kTextAndNumber);
  check_round_trip(
      {{"op", "replace_text"}, {"columns", {"site"}}, {"find", ""}, {"replace", "-"}, {"match", "entire"}},
      kTextAndNumber);
  check_common_errors({{"op", "replace_text"}, {"columns", {"site"}}, {"find", "a"}, {"replace", "b"}}, "columns");
  const json base = {{"op", "replace_text"}, {"columns", {"site"}}, {"find", "a"}, {"replace", "b"}};
  json bad = base;
  bad["match"] = "glob";
  CHECK(parse_error(bad, kTextAndNumber).message.find("expected one of literal, regex, entire") != std::string::npos);
  bad = base;
  bad["find"] = "";
  CHECK(parse_error(bad, kTextAndNumber).message.find("'find': must not be empty") != std::string::npos);
  bad = base;
  bad.erase("find");
  CHECK(parse_error(bad, kTextAndNumber).message.find("'find': is required") != std::string::npos);
  bad = base;
  bad["replace"] = json::array({"b"});
  CHECK(parse_error(bad, kTextAndNumber).message.find("'replace': expected text") != std::string::npos);
}

// ---------------------------------------------------------------- map_values

json map_step(json map, bool ignore_case = false) {
  return {{"op", "map_values"}, {"column", "v"}, {"map", std::move(map)}, {"ignore_case", ignore_case}};
}

TEST_CASE("unit_steps_text: map_values replaces whole values exactly") {
  const json map = {{"Q. robur", "Quercus robur"}, {"oak", "Quercus robur"}, {"Linde", "Tilia"}};
  CHECK(apply_to(map_step(map), {"oak", "Oak", "oak ", "Linde", "Q. robur", "Tilia", std::nullopt, ""}) ==
        std::vector<std::string>{"Quercus robur", "Oak", "oak ", "Tilia", "Quercus robur", "Tilia", "<NULL>", ""});
}

TEST_CASE("unit_steps_text: map_values ignore_case uses full case folding (CaseFolding.txt)") {
  // CaseFolding.txt: 00DF; F; 0073 0073 and 1E9E; F; 0073 0073 (ß and ẞ fold
  // to ss); 03A3, 03C3 and 03C2 all fold to 03C3.
  const json map = {{"Straße", "Strasse"}, {"ΣΟΦΙΑ", "Sofia"}, {"oak", "Oak"}};
  CHECK(apply_to(map_step(map, true), {"STRASSE", "strasse", "STRAẞE", "σοφια", "σοφιας", "OAK", "Oak", std::nullopt}) ==
        std::vector<std::string>{"Strasse", "Strasse", "Strasse", "Sofia", "σοφιας", "Oak", "Oak", "<NULL>"});
  // Without ignore_case none of them match.
  CHECK(apply_to(map_step(map), {"STRASSE", "OAK"}) == std::vector<std::string>{"STRASSE", "OAK"});
}

TEST_CASE("unit_steps_text: map_values parse errors") {
  const Schema schema = {{"v", Type::text, 0}};
  CHECK(parse_error(map_step({{"Oak", "Quercus"}, {"OAK", "Oak"}}, true), schema).message.find(
            "are the same ignoring case but map to different values") != std::string::npos);
  CHECK(parse_error(map_step({{"Straße", "A"}, {"STRASSE", "B"}}, true), schema).message.find("'map'") !=
        std::string::npos);
  // Keys that fold alike but agree on the target are fine.
  CHECK(parse_step(map_step({{"Oak", "Quercus"}, {"OAK", "Quercus"}}, true), 0, schema).ok());
  CHECK(parse_step(map_step({{"Oak", "Quercus"}, {"OAK", "Oak"}}), 0, schema).ok());
  const std::string null_message = parse_error(map_step({{"n/a", nullptr}}), schema).message;
  CHECK(null_message.find("to_null") != std::string::npos);
  CHECK(parse_error(map_step({{"a", 1}}), schema).message.find("\"a\" must map to text") != std::string::npos);
  CHECK(parse_error(map_step(json::object()), schema).message.find("non-empty object") != std::string::npos);
  CHECK(parse_error(map_step(json::array({"a"})), schema).message.find("'map'") != std::string::npos);
  json bad = map_step({{"a", "b"}});
  bad["ignore_case"] = "no";
  CHECK(parse_error(bad, schema).message.find("'ignore_case': expected true or false") != std::string::npos);
  bad.erase("map");
  CHECK(parse_error(bad, schema).message.find("'map': is required") != std::string::npos);
  check_common_errors({{"op", "map_values"}, {"column", "site"}, {"map", {{"a", "b"}}}}, "column");
  json plural = {{"op", "map_values"}, {"columns", {"site"}}, {"map", {{"a", "b"}}}};
  CHECK(parse_error(plural, kTextAndNumber).message.find("'column': is required") != std::string::npos);
}

TEST_CASE("unit_steps_text: map_values changes, describe and parameters") {
  const auto [out, change] = apply_ok(map_step({{"oak", "Oak"}, {"elm", "Elm"}}), values({"oak", "Elm", "oak"}));
  CHECK(change.cells_changed.at("v") == 2);
  REQUIRE(change.samples().size() == 1);
  CHECK(change.samples()[0].count == 2);
  CHECK(parse_ok(map_step({{"oak", "Oak"}, {"elm", "Elm"}}, true), {{"v", Type::text, 0}})->describe() ==
        "In v, replace 2 listed values with their preferred spelling, ignoring case.");
  check_round_trip(map_step({{"oak", "Oak"}, {"Straße", "Strasse"}}, true), {{"v", Type::text, 0}});
  CHECK(apply_ok(map_step({{"a", "b"}}), values({})).table.row_count() == 0);
}

// ---------------------------------------------------------------- to_null

TEST_CASE("unit_steps_text: to_null turns listed sentinels into NULL, exactly") {
  const json step = {{"op", "to_null"}, {"columns", {"v"}}, {"values", {"n/a", "-", "?"}}};
  CHECK(apply_to(step, {"n/a", "N/A", " n/a", "-", "--", "?", "", " ", std::nullopt, "oak"}) ==
        std::vector<std::string>{"<NULL>", "N/A", " n/a", "<NULL>", "--", "<NULL>", "", " ", "<NULL>", "oak"});
}

TEST_CASE("unit_steps_text: to_null blank turns empty and white-space-only values into NULL") {
  const json step = {{"op", "to_null"}, {"columns", {"v"}}, {"blank", true}};
  std::vector<Cell> cells = {"", " ", "\t\r\n", "\u3000\u00A0", ".", "a ", "\u200B"};
  // U+200B ZERO WIDTH SPACE is not White_Space (PropList.txt).
  CHECK(apply_to(step, cells) == std::vector<std::string>{"<NULL>", "<NULL>", "<NULL>", "<NULL>", ".", "a ", "\u200B"});
  std::string every_white_space;
  for (const char32_t ws : kWhiteSpace) every_white_space += utf8_of(ws);
  CHECK(apply_to(step, {every_white_space}) == std::vector<std::string>{"<NULL>"});
}

TEST_CASE("unit_steps_text: to_null changes, describe, parameters and errors") {
  const Table in = text_table({"v", "w"}, {{"x", "n/a"}, {"y", "z"}, {"", "n/a"}});
  const auto [out, change] = apply_ok({{"op", "to_null"}, {"columns", "*"}, {"values", {"n/a"}}, {"blank", true}}, in);
  CHECK(test::rows_of(out) == Rows{{"x", "<NULL>"}, {"y", "z"}, {"<NULL>", "<NULL>"}});
  CHECK(change.cells_changed.at("v") == 1);
  CHECK(change.cells_changed.at("w") == 2);
  CHECK(change.samples()[0].after == "NULL");
  CHECK(parse_ok({{"op", "to_null"}, {"columns", {"site"}}, {"values", {"n/a", "-"}}, {"blank", true}},
                 kTextAndNumber)
            ->describe() ==
        "Set values of site to NULL when they are \"n/a\" or \"-\", and when they are empty or only white space.");
  check_round_trip({{"op", "to_null"}, {"columns", {"site"}}, {"values", {"n/a"}}, {"blank", false}}, kTextAndNumber);
  check_common_errors({{"op", "to_null"}, {"columns", {"site"}}, {"blank", true}}, "columns");
  const json nothing = {{"op", "to_null"}, {"columns", {"site"}}};
  CHECK(parse_error(nothing, kTextAndNumber).message.find("would do nothing") != std::string::npos);
  json bad = {{"op", "to_null"}, {"columns", {"site"}}, {"values", "n/a"}};
  CHECK(parse_error(bad, kTextAndNumber).message.find("'values': expected a list of texts") != std::string::npos);
  bad["values"] = json::array({"n/a", 0});
  CHECK(parse_error(bad, kTextAndNumber).message.find("'values'") != std::string::npos);
  bad["values"] = json::array({"n/a"});
  bad["blank"] = "true";
  CHECK(parse_error(bad, kTextAndNumber).message.find("'blank': expected true or false") != std::string::npos);
  CHECK(apply_ok({{"op", "to_null"}, {"columns", {"v"}}, {"blank", true}}, values({})).table.row_count() == 0);
}

// ---------------------------------------------------------------- split_column

json split_step(const std::string& separator, std::vector<std::string> into, const std::string& column = "code") {
  return {{"op", "split_column"}, {"column", column}, {"separator", separator}, {"into", std::move(into)}};
}

TEST_CASE("unit_steps_text: split_column cuts at the first separators and keeps the rest in the last part") {
  const Table in = text_table({"id", "code", "note"}, {{"1", "N-12-b", "x"},
                                                        {"2", "N-12", "y"},
                                                        {"3", "N", "z"},
                                                        {"4", "", "w"},
                                                        {"5", std::nullopt, "v"},
                                                        {"6", "-", "u"}});
  const auto [out, change] = apply_ok(split_step("-", {"zone", "rest"}), in);
  CHECK(out.names() == std::vector<std::string>{"id", "code", "zone", "rest", "note"});
  CHECK(test::rows_of(out) == Rows{{"1", "N-12-b", "N", "12-b", "x"},
                                   {"2", "N-12", "N", "12", "y"},
                                   {"3", "N", "N", "<NULL>", "z"},
                                   {"4", "", "", "<NULL>", "w"},
                                   {"5", "<NULL>", "<NULL>", "<NULL>", "v"},
                                   {"6", "-", "", "", "u"}});
  CHECK(test::lines_of(out) == test::lines_of(in));
  CHECK(out.column_ptr(1) == in.column_ptr(1));  // the source column is kept as it is
  CHECK(change.cells_changed.at("zone") == 5);
  CHECK(change.cells_changed.at("rest") == 3);
  CHECK(change.rows_in == 6);
  CHECK(change.rows_out == 6);

  const auto three = apply_ok(split_step("-", {"a", "b", "c", "d"}), in).table;
  CHECK(test::rows_of(three)[0] == std::vector<std::string>{"1", "N-12-b", "N", "12", "b", "<NULL>", "x"});
}

TEST_CASE("unit_steps_text: split_column with a multi-character, non-ASCII separator and schema") {
  const Table in = text_table({"code"}, {{"Åsa – Öst – 3"}, {"Øst"}});
  const auto [out, change] = apply_ok(split_step(" – ", {"name", "area"}), in);
  CHECK(test::rows_of(out) == Rows{{"Åsa – Öst – 3", "Åsa", "Öst – 3"}, {"Øst", "Øst", "<NULL>"}});
  const Schema before = {{"x", Type::integer, 0}, {"code", Type::text, 0}, {"y", Type::date, 0}};
  const Schema after = parse_ok(split_step(" – ", {"name", "area"}), before)->output_schema(before);
  REQUIRE(after.size() == 5);
  CHECK(after[2].name == "name");
  CHECK(after[3].name == "area");
  CHECK(after[3].type == Type::text);
  CHECK(after[4].name == "y");
  CHECK(apply_ok(split_step(",", {"a", "b"}), text_table({"code"}, {})).table.column_count() == 3);
}

TEST_CASE("unit_steps_text: split_column describe, parameters and errors") {
  CHECK(parse_ok(split_step("-", {"zone", "plot"}, "site"), kTextAndNumber)->describe() ==
        "Split site at \"-\" into the new columns zone and plot (the last one takes the rest; missing parts are NULL).");
  check_round_trip(split_step("/", {"a", "b", "c"}, "site"), kTextAndNumber);
  check_common_errors(split_step("-", {"a", "b"}, "site"), "column");
  auto message = [](const json& step) { return parse_error(step, kTextAndNumber).message; };
  CHECK(message(split_step("-", {"a"}, "site")).find("at least two") != std::string::npos);
  CHECK(message(split_step("-", {"a", "count"}, "site")).find("'count' is already a column") != std::string::npos);
  CHECK(message(split_step("-", {"a", "site"}, "site")).find("'site' is already a column") != std::string::npos);
  CHECK(message(split_step("-", {"a", "a"}, "site")).find("names 'a' twice") != std::string::npos);
  CHECK(message(split_step("-", {"a", ""}, "site")).find("must not be empty") != std::string::npos);
  CHECK(message(split_step("", {"a", "b"}, "site")).find("'separator': must not be empty") != std::string::npos);
  json bad = split_step("-", {"a", "b"}, "site");
  bad["into"] = "a,b";
  CHECK(message(bad).find("'into': expected a list of texts") != std::string::npos);
  bad = split_step("-", {"a", "b"}, "site");
  bad["separator"] = 1;
  CHECK(message(bad).find("'separator': expected text") != std::string::npos);
}

// ---------------------------------------------------------------- all steps

// Batches of any size give the same table and the same change counts as the
// whole table in one batch (tamis run streams; the workbench does not).
TEST_CASE("unit_steps_text: every text step gives the same result batch by batch") {
  const std::vector<json> steps = {
      {{"op", "collapse_spaces"}, {"columns", {"a", "b"}}},
      {{"op", "change_case"}, {"columns", {"a"}}, {"to", "title"}},
      {{"op", "change_case"}, {"columns", {"a", "b"}}, {"to", "upper"}},
      {{"op", "normalize_unicode"}, {"columns", {"a", "b"}}, {"form", "NFKC"}, {"strip_accents", true}},
      {{"op", "replace_text"}, {"columns", {"a"}}, {"find", "(\\w)\\s+(\\w)"}, {"replace", "$1_$2"}, {"match", "regex"}},
      {{"op", "replace_text"}, {"columns", {"b"}}, {"find", "é"}, {"replace", "e"}},
      {{"op", "map_values"}, {"column", "b"}, {"map", {{"straße", "Street"}}}, {"ignore_case", true}},
      {{"op", "to_null"}, {"columns", {"a", "b"}}, {"values", {"-"}}, {"blank", true}},
      {{"op", "split_column"}, {"column", "a"}, {"separator", " "}, {"into", {"first", "second"}}}};
  const std::vector<std::vector<Cell>> rows = {{"oak  tree", "STRASSE"}, {std::nullopt, "café"},     {"  ", "-"},
                                               {"ﬁr\u3000cone", ""},     {"Élan vital", std::nullopt}, {"-", "straße"},
                                               {"x", "Ｘ é"}};
  const Table whole = text_table({"a", "b"}, rows, rows.size());
  for (const json& definition : steps) {
    const auto step = parse_ok(definition, schema_of(whole));
    ChangeRecord whole_change;
    auto expected = step->apply(whole, nullptr, whole_change);
    REQUIRE(expected.ok());
    for (const size_t batch_rows : {size_t{1}, size_t{3}}) {
      ChangeRecord batch_change;
      Table joined;
      for (size_t start = 0; start < rows.size(); start += batch_rows) {
        const std::vector<std::vector<Cell>> part(rows.begin() + static_cast<std::ptrdiff_t>(start),
                                                  rows.begin() + static_cast<std::ptrdiff_t>(
                                                                     std::min(rows.size(), start + batch_rows)));
        Table batch = text_table({"a", "b"}, part, 2);
        auto out = step->apply(batch, nullptr, batch_change);
        REQUIRE(out.ok());
        if (start == 0) joined = *out;
        else REQUIRE(joined.append(*out).ok());
      }
      // Source lines restart in each batch here; compare the cells only.
      CHECK_MESSAGE(test::rows_of(joined) == test::rows_of(*expected), definition.dump(), " in batches of ", batch_rows);
      CHECK(batch_change.cells_changed == whole_change.cells_changed);
      CHECK(batch_change.rows_in == whole_change.rows_in);
    }
  }
}

// The workbench keeps the file it loads with each distinct value once (a
// dictionary chunk, table.hpp); the steps that rewrite cells one by one
// rewrite each distinct value once and keep the dictionary. The result and
// the change record must be those of the same rows stored plainly (a
// consistency check within the engine).
TEST_CASE("unit_steps_text: every text step gives the same result on values kept once") {
  const std::vector<json> steps = {
      {{"op", "trim"}, {"columns", {"a", "b"}}},
      {{"op", "collapse_spaces"}, {"columns", {"a", "b"}}},
      {{"op", "change_case"}, {"columns", {"a"}}, {"to", "title"}},
      {{"op", "normalize_unicode"}, {"columns", {"a", "b"}}, {"form", "NFKC"}, {"strip_accents", true}},
      {{"op", "replace_text"}, {"columns", {"a"}}, {"find", "(\\w)\\s+(\\w)"}, {"replace", "$1_$2"}, {"match", "regex"}},
      {{"op", "replace_text"}, {"columns", {"b"}}, {"find", "é"}, {"replace", "e"}},
      {{"op", "map_values"}, {"column", "b"}, {"map", {{"straße", "Street"}, {"-", "café"}}}, {"ignore_case", true}},
      {{"op", "to_null"}, {"columns", {"a", "b"}}, {"values", {"-"}}, {"blank", true}},
      {{"op", "split_column"}, {"column", "a"}, {"separator", " "}, {"into", {"first", "second"}}}};
  const std::vector<std::vector<Cell>> distinct = {{"oak  tree", "STRASSE"}, {std::nullopt, "café"},
                                                   {"  ", "-"},               {"ﬁr\u3000cone", ""},
                                                   {"Élan vital", std::nullopt}, {"-", "straße"},
                                                   {"x", "Ｘ é"}};
  std::vector<std::vector<Cell>> rows;
  for (size_t round = 0; round < 4; ++round)
    for (size_t r = 0; r < distinct.size(); ++r) rows.push_back(distinct[(r * (round + 1)) % distinct.size()]);
  const Table plain = text_table({"a", "b"}, rows, rows.size());
  const Table kept_once = with_repeated_values_shared(plain);
  for (size_t c = 0; c < 2; ++c) REQUIRE(kept_once.column(c).chunk(0).layout == TextLayout::dictionary);
  for (const json& definition : steps) {
    const auto step = parse_ok(definition, schema_of(plain));
    ChangeRecord plain_change, kept_change;
    auto expected = step->apply(plain, nullptr, plain_change);
    auto got = step->apply(kept_once, nullptr, kept_change);
    REQUIRE(expected.ok());
    REQUIRE(got.ok());
    CHECK_MESSAGE(test::rows_of(*got) == test::rows_of(*expected), definition.dump());
    CHECK(kept_change.cells_changed == plain_change.cells_changed);
    REQUIRE(kept_change.samples().size() == plain_change.samples().size());
    for (size_t i = 0; i < plain_change.samples().size(); ++i) {
      const ValueChange &a = kept_change.samples()[i], &b = plain_change.samples()[i];
      CHECK_MESSAGE((a.column == b.column && a.before == b.before && a.after == b.after && a.count == b.count),
                    definition.dump(), " sample ", i);
    }
    if (definition["op"] != "split_column")
      for (size_t c = 0; c < 2; ++c) CHECK(got->column(c).chunk(0).layout == TextLayout::dictionary);
  }
}

// "(a+)+b" against a run of a's with no b backtracks exponentially (the
// classic catastrophic pattern, common practice), so ICU's time limit stops
// it. The error names the first row holding that value, whether the cells are
// visited row by row or each distinct value once.
TEST_CASE("unit_steps_text: replace_text names the line of the value its regular expression failed on") {
  const std::string runaway(30, 'a');
  const std::vector<Cell> cells = {"x", "y", "x", runaway, "y", "x", runaway, "x"};
  const Table plain = values(cells);
  const Table kept_once = with_repeated_values_shared(text_table({"v"}, [&] {
    std::vector<std::vector<Cell>> rows;
    for (const Cell& c : cells) rows.push_back({c});
    return rows;
  }(), cells.size()));
  REQUIRE(kept_once.column(0).chunk(0).layout == TextLayout::dictionary);
  const json definition = {{"op", "replace_text"}, {"columns", {"v"}}, {"find", "(a+)+b"}, {"replace", "-"}, {"match", "regex"}};
  for (const Table* table : {&plain, &kept_once}) {
    const auto step = parse_ok(definition, schema_of(*table));
    ChangeRecord change;
    auto out = step->apply(*table, nullptr, change);
    REQUIRE_FALSE(out.ok());
    // Row 4 (0-based 3) holds the first run; text_table numbers rows from line 2.
    CHECK(out.error().line == 5);
    CHECK(out.error().message.find("at line 5") != std::string::npos);
  }
}

}  // namespace
}  // namespace tamis
