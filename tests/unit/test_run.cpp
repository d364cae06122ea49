// The batch runner's engine side: streaming a file through RecipeRun in
// batches (down to one row) gives exactly what apply_recipe gives on the
// whole table, for every registered step; recipes survive load -> save ->
// load; the JSON Schema lists every registered op; row accounting; CSVW
// metadata helpers.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

#include <algorithm>
#include <array>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "csv_writer.hpp"
#include "csvw.hpp"
#include "recipe.hpp"
#include "run_report.hpp"
#include "steps/registry.hpp"
#include "unit_support.hpp"

using namespace tamis;

namespace {

// A deterministic messy table: spaces, case and accent variants, sentinels,
// numbers and dates written several ways, groups with gaps, repeated rows.
std::string sample_csv() {
  const char* names[] = {" Ada ", "ada", "Bjørn  Falk", "ZOË", "Zoë", "Ines\tAraújo", "ﬁona", "", "Émile", "-"};
  const char* cities[] = {"Oslo", "oslo", "OSLO", "Bergen", "", "NULL", "Tromsø", "Bodø"};
  const char* qty[] = {"1,234", "12", "", "7", "abc", "1,000,000", "-3", "0012"};
  const char* pct[] = {"12.5%", "3%", "", "100%", "x%"};
  const char* days[] = {"2024-02-29", "29.02.2023", "", "2023-13-01", "01.12.2022", "2021-06-30"};
  const char* groups[] = {"g1", "g2", "g3", "g1", "g4"};
  const char* vals[] = {"", "red", "", "blue", "", "green", "", ""};
  const char* ns[] = {"10", "", "x", "42", "-7", "3.5"};
  const char* pairs[] = {"a/b", "c/d/e", "", "f", "/g"};
  std::ostringstream out;
  out << "name,city,qty,pct,day,grp,val,n,pair\n";
  uint32_t seed = 20240229;
  auto next = [&](size_t n) {
    seed = seed * 1664525u + 1013904223u;
    return (seed >> 8) % n;
  };
  std::vector<std::string> rows;
  for (int r = 0; r < 60; ++r) {
    std::ostringstream row;
    row << '"' << names[next(10)] << "\"," << cities[next(8)] << ",\"" << qty[next(8)] << "\"," << pct[next(5)] << ','
        << days[next(6)] << ',' << groups[next(5)] << ',' << vals[next(8)] << ',' << ns[next(6)] << ','
        << pairs[next(5)];
    rows.push_back(row.str());
    if (next(6) == 0) rows.push_back(rows[next(rows.size())]);
  }
  for (const auto& r : rows) out << r << '\n';
  return out.str();
}

// One or more small recipes per op. Every registered op must have one here.
const std::map<std::string, std::vector<std::string>>& step_samples() {
  static const std::map<std::string, std::vector<std::string>> samples = {
      {"trim", {R"J([{"op": "trim", "columns": ["name", "city"]}])J",
                R"J([{"op": "trim", "columns": "*", "side": "trailing", "chars": "%"}])J"}},
      {"collapse_spaces", {R"J([{"op": "collapse_spaces", "columns": ["name"]}])J"}},
      {"change_case", {R"J([{"op": "change_case", "columns": ["name", "city"], "to": "upper"}])J",
                       R"J([{"op": "change_case", "columns": ["name"], "to": "title"}])J"}},
      {"normalize_unicode", {R"J([{"op": "normalize_unicode", "columns": ["name"], "form": "NFKC", "strip_accents": true}])J"}},
      {"replace_text", {R"J([{"op": "replace_text", "columns": ["city"], "find": "o+", "replace": "0", "match": "regex"}])J"}},
      {"map_values", {R"J([{"op": "map_values", "column": "city", "map": {"oslo": "Oslo"}, "ignore_case": true}])J"}},
      {"to_null", {R"J([{"op": "to_null", "columns": "*", "values": ["-", "NULL"], "blank": true}])J"}},
      {"parse_date", {R"J([{"op": "parse_date", "column": "day", "formats": ["%Y-%m-%d", "%d.%m.%Y"], "on_error": "null"}])J",
                      R"J([{"op": "parse_date", "column": "day", "formats": ["%Y-%m-%d"], "on_error": "reject"}])J"}},
      {"parse_number", {R"J([{"op": "parse_number", "column": "qty", "group_mark": ",", "on_error": "null"}])J",
                        R"J([{"op": "parse_number", "column": "pct", "percent": true, "scale": 4, "on_error": "reject"}])J"}},
      {"cast", {R"J([{"op": "cast", "column": "n", "to": "integer", "on_error": "null"}])J"}},
      {"fill_from_group", {R"J([{"op": "to_null", "columns": ["val"], "blank": true},
                              {"op": "fill_from_group", "column": "val", "keys": ["grp"]}])J"}},
      {"carry_forward", {R"J([{"op": "to_null", "columns": ["val"], "blank": true},
                            {"op": "carry_forward", "column": "val", "group_by": ["grp"]}])J"}},
      {"deduplicate", {R"J([{"op": "deduplicate", "columns": "*", "keep": "first"}])J",
                       R"J([{"op": "deduplicate", "columns": ["name", "grp"], "keep": "last", "compare": "casefold"}])J"}},
      {"keep_rows", {R"J([{"op": "keep_rows", "where": "CHAR_LENGTH(name) > 3 OR city IS NULL"}])J"}},
      {"drop_rows", {R"J([{"op": "drop_rows", "where": "city = 'Oslo' OR grp IN ('g2', 'g4')"}])J"}},
      {"drop_columns", {R"J([{"op": "drop_columns", "columns": ["pct", "n"]}])J"}},
      {"rename_columns", {R"J([{"op": "rename_columns", "map": {"city": "town"}}])J"}},
      {"reorder_columns", {R"J([{"op": "reorder_columns", "columns": ["pair", "n", "val", "grp", "day", "pct", "qty", "city", "name"]}])J"}},
      {"derive_column", {R"J([{"op": "derive_column", "name": "label", "expr": "UPPER(name) || '-' || COALESCE(city, '?')"}])J"}},
      {"split_column", {R"J([{"op": "split_column", "column": "pair", "separator": "/", "into": ["left", "right"]}])J"}},
      {"require", {R"J([{"op": "to_null", "columns": ["name"], "blank": true},
                    {"op": "require", "rule": "not_null", "columns": ["name"], "on_fail": "warn"}])J",
                   R"J([{"op": "require", "rule": "unique", "columns": ["name"], "on_fail": "reject"}])J"}},
  };
  return samples;
}

