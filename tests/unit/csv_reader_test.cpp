// The streaming CSV reader against RFC 4180 §2, the encodings it decodes, its
// dialect detection, its error reports, and its independence from how the
// input is split into reads and batches.
#include <doctest/doctest.h>

#include <algorithm>
#include <set>
#include <string>
#include <vector>

#include "csv_reader.hpp"
#include "unit_support.hpp"

using namespace tamis;
using tamis::test::dialect;
using tamis::test::first_difference;
using tamis::test::Lines;
using tamis::test::lines_of;
using tamis::test::read_ok;
using tamis::test::read_string;
using tamis::test::Rows;
using tamis::test::rows_of;
using tamis::test::SplittingSource;

namespace {

const CsvOptions kNoHeader = dialect(',', HeaderMode::no);
const CsvOptions kHeader = dialect(',', HeaderMode::yes);

// ASCII text as UTF-16 code units (every code unit's high byte is zero).
std::string utf16le_ascii(std::string_view ascii) {
  std::string out;
  for (const char c : ascii) out += c, out += '\0';
  return out;
}
std::string utf16be_ascii(std::string_view ascii) {
  std::string out;
  for (const char c : ascii) out += '\0', out += c;
  return out;
}

bool contains(std::string_view haystack, std::string_view needle) {
  return haystack.find(needle) != std::string_view::npos;
}

// A file of over 64 KiB (the reader's first block) whose later records
// hold every construct that can be cut by a read boundary: CRLF and lone CR
// record ends, blank lines, quoted fields with doubled quotes and CR/LF/CRLF
// inside, and UTF-8 sequences of two, three and four bytes.
std::string tricky_long_input() {
  std::string s = "id,text,note\r\n";
  for (int i = 0; s.size() < 76000; ++i) {
    const std::string id = std::to_string(i);
    switch (i % 6) {
      case 0: s += id + ",plain value,x\r\n"; break;
      case 1: s += id + ",\"quoted, with comma\",\"say \"\"hi\"\"\"\n"; break;
      case 2: s += id + ",\"two\r\nlines\",\"lone\rcr\"\r"; break;
      case 3: s += id + ",caf\xC3\xA9 \xE2\x82\xAC,tree \xF0\x9F\x8C\xB3\n\n"; break;
      case 4: s += id + ",\"\xF0\x9F\x8C\xB3\nin quotes\",\r\n\r\n"; break;
      default: s += id + ",,\"\"\r\n"; break;
    }
  }
  return s;
}

}  // namespace

TEST_SUITE("unit_csv_reader") {

// ---------------------------------------------------------------------------
// RFC 4180 §2, rules 1-7, with the RFC's own examples.

TEST_CASE("unit_csv_reader: RFC 4180 rule 1 - each record on its own line, ended by CRLF") {
  // RFC 4180 §2 rule 1: "Each record is located on a separate line, delimited
  // by a line break (CRLF)." Example: aaa,bbb,ccc CRLF zzz,yyy,xxx CRLF
  const Table t = read_ok("aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n", kNoHeader);
  CHECK(rows_of(t) == Rows{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}});
  CHECK(lines_of(t) == Lines{1, 2});
}

TEST_CASE("unit_csv_reader: RFC 4180 rule 2 - the last record may lack a line break") {
  // RFC 4180 §2 rule 2: "The last record in the file may or may not have an
  // ending line break." Example: aaa,bbb,ccc CRLF zzz,yyy,xxx
  const Table t = read_ok("aaa,bbb,ccc\r\nzzz,yyy,xxx", kNoHeader);
  CHECK(rows_of(t) == Rows{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}});
}

TEST_CASE("unit_csv_reader: RFC 4180 rule 3 - optional header line") {
  // RFC 4180 §2 rule 3: "There maybe an optional header line appearing as the
  // first line of the file with the same format as normal record lines."
  // Example: field_name,field_name,field_name CRLF aaa,bbb,ccc CRLF zzz,yyy,xxx CRLF
  ReadReport report;
  const Table t = read_ok("field_name,field_name,field_name\r\naaa,bbb,ccc\r\nzzz,yyy,xxx\r\n", kHeader, &report);
  // The RFC's example repeats one name; repeats get a suffix and a note.
  CHECK(t.names() == std::vector<std::string>{"field_name", "field_name_2", "field_name_3"});
  CHECK(report.header_notes.size() == 2);
  CHECK(rows_of(t) == Rows{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}});
  CHECK(lines_of(t) == Lines{2, 3});
}

TEST_CASE("unit_csv_reader: RFC 4180 rule 4 - fields separated by commas, spaces are part of a field") {
  // RFC 4180 §2 rule 4: "Within the header and each record, there may be one
  // or more fields, separated by commas. [...] Spaces are considered part of a
  // field and should not be ignored." Example: aaa,bbb,ccc
  CHECK(rows_of(read_ok("aaa,bbb,ccc", kNoHeader)) == Rows{{"aaa", "bbb", "ccc"}});
  CHECK(rows_of(read_ok(" aaa , bbb ,ccc \n", kNoHeader)) == Rows{{" aaa ", " bbb ", "ccc "}});
  // "one or more fields": a record of one field.
  CHECK(rows_of(read_ok("aaa\nbbb\n", kNoHeader)) == Rows{{"aaa"}, {"bbb"}});
}

TEST_CASE("unit_csv_reader: RFC 4180 rule 5 - fields may be enclosed in double quotes") {
  // RFC 4180 §2 rule 5: "Each field may or may not be enclosed in double
  // quotes". Example: "aaa","bbb","ccc" CRLF zzz,yyy,xxx
  const Table t = read_ok("\"aaa\",\"bbb\",\"ccc\"\r\nzzz,yyy,xxx", kNoHeader);
  CHECK(rows_of(t) == Rows{{"aaa", "bbb", "ccc"}, {"zzz", "yyy", "xxx"}});
}

