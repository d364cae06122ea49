// Measures the workbench model on a large file (not a test; tests never
// assert time): load, profile, preview on a visible window and over every
// row, and apply of a trim and a map_values step, with the peak memory.
//
// Usage: workbench_bench FILE.csv [RECIPE.json]
// Prints one line per figure. With a recipe, it only loads the file, opens
// the recipe and applies it in slices (a separate process, so the peak
// memory is the recipe's own).
#include <chrono>
#include <iterator>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string_view>

#include "data_view.hpp"
#include "document.hpp"
#include "load.hpp"
#include "similar/similar_values.hpp"

using namespace tamis;
using namespace tamis::workbench;

namespace {

using Clock = std::chrono::steady_clock;

double ms_since(Clock::time_point start) {
  return std::chrono::duration<double, std::milli>(Clock::now() - start).count();
}

// Resident memory of this process (Linux /proc), in MiB: now (VmRSS) or
// at its peak so far (VmHWM).
double rss_mib(std::string_view field) {
  std::ifstream status("/proc/self/status");
  std::string line;
  while (std::getline(status, line))
    if (line.rfind(field, 0) == 0) {
      std::istringstream in(line.substr(field.size()));
      double kib = 0;
      in >> kib;
      return kib / 1024.0;
    }
  return 0;
}
double peak_rss_mib() { return rss_mib("VmHWM:"); }
double rss_now_mib() { return rss_mib("VmRSS:"); }

void figure(const std::string& what, double value, const std::string& unit) {
  std::cout << what << ": " << value << ' ' << unit << '\n';
}

// Runs a job in slices of the default budget; returns the longest slice in
// ms and prints what the job was doing then.
double run_sliced(Job& job, double& total_ms) {
  double longest = 0;
  std::string longest_label;
  const auto start = Clock::now();
  for (;;) {
    const std::string label = job.label();
    const auto slice = Clock::now();
    const bool done = job.step(kSliceBudget);
    if (ms_since(slice) > longest) longest = ms_since(slice), longest_label = label;
    if (done) break;
  }
  total_ms = ms_since(start);
  std::cout << "  (longest slice while: " << longest_label << ")\n";
  return longest;
}

}  // namespace

