// Slice jobs give the same result as the one-shot engine calls, whatever the
// slice size, and can be cancelled.
#include <doctest/doctest.h>

#include "document.hpp"
#include "findings/findings.hpp"
#include "load.hpp"
#include "profile.hpp"
#include "recipe.hpp"
#include "similar/similar_values.hpp"
#include "workbench_support.hpp"

using namespace tamis;
using namespace tamis::workbench;
using tamis::test::exact_difference;
using tamis::test::read_repo_file;

namespace {

const char* const kDemo = "assets/demo/tree_survey.csv";
const char* const kDemoRecipe = "assets/demo/tree_survey.recipe.json";

// The demo loaded in batches of 100 rows, so its columns have many chunks.
LoadedFile demo_in_small_chunks() {
  CsvOptions options;
  options.batch_rows = 100;
  auto file = load_file(memory_source(read_repo_file(kDemo)), "tree_survey.csv", options);
  REQUIRE(file.ok());
  return std::move(file).value();
}

Recipe demo_recipe() {
  auto recipe = parse_recipe(read_repo_file(kDemoRecipe), kDemoRecipe);
  REQUIRE_MESSAGE(recipe.ok(), (recipe.ok() ? std::string() : recipe.error().to_string()));
  return std::move(recipe).value();
}

// Steps a job with a tiny budget, counting slices; progress never goes back.
size_t run_in_slices(Job& job, size_t budget) {
  size_t slices = 0;
  double last = 0.0;
  while (!job.step(budget)) {
    ++slices;
    const double p = job.progress();
    CHECK(p >= last);
    CHECK(p <= 1.0);
    last = p;
    REQUIRE(slices < 1000000);
  }
  return slices + 1;
}

}  // namespace

TEST_CASE("unit_workbench_jobs: loading in slices gives the table read_csv gives") {
  const std::string bytes = read_repo_file(kDemo);
  ReadReport report;
  auto whole = read_csv(memory_source(bytes), "tree_survey.csv", CsvOptions{}, &report);
  REQUIRE(whole.ok());

  CsvOptions small;
  small.batch_rows = 50;
  // Reads of 7 and 4096 bytes: a slice boundary may fall anywhere in a record.
  auto job = LoadJob::start(std::make_unique<tamis::test::SplittingSource>(bytes, std::vector<size_t>{7, 4096}),
                            "tree_survey.csv", small);
  REQUIRE(job.ok());
  CHECK((*job)->label() == "Reading tree_survey.csv");
  CHECK(run_in_slices(**job, 1) > 20);
  CHECK_FALSE((*job)->error().has_value());
  LoadedFile file = (*job)->take_result();
  CHECK(exact_difference(*whole, file.table) == "");
  CHECK(file.read.rows == report.rows);
  CHECK(file.read.delimiter == report.delimiter);
}

TEST_CASE("unit_workbench_jobs: a header-only file loads with its columns and no rows") {
  auto file = load_file(memory_source("a,b\n"), "empty.csv");
  REQUIRE(file.ok());
  CHECK(file->table.names() == std::vector<std::string>{"a", "b"});
  CHECK(file->table.row_count() == 0);
  Document doc(std::move(*file));
  REQUIRE(doc.add_step({{"op", "trim"}, {"columns", "*"}}));
  CHECK(doc.result().row_count() == 0);
  CHECK(doc.result().names() == std::vector<std::string>{"a", "b"});
}

TEST_CASE("unit_workbench_jobs: malformed records are set aside and listed, as tamis run does") {
  auto file = load_file(memory_source("a,b\n1,2\n3,4,5\n6,7\n"), "bad.csv");
  REQUIRE(file.ok());
  CHECK(file->table.row_count() == 2);
  CHECK(file->read.rejected == 1);
  REQUIRE(file->rejected.size() == 1);
  CHECK(file->rejected[0].line == 3);
}