TEST_CASE("unit_csv_reader: RFC 4180 rule 6 - quoted fields hold line breaks, quotes and commas") {
  // RFC 4180 §2 rule 6: "Fields containing line breaks (CRLF), double quotes,
  // and commas should be enclosed in double-quotes." Example:
  // "aaa","b CRLF bb","ccc" CRLF zzz,yyy,xxx
  const Table t = read_ok("\"aaa\",\"b\r\nbb\",\"ccc\"\r\nzzz,yyy,xxx", kNoHeader);
  CHECK(rows_of(t) == Rows{{"aaa", "b\r\nbb", "ccc"}, {"zzz", "yyy", "xxx"}});
  // The second record starts on physical line 3.
  CHECK(lines_of(t) == Lines{1, 3});
}

TEST_CASE("unit_csv_reader: RFC 4180 rule 7 - a quote inside a quoted field is doubled") {
  // RFC 4180 §2 rule 7: "If double-quotes are used to enclose fields, then a
  // double-quote appearing inside a field must be escaped by preceding it with
  // another double quote." Example: "aaa","b""bb","ccc"
  CHECK(rows_of(read_ok("\"aaa\",\"b\"\"bb\",\"ccc\"", kNoHeader)) == Rows{{"aaa", "b\"bb", "ccc"}});
}

// ---------------------------------------------------------------------------
// Record ends, quoting, empty fields.

TEST_CASE("unit_csv_reader: LF, CRLF and lone CR all end a record") {
  const Rows expected{{"a", "b"}, {"c", "d"}, {"e", "f"}};
  CHECK(rows_of(read_ok("a,b\nc,d\ne,f\n", kNoHeader)) == expected);
  CHECK(rows_of(read_ok("a,b\r\nc,d\r\ne,f\r\n", kNoHeader)) == expected);
  CHECK(rows_of(read_ok("a,b\rc,d\re,f\r", kNoHeader)) == expected);
  const Table mixed = read_ok("a,b\nc,d\r\ne,f\rg,h", kNoHeader);
  CHECK(rows_of(mixed) == Rows{{"a", "b"}, {"c", "d"}, {"e", "f"}, {"g", "h"}});
  CHECK(lines_of(mixed) == Lines{1, 2, 3, 4});
}

TEST_CASE("unit_csv_reader: quoted fields keep delimiters, doubled quotes and CR, LF, CRLF") {
  const Table t = read_ok(
      "\"x,y\",\"say \"\"hi\"\"\",\"l1\nl2\",\"l1\rl2\",\"l1\r\nl2\",\"\"\"\"\n"
      "next,2,3,4,5,6\n",
      kNoHeader);
  CHECK(rows_of(t) == Rows{{"x,y", "say \"hi\"", "l1\nl2", "l1\rl2", "l1\r\nl2", "\""},
                           {"next", "2", "3", "4", "5", "6"}});
  // The first record spans lines 1-4 (LF, CR and CRLF inside quotes each
  // start a new physical line), so the second starts on line 5.
  CHECK(lines_of(t) == Lines{1, 5});
}

TEST_CASE("unit_csv_reader: empty fields, quoted or not") {
  CHECK(rows_of(read_ok(",,\n", kNoHeader)) == Rows{{"", "", ""}});
  CHECK(rows_of(read_ok("\"\",a,\"\"\n", kNoHeader)) == Rows{{"", "a", ""}});
  CHECK(rows_of(read_ok("a,\nb,", kNoHeader)) == Rows{{"a", ""}, {"b", ""}});
  // A single empty quoted field is a record, not an empty line.
  CHECK(rows_of(read_ok("v\n\"\"\nx\n", kHeader)) == Rows{{""}, {"x"}});
}

TEST_CASE("unit_csv_reader: with and without a final line break give the same table") {
  const Table with = read_ok("id,name\n1,Ann\n2,Bo\n", kHeader);
  for (const char* variant : {"id,name\n1,Ann\n2,Bo", "id,name\r\n1,Ann\r\n2,Bo\r\n", "id,name\r1,Ann\r2,Bo\r"}) {
    CAPTURE(variant);
    CHECK(first_difference(with, read_ok(variant, kHeader)) == "");
  }
  // A quoted last field at the very end of the input.
  CHECK(rows_of(read_ok("a,\"b\"", kNoHeader)) == Rows{{"a", "b"}});
}

TEST_CASE("unit_csv_reader: blank lines are skipped and counted") {
  ReadReport report;
  // Lines: 1 header, 2 blank (LF), 3 record, 4 blank (CRLF), 5 blank (lone
  // CR), 6 record, 7 blank.
  const Table t = read_ok("a,b\n\n1,2\r\n\r\n\r3,4\n\n", kHeader, &report);
  CHECK(rows_of(t) == Rows{{"1", "2"}, {"3", "4"}});
  CHECK(lines_of(t) == Lines{3, 6});
  CHECK(report.blank_lines == 4);
  CHECK(report.first_blank_line == 2);
  CHECK(report.rows == 2);
  const auto warnings = report.warnings();
  CHECK(std::any_of(warnings.begin(), warnings.end(), [](const std::string& w) { return contains(w, "line 2"); }));

  ReadReport before_header;
  const Table t2 = read_ok("\n\nid\n1\n", kHeader, &before_header);
  CHECK(t2.names() == std::vector<std::string>{"id"});
  CHECK(lines_of(t2) == Lines{4});
  CHECK(before_header.blank_lines == 2);
  CHECK(before_header.first_blank_line == 1);

  ReadReport none;
  read_ok("a\n1\n", kHeader, &none);
  CHECK(none.blank_lines == 0);
}

