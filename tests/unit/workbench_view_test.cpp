// The Data grid's helpers: display text (NULL vs empty, visible white space),
// sorted and filtered views, and the cells a step changed; plus the exports.
#include <doctest/doctest.h>

#include "data_view.hpp"
#include "document.hpp"
#include "exports.hpp"
#include "workbench_support.hpp"

using namespace tamis;
using namespace tamis::workbench;
using tamis::test::document_of;
using json = nlohmann::json;

namespace {

const DateFormat& iso() {
  static const DateFormat format = DateFormat::compile("%Y-%m-%d").value();
  return format;
}

std::vector<std::string> column_in_view(const Table& t, size_t column, const std::vector<size_t>& view) {
  std::vector<std::string> out;
  for (size_t r : view) out.push_back(t.column(column).is_null(r) ? "<NULL>" : std::string(t.column(column).text(r)));
  return out;
}

}  // namespace

TEST_CASE("unit_workbench_view: NULL and empty text are told apart, white space at the ends is visible") {
  auto doc = document_of("v\n\" a\tb \"\n\"\"\nnull\n\"\xC2\xA0x\"\n\"p\r\nq\"\n");
  REQUIRE(doc->add_step({{"op", "to_null"}, {"columns", {"v"}}, {"values", {"null"}}}));
  const Table& t = doc->result();

  const CellText spaced = cell_text(t, 0, 0, iso());
  CHECK_FALSE(spaced.is_null);
  CHECK(spaced.value == " a\tb ");
  CHECK(spaced.shown == "\u00B7a\u21E5b\u00B7");  // middle dot for a space, a tab arrow inside
  CHECK(spaced.leading_marks == 2);                 // U+00B7 is two bytes in UTF-8 (RFC 3629)
  CHECK(spaced.trailing_marks == 2);

  const CellText empty = cell_text(t, 1, 0, iso());
  CHECK_FALSE(empty.is_null);
  CHECK(empty.value.empty());
  CHECK(empty.shown.empty());

  const CellText null = cell_text(t, 2, 0, iso());
  CHECK(null.is_null);
  CHECK(null.value.empty());

  // U+00A0 NO-BREAK SPACE is White_Space in Unicode's PropList.txt.
  const CellText no_break = cell_text(t, 3, 0, iso());
  CHECK(no_break.shown == "\u2423x");
  CHECK(no_break.leading_marks == 3);

  // A line break inside a value is one mark, CR LF included.
  CHECK(cell_text(t, 4, 0, iso()).shown == "p\u21B5q");
}

TEST_CASE("unit_workbench_view: typed cells show their canonical text") {
  auto doc = document_of("d,n\n03/04/2021,\"1,200\"\n");
  REQUIRE(doc->add_step({{"op", "parse_date"}, {"column", "d"}, {"formats", {"%m/%d/%Y"}}}));
  REQUIRE(doc->add_step({{"op", "parse_number"}, {"column", "n"}, {"group_mark", ","}, {"scale", 2}}));
  CHECK(cell_text(doc->result(), 0, 0, iso()).value == "2021-03-04");  // ISO 8601 calendar date
  CHECK(cell_text(doc->result(), 0, 1, iso()).value == "1200.00");
}

TEST_CASE("unit_workbench_view: sorting is by code point, NULL last, ties in source order") {
  // Code points: Z U+005A < a U+0061 < e U+0065 < É U+00C9 (Unicode code charts).
  auto doc = document_of("k,i\ne,1\n\xC3\x89,2\n,3\nZ,4\na,5\ne,6\n");
  REQUIRE(doc->add_step({{"op", "to_null"}, {"columns", {"k"}}, {"blank", true}}));
  const Table& t = doc->result();
  std::vector<SortKey> up{{0, false}};
  auto view = make_row_view(t, {}, up, iso());
  CHECK(column_in_view(t, 0, view) == std::vector<std::string>{"Z", "a", "e", "e", "\xC3\x89", "<NULL>"});
  CHECK(column_in_view(t, 1, view) == std::vector<std::string>{"4", "5", "1", "6", "2", "3"});
  std::vector<SortKey> down{{0, true}};
  view = make_row_view(t, {}, down, iso());
  CHECK(column_in_view(t, 0, view) == std::vector<std::string>{"\xC3\x89", "e", "e", "a", "Z", "<NULL>"});
  CHECK(column_in_view(t, 1, view) == std::vector<std::string>{"2", "1", "6", "5", "4", "3"});
  // The view never touches the recipe.
  CHECK(doc->step_count() == 1);
}