Recipe recipe_with_steps(const std::string& steps) {
  const std::string text = R"({"tamis_recipe": 1, "steps": )" + steps + "}";
  auto recipe = parse_recipe(text, "sample.json");
  REQUIRE_MESSAGE(recipe.ok(), (recipe.ok() ? std::string() : recipe.error().to_string()));
  return std::move(recipe).value();
}

CsvOptions sample_options(size_t batch_rows) {
  CsvOptions o;
  o.delimiter = ',';
  o.header = HeaderMode::yes;
  o.batch_rows = batch_rows;
  return o;
}

struct Outcome {
  std::string csv;
  std::vector<std::string> rejects;  // "line: reason"
  std::vector<ChangeRecord> changes;
  std::string error;
};

std::string written(const Table& table, const Schema& schema) {
  MemorySink sink;
  auto writer = CsvWriter::make(sink, CsvWriteOptions{});
  REQUIRE(writer.ok());
  std::vector<std::string_view> header;
  for (const ColumnSchema& c : schema) header.push_back(c.name);
  REQUIRE(writer->write_row(header).ok());
  REQUIRE(writer->write_table(table).ok());
  REQUIRE(writer->finish().ok());
  return sink.data;
}

Outcome whole_table(const CompiledRecipe& compiled, const std::string& csv) {
  Outcome o;
  Table table = tamis::test::read_ok(csv, sample_options(65536));
  std::vector<ChangeRecord> changes;
  auto out = apply_recipe(compiled, table, &changes);
  if (!out) {
    o.error = out.error().to_string();
    return o;
  }
  o.csv = written(*out, compiled.output);
  for (ChangeRecord& c : changes)
    for (const RemovedRow& r : c.take_rejected()) o.rejects.push_back(std::to_string(r.line) + ": " + r.reason);
  std::sort(o.rejects.begin(), o.rejects.end());
  o.changes = std::move(changes);
  return o;
}

