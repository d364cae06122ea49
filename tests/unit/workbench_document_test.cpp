// The workbench model: undo and redo restore the exact table and recipe for
// every step kind, previews leave the document alone, edit errors name the
// step and the key, recipes that no longer fit say where, and the slice jobs
// give what the one-shot engine calls give.
#include <doctest/doctest.h>

#include <set>

#include "document.hpp"
#include "findings/findings.hpp"
#include "profile.hpp"
#include "recipe.hpp"
#include "similar/similar_values.hpp"
#include "steps/registry.hpp"
#include "workbench_support.hpp"

using namespace tamis;
using namespace tamis::workbench;
using tamis::test::document_of;
using tamis::test::exact_difference;
using json = nlohmann::json;

namespace {

// Rows 2 and 4 repeat each other (deduplicate); val has blanks that the
// first step turns into NULL (fill_from_group, carry_forward, require).
const char* const kSample =
    "name,city,planted,amount,flag,code,grp,val\n"
    " Ada ,Oslo,2021-03-04,\"1,200\",true,A-1;B-2,g1,x\n"
    "Bob,oslo,03/04/2021,35,false,C-3;D-4,g1,\n"
    "Cy  Lee,Bergen,2021-13-01,7,true,E-5;F-6,g2,y\n"
    "Bob,oslo,03/04/2021,35,false,C-3;D-4,g1,\n"
    "De\xCC\x81,Bergen,2022-01-02,12,false,G-7;H-8,g2,\n";

const json kBaseStep = {{"op", "to_null"}, {"columns", {"val"}}, {"blank", true}};

// One step of every kind that changes the sample table after kBaseStep.
std::vector<json> one_step_of_every_kind() {
  return {
      {{"op", "trim"}, {"columns", {"name"}}},
      {{"op", "collapse_spaces"}, {"columns", {"name"}}},
      {{"op", "change_case"}, {"columns", {"city"}}, {"to", "upper"}},
      {{"op", "normalize_unicode"}, {"columns", {"name"}}, {"form", "NFC"}},
      {{"op", "replace_text"}, {"columns", {"code"}}, {"find", ";"}, {"replace", "|"}},
      {{"op", "map_values"}, {"column", "city"}, {"map", {{"oslo", "Oslo"}}}},
      {{"op", "to_null"}, {"columns", {"flag"}}, {"values", {"false"}}},
      {{"op", "split_column"}, {"column", "code"}, {"separator", ";"}, {"into", {"code_a", "code_b"}}},
      {{"op", "keep_rows"}, {"where", "grp = 'g1'"}},
      {{"op", "drop_rows"}, {"where", "grp = 'g1'"}},
      {{"op", "derive_column"}, {"name", "name_length"}, {"expr", "CHAR_LENGTH(name)"}},
      {{"op", "parse_date"}, {"column", "planted"}, {"formats", {"%Y-%m-%d", "%m/%d/%Y"}}, {"on_error", "null"}},
      {{"op", "parse_number"}, {"column", "amount"}, {"group_mark", ","}},
      {{"op", "cast"}, {"column", "flag"}, {"to", "boolean"}},
      {{"op", "fill_from_group"}, {"column", "val"}, {"keys", {"grp"}}},
      {{"op", "carry_forward"}, {"column", "val"}},
      {{"op", "deduplicate"}, {"columns", "*"}},
      {{"op", "require"}, {"rule", "not_null"}, {"columns", {"val"}}, {"on_fail", "reject"}},
      {{"op", "drop_columns"}, {"columns", {"code"}}},
      {{"op", "rename_columns"}, {"map", {{"city", "town"}}}},
      {{"op", "reorder_columns"}, {"columns", {"val", "name"}}},
  };
}

std::string recipe_text(const Document& d) { return recipe_to_json(d.recipe()); }

}  // namespace