TEST_CASE("unit_csv_reader: source lines count the physical lines of multi-line quoted fields") {
  const Table t = read_ok("id,note\n1,\"two\nlines\"\n2,\"three\r\nline\r\nfield\"\n3,plain\n4,\"a\rb\"\n5,end\n", kHeader);
  CHECK(rows_of(t) == Rows{{"1", "two\nlines"}, {"2", "three\r\nline\r\nfield"}, {"3", "plain"}, {"4", "a\rb"}, {"5", "end"}});
  CHECK(lines_of(t) == Lines{2, 4, 7, 8, 10});
}

TEST_CASE("unit_csv_reader: skip_rows skips physical lines before the header") {
  CsvOptions options = kHeader;
  options.skip_rows = 2;
  const Table t = read_ok("Tree survey export\r\ncreated 2023-06-19\r\nid,species\r\n1,oak\r\n", options);
  CHECK(t.names() == std::vector<std::string>{"id", "species"});
  CHECK(rows_of(t) == Rows{{"1", "oak"}});
  CHECK(lines_of(t) == Lines{4});
}

TEST_CASE("unit_csv_reader: a quote inside an unquoted field is kept and counted") {
  ReadReport report;
  const Table t = read_ok("a,b\n1,2\n3,5\"6\n", kHeader, &report);
  CHECK(rows_of(t) == Rows{{"1", "2"}, {"3", "5\"6"}});
  CHECK(report.bare_quotes == 1);
  CHECK(report.first_bare_quote_line == 3);
}

// ---------------------------------------------------------------------------
// Encodings.

TEST_CASE("unit_csv_reader: a UTF-8 byte order mark is stripped") {
  ReadReport report;
  const Table t = read_ok("\xEF\xBB\xBFid,name\n1,caf\xC3\xA9\n", kHeader, &report);
  CHECK(t.names() == std::vector<std::string>{"id", "name"});
  CHECK(rows_of(t) == Rows{{"1", "caf\xC3\xA9"}});
  CHECK(report.encoding == Encoding::utf8);
  CHECK(!report.encoding_reason.empty());
}

TEST_CASE("unit_csv_reader: UTF-16LE and UTF-16BE with BOM, including a surrogate pair") {
  // U+1F333 DECIDUOUS TREE is the surrogate pair D83C DF33 in UTF-16 (Unicode
  // Standard §3.9 / RFC 2781 §2.1: U' = 0xF333, high ten bits 0x03C, low ten
  // bits 0x333) and F0 9F 8C B3 in UTF-8 (RFC 3629 §3); both checked with
  // Python's codecs.
  const std::string tree_utf8 = "\xF0\x9F\x8C\xB3";
  {
    ReadReport report;
    const std::string bytes = "\xFF\xFE" + utf16le_ascii("id,tree\n1,") + "\x3C\xD8\x33\xDF" +
                              utf16le_ascii(" oak\n2,\xE9\n");
    const Table t = read_ok(bytes, kHeader, &report);
    CHECK(report.encoding == Encoding::utf16le);
    CHECK(!report.encoding_reason.empty());
    CHECK(t.names() == std::vector<std::string>{"id", "tree"});
    // U+00E9 is the code unit 00E9: C3 A9 in UTF-8.
    CHECK(rows_of(t) == Rows{{"1", tree_utf8 + " oak"}, {"2", "\xC3\xA9"}});
  }
  {
    ReadReport report;
    const std::string bytes = "\xFE\xFF" + utf16be_ascii("id,tree\n1,") + "\xD8\x3C\xDF\x33" + utf16be_ascii("\n");
    const Table t = read_ok(bytes, kHeader, &report);
    CHECK(report.encoding == Encoding::utf16be);
    CHECK(rows_of(t) == Rows{{"1", tree_utf8}});
  }
}

TEST_CASE("unit_csv_reader: UTF-16 without BOM is recognised by its zero bytes") {
  ReadReport le, be;
  const Table t = read_ok(utf16le_ascii("id,name\n1,Ann\n2,Bo\n"), kHeader, &le);
  CHECK(le.encoding == Encoding::utf16le);
  CHECK(!le.encoding_reason.empty());
  CHECK(rows_of(t) == Rows{{"1", "Ann"}, {"2", "Bo"}});
  read_ok(utf16be_ascii("id,name\n1,Ann\n2,Bo\n"), kHeader, &be);
  CHECK(be.encoding == Encoding::utf16be);
}

TEST_CASE("unit_csv_reader: a lone UTF-16 surrogate is an error with its byte offset") {
  // RFC 2781 §2.2: a high surrogate (D800-DBFF) must be followed by a low
  // surrogate; here D83C is followed by 'b'. Bytes: FF FE | 61 00 | 0A 00 |
  // 3C D8 (offset 6) | 62 00 | 0A 00.
  const auto t = read_string("\xFF\xFE" + utf16le_ascii("a\n") + "\x3C\xD8" + utf16le_ascii("b\n"), kHeader);
  REQUIRE(!t.ok());
  CHECK(t.error().kind == ErrorKind::bad_input);
  REQUIRE(t.error().byte_offset.has_value());
  CHECK(*t.error().byte_offset == 6);
}

TEST_CASE("unit_csv_reader: windows-1252 decoding, undefined bytes become C1 controls and are counted") {
  // WHATWG Encoding Standard, index-windows-1252 (from memory; 0x80 and 0x9F
  // cross-checked with Python's cp1252 codec and npm iconv-lite): 0x80 ->
  // U+20AC EURO SIGN, 0x9F -> U+0178 LATIN CAPITAL LETTER Y WITH DIAERESIS;
  // 0x81, 0x8D, 0x8F, 0x90, 0x9D -> U+0081, U+008D, U+008F, U+0090, U+009D.
  const std::string bytes = std::string("name,sign\n") + "A,\x80\n" + "B,\x9F\n" + "C,\x81\n" + "D,\x8D\n" +
                            "E,\x8F\n" + "F,\x90\n" + "G,\x9D\n" + "H,caf\xE9\n";
  ReadReport report;
  const Table t = read_ok(bytes, kHeader, &report);
  CHECK(report.encoding == Encoding::windows1252);
  CHECK(!report.encoding_reason.empty());
  CHECK(rows_of(t) == Rows{{"A", "\xE2\x82\xAC"},
                           {"B", "\xC5\xB8"},
                           {"C", "\xC2\x81"},
                           {"D", "\xC2\x8D"},
                           {"E", "\xC2\x8F"},
                           {"F", "\xC2\x90"},
                           {"G", "\xC2\x9D"},
                           {"H", "caf\xC3\xA9"}});
  CHECK(report.undefined_bytes == 5);
  REQUIRE(report.first_undefined_byte.has_value());
  CHECK(*report.first_undefined_byte == bytes.find('\x81'));

  // The same when the encoding is given instead of detected.
  CsvOptions given = kHeader;
  given.encoding = Encoding::windows1252;
  ReadReport given_report;
  CHECK(first_difference(t, read_ok(bytes, given, &given_report)) == "");
  CHECK(given_report.undefined_bytes == 5);
}

