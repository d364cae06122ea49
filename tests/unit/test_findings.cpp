// Findings: each detector on small tables (and no false positives on clean
// ones), with the previews checked against really applying the steps.
// White space is Unicode's White_Space property and case folding Unicode's
// CaseFolding.txt (as in ICU 72 / Debian unicode-data); the expected values
// below are worked out by hand from the tables in each test.
#include <doctest/doctest.h>

#include <algorithm>
#include <set>
#include <string>
#include <vector>

#include "findings/finding_support.hpp"
#include "findings/findings.hpp"
#include "recipe.hpp"
#include "steps/registry.hpp"
#include "unit_support.hpp"

namespace tamis {
namespace {

using test::read_ok;

Table table_of(const std::string& csv) { return read_ok(csv, test::dialect(',', HeaderMode::yes)); }

// Every test's table is also scanned with its whole-table work (previews,
// views) run one row at a time, and with its repeated values stored once:
// neither may change a single finding.
std::vector<Finding> findings_of(const Table& table, const FindingOptions& options = {}) {
  const TableProfile profile = profile_table(table);
  std::vector<Finding> found = find_problems(table, profile, options);
  FindingOptions one_row_batches = options;
  one_row_batches.batch_cells = 1;
  const std::vector<Finding> batched = find_problems(table, profile, one_row_batches);
  REQUIRE(batched.size() == found.size());
  for (size_t i = 0; i < found.size(); ++i)
    CHECK(finding_to_json(batched[i]).dump() == finding_to_json(found[i]).dump());
  // And as the workbench loads it, with repeated values kept once.
  const Table shared = with_repeated_values_shared(table);
  const std::vector<Finding> from_shared = find_problems(shared, profile_table(shared), options);
  REQUIRE(from_shared.size() == found.size());
  for (size_t i = 0; i < found.size(); ++i)
    CHECK(finding_to_json(from_shared[i]).dump() == finding_to_json(found[i]).dump());
  return found;
}

std::vector<const Finding*> of_kind(const std::vector<Finding>& findings, const std::string& kind) {
  std::vector<const Finding*> out;
  for (const Finding& f : findings)
    if (f.kind == kind) out.push_back(&f);
  return out;
}

const Finding& only(const std::vector<Finding>& findings, const std::string& kind) {
  const auto list = of_kind(findings, kind);
  REQUIRE_MESSAGE(list.size() == 1, (kind + " findings: " + std::to_string(list.size())));
  return *list.front();
}

std::string kinds_of(const std::vector<Finding>& findings) {
  std::string out;
  for (const Finding& f : findings) out += f.kind + "(" + (f.columns.empty() ? "" : f.columns[0]) + ") ";
  return out;
}

// Cells that differ between two tables with the same rows and columns.
uint64_t cells_differing(const Table& a, const Table& b) {
  uint64_t n = 0;
  for (size_t c = 0; c < a.column_count(); ++c) {
    const auto bc = b.find(a.name(c));
    REQUIRE(bc.has_value());
    for (size_t r = 0; r < a.row_count(); ++r)
      n += cell_text(a.column(c), r) != cell_text(b.column(*bc), r);
  }
  return n;
}

TEST_CASE("unit_findings: a clean table has no findings") {
  const Table t = table_of(
      "id,site,species,planted_on,count\n"
      "1,Mill Lane,Oak,2023-01-05,12\n"
      "2,Quarry Park,Rowan,2023-02-11,7\n"
      "3,Heron Walk,Ginkgo,2023-03-15,30\n"
      "4,Pike Row,Hornbeam,2023-04-20,4\n"
      "5,Slate Rd,Alder,2023-05-02,18\n");
  const auto findings = findings_of(t);
  CHECK_MESSAGE(findings.empty(), kinds_of(findings));
}

TEST_CASE("unit_findings: an empty table and a one-row table give no findings") {
  CHECK(findings_of(table_of("a,b\n")).empty());
  const Table one_row = table_of("a,b\nx,y\n");
  CHECK(findings_of(one_row).empty());
}

TEST_CASE("unit_findings: exact duplicate rows, removed by a safe deduplicate") {
  const Table t = table_of(
      "site,n\n"
      "Mill Lane,1\n"
      "Quarry Park,2\n"
      "Mill Lane,1\n"
      "Mill Lane,1 \n"
      "Quarry Park,2\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "duplicate_rows");
  CHECK(f.rows_affected == 2);
  REQUIRE(f.fixes.size() == 1);
  CHECK(f.fixes[0].safe);
  CHECK(f.fixes[0].why_review.empty());
  CHECK(f.fixes[0].step["op"] == "deduplicate");
  CHECK(f.fixes[0].preview.rows_removed == 2);
  REQUIRE(f.fixes[0].preview.examples.size() == 2);
  CHECK(f.fixes[0].preview.examples[0].removed);
  CHECK(f.fixes[0].preview.examples[0].source_line == 4);
  CHECK(f.fixes[0].preview.examples[0].before == "Mill Lane | 1");
  CHECK(f.fixes[0].preview.examples[1].source_line == 6);
  auto after = apply_steps(t, {f.fixes[0].step});
  REQUIRE(after.ok());
  CHECK(t.row_count() - after->row_count() == f.fixes[0].preview.rows_removed);
}

TEST_CASE("unit_findings: white space at the ends, Unicode included, gets a safe trim per column") {
  // U+00A0 NO-BREAK SPACE and U+3000 IDEOGRAPHIC SPACE are White_Space (PropList.txt).
  const Table t = table_of(
      "species,crew\n"
      " Oak,Ada\n"
      "Ash ,Ben\n"
      "\xC2\xA0" "Elm,Cy\n"
      "Yew\xE3\x80\x80,Di\n"
      "Oak,Ed\n"
      "   ,Flo\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "edge_white_space");
  CHECK(f.columns == std::vector<std::string>{"species"});
  CHECK(f.rows_affected == 4);  // the blank "   " is missing_as_text's, not counted here
  REQUIRE(!f.fixes.empty());
  CHECK(f.fixes[0].safe);
  CHECK(f.fixes[0].step["op"] == "trim");
  auto after = apply_steps(t, {f.fixes[0].step});
  REQUIRE(after.ok());
  CHECK(f.fixes[0].preview.cells_changed == cells_differing(t, *after));
  CHECK(f.fixes[0].preview.cells_changed == 5);  // the blank is trimmed to "" too
  REQUIRE(f.fixes[0].preview.examples.size() == 5);
  CHECK(f.fixes[0].preview.examples[0].before == " Oak");
  CHECK(f.fixes[0].preview.examples[0].after == "Oak");
  CHECK(f.fixes[0].preview.examples[0].source_line == 2);
  CHECK(f.fixes[0].preview.examples[2].after == "Elm");
}

TEST_CASE("unit_findings: doubled and odd white space inside values needs review") {
  const Table t = table_of(
      "contractor\n"
      "Fennick  & Rye\n"
      "\"Hollin, Marsh &\nDaughters\"\n"
      "Tillwater Arbor\n"
      "Greenrow\tLandscapes\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "inner_white_space");
  CHECK(f.rows_affected == 3);
  CHECK(f.facts["line_breaks"] == 1);
  REQUIRE(!f.fixes.empty());
  CHECK_FALSE(f.fixes[0].safe);
  CHECK_FALSE(f.fixes[0].why_review.empty());
  CHECK(f.fixes[0].preview.cells_changed == 3);
  CHECK(f.fixes[0].preview.examples[1].after == "Hollin, Marsh & Daughters");
  CHECK(f.fixes[0].preview.examples[1].source_line == 3);
}

TEST_CASE("unit_findings: blanks and sentinels, in any letter case, become NULL and other values stay") {
  const Table t = table_of(
      "status,delta\n"
      "Lost,-5\n"
      ",-\n"
      "N/A,3\n"
      "n/a,NULL\n"
      " none ,4\n"
      "\t,?\n"
      "Pending,7\n");
  const auto findings = findings_of(t);
  const auto list = of_kind(findings, "missing_as_text");
  REQUIRE(list.size() == 2);
  const Finding& status = list[0]->columns[0] == "status" ? *list[0] : *list[1];
  const Finding& delta = list[0]->columns[0] == "delta" ? *list[0] : *list[1];
  CHECK(status.rows_affected == 5);
  CHECK(status.facts["blanks"] == 2);
  CHECK(status.facts["sentinels"] == 3);
  REQUIRE(!status.fixes.empty());
  CHECK(status.fixes[0].safe);
  // " none " was trimmed by the trim fix before the sentinels were matched.
  CHECK(status.fixes[0].step["values"] == nlohmann::ordered_json({"N/A", "n/a", "none"}));
  CHECK(delta.rows_affected == 3);  // "-", "NULL", "?"; "-5" is a number, not the sentinel "-"
  CHECK(delta.fixes[0].preview.cells_changed == 3);

  FindingOptions only_dash;
  only_dash.sentinels = {"-"};
  const auto narrow = findings_of(t, only_dash);
  for (const Finding* f : of_kind(narrow, "missing_as_text"))
    if (f->columns[0] == "delta") CHECK(f->rows_affected == 1);
}

TEST_CASE("unit_findings: trailing punctuation only where the bare value exists") {
  const Table t = table_of(
      "district,street\n"
      "Canal Basin,Kiln St.\n"
      "Canal Basin.,Kiln St.\n"
      "Northwick,Wharf St.\n"
      "northwick.,Wharf St.\n"
      "Canal Basin,Kiln St.\n"
      "Saltpan,Wharf St.\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "trailing_punctuation");
  CHECK(f.columns == std::vector<std::string>{"district"});
  CHECK(f.rows_affected == 2);
  CHECK(f.facts["map"]["Canal Basin."] == "Canal Basin");
  CHECK(f.facts["map"]["northwick."] == "Northwick");
  REQUIRE(!f.fixes.empty());
  CHECK(f.fixes[0].step["op"] == "map_values");
  CHECK_FALSE(f.fixes[0].safe);
  CHECK(f.fixes[0].preview.cells_changed == 2);
}

TEST_CASE("unit_findings: letter-case variants map to the most frequent spelling (Unicode case folding)") {
  const Table t = table_of(
      "species,place\n"
      "Oak,\xC3\x89tang\n"      // Étang
      "oak,\xC3\xA9tang\n"      // étang
      "Oak,\xC3\x89tang\n"
      "OAK,Stra\xC3\x9F" "e\n"  // Straße
      "Rowan,STRASSE\n"         // folds to strasse, like Straße
      "Rowan,Stra\xC3\x9F" "e\n");
  const auto findings = findings_of(t);
  const auto list = of_kind(findings, "case_variants");
  REQUIRE(list.size() == 2);
  for (const Finding* f : list) {
    if (f->columns[0] == "species") {
      CHECK(f->rows_affected == 2);
      CHECK(f->facts["map"]["oak"] == "Oak");
      CHECK(f->facts["map"]["OAK"] == "Oak");
    } else {
      CHECK(f->rows_affected == 2);
      CHECK(f->facts["map"]["\xC3\xA9tang"] == "\xC3\x89tang");
      CHECK(f->facts["map"]["STRASSE"] == "Stra\xC3\x9F" "e");
    }
    REQUIRE(!f->fixes.empty());
    CHECK(f->fixes[0].preview.cells_changed == 2);
  }
}

TEST_CASE("unit_findings: variant spellings by similarity but not in number or date columns") {
  std::string csv = "district,planted_on\n";
  const char* rows[][2] = {{"Fenmoor", "2023-01-05"},        {"Fenmoor", "2023-01-06"},
                           {"Fenmoor", "2023-01-07"},        {"Fenmor", "2023-01-05"},
                           {"Rivi\xC3\xA8re Quay", "2023-01-06"}, {"Rivi\xC3\xA8re Quay", "2023-01-07"},
                           {"Riviere Quay", "2023-01-05"},   {"Saltpan", "2023-01-06"},
                           {"Saltpan", "2023-01-07"},        {"Saltpan", "2023-01-05"}};
  for (const auto& r : rows) csv += std::string(r[0]) + "," + r[1] + "\n";
  const auto findings = findings_of(table_of(csv));
  const Finding& f = only(findings, "similar_values");
  CHECK(f.columns == std::vector<std::string>{"district"});
  CHECK(f.rows_affected == 2);
  REQUIRE(!f.fixes.empty());
  CHECK(f.fixes[0].step["op"] == "map_values");
  CHECK(f.fixes[0].step["map"]["Fenmor"] == "Fenmoor");  // one edit in seven letters: 6/7 >= 0.85
  CHECK(f.fixes[0].step["map"]["Riviere Quay"] == "Rivi\xC3\xA8re Quay");  // equal once accents are stripped
  CHECK_FALSE(f.fixes[0].safe);
  CHECK(f.fixes[0].preview.cells_changed == 2);
}

TEST_CASE("unit_findings: dates in several formats, a value that fits none, inferred month/day order") {
  const Table t = table_of(
      "planted_on\n"
      "2023-01-05\n"
      "03/16/2022\n"
      "4/2/2023\n"
      "2/30/2023\n"
      "12.10.2021\n"
      "2023-11-30\n"
      "\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "dates_as_text");
  CHECK(f.rows_affected == 4);  // every non-NULL value not already ISO 8601
  CHECK(f.facts["unmatched"] == 1);
  CHECK(f.facts["unmatched_values"][0]["value"] == "2/30/2023");
  REQUIRE(f.fixes.size() == 2);  // the dotted family has no day above 12: both orders are offered
  const auto formats = f.fixes[0].step["formats"];
  CHECK(std::find(formats.begin(), formats.end(), "%m/%d/%Y") != formats.end());  // 03/16 has a 16th day
  CHECK(std::find(formats.begin(), formats.end(), "%Y-%m-%d") != formats.end());
  CHECK(std::find(formats.begin(), formats.end(), "%d.%m.%Y") != formats.end());
  const auto other = f.fixes[1].step["formats"];
  CHECK(std::find(other.begin(), other.end(), "%m.%d.%Y") != other.end());
  CHECK(f.facts["ambiguous_day_month"] == 2);  // 4/2/2023 and 12.10.2021
  // ISO values keep their text; the blank is NULL already in the view the
  // preview runs on (after to_null); 2/30/2023 becomes NULL.
  CHECK(f.fixes[0].preview.cells_changed == 4);
}

TEST_CASE("unit_findings: a column written entirely in ISO 8601 is not a finding") {
  CHECK(of_kind(findings_of(table_of("d\n2023-01-05\n2024-02-29\n1999-12-31\n")), "dates_as_text").empty());
}

TEST_CASE("unit_findings: numbers with thousands separators, currency and percent signs") {
  const Table t = table_of(
      "count,pct,cost\n"
      "\"1,761\",37,$12.50\n"
      "368,36.4%,$7\n"
      "160,91%,3.25\n"
      "\"3,127\",45,$100\n");
  const auto findings = findings_of(t);
  const auto list = of_kind(findings, "numbers_as_text");
  REQUIRE(list.size() == 3);
  for (const Finding* f : list) {
    REQUIRE(!f->fixes.empty());
    const auto& step = f->fixes[0].step;
    CHECK(step["op"] == "parse_number");
    if (f->columns[0] == "count") {
      CHECK(f->facts["thousands_separator"] == 2);
      CHECK(step["group_mark"] == ",");
      CHECK(step["scale"] == 0);
    } else if (f->columns[0] == "pct") {
      CHECK(f->facts["percent_sign"] == 2);
      CHECK(step["strip"] == "%");  // mixed with unsigned values: the sign is dropped, not divided out
    } else {
      CHECK(f->facts["currency_sign"] == 3);
      CHECK(step["strip"] == "$");
    }
    CHECK(f->fixes[0].preview.cells_changed >= 2);
  }
}

TEST_CASE("unit_findings: a decimal comma in a column of decimal points, fixed before parse_number") {
  const Table t = table_of(
      "funding_k\n"
      "52.4\n"
      "\"31,1\"\n"
      "16.6\n"
      "60.4\n"
      "\"1,250\"\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "decimal_comma");
  CHECK(f.rows_affected == 1);  // 1,250 has three digits after the comma: a thousands separator
  REQUIRE(!f.fixes.empty());
  CHECK(f.fixes[0].preview.cells_changed == 1);
  CHECK(f.fixes[0].preview.examples[0].after == "31.1");
  const Finding& n = only(findings, "numbers_as_text");
  CHECK(n.facts["previewed_after"].size() == 1);
  REQUIRE(!n.fixes.empty());
  // Only 1,250 changes its text (to 1250.0); 31,1 was 31.1 already after the first fix.
  CHECK(n.fixes[0].preview.cells_changed == 1);
  CHECK(n.fixes[0].step["group_mark"] == ",");
}

TEST_CASE("unit_findings: NULLs fillable from a key column and a conflicting group reported but not filled") {
  std::string csv = "site,district,crew\n";
  const char* rows[][3] = {
      {"Mill Lane", "Old Tannery", "Ada"}, {"Mill Lane", "", "Ben"},          {"Mill Lane", "Old Tannery", "Cy"},
      {"Mill Lane", "Old Tannery", "Di"},  {"Mill Lane", "Old Tannery", "Ed"}, {"Fen Edge", "Fenmoor", "Ada"},
      {"Fen Edge", "N/A", "Ben"},          {"Fen Edge", "Fenmoor", "Cy"},      {"Fen Edge", "Fenmoor", "Di"},
      {"Fen Edge", "Fenmoor", "Ed"},       {"Fen Edge", "Fenmoor", "Flo"},     {"Towpath", "Canal Basin", "Ada"},
      {"Towpath", "Old Tannery", "Ben"},   {"Towpath", "", "Cy"},              {"Towpath", "Canal Basin", "Di"},
      {"Towpath", "Canal Basin", "Ed"},    {"Towpath", "Canal Basin", "Flo"},  {"Towpath", "Canal Basin", "Gus"},
      {"Towpath", "Canal Basin", "Hal"},   {"Towpath", "Canal Basin", "Ida"},  {"Towpath", "Canal Basin", "Jo"},
      {"Towpath", "Canal Basin", "Kim"},   {"Towpath", "Canal Basin", "Lu"},   {"Towpath", "Canal Basin", "Mo"},
      {"Towpath", "Canal Basin", "Ned"},   {"Towpath", "Canal Basin", "Oz"},   {"Towpath", "Canal Basin", "Pat"},
      {"Towpath", "Canal Basin", "Quin"},  {"Towpath", "Canal Basin", "Ray"},  {"Towpath", "Canal Basin", "Sal"},
      {"Towpath", "Canal Basin", "Tom"},   {"Towpath", "Canal Basin", "Uma"},  {"Towpath", "Canal Basin", "Vic"},
      {"Towpath", "Canal Basin", "Wes"},   {"Towpath", "Canal Basin", "Xia"},  {"Towpath", "Canal Basin", "Yan"},
      {"Towpath", "Canal Basin", "Zed"},   {"Towpath", "Canal Basin", "Al"},   {"Towpath", "Canal Basin", "Bo"},
      {"Towpath", "Canal Basin", "Cal"}};
  for (const auto& r : rows) csv += std::string(r[0]) + "," + r[1] + "," + r[2] + "\n";
  const auto findings = findings_of(table_of(csv));
  const Finding& f = only(findings, "fillable_nulls");
  CHECK(f.columns == std::vector<std::string>{"district", "site"});
  CHECK(f.facts["key"] == "site");
  CHECK(f.rows_affected == 2);
  CHECK(f.facts["conflicting_groups"] == 1);
  CHECK(f.facts["nulls_in_conflicting_groups"] == 1);
  REQUIRE(!f.fixes.empty());
  CHECK(f.fixes[0].step["op"] == "fill_from_group");
  CHECK(f.fixes[0].preview.cells_changed == 2);
  CHECK(f.fixes[0].preview.warnings.size() >= 1);  // the Towpath conflict, from the step itself
}

TEST_CASE("unit_findings: NULLs fillable once a variant spelling is fixed, the fix seen through its delta") {
  // Fen Edge's "Fenmoor." rows agree with "Fenmoor" only after the trailing
  // punctuation fix; the fixed rows are a delta over the column's chunk.
  std::string csv = "site,district\n";
  for (int i = 0; i < 12; ++i) csv += "Mill Lane,Old Tannery\n";
  for (int i = 0; i < 12; ++i) csv += i % 4 == 3 ? "Fen Edge,Fenmoor.\n" : "Fen Edge,Fenmoor\n";
  csv += "Mill Lane,\nFen Edge,\n";
  const auto findings = findings_of(table_of(csv));
  const Finding& f = only(findings, "fillable_nulls");
  CHECK(f.facts["key"] == "site");
  CHECK(f.rows_affected == 2);
  CHECK(f.facts["conflicting_groups"] == 0);
}

TEST_CASE("unit_findings: rows whose measure columns are all missing, and useless columns") {
  const Table t = table_of(
      "site,count,pct,unit,note\n"
      "Mill Lane,12,40,trees,\n"
      "Fen Edge,,N/A,trees,\n"
      "Pike Row,7,,trees,-\n"
      "Kiln St,-,,trees,\n"
      "Slate Rd,30,55,trees,\n");
  const auto findings = findings_of(t);
  const Finding& f = only(findings, "empty_measure_rows");
  CHECK(f.columns == std::vector<std::string>{"count", "pct"});
  CHECK(f.rows_affected == 2);
  REQUIRE(!f.fixes.empty());
  CHECK(f.fixes[0].step["where"] == "\"count\" IS NULL AND \"pct\" IS NULL");
  CHECK_FALSE(f.fixes[0].safe);
  CHECK(f.fixes[0].preview.rows_removed == 2);
  CHECK(f.fixes[0].preview.examples[0].source_line == 3);
  CHECK(f.fixes[0].preview.examples[1].source_line == 5);
  const auto useless = of_kind(findings, "useless_columns");
  REQUIRE(useless.size() == 2);
  std::set<std::string> names;
  for (const Finding* u : useless) names.insert(u->columns[0]);
  CHECK(names == std::set<std::string>{"unit", "note"});
  for (const Finding* u : useless) CHECK(u->fixes.at(0).step["op"] == "drop_columns");
}

TEST_CASE("unit_findings: ranked by rows affected, every fix is a valid v1 step, the scanner matches") {
  const Table t = table_of(
      "site,status,planted_on\n"
      " Mill Lane,Lost,03/16/2022\n"
      "Mill Lane,lost,2022-01-02\n"
      "Quarry Park,N/A,\n"
      "Quarry Park,N/A,\n"
      "Pike Row ,Lost,4/1/2023\n"
      "Pike Row,Pending,2023-02-01\n");
  const auto findings = findings_of(t);
  REQUIRE(findings.size() >= 4);
  for (size_t i = 1; i < findings.size(); ++i) CHECK(findings[i - 1].rows_affected >= findings[i].rows_affected);
  for (const Finding& f : findings) {
    CHECK(!f.title.empty());
    CHECK(!f.explanation.empty());
    CHECK(!f.columns.empty());
    for (const SuggestedFix& fix : f.fixes) {
      CHECK(fix.safe == fix.why_review.empty());
      nlohmann::ordered_json recipe = {{"tamis_recipe", 1}, {"steps", {fix.step}}};
      const auto parsed = parse_recipe(recipe.dump(), "fix.json");
      CHECK_MESSAGE(parsed.ok(), fix.step.dump());
    }
  }
  std::set<std::string> safe_ops;
  for (const Finding& f : findings)
    for (const SuggestedFix& fix : f.fixes)
      if (fix.safe) safe_ops.insert(fix.step["op"].get<std::string>());
  for (const std::string& op : safe_ops) CHECK((op == "trim" || op == "to_null" || op == "deduplicate"));

  // Sliced to one batch or pause per slice, and with every whole-table step
  // run one row at a time, the scan finds exactly what one call over the
  // table as one batch finds: titles, counts, fixes, previews and examples.
  FindingOptions one_row_batches;
  one_row_batches.batch_cells = 1;
  FindingScanner sliced(t, profile_table(t), one_row_batches);
  int slices = 0;
  while (!sliced.step(1)) {
    CHECK(sliced.progress() < 1.0);
    ++slices;
  }
  CHECK(slices > 10);
  CHECK(sliced.progress() == 1.0);
  REQUIRE(sliced.result().size() == findings.size());
  for (size_t i = 0; i < findings.size(); ++i)
    CHECK(finding_to_json(sliced.result()[i]).dump() == finding_to_json(findings[i]).dump());
  const auto json = finding_to_json(findings.front());
  CHECK(json["kind"] == findings.front().kind);
  CHECK(json["fixes"].size() == findings.front().fixes.size());
}

}  // namespace
}  // namespace tamis