TEST_CASE("unit_workbench_jobs: the demo recipe applied in slices equals apply_recipe in one call") {
  LoadedFile file = demo_in_small_chunks();
  const Table input = file.table;
  const Recipe recipe = demo_recipe();
  auto compiled = compile_recipe(recipe, schema_of(input));
  REQUIRE(compiled.ok());
  std::vector<ChangeRecord> changes;
  auto expected = apply_recipe(*compiled, input, &changes);
  REQUIRE(expected.ok());

  for (size_t budget : {size_t{1}, size_t{5000}, kSliceBudget}) {
    CAPTURE(budget);
    Document doc(demo_in_small_chunks());
    REQUIRE(doc.replace_recipe(recipe).problems.empty());
    auto job = doc.make_apply_job();
    const size_t slices = run_in_slices(*job, budget);
    CHECK(slices >= recipe.steps.size());  // at least one slice per step
    CHECK_FALSE(job->error().has_value());
    CHECK(doc.stage_ready(doc.step_count()));
    CHECK(exact_difference(*expected, doc.result()) == "");
    for (const CompiledStep& step : compiled->steps) {
      const size_t i = static_cast<size_t>(step.index);
      CAPTURE(i);
      const ChangeRecord& mine = doc.change(i);
      const size_t k = static_cast<size_t>(&step - compiled->steps.data());
      CHECK(mine.rows_in == changes[k].rows_in);
      CHECK(mine.rows_out == changes[k].rows_out);
      CHECK(mine.rows_removed == changes[k].rows_removed);
      CHECK(mine.rows_rejected == changes[k].rows_rejected);
      CHECK(mine.cells_changed == changes[k].cells_changed);
      CHECK(mine.conflicts == changes[k].conflicts);
      CHECK(mine.samples().size() == changes[k].samples().size());
    }
  }
}

TEST_CASE("unit_workbench_jobs: a stage shares the columns its step did not change") {
  Document doc(demo_in_small_chunks());
  REQUIRE(doc.add_step({{"op", "trim"}, {"columns", {"site"}}}));
  const Table& before = doc.table_at(0);
  const Table& after = doc.table_at(1);
  for (size_t c = 1; c < after.column_count(); ++c) {
    CAPTURE(after.name(c));
    REQUIRE(after.column(c).chunk_count() == before.column(c).chunk_count());
    for (size_t k = 0; k < after.column(c).chunk_count(); ++k)
      CHECK(after.column(c).chunk_ptr(k) == before.column(c).chunk_ptr(k));
  }
  // Memory counted once per shared chunk: the stage adds at most its new site column.
  Table both = before;
  REQUIRE(both.append(after).ok());
  CHECK(both.memory_bytes() <= 2 * before.memory_bytes());
}

TEST_CASE("unit_workbench_jobs: profile, findings and similar-values jobs equal the one-shot calls") {
  Document doc(demo_in_small_chunks());
  const Table& table = doc.table_at(0);

  auto profile_job = doc.make_profile_job();
  CHECK(doc.profile() == nullptr);
  run_in_slices(*profile_job, 500);
  REQUIRE(doc.profile() != nullptr);
  const TableProfile expected = profile_table(table);
  REQUIRE(doc.profile()->columns.size() == expected.columns.size());
  for (size_t c = 0; c < expected.columns.size(); ++c) {
    const ColumnProfile& a = doc.profile()->columns[c];
    const ColumnProfile& b = expected.columns[c];
    CAPTURE(b.name);
    CHECK(a.type == b.type);
    CHECK(a.distinct == b.distinct);
    CHECK(a.blanks == b.blanks);
    CHECK(a.edge_whitespace == b.edge_whitespace);
    REQUIRE(a.top_values.size() == b.top_values.size());
    for (size_t i = 0; i < a.top_values.size(); ++i) CHECK(a.top_values[i].value == b.top_values[i].value);
  }

  auto findings_job = doc.make_findings_job();
  run_in_slices(*findings_job, 500);
  REQUIRE(doc.findings() != nullptr);
  const std::vector<Finding> found = find_problems(table, expected);
  REQUIRE(doc.findings()->size() == found.size());
  for (size_t i = 0; i < found.size(); ++i) {
    CHECK((*doc.findings())[i].title == found[i].title);
    CHECK((*doc.findings())[i].rows_affected == found[i].rows_affected);
  }

  const size_t district = *table.find("district");
  SimilarOptions options;
  options.method = SimilarMethod::levenshtein;
  options.threshold = 0.8;
  auto similar_job = doc.make_similar_job(district, options);
  run_in_slices(*similar_job, 50);
  REQUIRE(doc.similar() != nullptr);
  const auto groups = group_similar_values(distinct_values(table, district), options);
  REQUIRE(doc.similar()->groups.size() == groups.size());
  CHECK(!groups.empty());
  for (size_t i = 0; i < groups.size(); ++i) {
    CHECK(doc.similar()->groups[i].canonical == groups[i].canonical);
    CHECK(doc.similar()->groups[i].rows == groups[i].rows);
  }
}

TEST_CASE("unit_workbench_jobs: a cancelled job ends without a result") {
  Document doc(demo_in_small_chunks());
  REQUIRE(doc.replace_recipe(demo_recipe()).applied);
  auto job = doc.make_apply_job();
  CHECK_FALSE(job->step(1));
  job->cancel();
  CHECK(job->step(1));
  CHECK(job->cancelled());
  CHECK_FALSE(run_to_end(*job));
  CHECK_FALSE(doc.stage_ready(doc.step_count()));

  auto profile_job = doc.make_profile_job();
  profile_job->cancel();
  CHECK_FALSE(run_to_end(*profile_job));
  CHECK(doc.profile() == nullptr);

  auto load = LoadJob::start(memory_source(read_repo_file(kDemo)), "tree_survey.csv");
  REQUIRE(load.ok());
  (*load)->cancel();
  CHECK_FALSE(run_to_end(**load));
}