TEST_CASE("unit_workbench: the every-kind list covers every registered step kind") {
  std::set<std::string> listed, registered;
  for (const json& step : one_step_of_every_kind()) listed.insert(step["op"].get<std::string>());
  for (const StepKind& kind : step_kinds()) registered.insert(std::string(kind.op));
  CHECK(listed == registered);
  CHECK(registered.size() == 21);  // design §4 lists 21 step kinds for version 1
}

TEST_CASE("unit_workbench: undo and redo of adding every step kind restore the exact table and recipe") {
  for (const json& definition : one_step_of_every_kind()) {
    const std::string op = definition["op"].get<std::string>();
    CAPTURE(op);
    auto doc = document_of(kSample);
    REQUIRE(doc->add_step(kBaseStep));
    const Table before = doc->result();
    const std::string recipe_before = recipe_text(*doc);

    const EditOutcome added = doc->add_step(definition);
    REQUIRE_MESSAGE(added.applied, (added.problems.empty() ? std::string() : added.problems[0].message));
    CHECK(added.problems.empty());
    const Table after = doc->result();
    CHECK_MESSAGE(!exact_difference(before, after).empty(), "the step must change the sample table");
    CHECK(doc->undo_label() == "add " + op);

    REQUIRE(doc->undo());
    CHECK(exact_difference(before, doc->result()) == "");
    CHECK(recipe_text(*doc) == recipe_before);
    CHECK(doc->can_redo());

    REQUIRE(doc->redo());
    CHECK(exact_difference(after, doc->result()) == "");
    CHECK(doc->step_count() == 2);
  }
}

TEST_CASE("unit_workbench: undo restores the table after edit, disable, move, delete and note") {
  auto doc = document_of(kSample);
  REQUIRE(doc->add_step(kBaseStep));
  REQUIRE(doc->add_step({{"op", "trim"}, {"columns", {"name"}}}));
  REQUIRE(doc->add_step({{"op", "map_values"}, {"column", "city"}, {"map", {{"oslo", "Oslo"}}}}));
  const Table start = doc->result();
  const std::string recipe_start = recipe_text(*doc);

  auto check_undo = [&](const std::string& label, EditOutcome outcome) {
    CAPTURE(label);
    REQUIRE(outcome.applied);
    CHECK(doc->undo_label() == label);
    const Table edited = doc->result();
    const std::string recipe_edited = recipe_text(*doc);
    CHECK(recipe_edited != recipe_start);
    REQUIRE(doc->undo());
    CHECK(exact_difference(start, doc->result()) == "");
    CHECK(recipe_text(*doc) == recipe_start);
    CHECK(doc->redo_label() == label);
    REQUIRE(doc->redo());
    CHECK(exact_difference(edited, doc->result()) == "");
    CHECK(recipe_text(*doc) == recipe_edited);
    REQUIRE(doc->undo());
  };
  check_undo("edit trim", doc->edit_step(1, {{"op", "trim"}, {"columns", {"name", "city"}}, {"side", "leading"}}));
  check_undo("disable map_values", doc->set_enabled(2, false));
  check_undo("move map_values", doc->move_step(2, 0));
  check_undo("delete trim", doc->delete_step(1));
  check_undo("note on trim", doc->set_note(1, "clerks typed spaces"));
  check_undo("open recipe", doc->open_recipe(R"({"tamis_recipe": 1, "steps": [{"op": "deduplicate"}]})", "r.json"));
  CHECK(doc->can_redo());
}

TEST_CASE("unit_workbench: a note and the enabled flag travel in the recipe and do not change the result") {
  auto doc = document_of(kSample);
  REQUIRE(doc->add_step({{"op", "trim"}, {"columns", {"name"}}}));
  const Table trimmed = doc->result();
  REQUIRE(doc->set_note(0, "stray spaces"));
  CHECK(doc->recipe().steps[0].note == "stray spaces");
  CHECK(doc->stage_ready(1));  // a note changes nothing, so nothing is recomputed
  REQUIRE(doc->set_enabled(0, false));
  CHECK(recipe_text(*doc).find("\"enabled\": false") != std::string::npos);
  CHECK(exact_difference(doc->result(), doc->table_at(0)) == "");
  REQUIRE(doc->edit_step(0, {{"op", "trim"}, {"columns", {"name"}}}));
  CHECK(doc->recipe().steps[0].note == "stray spaces");  // kept unless the definition sets one
  CHECK_FALSE(doc->recipe().steps[0].enabled);
}