TEST_CASE("unit_csv_reader: ISO-8859-1 maps each byte to the code point of the same value") {
  // ISO/IEC 8859-1 as registered by IANA (ISO-8859-1 with the ISO 6429
  // controls): byte b is U+00bb (from memory). 0xE9 -> U+00E9, 0xFF -> U+00FF,
  // 0xA0 -> U+00A0, and 0x80 -> U+0080 (unlike windows-1252's euro sign).
  CsvOptions options = kNoHeader;
  options.encoding = Encoding::iso8859_1;
  ReadReport report;
  const Table t = read_ok("\xE9,\xFF,\xA0,\x80\n", options, &report);
  CHECK(report.encoding == Encoding::iso8859_1);
  CHECK(rows_of(t) == Rows{{"\xC3\xA9", "\xC3\xBF", "\xC2\xA0", "\xC2\x80"}});
}

TEST_CASE("unit_csv_reader: encoding detection and its reason") {
  ReadReport utf8_report;
  read_ok("id,name\n1,caf\xC3\xA9\n", kHeader, &utf8_report);
  CHECK(utf8_report.encoding == Encoding::utf8);
  CHECK(!utf8_report.encoding_reason.empty());

  // 0xE9 followed by ',' is not UTF-8, so the text is read as windows-1252.
  ReadReport legacy;
  const Table t = read_ok("id,name\n1,caf\xE9\n", kHeader, &legacy);
  CHECK(legacy.encoding == Encoding::windows1252);
  CHECK(!legacy.encoding_reason.empty());
  CHECK(legacy.encoding_reason != utf8_report.encoding_reason);
  CHECK(rows_of(t) == Rows{{"1", "caf\xC3\xA9"}});
}

// ---------------------------------------------------------------------------
// Dialect detection.

TEST_CASE("unit_csv_reader: delimiter detection among comma, semicolon, tab and bar") {
  for (const char d : {',', ';', '\t', '|'}) {
    CAPTURE(d);
    std::string text = "id*species*height\n1*oak*12.5\n2*\"ash*elm\"*7\n3*birch*3\n";
    std::replace(text.begin(), text.end(), '*', d);
    CsvOptions options;
    options.header = HeaderMode::yes;
    ReadReport report;
    const Table t = read_ok(text, options, &report);
    CHECK(report.delimiter == d);
    CHECK(!report.delimiter_reason.empty());
    CHECK(t.names() == std::vector<std::string>{"id", "species", "height"});
    CHECK(rows_of(t) == Rows{{"1", "oak", "12.5"}, {"2", "ash" + std::string(1, d) + "elm", "7"}, {"3", "birch", "3"}});
  }
  // Commas inside quoted text do not outvote the semicolons that split every record.
  ReadReport report;
  read_ok("name;note\n\"Oak, red\";\"tall, old, healthy\"\nAsh;\"x, y\"\n", CsvOptions{}, &report);
  CHECK(report.delimiter == ';');
}

TEST_CASE("unit_csv_reader: header detection both ways, with a reason") {
  {
    ReadReport report;
    const Table t = read_ok("name,age\nAnn,31\nBo,45\n", CsvOptions{}, &report);
    CHECK(report.header);
    CHECK(!report.header_reason.empty());
    CHECK(t.names() == std::vector<std::string>{"name", "age"});
    CHECK(t.row_count() == 2);
  }
  {
    ReadReport report;
    const Table t = read_ok("Ann,31\nBo,45\n", CsvOptions{}, &report);
    CHECK_FALSE(report.header);
    CHECK(!report.header_reason.empty());
    CHECK(t.names() == std::vector<std::string>{"column_1", "column_2"});
    CHECK(rows_of(t) == Rows{{"Ann", "31"}, {"Bo", "45"}});
    CHECK(lines_of(t) == Lines{1, 2});
  }
  {
    // A date in the first row makes it data.
    ReadReport report;
    const Table t = read_ok("2023-06-19,oak\n2023-06-20,ash\n", CsvOptions{}, &report);
    CHECK_FALSE(report.header);
    CHECK(t.row_count() == 2);
  }
  {
    ReadReport report;
    read_ok("species,park\noak,north\nash,south\n", CsvOptions{}, &report);
    CHECK(report.header);
    CHECK(!report.header_reason.empty());
  }
}

TEST_CASE("unit_csv_reader: repeated and empty header names are made unique, with notes") {
  ReadReport report;
  const Table t = read_ok("a,a,b,a\n1,2,3,4\n", kHeader, &report);
  CHECK(t.names() == std::vector<std::string>{"a", "a_2", "b", "a_3"});
  CHECK(report.header_notes.size() == 2);
  CHECK(rows_of(t) == Rows{{"1", "2", "3", "4"}});

  ReadReport empty_report;
  const Table e = read_ok("id,,x\n1,2,3\n", kHeader, &empty_report);
  CHECK(e.names() == std::vector<std::string>{"id", "column_2", "x"});
  CHECK(empty_report.header_notes.size() == 1);

  // A renamed column never takes a name that the header already uses.
  const Table c = read_ok("a,a,a_2\n1,2,3\n", kHeader);
  const std::set<std::string> unique(c.names().begin(), c.names().end());
  CHECK(unique.size() == 3);
  CHECK(c.name(0) == "a");
  CHECK(c.name(2) == "a_2");
}