TEST_CASE("unit_workbench_view: typed columns sort by value, not by text") {
  auto doc = document_of("n\n10\n9\n-3\n100\n");
  REQUIRE(doc->add_step({{"op", "parse_number"}, {"column", "n"}}));
  std::vector<SortKey> up{{0, false}};
  const Table& t = doc->result();
  const auto view = make_row_view(t, {}, up, iso());
  CHECK(view == std::vector<size_t>{2, 1, 0, 3});
}

TEST_CASE("unit_workbench_view: filters select rows without changing the table") {
  auto doc = document_of("k\nOak\n oak\n\"\"\nnull\nPine\n");  // "" is an empty value, an empty line is none
  REQUIRE(doc->add_step({{"op", "to_null"}, {"columns", {"k"}}, {"values", {"null"}}}));
  const Table& t = doc->result();
  auto rows = [&](FilterKind kind, std::string text = "") {
    std::vector<RowFilter> f{{0, kind, std::move(text)}};
    return make_row_view(t, f, {}, iso());
  };
  CHECK(rows(FilterKind::contains, "ak") == std::vector<size_t>{0, 1});
  CHECK(rows(FilterKind::contains, "AK").empty());  // case-sensitive (design §4)
  CHECK(rows(FilterKind::equals, "Oak") == std::vector<size_t>{0});
  CHECK(rows(FilterKind::is_null) == std::vector<size_t>{3});
  CHECK(rows(FilterKind::is_empty) == std::vector<size_t>{2});
  CHECK(rows(FilterKind::not_null) == std::vector<size_t>{0, 1, 2, 4});
  CHECK(rows(FilterKind::edge_space) == std::vector<size_t>{1});
  std::vector<RowFilter> both{{0, FilterKind::contains, "a"}, {0, FilterKind::edge_space, ""}};
  CHECK(make_row_view(t, both, {}, iso()) == std::vector<size_t>{1});
}

TEST_CASE("unit_workbench_view: the cells a step changed, matched by source line") {
  auto doc = document_of("a,b\n x,1\ny,2\ny,2\n z ,3\n");
  REQUIRE(doc->add_step({{"op", "trim"}, {"columns", {"a"}}}));
  REQUIRE(doc->add_step({{"op", "deduplicate"}}));
  REQUIRE(doc->add_step({{"op", "derive_column"}, {"name", "c"}, {"expr", "b || a"}}));

  StepDiff trim(doc->table_at(0), doc->table_at(1));
  CHECK(trim.cell_changed(0, 0));
  CHECK_FALSE(trim.cell_changed(1, 0));
  CHECK(trim.cell_changed(3, 0));
  for (size_t r = 0; r < 4; ++r) CHECK_FALSE(trim.cell_changed(r, 1));

  // After removing row 2 (line 4), row 2 of the result is line 5: unchanged.
  StepDiff dedup(doc->table_at(1), doc->table_at(2));
  REQUIRE(doc->table_at(2).row_count() == 3);
  for (size_t r = 0; r < 3; ++r)
    for (size_t c = 0; c < 2; ++c) CHECK_FALSE(dedup.cell_changed(r, c));

  StepDiff derive(doc->table_at(2), doc->table_at(3));
  CHECK(derive.column_is_new(2));
  CHECK(derive.cell_changed(0, 2));
  CHECK_FALSE(derive.column_is_new(0));
  CHECK_FALSE(derive.cell_changed(0, 0));
}

