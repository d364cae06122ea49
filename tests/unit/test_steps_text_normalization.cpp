// normalize_unicode against the Unicode Consortium's conformance file
// NormalizationTest.txt (UAX #15), every line, from Debian's unicode-data
// package (/usr/share/unicode/NormalizationTest.txt.bz2). The file lies
// outside the repository, so this suite is built natively only.
#include <doctest/doctest.h>
#include <unicode/uchar.h>

#include <nlohmann/json.hpp>

#include <cstdio>
#include <memory>
#include <sstream>
#include <string>
#include <vector>

#include "recipe.hpp"
#include "steps/registry.hpp"
#include "unit_support.hpp"
#include "utf8.hpp"

namespace tamis {
namespace {

constexpr const char* kNormalizationTest = "/usr/share/unicode/NormalizationTest.txt.bz2";

struct TestFile {
  std::string version;                           // from the first line, e.g. "15.0.0"
  std::vector<std::vector<std::string>> rows;    // c1..c5 as UTF-8, Parts 0-3
  std::vector<bool> listed = std::vector<bool>(0x110000);  // code points that are c1 of a Part 1 line
  size_t parts = 0;
};

std::string utf8_of_hex_list(const std::string& field) {
  std::istringstream in(field);
  std::string out, hex;
  while (in >> hex) utf8::append(out, static_cast<char32_t>(std::stoul(hex, nullptr, 16)));
  return out;
}

TestFile read_test_file() {
  TestFile file;
  const std::string command = std::string("bzip2 -dc ") + kNormalizationTest;
  std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(command.c_str(), "r"), pclose);
  REQUIRE_MESSAGE(pipe, "cannot run bzip2");
  std::string text;
  char buffer[1 << 16];
  for (size_t n; (n = fread(buffer, 1, sizeof buffer, pipe.get())) > 0;) text.append(buffer, n);
  REQUIRE_MESSAGE(!text.empty(), kNormalizationTest, " is missing: install Debian's unicode-data and bzip2");
  std::istringstream lines(text);
  bool part1 = false;
  for (std::string line; std::getline(lines, line);) {
    if (file.version.empty() && line.rfind("# NormalizationTest-", 0) == 0)
      file.version = line.substr(20, line.find(".txt") - 20);
    if (line.empty() || line[0] == '#') continue;
    if (line[0] == '@') {
      ++file.parts;
      part1 = line.rfind("@Part1", 0) == 0;
      continue;
    }
    std::vector<std::string> fields;
    std::istringstream in(line);
    for (std::string field; fields.size() < 5 && std::getline(in, field, ';');) fields.push_back(utf8_of_hex_list(field));
    REQUIRE_MESSAGE(fields.size() == 5, line);
    if (part1) {
      size_t i = 0;
      file.listed[utf8::next(fields[0], i)] = true;
    }
    file.rows.push_back(std::move(fields));
  }
  return file;
}

const TestFile& test_file() {
  static const TestFile file = read_test_file();
  return file;
}

Table columns_table(const std::vector<std::string>& names, const std::vector<std::vector<std::string>>& rows) {
  std::vector<ColumnPtr> columns;
  for (size_t c = 0; c < names.size(); ++c) {
    TextChunkBuilder builder;
    for (const auto& row : rows) builder.append(row[c]);
    auto column = std::make_shared<Column>(Type::text);
    column->append_chunk(builder.finish());
    columns.push_back(column);
  }
  auto lines = std::make_shared<Column>(Type::integer);
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = rows.size();
  chunk->numbers.assign(rows.size(), 1);
  lines->append_chunk(chunk);
  auto table = Table::make(names, columns, lines);
  REQUIRE(table.ok());
  return std::move(table).value();
}

Table normalized(const Table& in, const std::string& form) {
  nlohmann::json columns = nlohmann::json::array();
  for (const std::string& name : in.names()) columns.push_back(name);
  auto step = parse_step({{"op", "normalize_unicode"}, {"columns", columns}, {"form", form}}, 0, schema_of(in));
  REQUIRE(step.ok());
  ChangeRecord change;
  auto out = (*step)->apply(in, nullptr, change);
  REQUIRE(out.ok());
  return std::move(out).value();
}

std::string hex_of(std::string_view s) {
  std::string out;
  char buffer[16];
  for (size_t i = 0; i < s.size();) {
    std::snprintf(buffer, sizeof buffer, "%s%04X", out.empty() ? "" : " ", static_cast<unsigned>(utf8::next(s, i)));
    out += buffer;
  }
  return out;
}

TEST_CASE("unit_steps_text_normalization: the file is the Unicode version ICU implements") {
  const TestFile& file = test_file();
  UVersionInfo version;
  u_getUnicodeVersion(version);
  char icu_version[U_MAX_VERSION_STRING_LENGTH];
  u_versionToString(version, icu_version);
  // u_versionToString drops trailing zero fields ("15.0" for 15.0.0).
  CHECK(file.version.rfind(icu_version, 0) == 0);
  CHECK(file.parts == 4);  // @Part0 .. @Part3
  CHECK(file.rows.size() > 19000);
}

TEST_CASE("unit_steps_text_normalization: NormalizationTest.txt NFC and NFKC invariants, every line") {
  const TestFile& file = test_file();
  const std::vector<std::string> names = {"c1", "c2", "c3", "c4", "c5"};
  const Table in = columns_table(names, file.rows);
  const Table nfc = normalized(in, "NFC");
  const Table nfkc = normalized(in, "NFKC");
  size_t failures = 0;
  for (size_t r = 0; r < file.rows.size(); ++r) {
    const auto& c = file.rows[r];
    // NormalizationTest.txt, invariants for NFC:
    //   c2 == toNFC(c1) == toNFC(c2) == toNFC(c3);  c4 == toNFC(c4) == toNFC(c5)
    const std::string nfc_expected[] = {c[1], c[1], c[1], c[3], c[3]};
    for (size_t k = 0; k < 5; ++k) {
      // invariant for NFKC: c4 == toNFKC(c1) == toNFKC(c2) == ... == toNFKC(c5)
      const bool nfc_ok = nfc.column(k).text(r) == nfc_expected[k];
      const bool nfkc_ok = nfkc.column(k).text(r) == c[3];
      if (nfc_ok && nfkc_ok) continue;
      if (++failures <= 20)
        FAIL_CHECK("line with c1 = ", hex_of(c[0]), ": ", names[k], " = ", hex_of(c[k]), " -> NFC ",
                   hex_of(nfc.column(k).text(r)), " (want ", hex_of(nfc_expected[k]), "), NFKC ",
                   hex_of(nfkc.column(k).text(r)), " (want ", hex_of(c[3]), ")");
    }
  }
  CHECK(failures == 0);
}

TEST_CASE("unit_steps_text_normalization: NormalizationTest.txt Part 1 complement stays unchanged") {
  // NormalizationTest.txt, invariant 2: every code point assigned in this
  // version and not listed in Part 1 is its own NFC and NFKC.
  const TestFile& file = test_file();
  std::vector<std::vector<std::string>> rows;
  for (UChar32 c = 0; c < 0x110000; ++c) {
    if (file.listed[c] || (c >= 0xD800 && c <= 0xDFFF) || u_charType(c) == U_UNASSIGNED) continue;
    std::string s;
    utf8::append(s, static_cast<char32_t>(c));
    rows.push_back({s});
  }
  CHECK(rows.size() > 200000);
  const Table in = columns_table({"x"}, rows);
  for (const char* form : {"NFC", "NFKC"}) {
    const Table out = normalized(in, form);
    size_t failures = 0;
    for (size_t r = 0; r < rows.size(); ++r)
      if (out.column(0).text(r) != rows[r][0] && ++failures <= 20)
        FAIL_CHECK(form, " changed ", hex_of(rows[r][0]), " to ", hex_of(out.column(0).text(r)));
    CHECK(failures == 0);
  }
}

}  // namespace
}  // namespace tamis