TEST_CASE("unit_workbench: edit validation errors name the step and the key and change nothing") {
  auto doc = document_of(kSample);
  REQUIRE(doc->add_step({{"op", "trim"}, {"columns", {"name"}}}));
  REQUIRE(doc->add_step({{"op", "deduplicate"}}));
  const uint64_t revision = doc->revision();
  const std::string recipe_before = recipe_text(*doc);

  EditOutcome missing = doc->edit_step(1, {{"op", "map_values"}, {"column", "town"}, {"map", {{"a", "b"}}}});
  CHECK_FALSE(missing.applied);
  REQUIRE(missing.problems.size() == 1);
  CHECK(missing.problems[0].step == std::optional<size_t>(1));
  CHECK(missing.problems[0].key == "column");
  CHECK(missing.problems[0].message.find("town") != std::string::npos);

  EditOutcome bad_choice = doc->edit_step(0, {{"op", "trim"}, {"columns", {"name"}}, {"side", "middle"}});
  REQUIRE(bad_choice.problems.size() == 1);
  CHECK(bad_choice.problems[0].step == std::optional<size_t>(0));
  CHECK(bad_choice.problems[0].key == "side");

  EditOutcome unknown_key = doc->add_step({{"op", "trim"}, {"columns", {"name"}}, {"colour", "red"}}, 1);
  REQUIRE(unknown_key.problems.size() == 1);
  CHECK(unknown_key.problems[0].step == std::optional<size_t>(1));
  CHECK(unknown_key.problems[0].key == "colour");

  EditOutcome unknown_op = doc->add_step({{"op", "shuffle"}});
  REQUIRE(unknown_op.problems.size() == 1);
  CHECK(unknown_op.problems[0].message.find("unknown op 'shuffle'") != std::string::npos);

  // "name = = 'x'": the second '=' is character 8 (1-based).
  EditOutcome bad_expression = doc->add_step({{"op", "keep_rows"}, {"where", "name = = 'x'"}});
  REQUIRE(bad_expression.problems.size() == 1);
  CHECK(bad_expression.problems[0].key == "where");
  CHECK(bad_expression.problems[0].character == std::optional<size_t>(8));

  CHECK(doc->revision() == revision);
  CHECK(recipe_text(*doc) == recipe_before);
  CHECK(doc->undo_label() == "add deduplicate");
}

TEST_CASE("unit_workbench: a step that sees its column only after a move reports it, and undo clears it") {
  auto doc = document_of(kSample);
  REQUIRE(doc->add_step({{"op", "rename_columns"}, {"map", {{"city", "town"}}}}));
  REQUIRE(doc->add_step({{"op", "change_case"}, {"columns", {"town"}}, {"to", "lower"}}));
  CHECK(doc->problems().empty());
  EditOutcome moved = doc->move_step(1, 0);
  REQUIRE(moved.applied);
  REQUIRE(moved.problems.size() == 1);
  CHECK(moved.problems[0].step == std::optional<size_t>(0));
  CHECK(moved.problems[0].key == "columns");
  CHECK(moved.problems[0].message.find("town") != std::string::npos);
  // The step that does not fit passes its input through; the next still runs.
  CHECK(doc->result().find("town").has_value());
  REQUIRE(doc->undo());
  CHECK(doc->problems().empty());
}