// What `tamis run` does, without the threads: every pass reads the file
// again in batches of batch_rows, the last one applies and writes. With
// step_by_step, the last pass runs the steps one at a time and takes each
// one's rejected rows, as the threaded runner's stages do.
Outcome streamed(const CompiledRecipe& compiled, const std::string& csv, size_t batch_rows, bool step_by_step = false) {
  Outcome o;
  RecipeRun run(compiled);
  auto reader_for = [&] {
    auto reader = CsvReader::open(memory_source(csv), "sample.csv", sample_options(batch_rows));
    REQUIRE(reader.ok());
    return std::move(reader).value();
  };
  for (size_t pass = 0; pass + 1 < run.passes(); ++pass) {
    auto reader = reader_for();
    for (;;) {
      auto batch = reader->next_batch();
      REQUIRE(batch.ok());
      if (!batch->has_value()) break;
      const Status s = run.observe(pass, **batch);
      if (!s) {
        o.error = s.error().to_string();
        return o;
      }
    }
    run.end_pass(pass);
  }
  auto reader = reader_for();
  MemorySink sink;
  auto writer = CsvWriter::make(sink, CsvWriteOptions{});
  REQUIRE(writer.ok());
  std::vector<std::string_view> header;
  for (const ColumnSchema& c : compiled.output) header.push_back(c.name);
  REQUIRE(writer->write_row(header).ok());
  for (;;) {
    auto batch = reader->next_batch();
    REQUIRE(batch.ok());
    if (!batch->has_value()) break;
    Result<Table> out = **batch;
    std::vector<RecipeRun::Rejected> rejected;
    if (step_by_step) {
      for (size_t j = 0; j < run.step_count() && out; ++j) {
        out = run.apply_step(j, *out);
        run.take_rejected(j, rejected);
      }
    } else {
      out = run.apply(**batch);
      rejected = run.take_rejected();
    }
    if (!out) {
      o.error = out.error().to_string();
      return o;
    }
    for (const auto& r : rejected) o.rejects.push_back(std::to_string(r.row.line) + ": " + r.row.reason);
    REQUIRE(writer->write_table(*out).ok());
  }
  if (const Status s = run.finish(); !s) {
    o.error = s.error().to_string();
    return o;
  }
  REQUIRE(writer->finish().ok());
  o.csv = sink.data;
  std::sort(o.rejects.begin(), o.rejects.end());
  o.changes = run.changes();
  return o;
}

std::vector<std::filesystem::path> repository_recipes() {
  namespace fs = std::filesystem;
  std::vector<fs::path> found;
  for (const char* top : {"assets", "tests"}) {
    const fs::path root = fs::path(TAMIS_SOURCE_DIR) / top;
    for (auto it = fs::recursive_directory_iterator(root); it != fs::recursive_directory_iterator(); ++it) {
      if (it->is_directory() && it->path().filename() == "node_modules") {
        it.disable_recursion_pending();
        continue;
      }
      const std::string name = it->path().filename().string();
      if (it->is_regular_file() && name.size() > 12 && name.substr(name.size() - 12) == ".recipe.json")
        found.push_back(it->path());
    }
  }
  std::sort(found.begin(), found.end());
  return found;
}

std::string file_text(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

}  // namespace