// ---------------------------------------------------------------------------
// Strict mode: errors name the place.

TEST_CASE("unit_csv_reader: strict - a wrong field count stops the read and lists the lines") {
  const auto t = read_string("a,b\n1,2\n3\n4,5\n6,7,8\n9,10\n", kHeader);
  REQUIRE(!t.ok());
  const Error& e = t.error();
  CHECK(e.kind == ErrorKind::bad_input);
  CHECK(e.file == "test.csv");
  CHECK(e.line == 3);
  CHECK(contains(e.message, "3, 5"));
  CHECK(contains(e.to_string(), "test.csv:3"));
}

TEST_CASE("unit_csv_reader: strict - an unterminated quote reports the line and column of the opening quote") {
  const auto t = read_string("a,b\n1,2\n3,\"abc\n4,5\n", kHeader);
  REQUIRE(!t.ok());
  CHECK(t.error().kind == ErrorKind::bad_input);
  CHECK(t.error().line == 3);
  CHECK(t.error().column == 3);
  // Columns count characters, not bytes: the two-byte e-acute is one column.
  const auto u = read_string("a,b\n\xC3\xA9,\"x\n", kHeader);
  REQUIRE(!u.ok());
  CHECK(u.error().line == 2);
  CHECK(u.error().column == 3);
}

TEST_CASE("unit_csv_reader: strict - text after a closing quote is an error") {
  const auto t = read_string("a,b\n1,2\n\"x\"y,2\n", kHeader);
  REQUIRE(!t.ok());
  CHECK(t.error().kind == ErrorKind::bad_input);
  CHECK(t.error().line == 3);
  CHECK(contains(t.error().message, "'y'"));
}

TEST_CASE("unit_csv_reader: strict - invalid UTF-8 reports the exact byte offset") {
  CsvOptions utf8 = kHeader;
  utf8.encoding = Encoding::utf8;
  {
    // "a,b\n" is bytes 0-3, "1,x" bytes 4-6, so 0xFF is at offset 7.
    const auto t = read_string("a,b\n1,x\xFFy\n", utf8);
    REQUIRE(!t.ok());
    CHECK(t.error().kind == ErrorKind::bad_input);
    CHECK(t.error().line == 2);
    REQUIRE(t.error().byte_offset.has_value());
    CHECK(*t.error().byte_offset == 7);
  }
  {
    // Offsets count the source bytes, BOM included: C0 80 (an overlong NUL,
    // ill-formed per Unicode §3.9 Table 3-7) starts at 3 + 4 + 2 = 9.
    const auto t = read_string("\xEF\xBB\xBF" "a,b\n1,\xC0\x80\n", utf8);
    REQUIRE(!t.ok());
    REQUIRE(t.error().byte_offset.has_value());
    CHECK(*t.error().byte_offset == 9);
  }
  {
    // Detected as UTF-8 from the first 64 KiB (which holds UTF-8 beyond
    // ASCII, so the file cannot be windows-1252), ill-formed later: the error
    // still points at the byte.
    std::string text = "v\ncaf\xC3\xA9\n";
    while (text.size() < 100000) text += "value\n";
    const size_t bad = text.size() + 3;
    const uint64_t bad_line = static_cast<uint64_t>(std::count(text.begin(), text.end(), '\n')) + 1;
    text += "abc\xE9z\nok\n";
    const auto t = read_string(text, CsvOptions{});
    REQUIRE(!t.ok());
    CHECK(t.error().line == bad_line);
    REQUIRE(t.error().byte_offset.has_value());
    CHECK(*t.error().byte_offset == bad);
  }
}

TEST_CASE("unit_csv_reader: strict - a NUL byte is an error at its line") {
  const auto t = read_string(std::string("a,b\n1,2\n3,x\0y\n", 14), kHeader);
  REQUIRE(!t.ok());
  CHECK(t.error().kind == ErrorKind::bad_input);
  CHECK(t.error().line == 3);
  const auto quoted = read_string(std::string("a,b\n1,\"x\ny\0\"\n", 13), kHeader);
  REQUIRE(!quoted.ok());
  CHECK(quoted.error().line == 3);
}

TEST_CASE("unit_csv_reader: an empty file is an error, a header-only file is an empty table") {
  for (const char* empty : {"", "\n\n", "\r\n"}) {
    CAPTURE(empty);
    const auto t = read_string(empty, CsvOptions{});
    REQUIRE(!t.ok());
    CHECK(t.error().kind == ErrorKind::bad_input);
    CHECK(contains(t.error().message, "empty"));
  }
  for (const char* header_only : {"a,b\n", "a,b"}) {
    CAPTURE(header_only);
    const Table t = read_ok(header_only, kHeader);
    CHECK(t.row_count() == 0);
    CHECK(t.column_count() == 2);
    CHECK(t.names() == std::vector<std::string>{"a", "b"});
  }
}

// ---------------------------------------------------------------------------
// Lenient mode.