TEST_CASE("unit_workbench_view: a removed row is found again by its source line") {
  // The quoted value spans lines 3 and 4, so the next record starts on line 5.
  auto doc = document_of("a,b\nx,1\n\"y\ny\",2\nx,1\nz,3\n");
  REQUIRE(doc->add_step({{"op", "deduplicate"}}));
  const ChangeRecord& change = doc->change(0);
  REQUIRE(change.removed.size() == 1);
  CHECK(change.removed[0].line == 5);
  const auto row = row_of_line(doc->table_at(0), change.removed[0].line);
  REQUIRE(row.has_value());
  CHECK(*row == 2);
  CHECK(doc->table_at(0).column(0).text(*row) == "x");
  CHECK_FALSE(row_of_line(doc->table_at(0), 4).has_value());  // inside a record
  CHECK_FALSE(row_of_line(doc->table_at(1), 5).has_value());  // removed

  Preview dedup = doc->preview({{"op", "deduplicate"}}, 1, RowRange{0, 2});
  CHECK(dedup.depends_on_other_rows);
  CHECK_FALSE(doc->preview({{"op", "trim"}, {"columns", "*"}}, 1, RowRange{0, 2}).depends_on_other_rows);
}

TEST_CASE("unit_workbench_exports: cleaned CSV and TSV, recipe, SQL and run report") {
  auto doc = document_of("name,when\n Ada ,03/04/2021\nBob,\n");
  REQUIRE(doc->add_step({{"op", "trim"}, {"columns", {"name"}}}));
  REQUIRE(doc->add_step({{"op", "parse_date"}, {"column", "when"}, {"formats", {"%m/%d/%Y"}}, {"on_error", "null"}}));
  auto csv = export_cleaned(*doc);
  REQUIRE(csv.ok());
  CHECK(*csv == "name,when\nAda,2021-03-04\nBob,\n");
  auto tsv = export_cleaned(*doc, "tsv");
  REQUIRE(tsv.ok());
  CHECK(*tsv == "name\twhen\nAda\t2021-03-04\nBob\t\n");
  CHECK_FALSE(export_cleaned(*doc, "xlsx").ok());

  const std::string recipe = export_recipe(*doc);
  auto reparsed = parse_recipe(recipe, "exported");
  REQUIRE(reparsed.ok());
  CHECK(reparsed->steps.size() == 2);
  CHECK(reparsed->input.columns.size() == 2);

  auto sql = export_sql_script(*doc, Dialect::sqlite);
  REQUIRE_MESSAGE(sql.ok(), (sql.ok() ? std::string() : sql.error().to_string()));
  CHECK(sql->find("tamis_clean") != std::string::npos);

  auto report = export_run_report(*doc, "clean.csv");
  REQUIRE(report.ok());
  const json parsed = json::parse(*report);
  const json& totals = parsed["totals"];
  CHECK(totals["rows_read"] == 2);
  CHECK(totals["rows_written"] == 2);
  // Row accounting (design §5): rows read = written + removed + rejected.
  CHECK(totals["rows_read"].get<int>() ==
        totals["rows_written"].get<int>() + totals["rows_removed"].get<int>() + totals["rows_rejected"].get<int>());
  CHECK(parsed["steps"].size() == 2);
}

TEST_CASE("unit_workbench_exports: a recipe that does not fit is not exported") {
  auto doc = document_of("a\n1\n");
  REQUIRE(doc->add_step({{"op", "rename_columns"}, {"map", {{"a", "b"}}}}));
  REQUIRE(doc->add_step({{"op", "trim"}, {"columns", {"b"}}}));
  REQUIRE(doc->move_step(1, 0).applied);
  auto csv = export_cleaned(*doc);
  REQUIRE_FALSE(csv.ok());
  CHECK(csv.error().step == std::optional<int>(0));
  CHECK(csv.error().message.find("step 1") != std::string::npos);
  CHECK_FALSE(export_run_report(*doc).ok());

  auto stop = document_of("a\n1\n\n");
  REQUIRE(stop->add_step({{"op", "require"}, {"rule", "row_count"}, {"min", 5}}));
  CHECK_FALSE(export_cleaned(*stop).ok());
  REQUIRE(stop->step_problem(0).has_value());
  CHECK(stop->step_problem(0)->step == std::optional<size_t>(0));
}