int main(int argc, char** argv) {
  if (argc != 2 && argc != 3) {
    std::cerr << "usage: workbench_bench FILE.csv [RECIPE.json]\n";
    return 2;
  }
  const std::string path = argv[1];
  auto source = open_file_source(path);
  if (!source) return std::cerr << source.error().to_string() << '\n', 1;
  const double file_mib = static_cast<double>((*source)->size().value_or(0)) / (1024.0 * 1024.0);
  figure("file size", file_mib, "MiB");

  double total = 0;
  auto load = LoadJob::start(std::move(*source), path);
  if (!load) return std::cerr << load.error().to_string() << '\n', 1;
  double longest = run_sliced(**load, total);
  if ((*load)->error()) return std::cerr << (*load)->error()->to_string() << '\n', 1;
  Document doc((*load)->take_result());
  figure("load", total, "ms");
  figure("load, longest slice", longest, "ms");
  figure("rows", static_cast<double>(doc.table_at(0).row_count()), "");
  figure("table memory", static_cast<double>(doc.table_at(0).memory_bytes()) / (1024.0 * 1024.0), "MiB");
  figure("peak RSS after load", peak_rss_mib(), "MiB");
  figure("RSS after load", rss_now_mib(), "MiB");

  if (argc == 3) {
    std::ifstream in(argv[2], std::ios::binary);
    const std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    const EditOutcome opened = doc.open_recipe(text, argv[2]);
    if (!opened || !opened.problems.empty())
      return std::cerr << "the recipe does not fit: " << (opened.problems.empty() ? "" : opened.problems[0].message)
                       << '\n', 1;
    doc.select_stage(doc.step_count());
    auto apply = doc.make_apply_job();
    longest = run_sliced(*apply, total);
    figure("recipe of " + std::to_string(doc.step_count()) + " steps, apply (sliced)", total, "ms");
    figure("recipe apply, longest slice", longest, "ms");
    size_t kept = 0;
    for (size_t stage = 0; stage <= doc.step_count(); ++stage) kept += doc.stage_ready(stage);
    figure("stage tables kept", static_cast<double>(kept), "");
    figure("result rows", static_cast<double>(doc.result().row_count()), "");
    figure("peak RSS", peak_rss_mib(), "MiB");
    figure("peak RSS / file size", peak_rss_mib() / file_mib, "x");
    return 0;
  }

  const nlohmann::json trim = {{"op", "trim"}, {"columns", "*"}};
  auto start = Clock::now();
  Preview window = doc.preview(trim, 0, RowRange{0, 100});
  figure("trim preview, 100-row window", ms_since(start), "ms");
  if (window.problem) return std::cerr << window.problem->message << '\n', 1;

  auto full = doc.make_preview_job(trim, 0);
  longest = run_sliced(*full, total);
  figure("trim preview, every row (sliced)", total, "ms");
  figure("trim preview, longest slice", longest, "ms");
  Preview complete = full->take_result();
  figure("trim cells changed", [&] {
    uint64_t n = 0;
    for (const auto& [column, count] : complete.change.cells_changed) n += count;
    return static_cast<double>(n);
  }(), "");
  start = Clock::now();
  doc.add_step(std::move(complete));
  figure("trim add after preview", ms_since(start), "ms");
  if (!doc.stage_ready(1)) return std::cerr << "the preview was not reused\n", 1;

  // The same step applied without a preview, as undo/redo recompute it.
  doc.undo();
  doc.redo();
  auto apply = doc.make_apply_job();
  longest = run_sliced(*apply, total);
  figure("trim apply (sliced)", total, "ms");
  figure("trim apply, longest slice", longest, "ms");
  figure("peak RSS after trim", peak_rss_mib(), "MiB");
  figure("RSS after trim", rss_now_mib(), "MiB");

  // map_values on the second text column: its second most frequent value
  // becomes its most frequent one.
  const Table& trimmed = doc.table_at(1);
  const size_t column = 1;
  const auto values = distinct_values(trimmed, column);
  if (values.size() < 2) return std::cerr << "too few values in " << trimmed.name(column) << '\n', 1;
  const nlohmann::json map = {
      {"op", "map_values"}, {"column", trimmed.name(column)}, {"map", {{values[1].value, values[0].value}}}};
  start = Clock::now();
  Preview map_window = doc.preview(map, 1, RowRange{0, 100});
  figure("map_values preview, 100-row window", ms_since(start), "ms");
  auto map_full = doc.make_preview_job(map, 1);
  longest = run_sliced(*map_full, total);
  figure("map_values preview, every row (sliced)", total, "ms");
  figure("map_values preview, longest slice", longest, "ms");
  start = Clock::now();
  doc.add_step(map);
  apply = doc.make_apply_job();
  run_sliced(*apply, total);
  figure("map_values add + apply (sliced)", ms_since(start), "ms");
  figure("RSS after map_values", rss_now_mib(), "MiB");
  figure("peak RSS after map_values", peak_rss_mib(), "MiB");

  const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  RowViewJob sort(doc.result(), {}, {{column, false}}, iso);
  longest = run_sliced(sort, total);
  figure("sort view by one text column (sliced)", total, "ms");
  figure("sort view, longest slice", longest, "ms");
  const auto view = sort.take_result();
  start = Clock::now();
  StepDiff diff(doc.table_at(1), doc.table_at(2));
  figure("step diff setup", ms_since(start), "ms");

  Table all = doc.table_at(0);
  for (size_t stage = 1; stage <= doc.step_count(); ++stage) (void)all.append(doc.table_at(stage));
  figure("all stages, shared chunks counted once", static_cast<double>(all.memory_bytes()) / (1024.0 * 1024.0), "MiB");
  figure("peak RSS before profiling", peak_rss_mib(), "MiB");

  doc.select_stage(0);
  auto profile = doc.make_profile_job();
  longest = run_sliced(*profile, total);
  figure("profile", total, "ms");
  figure("profile, longest slice", longest, "ms");

  auto findings = doc.make_findings_job();
  longest = run_sliced(*findings, total);
  figure("findings (profile reused)", total, "ms");
  figure("findings, longest slice", longest, "ms");
  figure("findings found", static_cast<double>(doc.findings() ? doc.findings()->size() : 0), "");

  auto similar = doc.make_similar_job(1);
  longest = run_sliced(*similar, total);
  figure("similar values of " + doc.table_at(0).name(1) + " (token_key)", total, "ms");
  figure("similar values, longest slice", longest, "ms");

  figure("peak RSS", peak_rss_mib(), "MiB");
  figure("peak RSS / file size", peak_rss_mib() / file_mib, "x");

  return view.empty() ? 1 : 0;
}