TEST_CASE("unit_csv_reader: lenient - malformed records go to the reject sink with line, reason and text") {
  CsvOptions options = kHeader;
  options.lenient = true;
  std::vector<RejectedRecord> rejected;
  ReadReport report;
  // Data records start on lines 2, 3, 4, 5, 6, 7 (spanning 7-8) and 9.
  const Table t = read_ok("a,b\n1,2\n3\n\"x\"y,2\n4,5,6\n7,8\n\"multi\nline\",9,10\n11,12",
                          options, &report, [&](const RejectedRecord& r) -> Status {
                            rejected.push_back(r);
                            return Ok{};
                          });
  CHECK(rows_of(t) == Rows{{"1", "2"}, {"7", "8"}, {"11", "12"}});
  CHECK(lines_of(t) == Lines{2, 6, 9});
  REQUIRE(rejected.size() == 4);
  CHECK(rejected[0].line == 3);
  CHECK(rejected[0].text == "3");
  CHECK(contains(rejected[0].reason, "2"));
  CHECK(rejected[1].line == 4);
  CHECK(rejected[1].text == "\"x\"y,2");
  CHECK(!rejected[1].reason.empty());
  CHECK(rejected[2].line == 5);
  CHECK(rejected[2].text == "4,5,6");
  CHECK(rejected[3].line == 7);
  CHECK(rejected[3].text == "\"multi\nline\",9,10");
  // Row accounting balances: 7 records read = 3 delivered + 4 rejected.
  CHECK(report.rows == 3);
  CHECK(report.rejected == 4);
  CHECK(report.rows + report.rejected == 7);
  CHECK(report.first_rejected_lines == Lines{3, 4, 5, 7});
}

TEST_CASE("unit_csv_reader: lenient - a failing reject sink stops the read with its error") {
  CsvOptions options = kHeader;
  options.lenient = true;
  const auto t = read_string("a,b\n1,2\n3\n", options, nullptr,
                             [](const RejectedRecord&) -> Status { return io_error("rejects.csv", "disk full"); });
  REQUIRE(!t.ok());
  CHECK(t.error().kind == ErrorKind::io);
  CHECK(t.error().file == "rejects.csv");
}

// ---------------------------------------------------------------------------
// Size and splitting.

TEST_CASE("unit_csv_reader: a 1 MB field, unquoted and quoted") {
  const std::string big(1 << 20, 'x');
  std::string quoted_big = big;
  quoted_big[1000] = '"';
  quoted_big[500000] = '\n';
  std::string escaped_big;
  for (const char c : quoted_big) escaped_big += c == '"' ? std::string("\"\"") : std::string(1, c);
  const Table t = read_ok("id,blob\n1," + big + "\n2,\"" + escaped_big + "\"\n3,end\n", kHeader);
  REQUIRE(t.row_count() == 3);
  CHECK(t.column(1).text(0).size() == big.size());
  CHECK(t.column(1).text(0) == big);
  CHECK(t.column(1).text(1) == quoted_big);
  CHECK(t.column(1).text(2) == "end");
  CHECK(lines_of(t) == Lines{2, 3, 5});
}

TEST_CASE("unit_csv_reader: batch sizes 1, 2, 3, 7 and 65536 give identical tables") {
  std::string text = "id,text,note\n";
  for (int i = 0; i < 300; ++i) {
    text += std::to_string(i) + (i % 3 == 0 ? ",\"multi\r\nline " : ",plain ") + std::to_string(i) +
            (i % 3 == 0 ? "\"" : "") + (i % 5 == 0 ? ",\"q\"\"uote\"\n\n" : ",n\r\n");
  }
  CsvOptions whole = kHeader;
  const Table reference = read_ok(text, whole);
  REQUIRE(reference.row_count() == 300);
  for (const size_t batch : {size_t{1}, size_t{2}, size_t{3}, size_t{7}, size_t{65536}}) {
    CAPTURE(batch);
    CsvOptions options = kHeader;
    options.batch_rows = batch;
    CHECK(first_difference(reference, read_ok(text, options)) == "");

    // Streaming batch by batch: no batch exceeds the size, and the batches
    // concatenated equal the whole-file table.
    auto reader = CsvReader::open(memory_source(text), "test.csv", options);
    REQUIRE(reader.ok());
    Table streamed;
    size_t batches = 0;
    for (;;) {
      auto next = (*reader)->next_batch();
      REQUIRE(next.ok());
      if (!next->has_value()) break;
      CHECK((*next)->row_count() <= batch);
      CHECK((*next)->row_count() >= 1);
      REQUIRE(streamed.append(**next).ok());
      ++batches;
    }
    CHECK(batches == (300 + batch - 1) / batch);
    CHECK(first_difference(reference, streamed) == "");
    CHECK((*reader)->report().rows == 300);
  }
}

TEST_CASE("unit_csv_reader: a source that returns one byte per read gives the same table") {
  const std::string text = tricky_long_input();
  REQUIRE(text.size() > (1u << 16));
  ReadReport whole_report;
  const Table whole = read_ok(text, CsvOptions{}, &whole_report);
  CHECK(whole.row_count() > 1000);
  for (const std::vector<size_t>& sizes : {std::vector<size_t>{1}, std::vector<size_t>{1, 2, 3, 5, 7, 11, 4096}}) {
    CAPTURE(sizes.size());
    ReadReport report;
    auto split = read_csv(std::make_unique<SplittingSource>(text, sizes), "split.csv", CsvOptions{}, &report);
    REQUIRE_MESSAGE(split.ok(), (split.ok() ? std::string() : split.error().to_string()));
    CHECK(first_difference(whole, *split) == "");
    CHECK(report.blank_lines == whole_report.blank_lines);
    CHECK(report.rows == whole_report.rows);
    CHECK(report.delimiter == whole_report.delimiter);
    CHECK(report.header == whole_report.header);
  }
}

