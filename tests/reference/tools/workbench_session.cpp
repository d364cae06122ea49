// A scripted workbench session for ref.workbench_replay: opens a CSV file,
// adds the fix of the top-ranked finding three times (findings recomputed on
// the table as of the newest step each time, as the Findings panel does),
// merges the largest similar-values group of a column, and writes what the
// workbench exports: the recipe, the cleaned CSV and the run report.
//
// Usage: workbench_session INPUT.csv COLUMN OUT_DIR
// Prints one line per action to standard output.
#include <fstream>
#include <iostream>

#include "document.hpp"
#include "exports.hpp"
#include "load.hpp"

using namespace tamis;
using namespace tamis::workbench;

namespace {

int fail(const std::string& message) {
  std::cerr << "workbench_session: " << message << '\n';
  return 1;
}

bool write_file(const std::string& path, const std::string& bytes) {
  std::ofstream out(path, std::ios::binary);
  out << bytes;
  return static_cast<bool>(out);
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 4) return fail("usage: workbench_session INPUT.csv COLUMN OUT_DIR");
  const std::string input = argv[1], column = argv[2], out_dir = argv[3];
  auto source = open_file_source(input);
  if (!source) return fail(source.error().to_string());
  auto load = LoadJob::start(std::move(*source), input);
  if (!load) return fail(load.error().to_string());
  if (!run_to_end(**load)) return fail((*load)->error()->to_string());
  Document doc((*load)->take_result());

  for (int added = 0; added < 3; ++added) {
    if (!run_to_end(*doc.make_findings_job())) return fail("the findings job failed");
    const std::vector<Finding>& findings = *doc.findings();
    bool done = false;
    for (const Finding& finding : findings) {
      if (finding.fixes.empty()) continue;
      const EditOutcome outcome = doc.add_fix(finding);
      if (!outcome || !outcome.problems.empty()) {
        if (outcome) doc.undo();
        continue;
      }
      std::cout << "fix: " << finding.title << " -> " << doc.describe_step(doc.selected_stage() - 1) << '\n';
      done = true;
      break;
    }
    if (!done) return fail("no finding with a fix that fits");
  }

  const auto column_index = doc.table_at(doc.selected_stage()).find(column);
  if (!column_index) return fail("no column " + column);
  if (!run_to_end(*doc.make_similar_job(*column_index))) return fail("the similar-values job failed");
  const SimilarResult& similar = *doc.similar();
  if (similar.groups.empty()) return fail("no similar-values group in " + column);
  const SimilarChoice choice{similar.groups.front(), similar.groups.front().canonical, {}};
  const EditOutcome merged = doc.add_similar_groups(column, std::span<const SimilarChoice>(&choice, 1));
  if (!merged || !merged.problems.empty()) return fail("the map_values step does not fit");
  std::cout << "merge: " << doc.describe_step(doc.selected_stage() - 1) << '\n';

  auto csv = export_cleaned(doc);
  if (!csv) return fail(csv.error().to_string());
  auto report = export_run_report(doc, "cleaned.csv");
  if (!report) return fail(report.error().to_string());
  if (!write_file(out_dir + "/recipe.json", export_recipe(doc)) || !write_file(out_dir + "/cleaned.csv", *csv) ||
      !write_file(out_dir + "/report.json", *report))
    return fail("cannot write to " + out_dir);
  std::cout << "steps: " << doc.step_count() << ", rows: " << doc.result().row_count() << '\n';
  return 0;
}