TEST_CASE("unit_run: every registered step streams to the same result as the whole table, batches down to one row") {
  const std::string csv = sample_csv();
  Table table = tamis::test::read_ok(csv, sample_options(65536));
  const Schema schema = schema_of(table);
  REQUIRE(!step_kinds().empty());
  for (const StepKind& kind : step_kinds()) {
    const auto sample = step_samples().find(std::string(kind.op));
    INFO("op: " << kind.op);
    REQUIRE_MESSAGE(sample != step_samples().end(), "no sample recipe for a registered op: add one to step_samples()");
    for (const std::string& steps : sample->second) {
      INFO("steps: " << steps);
      const Recipe recipe = recipe_with_steps(steps);
      auto compiled = compile_recipe(recipe, schema);
      REQUIRE_MESSAGE(compiled.ok(), (compiled.ok() ? std::string() : compiled.error().to_string()));
      const Outcome whole = whole_table(*compiled, csv);
      for (size_t batch_rows : {size_t{1}, size_t{2}, size_t{3}, size_t{7}, size_t{64}}) {
        INFO("batch rows: " << batch_rows);
        const Outcome stream = streamed(*compiled, csv, batch_rows);
        CHECK(stream.error == whole.error);
        CHECK(stream.csv == whole.csv);
        CHECK(stream.rejects == whole.rejects);
        REQUIRE(stream.changes.size() == whole.changes.size());
        for (size_t j = 0; j < whole.changes.size(); ++j) {
          CHECK(stream.changes[j].rows_in == whole.changes[j].rows_in);
          CHECK(stream.changes[j].rows_out == whole.changes[j].rows_out);
          CHECK(stream.changes[j].rows_removed == whole.changes[j].rows_removed);
          CHECK(stream.changes[j].rows_rejected == whole.changes[j].rows_rejected);
          CHECK(stream.changes[j].cells_changed == whole.changes[j].cells_changed);
          CHECK(stream.changes[j].conflicts.size() == whole.changes[j].conflicts.size());
        }
        // Step by step, the change records are the same to the last sample:
        // the batches reach every step in the same order.
        const Outcome stepwise = streamed(*compiled, csv, batch_rows, true);
        CHECK(stepwise.error == stream.error);
        CHECK(stepwise.csv == stream.csv);
        CHECK(stepwise.rejects == stream.rejects);
        REQUIRE(stepwise.changes.size() == stream.changes.size());
        for (size_t j = 0; j < stream.changes.size(); ++j) {
          CHECK(stepwise.changes[j].rows_removed == stream.changes[j].rows_removed);
          CHECK(stepwise.changes[j].cells_changed == stream.changes[j].cells_changed);
          CHECK(stepwise.changes[j].warnings == stream.changes[j].warnings);
          REQUIRE(stepwise.changes[j].samples().size() == stream.changes[j].samples().size());
          for (size_t k = 0; k < stream.changes[j].samples().size(); ++k) {
            const ValueChange& a = stepwise.changes[j].samples()[k];
            const ValueChange& b = stream.changes[j].samples()[k];
            CHECK(a.column == b.column);
            CHECK(a.before == b.before);
            CHECK(a.after == b.after);
            CHECK(a.count == b.count);
          }
        }
      }
      // The data exercises the step: a sample that changes nothing proves nothing.
      if (whole.error.empty()) {
        bool acted = whole.csv != written(table, schema);
        for (const ChangeRecord& c : whole.changes) acted |= c.rows_rejected + c.warnings.size() > 0;
        CHECK_MESSAGE(acted, "the sample recipe changed nothing in the sample table");
      }
    }
  }
}

TEST_CASE("unit_run: a change record samples the first distinct changes with their exact counts") {
  // The model: every change in order, the first kListedChanges distinct
  // (column, before, after) triples listed with how often each occurred.
  std::vector<std::array<std::string, 3>> order;
  std::map<std::array<std::string, 3>, uint64_t> counts;
  ChangeRecord change;
  uint32_t seed = 7;
  for (int i = 0; i < 5000; ++i) {
    seed = seed * 1664525u + 1013904223u;
    const std::array<std::string, 3> triple = {(seed >> 9) % 3 ? "a" : "b", std::to_string((seed >> 12) % 40),
                                               std::to_string((seed >> 20) % 2)};
    if (counts[triple]++ == 0) order.push_back(triple);
    change.note_change(triple[0], triple[1], triple[2]);
  }
  REQUIRE(order.size() > ChangeRecord::kListedChanges);
  REQUIRE(change.samples().size() == ChangeRecord::kListedChanges);
  for (size_t k = 0; k < ChangeRecord::kListedChanges; ++k) {
    const ValueChange& sample = change.samples()[k];
    CHECK(sample.column == order[k][0]);
    CHECK(sample.before == order[k][1]);
    CHECK(sample.after == order[k][2]);
    CHECK(sample.count == counts[order[k]]);
  }
  CHECK(change.cells_changed.at("a") + change.cells_changed.at("b") == 5000);
}