TEST_CASE("unit_csv_reader: one-byte reads of UTF-16 and windows-1252 give the same table") {
  // UTF-16LE past the first block, so surrogate pairs and code units are cut
  // by reads.
  std::string utf16 = "\xFF\xFE" + utf16le_ascii("id,tree\r\n");
  for (int i = 0; utf16.size() < 76000; ++i)
    utf16 += utf16le_ascii(std::to_string(i) + ",") + "\x3C\xD8\x33\xDF" + utf16le_ascii("\r\n");
  // windows-1252 past the first block, with undefined bytes in the later part.
  std::string legacy = "id,sign\n";
  for (int i = 0; legacy.size() < 76000; ++i) legacy += std::to_string(i) + (i % 2 ? ",\x80\n" : ",\x81\x9D\n");
  for (const std::string* text : {&utf16, &legacy}) {
    ReadReport whole_report, split_report;
    const Table whole = read_ok(*text, CsvOptions{}, &whole_report);
    auto split = read_csv(std::make_unique<SplittingSource>(*text, std::vector<size_t>{1}), "split.csv",
                          CsvOptions{}, &split_report);
    REQUIRE_MESSAGE(split.ok(), (split.ok() ? std::string() : split.error().to_string()));
    CHECK(whole.row_count() > 3000);
    CHECK(first_difference(whole, *split) == "");
    CHECK(split_report.encoding == whole_report.encoding);
    CHECK(split_report.undefined_bytes == whole_report.undefined_bytes);
  }
  // Rows 0, 2, 4, ... carry two undefined bytes each, the others a euro sign.
  ReadReport legacy_report;
  const Table legacy_table = read_ok(legacy, CsvOptions{}, &legacy_report);
  CHECK(legacy_report.undefined_bytes == 2 * ((legacy_table.row_count() + 1) / 2));
  CHECK(legacy_table.column(1).text(0) == "\xC2\x81\xC2\x9D");
  CHECK(legacy_table.column(1).text(1) == "\xE2\x82\xAC");
}

TEST_CASE("unit_csv_reader: one-byte reads report the same error place") {
  std::string text = "v\ncaf\xC3\xA9\n";
  while (text.size() < 70000) text += "value\n";
  text += "ok\r\n\"still\r\nquoted\"\r\nab\xF0\x9F\x8C\r\n";
  const auto whole = read_string(text, CsvOptions{});
  const auto split = read_csv(std::make_unique<SplittingSource>(text, std::vector<size_t>{1}), "test.csv",
                              CsvOptions{});
  REQUIRE(!whole.ok());
  REQUIRE(!split.ok());
  CHECK(whole.error().line == split.error().line);
  CHECK(whole.error().column == split.error().column);
  REQUIRE(whole.error().byte_offset.has_value());
  REQUIRE(split.error().byte_offset.has_value());
  CHECK(*whole.error().byte_offset == text.size() - 5);
  CHECK(*split.error().byte_offset == *whole.error().byte_offset);
}

TEST_CASE("unit_csv_reader: constructs cut by the end of the first 64 KiB block") {
  // The reader detects the dialect from the first 65536 bytes and reads on
  // from there, so a sequence that starts just before that boundary is split.
  const size_t boundary = 1 << 16;
  struct Construct {
    std::string record;  // as written in the file, line break included
    std::string value;   // the cell it must give
  };
  const std::vector<Construct> constructs{
      {"caf\xC3\xA9\n", "caf\xC3\xA9"},
      {"\xE2\x82\xAC\n", "\xE2\x82\xAC"},
      {"\xF0\x9F\x8C\xB3\r\n", "\xF0\x9F\x8C\xB3"},
      {"\"a\r\nb\"\r\n", "a\r\nb"},
      {"\"x\"\"y\"\r", "x\"y"},
  };
  for (const Construct& construct : constructs) {
    for (size_t before = 1; before <= 4; ++before) {
      CAPTURE(construct.value);
      CAPTURE(before);
      std::string text = "v\n";
      while (text.size() + 100 < boundary - before) text += std::string(49, 'p') + "\n";
      text += std::string(boundary - before - text.size() - 1, 'q') + "\n";
      REQUIRE(text.size() == boundary - before);
      text += construct.record + "last\n";
      const Table t = read_ok(text, CsvOptions{});
      REQUIRE(t.row_count() >= 2);
      CHECK(t.column(0).text(t.row_count() - 2) == construct.value);
      CHECK(t.column(0).text(t.row_count() - 1) == "last");
    }
  }
  // A UTF-16 surrogate pair across the boundary: BOM, then ASCII code units up
  // to byte 65534, then D83C DF33.
  std::string utf16 = "\xFF\xFE" + utf16le_ascii("v\n");
  while (utf16.size() + 200 < boundary) utf16 += utf16le_ascii(std::string(49, 'p') + "\n");
  utf16 += utf16le_ascii(std::string((boundary - 2 - utf16.size()) / 2 - 1, 'q') + "\n");
  REQUIRE(utf16.size() == boundary - 2);
  utf16 += "\x3C\xD8\x33\xDF" + utf16le_ascii("\nlast\n");
  const Table t = read_ok(utf16, CsvOptions{});
  REQUIRE(t.row_count() >= 2);
  CHECK(t.column(0).text(t.row_count() - 2) == "\xF0\x9F\x8C\xB3");
}

TEST_CASE("unit_csv_reader: options that cannot work are usage errors") {
  CsvOptions same = kHeader;
  same.delimiter = '"';
  CHECK(read_string("a\n", same).error().kind == ErrorKind::usage);
  CsvOptions line_break = kHeader;
  line_break.delimiter = '\n';
  CHECK(read_string("a\n", line_break).error().kind == ErrorKind::usage);
  CsvOptions no_batch = kHeader;
  no_batch.batch_rows = 0;
  CHECK(read_string("a\n", no_batch).error().kind == ErrorKind::usage);
}

TEST_CASE("unit_csv_reader: strict - the error lists at most ten lines and says there are more") {
  std::string text = "a,b\n";
  for (int i = 0; i < 15; ++i) text += "lonely\n";
  const auto t = read_string(text, kHeader);
  REQUIRE(!t.ok());
  CHECK(t.error().line == 2);
  CHECK(contains(t.error().message, "2, 3, 4, 5, 6, 7, 8, 9, 10, 11"));
  CHECK_FALSE(contains(t.error().message, "12"));
  CHECK(contains(t.error().message, "more"));
}