TEST_CASE("unit_workbench: opening a recipe that no longer fits reports the step and the column") {
  auto doc = document_of(kSample);
  const char* recipe = R"({
    "tamis_recipe": 1,
    "input": {"columns": [{"name": "name", "type": "text"}, {"name": "district", "type": "text"}],
              "unknown_columns": "ignore"},
    "steps": [
      {"op": "trim", "columns": ["name"]},
      {"op": "map_values", "column": "district", "map": {"Fenmore": "Fenmoor"}},
      {"op": "parse_number", "column": "name", "decimal_mark": ";"}
    ]
  })";
  EditOutcome opened = doc->open_recipe(recipe, "old.recipe.json");
  CHECK(opened.applied);
  REQUIRE(opened.problems.size() == 3);
  CHECK_FALSE(opened.problems[0].step.has_value());
  CHECK(opened.problems[0].message.find("'district'") != std::string::npos);
  CHECK(opened.problems[1].step == std::optional<size_t>(1));
  CHECK(opened.problems[1].key == "column");
  CHECK(opened.problems[1].message.find("district") != std::string::npos);
  CHECK(opened.problems[2].step == std::optional<size_t>(2));
  CHECK(opened.problems[2].key == "decimal_mark");
  // The step that fits still runs: the first step trimmed the name.
  CHECK(doc->result().column(0).text(0) == "Ada");
  // unknown_columns "ignore": of the expected columns, the file has only name.
  CHECK(doc->result().names() == std::vector<std::string>{"name"});

  // A recipe for another dialect would read this file differently.
  EditOutcome other_dialect = doc->open_recipe(
      R"({"tamis_recipe": 1, "input": {"delimiter": ";", "header": false, "encoding": "windows-1252"}, "steps": []})",
      "semicolons.json");
  CHECK(other_dialect.applied);
  REQUIRE(other_dialect.problems.size() == 3);
  CHECK(other_dialect.problems[0].key == "delimiter");
  CHECK(other_dialect.problems[0].message.find("';'") != std::string::npos);
  CHECK(other_dialect.problems[1].key == "header");
  CHECK(other_dialect.problems[2].key == "encoding");
  CHECK_FALSE(other_dialect.problems[2].step.has_value());
  REQUIRE(doc->undo());
  CHECK(doc->problems().size() == 3);  // back to the recipe with the missing district

  EditOutcome broken = doc->open_recipe("{\"tamis_recipe\": 1, \"steps\": [", "broken.json");
  CHECK_FALSE(broken.applied);
  REQUIRE(broken.problems.size() == 1);
  CHECK(broken.problems[0].message.find("broken.json:1:") != std::string::npos);
}

TEST_CASE("unit_workbench: preview does not change the document, and adding it reuses its result") {
  auto doc = document_of(kSample);
  REQUIRE(doc->add_step(kBaseStep));
  REQUIRE(doc->add_step({{"op", "deduplicate"}}));
  const Table result = doc->result();
  const uint64_t revision = doc->revision();
  const std::string recipe_before = recipe_text(*doc);
  const uint64_t serial1 = doc->stage_serial(1), serial2 = doc->stage_serial(2);

  const json fill = {{"op", "fill_from_group"}, {"column", "val"}, {"keys", {"grp"}}};
  Preview preview = doc->preview(fill, 1);
  REQUIRE_FALSE(preview.problem.has_value());
  CHECK(preview.complete);
  CHECK(preview.change.rows_in == 5);
  CHECK(preview.change.cells_changed["val"] == 3);  // g1 gets x twice, g2 gets y once
  CHECK(preview.description.find("val") != std::string::npos);

  CHECK(doc->revision() == revision);
  CHECK(recipe_text(*doc) == recipe_before);
  CHECK(doc->stage_serial(1) == serial1);
  CHECK(doc->stage_serial(2) == serial2);
  CHECK(exact_difference(result, doc->result()) == "");

  const Table previewed = preview.after;
  REQUIRE(doc->add_step(std::move(preview)));
  CHECK(doc->stage_ready(2));  // installed from the preview, not recomputed
  CHECK(exact_difference(previewed, doc->table_at(2)) == "");
  CHECK(doc->change(1).cells_changed.at("val") == 3);
  CHECK(doc->result().row_count() == 4);

  // The same step computed from scratch gives the same table.
  auto fresh = document_of(kSample);
  REQUIRE(fresh->add_step(kBaseStep));
  REQUIRE(fresh->add_step(fill));
  REQUIRE(fresh->add_step({{"op", "deduplicate"}}));
  CHECK(exact_difference(fresh->result(), doc->result()) == "");
}