TEST_CASE("unit_workbench_exports: the cleaned file obeys input.max_rejects as tamis run does") {
  // Two of three values do not fit the declared integer type: `tamis run`
  // rejects both rows and, over the cap, writes nothing (design §5).
  auto doc = document_of("a\n1\nx\ny\n");
  auto recipe_with_cap = [](const std::string& cap) {
    return R"({"tamis_recipe": 1, "input": {"columns": [{"name": "a", "type": "integer"}], "max_rejects": )" + cap +
           R"(}, "steps": []})";
  };
  REQUIRE(doc->open_recipe(recipe_with_cap("1"), "r.json"));
  REQUIRE(doc->input_rejected_rows() == 2);
  auto over = export_cleaned(*doc);
  REQUIRE_FALSE(over.ok());
  // The message `tamis run r.json t.csv -o out.csv` printed for this recipe
  // and file (before its hint about --rejects).
  CHECK(over.error().message ==
        "2 rows rejected, more than the cap of 1 (--max-rejects or input.max_rejects); no output written. "
        "First: line 3: input: column 'a' is declared integer in input.columns; 'x' is not");
  CHECK(over.error().file == "test.csv");

  REQUIRE(doc->open_recipe(recipe_with_cap("\"60%\""), "r.json"));  // 2 > 1.8 of 3 rows read
  CHECK_FALSE(export_cleaned(*doc).ok());
  REQUIRE(doc->open_recipe(recipe_with_cap("\"70%\""), "r.json"));  // 2 <= 2.1
  auto within = export_cleaned(*doc);
  REQUIRE(within.ok());
  CHECK(*within == "a\n1\n");
}

TEST_CASE("unit_workbench_view: the sliced sort of 150,000 rows equals std::stable_sort") {
  // Keys from a fixed linear congruential generator (Knuth's MMIX constants,
  // from memory): few distinct values, so ties and NULLs are frequent.
  uint64_t state = 42;
  auto next = [&] {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    return state >> 33;
  };
  std::string csv = "k,n\n";
  // Enough rows that the last merge pass is cut into segments of 65,536.
  const size_t rows = 150000;
  for (size_t i = 0; i < rows; ++i) {
    const uint64_t r = next();
    csv += (r % 7 == 0 ? std::string("null") : std::string(1, static_cast<char>('a' + r % 5)));
    csv += ",";
    csv += std::to_string(static_cast<int64_t>(next() % 50) - 25);
    csv += "\n";
  }
  auto doc = document_of(csv);
  REQUIRE(doc->add_step({{"op", "to_null"}, {"columns", {"k"}}, {"values", {"null"}}}));
  REQUIRE(doc->add_step({{"op", "parse_number"}, {"column", "n"}}));
  const Table& t = doc->result();

  std::vector<size_t> expected(rows);
  for (size_t i = 0; i < rows; ++i) expected[i] = i;
  std::stable_sort(expected.begin(), expected.end(), [&](size_t a, size_t b) {
    const bool na = t.column(0).is_null(a), nb = t.column(0).is_null(b);
    if (na != nb) return nb;
    if (!na && t.column(0).text(a) != t.column(0).text(b)) return t.column(0).text(a) < t.column(0).text(b);
    return t.column(1).number(a) > t.column(1).number(b);
  });

  RowViewJob job(t, {}, {{0, false}, {1, true}}, iso());
  size_t slices = 1;
  double last = 0;
  while (!job.step(50000)) {
    ++slices;
    CHECK(job.progress() >= last);
    last = job.progress();
  }
  CHECK(slices > 15);  // runs of 4096 rows, then merged segments of at most 65,536
  CHECK(job.progress() == 1.0);
  CHECK(job.take_result() == expected);

  // A filter over many chunks, in slices, keeps the sorted order of what passes.
  std::vector<size_t> only_a;
  for (size_t r : expected)
    if (!t.column(0).is_null(r) && t.column(0).text(r) == "a") only_a.push_back(r);
  REQUIRE(t.column(0).chunk_count() > 3);  // loaded in chunks of 32,768 rows
  RowViewJob filtered(t, {{0, FilterKind::equals, "a"}}, {{0, false}, {1, true}}, iso());
  CHECK(run_to_end(filtered, 10000));
  CHECK(filtered.take_result() == only_a);
}