TEST_CASE("unit_run: every recipe in the repository survives load -> save -> load") {
  const auto recipes = repository_recipes();
  // The demo recipe at least; the list grows as examples are added.
  REQUIRE(!recipes.empty());
  for (const auto& path : recipes) {
    INFO("recipe: " << path.string());
    auto first = parse_recipe(file_text(path), path.string());
    REQUIRE_MESSAGE(first.ok(), (first.ok() ? std::string() : first.error().to_string()));
    const std::string saved = recipe_to_json(*first);
    auto second = parse_recipe(saved, "saved");
    REQUIRE_MESSAGE(second.ok(), (second.ok() ? std::string() : second.error().to_string()));
    CHECK(recipe_to_json(*second) == saved);
    CHECK(second->title == first->title);
    CHECK(second->input.columns.size() == first->input.columns.size());
    CHECK(second->input.max_rejects == first->input.max_rejects);
    REQUIRE(second->steps.size() == first->steps.size());
    for (size_t i = 0; i < first->steps.size(); ++i) {
      CHECK(second->steps[i].op == first->steps[i].op);
      CHECK(second->steps[i].enabled == first->steps[i].enabled);
      CHECK(second->steps[i].note == first->steps[i].note);
      CHECK(second->steps[i].definition == first->steps[i].definition);
    }
  }
}

TEST_CASE("unit_run: a number too large for JSON's double is an error, not an exception") {
  // Found by tests/fuzz/fuzz_recipe.cpp: nlohmann reports it as out_of_range, not parse_error.
  for (const char* text : {R"({"tamis_recipe": 1e400, "steps": []})", R"({"tamis_recipe": 1, "steps": [{"op": "trim", "x": -1e999}]})"}) {
    INFO(text);
    auto recipe = parse_recipe(text, "big.json");
    REQUIRE(!recipe.ok());
    CHECK(recipe.error().kind == ErrorKind::usage);
    CHECK(recipe.error().message.find("number overflow") != std::string::npos);
  }
}

TEST_CASE("unit_run: only version 1 is version 1") {
  // 4294967297 is 2^32 + 1: cut to a 32-bit int it would read as 1.
  for (const char* version : {"4294967297", "1.0", "\"1\"", "2", "0"}) {
    INFO(version);
    auto recipe = parse_recipe(std::string(R"({"tamis_recipe": )") + version + R"(, "steps": []})", "v.json");
    CHECK(!recipe.ok());
  }
  CHECK(parse_recipe(R"({"tamis_recipe": 1, "steps": []})", "v.json").ok());
}

TEST_CASE("unit_run: the JSON Schema lists every registered op with its own definition") {
  const auto schema = nlohmann::json::parse(file_text(std::filesystem::path(TAMIS_SOURCE_DIR) / "assets/recipe.schema.json"));
  std::set<std::string> listed;
  for (const auto& op : schema["$defs"]["step"]["properties"]["op"]["enum"]) listed.insert(op.get<std::string>());
  std::set<std::string> registered;
  for (const StepKind& kind : step_kinds()) registered.insert(std::string(kind.op));
  CHECK(listed == registered);
  for (const StepKind& kind : step_kinds()) {
    INFO("op: " << kind.op);
    CHECK(listed.count(std::string(kind.op)) == 1);
    const std::string def = "step_" + std::string(kind.op);
    REQUIRE(schema["$defs"].contains(def));
    // The schema's parameters are the step's: what the step writes back
    // when a recipe is saved must be allowed by the schema.
    const auto& properties = schema["$defs"][def]["properties"];
    for (const std::string& steps : step_samples().at(std::string(kind.op))) {
      const Recipe recipe = recipe_with_steps(steps);
      for (const RecipeStep& step : recipe.steps)
        // No structured binding here: clang 14 cannot capture one in INFO.
        for (const auto& item : step.definition.items()) {
          const std::string key = item.key();
          INFO("key: " << key);
          if (step.op == kind.op) CHECK(properties.contains(key));
        }
    }
  }
}