TEST_CASE("unit_csv_reader: lenient without a header - a malformed first record is rejected, not fatal") {
  // The reader's contract (csv_reader.hpp): in lenient mode a malformed record
  // goes to the reject sink with its line and reason; the first record of a
  // file without a header row is a data record like any other.
  CsvOptions options = kNoHeader;
  options.lenient = true;
  std::vector<RejectedRecord> rejected;
  ReadReport report;
  const auto t = read_string("\"x\"y,2\n1,2\n3,4\n", options, &report, [&](const RejectedRecord& r) -> Status {
    rejected.push_back(r);
    return Ok{};
  });
  REQUIRE_MESSAGE(t.ok(), (t.ok() ? std::string() : t.error().to_string()));
  CHECK(rows_of(t.value()) == Rows{{"1", "2"}, {"3", "4"}});
  REQUIRE(rejected.size() == 1);
  CHECK(rejected[0].line == 1);
  CHECK(rejected[0].text == "\"x\"y,2");
  CHECK(report.rows + report.rejected == 3);
}

TEST_CASE("unit_csv_reader: a single-column file keeps the comma and says why") {
  ReadReport report;
  const Table t = read_ok("name\nAnn\nBo\n", CsvOptions{}, &report);
  CHECK(report.delimiter == ',');
  CHECK(!report.delimiter_reason.empty());
  CHECK(t.names() == std::vector<std::string>{"name"});
  CHECK(rows_of(t) == Rows{{"Ann"}, {"Bo"}});
}

TEST_CASE("unit_csv_reader: encoding names people type") {
  // WHATWG Encoding Standard labels and IANA names, case-insensitive.
  CHECK(encoding_from_name("UTF-8") == std::optional<Encoding>(Encoding::utf8));
  CHECK(encoding_from_name("utf8") == std::optional<Encoding>(Encoding::utf8));
  CHECK(encoding_from_name("UTF-16LE") == std::optional<Encoding>(Encoding::utf16le));
  CHECK(encoding_from_name("utf-16be") == std::optional<Encoding>(Encoding::utf16be));
  CHECK(encoding_from_name("Windows-1252") == std::optional<Encoding>(Encoding::windows1252));
  CHECK(encoding_from_name("CP1252") == std::optional<Encoding>(Encoding::windows1252));
  CHECK(encoding_from_name("ISO-8859-1") == std::optional<Encoding>(Encoding::iso8859_1));
  CHECK(encoding_from_name("Latin1") == std::optional<Encoding>(Encoding::iso8859_1));
  CHECK(!encoding_from_name("ebcdic").has_value());
  for (const Encoding e : {Encoding::utf8, Encoding::utf16le, Encoding::utf16be, Encoding::windows1252, Encoding::iso8859_1})
    CHECK(encoding_from_name(encoding_name(e)) == std::optional<Encoding>(e));
}

TEST_CASE("unit_csv_reader: another quote character") {
  CsvOptions options = kNoHeader;
  options.quote = '\'';
  CHECK(rows_of(read_ok("'it''s, here',\"plain\"\n", options)) == Rows{{"it's, here", "\"plain\""}});
}

TEST_CASE("unit_csv_reader: ASCII for 64 KiB, then windows-1252 - the rest is read as windows-1252") {
  // encoding.hpp's rule: UTF-8 if well-formed, otherwise windows-1252. ASCII
  // reads the same in both, so a file whose first non-ASCII byte is late and
  // not UTF-8 is windows-1252 (0xE9 -> U+00E9, 0x80 -> U+20AC, 0x81 -> U+0081:
  // WHATWG index-windows-1252, see above).
  std::string text = "id,name\n";
  for (int i = 0; text.size() < 70000; ++i) text += std::to_string(i) + ",plain\n";
  const std::string late = "late,\"two\nlines caf\xE9\"\nlast,\x80\x81\n";
  const size_t late_offset = text.size();
  text += late;
  ReadReport report;
  const Table t = read_ok(text, CsvOptions{}, &report);
  CHECK(report.encoding == Encoding::windows1252);
  CHECK(contains(report.encoding_reason, std::to_string(late_offset + late.find('\xE9'))));
  REQUIRE(t.row_count() >= 2);
  CHECK(t.column(1).text(t.row_count() - 2) == "two\nlines caf\xC3\xA9");
  CHECK(t.column(1).text(t.row_count() - 1) == "\xE2\x82\xAC\xC2\x81");
  CHECK(report.undefined_bytes == 1);
  REQUIRE(report.first_undefined_byte.has_value());
  CHECK(*report.first_undefined_byte == late_offset + late.find('\x81'));
  // One-byte reads switch at the same place and give the same table.
  ReadReport split_report;
  auto split = read_csv(std::make_unique<SplittingSource>(text, std::vector<size_t>{1}), "split.csv", CsvOptions{},
                        &split_report);
  REQUIRE_MESSAGE(split.ok(), (split.ok() ? std::string() : split.error().to_string()));
  CHECK(first_difference(t, *split) == "");
  CHECK(split_report.undefined_bytes == 1);
  CHECK(split_report.first_undefined_byte == report.first_undefined_byte);
}

TEST_CASE("unit_csv_reader: progress counts source bytes up to the total") {
  std::string text = "id,name\n";
  for (int i = 0; text.size() < 3000000; ++i) text += std::to_string(i) + ",a name of some length\n";
  std::vector<uint64_t> done;
  std::optional<uint64_t> total;
  CsvOptions options = kHeader;
  options.batch_rows = 20000;
  const auto t = read_csv(memory_source(text), "test.csv", options, nullptr, {},
                          [&](uint64_t bytes, std::optional<uint64_t> size) {
                            done.push_back(bytes);
                            total = size;
                          });
  REQUIRE(t.ok());
  REQUIRE(done.size() > 2);
  CHECK(std::is_sorted(done.begin(), done.end()));
  CHECK(total == std::optional<uint64_t>(text.size()));
  CHECK(done.back() == text.size());
}

}  // TEST_SUITE
