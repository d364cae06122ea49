// The step form (core/workbench/ui/step_form.hpp) covers every v1 step: the
// form filled from a step definition gives back a definition that the engine
// accepts and that does the same thing (same plain sentence, same counts),
// and an SQL expression error points at a character of the expression.
#include <doctest/doctest.h>

#include <set>
#include <string>

#include "document.hpp"
#include "load.hpp"
#include "step_form.hpp"
#include "steps/registry.hpp"

namespace tamis::ui {
namespace {

std::unique_ptr<workbench::Document> demo_document() {
  auto source = open_file_source(std::string(TAMIS_SOURCE_DIR) + "/assets/demo/tree_survey.csv");
  REQUIRE(source.ok());
  auto file = workbench::load_file(std::move(source.value()), "tree_survey.csv");
  REQUIRE_MESSAGE(file.ok(), (file.ok() ? std::string() : file.error().to_string()));
  return std::make_unique<workbench::Document>(std::move(file).value());
}

// One definition per step, on the demo's columns.
const char* const kSamples[] = {
    R"({"op":"trim","columns":["site","district"],"side":"trailing"})",
    R"({"op":"collapse_spaces","columns":["species"]})",
    R"({"op":"change_case","columns":["status"],"to":"upper"})",
    R"({"op":"normalize_unicode","columns":["district"],"form":"NFKC","strip_accents":true})",
    R"({"op":"replace_text","columns":["district"],"find":".","replace":"","match":"literal"})",
    R"({"op":"map_values","column":"district","map":{"Riviere Quay":"Rivière Quay","Canal Basin.":"Canal Basin"}})",
    R"({"op":"to_null","columns":["planted_on","crew"],"values":["N/A","-"],"blank":true})",
    R"({"op":"split_column","column":"crew","separator":" ","into":["first_name","last_name"]})",
    R"({"op":"keep_rows","where":"planted_count IS NOT NULL"})",
    R"({"op":"drop_rows","where":"status = 'Lost'"})",
    R"({"op":"derive_column","name":"site_and_district","expr":"site || ' / ' || district"})",
    R"({"op":"parse_date","column":"planted_on","formats":["%Y-%m-%d","%m/%d/%Y"],"on_error":"keep"})",
    R"({"op":"parse_number","column":"survival_pct","decimal_mark":".","strip":"%","on_error":"null"})",
    R"({"op":"cast","column":"planted_count","to":"integer","on_error":"null"})",
    R"({"op":"fill_from_group","column":"district","keys":["site"]})",
    R"({"op":"carry_forward","column":"contractor","group_by":["site"]})",
    R"({"op":"deduplicate","columns":"*","keep":"last","compare":"trimmed"})",
    R"({"op":"require","rule":"in_set","columns":["status"],"values":["Lost","Pending","Watering","Established"],"on_fail":"warn"})",
    R"({"op":"drop_columns","columns":["funding_k"]})",
    R"({"op":"rename_columns","map":{"crew":"crew_lead"}})",
    R"({"op":"reorder_columns","columns":["status","site","district","species","planted_on","planted_count","survival_pct","crew","contractor","funding_k"]})",
};

uint64_t cells_changed(const ChangeRecord& change) {
  uint64_t total = 0;
  for (const auto& entry : change.cells_changed) total += entry.second;
  return total;
}

TEST_CASE("every registered step has a form") {
  std::set<std::string> with_form;
  for (const StepSpec& spec : step_specs()) with_form.insert(std::string(spec.op));
  for (const StepKind& kind : step_kinds()) CHECK_MESSAGE(with_form.count(std::string(kind.op)) == 1, kind.op);
  CHECK(with_form.size() == step_kinds().size());
  CHECK(std::size(kSamples) == step_kinds().size());
}

TEST_CASE("a form filled from a step gives a step that does the same") {
  auto document = demo_document();
  const Schema columns = schema_of(document->table_at(0));
  for (const char* sample_text : kSamples) {
    const nlohmann::json sample = nlohmann::json::parse(sample_text);
    const std::string op = sample["op"];
    INFO(op);
    const StepSpec* spec = find_step_spec(op);
    REQUIRE(spec != nullptr);
    StepForm form;
    form.open_new(*spec, 0, columns, &sample);
    const nlohmann::json from_form = form.definition();
    CHECK(from_form["op"] == op);
    const workbench::Preview expected = document->preview(sample, 0);
    const workbench::Preview got = document->preview(from_form, 0);
    REQUIRE_MESSAGE(!expected.problem, (expected.problem ? expected.problem->message : std::string()));
    const std::string form_problem = got.problem ? got.problem->message + " in " + from_form.dump() : std::string();
    REQUIRE_MESSAGE(!got.problem, form_problem);
    CHECK(got.description == expected.description);
    CHECK(cells_changed(got.change) == cells_changed(expected.change));
    CHECK(got.change.rows_removed == expected.change.rows_removed);
    CHECK(got.change.rows_out == expected.change.rows_out);
    CHECK(got.after.column_count() == expected.after.column_count());
  }
  CHECK(document->step_count() == 0);  // previews never change the document
}

TEST_CASE("an SQL expression error is placed on its character") {
  auto document = demo_document();
  const nlohmann::json broken = nlohmann::json::parse(R"({"op":"keep_rows","where":"planted_count > > 3"})");
  const workbench::Preview preview = document->preview(broken, 0);
  REQUIRE(preview.problem);
  CHECK(preview.problem->key == "where");
  const std::optional<size_t> at = error_character(preview.problem->message);
  REQUIRE(at);
  // "planted_count > > 3": the second '>' is character 17 (1-based).
  CHECK(*at == 17);
}

TEST_CASE("error_character reads the engine's position and nothing else") {
  CHECK(error_character("step 1 (keep_rows), where: at character 5: expected a value") == std::optional<size_t>(5));
  CHECK_FALSE(error_character("no position here"));
  CHECK_FALSE(error_character("at character x"));
}

}  // namespace
}  // namespace tamis::ui