TEST_CASE("unit_run: row accounting balances and a step that miscounts is caught") {
  const std::string csv = sample_csv();
  Table table = tamis::test::read_ok(csv, sample_options(65536));
  const Recipe recipe = recipe_with_steps(R"J([{"op": "trim", "columns": "*"}])J");
  auto compiled = compile_recipe(recipe, schema_of(table));
  REQUIRE(compiled.ok());
  std::vector<ChangeRecord> changes;
  auto out = apply_recipe(*compiled, table, &changes);
  REQUIRE(out.ok());
  RunFacts facts;
  facts.read.rows = table.row_count() - 1;  // as if the reader had set one record aside
  facts.read.rejected = 1;
  facts.rows_written = out->row_count() - 1;
  changes[0].rows_in -= 1;
  changes[0].rows_out -= 1;
  CHECK(check_row_accounting(*compiled, changes, facts).ok());
  const RunTotals totals = run_totals(facts, changes);
  CHECK(totals.rows_read == table.row_count());
  CHECK(totals.rows_rejected == 1);
  CHECK(totals.balances());

  ChangeRecord miscounted = changes[0];
  miscounted.rows_out -= 1;  // a row vanished without being removed or rejected
  auto broken = check_row_accounting(*compiled, {miscounted}, facts);
  REQUIRE(!broken.ok());
  CHECK(broken.error().message.find("step 1 (trim)") != std::string::npos);

  const auto report = run_report_json(recipe, *compiled, changes, facts);
  CHECK(report["totals"]["rows_read"] == table.row_count());
  CHECK(report["totals"]["balanced"] == true);
  CHECK(report["steps"][0]["sentence"] == compiled->steps[0].step->describe());
}

TEST_CASE("unit_run: CSVW date patterns, column names and required columns") {
  // tabular-metadata §6.4.4: the date patterns a CSVW processor understands.
  CHECK(csvw_date_pattern("%Y-%m-%d") == std::string());
  CHECK(csvw_date_pattern("%d.%m.%Y") == std::string("dd.MM.yyyy"));
  CHECK(csvw_date_pattern("%m/%d/%Y") == std::string("MM/dd/yyyy"));
  CHECK(!csvw_date_pattern("%B %d, %Y").has_value());
  // RFC 6570 §2.3 varname characters; tabular-metadata §5.6: no leading "_".
  CHECK(csvw_column_name("planted_on") == "planted_on");
  CHECK(csvw_column_name("_id") == "%5Fid");
  CHECK(csvw_column_name("a b") == "a%20b");
  CHECK(csvw_column_name("né") == "n%C3%A9");

  Table table = tamis::test::read_ok("a,b,c\nx,,1\ny,z,NA\n", sample_options(65536));
  auto date_format = DateFormat::compile("%Y-%m-%d");
  REQUIRE(date_format.ok());
  NullTracker empty_marker(schema_of(table), "", *date_format);
  empty_marker.observe(table);
  CHECK(empty_marker.required() == std::vector<bool>{true, false, true});
  NullTracker na_marker(schema_of(table), "NA", *date_format);
  na_marker.observe(table);
  CHECK(na_marker.required() == std::vector<bool>{true, true, false});
}

TEST_CASE("unit_run: the rejects cap counts rows or a share of the rows read") {
  // The rule documented for input.max_rejects in the recipe JSON Schema:
  // a count allows that many rows; a share P% allows P% of the rows read,
  // and "more than" the cap stops the run.
  const RejectCap two = RejectCap::parse("2").value();
  CHECK_FALSE(two.exceeded(2, 10));
  CHECK(two.exceeded(3, 10));
  const RejectCap share = RejectCap::parse("1%").value();
  CHECK_FALSE(share.exceeded(2, 250));  // 2.5 allowed
  CHECK(share.exceeded(3, 250));
  CHECK(RejectCap::of(RecipeInput{}).value().exceeded(1, 1000));  // none given: none allowed
  for (const char* bad : {"", "-1", "1.5", "101%", "x%", "+2%"}) {
    CAPTURE(bad);
    CHECK_FALSE(RejectCap::parse(bad).ok());
  }
  const Error e = two.error("in.csv", 3, 10, RemovedRow{7, "input: no"});
  CHECK(e.message == "3 rows rejected, more than the cap of 2 (--max-rejects or input.max_rejects); "
                     "no output written. First: line 7: input: no");
  CHECK(share.error("in.csv", 3, 250, RemovedRow{7, "x"}).message.find("cap of 1% of 250 rows read") !=
        std::string::npos);
}