TEST_CASE("unit_workbench: a windowed preview covers only its rows and says it is not complete") {
  auto doc = document_of(kSample);
  // Rows 1 and 2 (Bob, "Cy  Lee") have no white space at the ends; row 0 (" Ada ") has.
  Preview window = doc->preview({{"op", "trim"}, {"columns", {"name"}}}, 0, RowRange{1, 3});
  REQUIRE_FALSE(window.problem.has_value());
  CHECK_FALSE(window.complete);
  CHECK(window.change.rows_in == 2);
  CHECK(window.change.cells_changed["name"] == 0);
  CHECK(window.after.row_count() == 2);
  CHECK(window.after.source_line(0) == 3);
  // Adding an incomplete preview computes the step over every row.
  REQUIRE(doc->add_step(std::move(window)));
  CHECK(doc->change(0).rows_in == 5);
  CHECK(doc->change(0).cells_changed.at("name") == 1);

  Preview bad = doc->preview({{"op", "trim"}, {"columns", {"nope"}}}, 1);
  REQUIRE(bad.problem.has_value());
  CHECK(bad.problem->key == "columns");
  CHECK_FALSE(doc->add_step(std::move(bad)).applied);
}

TEST_CASE("unit_workbench: a finding's fix and a similar-values group become steps") {
  auto doc = document_of(kSample);
  REQUIRE(run_to_end(*doc->make_findings_job()));
  const std::vector<Finding>* findings = doc->findings();
  REQUIRE(findings != nullptr);
  const Finding* edge = nullptr;
  for (const Finding& f : *findings)
    if (f.kind == "edge_white_space") edge = &f;
  REQUIRE(edge != nullptr);
  REQUIRE(doc->add_fix(*edge));
  CHECK(doc->recipe().steps[0].op == "trim");
  CHECK(doc->result().column(0).text(0) == "Ada");
  CHECK(doc->selected_stage() == 1);  // the added step is selected
  CHECK(doc->findings() == nullptr);  // findings belong to the stage they were computed on
  doc->select_stage(0);
  CHECK(doc->findings() != nullptr);  // the file itself (stage 0) did not change
  doc->select_stage(1);

  REQUIRE(run_to_end(*doc->make_similar_job(1)));
  const SimilarResult* similar = doc->similar();
  REQUIRE(similar != nullptr);
  CHECK(similar->column == "city");
  REQUIRE(similar->groups.size() == 1);  // Oslo and oslo; Bergen has no variant
  CHECK(similar->groups[0].canonical == "oslo");  // the most frequent spelling
  SimilarChoice choice{similar->groups[0], "Oslo", {}};
  REQUIRE(doc->add_similar_groups("city", std::span<const SimilarChoice>(&choice, 1)));
  CHECK(doc->recipe().steps[1].op == "map_values");
  CHECK(doc->recipe().steps[1].definition["map"] == json{{"oslo", "Oslo"}});
  const Table& result = doc->result();
  for (size_t r = 0; r < result.row_count(); ++r) CHECK(result.column(1).text(r) != "oslo");

  // An unticked member stays as it is: no group is left, so the map is empty.
  SimilarChoice unticked{similar->groups[0], "Oslo", {"oslo"}};
  CHECK(similar_values_step("city", std::span<const SimilarChoice>(&unticked, 1))["map"].empty());
}