TEST_CASE("unit_workbench_jobs: an edit between two slices is picked up by the running job") {
  const Recipe recipe = demo_recipe();
  Document doc(demo_in_small_chunks());
  REQUIRE(doc.replace_recipe(recipe).applied);
  auto job = doc.make_apply_job();
  for (int i = 0; i < 5; ++i) CHECK_FALSE(job->step(1));
  REQUIRE(doc.delete_step(1));
  REQUIRE(doc.set_enabled(0, false));
  CHECK(run_to_end(*job, 1));

  Document fresh(demo_in_small_chunks());
  Recipe edited = recipe;
  edited.steps.erase(edited.steps.begin() + 1);
  edited.steps[0].enabled = false;
  edited.steps[0].definition["enabled"] = false;
  REQUIRE(fresh.replace_recipe(edited).applied);
  CHECK(exact_difference(fresh.result(), doc.result()) == "");
}

TEST_CASE("unit_workbench_jobs: typed stages are profiled and searched through their canonical text") {
  Document doc(demo_in_small_chunks());
  REQUIRE(doc.add_step(
      {{"op", "parse_date"}, {"column", "planted_on"}, {"formats", {"%Y-%m-%d", "%m/%d/%Y"}}, {"on_error", "null"}}));
  REQUIRE(doc.add_step({{"op", "parse_number"}, {"column", "funding_k"}, {"decimal_mark", ","}, {"on_error", "null"}}));
  CHECK(doc.selected_stage() == 2);
  REQUIRE(run_to_end(*doc.make_findings_job(), 1000));
  REQUIRE(doc.profile() != nullptr);
  REQUIRE(doc.findings() != nullptr);
  const Table& t = doc.table_at(2);
  const ColumnProfile& planted = doc.profile()->columns[*t.find("planted_on")];
  CHECK(planted.type == Type::date);
  CHECK(planted.type_share == 1.0);
  CHECK(planted.nulls == t.row_count() - planted.non_blank);
  for (const Finding& f : *doc.findings()) CHECK(f.kind != "dates_as_text");
}

TEST_CASE("unit_workbench_jobs: only the file, the selected stages and the result keep their tables") {
  const Recipe recipe = demo_recipe();
  Document doc(demo_in_small_chunks());
  REQUIRE(doc.replace_recipe(recipe).applied);
  const size_t n = doc.step_count();
  REQUIRE(n > 8);
  (void)doc.result();
  CHECK(doc.stage_ready(0));
  CHECK(doc.stage_ready(n));
  for (size_t stage = 1; stage < n; ++stage) {
    CAPTURE(stage);
    CHECK_FALSE(doc.stage_ready(stage));
    CHECK(doc.step_computed(stage - 1));
    CHECK(doc.stage_serial(stage) != 0);
  }
  // Counts and schemas come without recomputing.
  const uint64_t read_dates = doc.change(8).cells_changed.at("planted_on");
  CHECK(read_dates > 0);
  CHECK_FALSE(doc.stage_ready(9));

  // A dropped stage comes back the same, with the same serial.
  auto expected_at = [&](size_t stage) {
    Recipe first = recipe;
    first.steps.resize(stage);
    auto compiled = compile_recipe(first, schema_of(doc.table_at(0)));
    REQUIRE(compiled.ok());
    auto table = apply_recipe(*compiled, doc.table_at(0));
    REQUIRE(table.ok());
    return std::move(table).value();
  };
  const uint64_t serial5 = doc.stage_serial(5);
  const Table expected5 = expected_at(5);
  CHECK(doc.schema_at(5).size() == expected5.column_count());
  CHECK(doc.schema_at(9)[*expected_at(9).find("planted_on")].type == Type::date);
  CHECK(tamis::test::exact_difference(expected5, doc.table_at(5)) == "");
  CHECK(doc.stage_serial(5) == serial5);
  CHECK(doc.change(8).cells_changed.at("planted_on") == read_dates);

  doc.select_stage(8);
  (void)doc.table_at(8);
  CHECK(doc.stage_ready(7));  // the one before the selection (for the Data panel's diff)
  CHECK(doc.stage_ready(8));
  CHECK_FALSE(doc.stage_ready(5));
  CHECK(doc.stage_ready(n));
  CHECK(tamis::test::exact_difference(expected_at(8), doc.table_at(8)) == "");
}
