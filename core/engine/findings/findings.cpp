#include "findings/findings.hpp"

#include <algorithm>
#include <utility>

#include "findings/detectors.hpp"
#include "findings/similar_values.hpp"

namespace tamis {

namespace {

// What a detector looks at. The detectors that propose the safe text fixes
// see the raw table; missing-value detection sees it after the trims (so
// " N/A " is found as N/A); every later detector sees it after the trims and
// the NULL conversions, which is where a starter recipe applies its other
// steps, so their previews count what those steps would really do there.
enum class View : uint8_t { raw, trimmed, tidy };

struct Detector {
  FindingKind kind;
  Task<> (*detect)(DetectorContext&);
  View view;
};

// The one table of detectors, in the order a recipe applies their fixes.
constexpr Detector kDetectors[] = {
    {{"duplicate_rows", "rows identical in every column to an earlier row"}, detect_duplicate_rows, View::raw},
    {{"edge_white_space", "text values with white space at the start or end"}, detect_edge_white_space, View::raw},
    {{"inner_white_space", "text values with doubled white space or tabs inside"}, detect_inner_white_space,
     View::raw},
    {{"missing_as_text", "blank values and sentinel texts (NULL, N/A, -, ...) that stand for a missing value"},
     detect_missing_as_text, View::trimmed},
    {{"trailing_punctuation", "category values that differ from another value only by punctuation at the end"},
     detect_trailing_punctuation, View::tidy},
    {{"case_variants", "category values that differ from another value only in letter case"}, detect_case_variants,
     View::tidy},
    {{"similar_values", "values that are probably variant spellings of another value (typos, accents, spacing)"},
     detect_similar_values, View::tidy},
    {{"decimal_comma", "numbers written with a decimal comma in a column that mostly uses a decimal point"},
     detect_decimal_comma, View::tidy},
    {{"numbers_as_text", "numbers written with thousands separators, currency signs or percent signs"},
     detect_numbers_as_text, View::tidy},
    {{"dates_as_text", "dates stored as text, with the formats they are written in"}, detect_dates_as_text,
     View::tidy},
    {{"fillable_nulls", "NULLs that rows with the same key value could fill without conflict"},
     detect_fillable_nulls, View::tidy},
    {{"empty_measure_rows", "rows in which every numeric (measure) column is NULL"}, detect_empty_measure_rows,
     View::tidy},
    {{"useless_columns", "columns that are entirely NULL or hold one value in every row"}, detect_useless_columns,
     View::tidy},
};
constexpr size_t kDetectorCount = sizeof kDetectors / sizeof kDetectors[0];

size_t kind_rank(const std::string& kind) {
  for (size_t i = 0; i < kDetectorCount; ++i)
    if (kDetectors[i].kind.kind == kind) return i;
  return kDetectorCount;
}

void rank(std::vector<Finding>& findings) {
  std::stable_sort(findings.begin(), findings.end(), [](const Finding& a, const Finding& b) {
    if (a.rows_affected != b.rows_affected) return a.rows_affected > b.rows_affected;
    const size_t ka = kind_rank(a.kind), kb = kind_rank(b.kind);
    if (ka != kb) return ka < kb;
    return a.columns < b.columns;
  });
}

}  // namespace

std::span<const FindingKind> finding_kinds() {
  static const std::vector<FindingKind> kinds = [] {
    std::vector<FindingKind> v;
    for (const Detector& d : kDetectors) v.push_back(d.kind);
    return v;
  }();
  return kinds;
}

struct FindingScanner::State {
  Table raw;
  TableProfile raw_profile;
  FindingOptions options;
  size_t next = 0;
  View view = View::raw;
  Table seen;  // the table the current view's detectors look at
  TableProfile seen_profile;
  std::vector<Finding> found;  // in detector order
  SliceControl control;
  ValuesCache values;  // shared by the views
  std::unique_ptr<DetectorContext> context;
  Task<> scan = run_detectors();

  Task<> run_detectors() {
    for (; next < kDetectorCount; ++next) {
      const Detector& d = kDetectors[next];
      if (d.view != view || !context) co_await enter(d.view);
      co_await d.detect(*context);
    }
  }

  // The raw table with the safe text fixes found so far (every safe fix
  // except row removal, which later detectors must not see, so that their
  // row counts stay those of the file).
  Task<> enter(View next_view) {
    view = next_view;
    StepList safe;
    for (const Finding& f : found)
      if (!f.fixes.empty() && f.fixes.front().safe && f.fixes.front().step.value("op", "") != "deduplicate")
        safe.push_back(f.fixes.front().step);
    auto table = co_await apply_sliced(control, raw, safe, options.batch_cells);
    // The safe steps were each previewed on this same sequence; one that does
    // not run here is left out of the view instead of stopping the scan.
    seen = table ? std::move(*table) : raw;
    seen_profile = raw_profile;
    if (view == View::tidy && !safe.empty()) {
      TableProfiler profiler(seen);
      co_await SlicedWork{control, [&profiler](WorkBudget& budget) {
                            const bool done = profiler.step(budget.left);
                            budget.spend(budget.left);
                            return done;
                          }};
      seen_profile = profiler.result();
    }
    values.keep_only(seen);
    context = std::make_unique<DetectorContext>(seen, seen_profile, options, found, control, values);
  }
};

FindingScanner::FindingScanner(Table table, TableProfile profile, FindingOptions options)
    : state_(std::make_unique<State>()) {
  state_->raw = std::move(table);
  state_->raw_profile = std::move(profile);
  state_->options = std::move(options);
  state_->control.waiting = state_->scan.handle();
}

FindingScanner::~FindingScanner() = default;

// A slice resumes the scan where it stopped: the whole-table work it waits
// for first, then the detector that waits for it.
bool FindingScanner::step(size_t budget) {
  State& st = *state_;
  if (!st.scan.done()) {
    WorkBudget slice{std::max<size_t>(budget, 1)};
    st.control.budget = &slice;
    if (st.control.pending && !st.control.pending(slice)) return false;
    st.control.pending = nullptr;
    std::exchange(st.control.waiting, {}).resume();
    if (!st.scan.done()) return false;
    st.scan.result();
  }
  if (findings_.empty() && !st.found.empty()) {
    findings_ = std::move(st.found);
    st.found.clear();
    rank(findings_);
  }
  return true;
}

double FindingScanner::progress() const {
  return static_cast<double>(state_->next) / static_cast<double>(kDetectorCount);
}

std::vector<Finding> find_problems(const Table& table, const TableProfile& profile, const FindingOptions& options) {
  FindingScanner scanner(table, profile, options);
  while (!scanner.step(static_cast<size_t>(-1))) {
  }
  return scanner.result();
}

nlohmann::ordered_json finding_to_json(const Finding& f) {
  using json = nlohmann::ordered_json;
  json out;
  out["kind"] = f.kind;
  out["title"] = f.title;
  out["columns"] = f.columns;
  out["rows_affected"] = f.rows_affected;
  out["explanation"] = f.explanation;
  out["details"] = f.details;
  out["facts"] = f.facts;
  out["fixes"] = json::array();
  for (const SuggestedFix& fix : f.fixes) {
    json j;
    j["step"] = fix.step;
    j["safe"] = fix.safe;
    if (!fix.safe) j["why_review"] = fix.why_review;
    json preview;
    preview["cells_changed"] = fix.preview.cells_changed;
    preview["rows_removed"] = fix.preview.rows_removed;
    preview["examples"] = json::array();
    for (const FixExample& e : fix.preview.examples) {
      json x;
      x["source_line"] = e.source_line;
      if (e.removed) {
        x["removed"] = true;
        x["row"] = e.before;
      } else {
        x["column"] = e.column;
        x["before"] = e.before;
        x["after"] = e.after;
      }
      preview["examples"].push_back(std::move(x));
    }
    preview["warnings"] = fix.preview.warnings;
    j["preview"] = std::move(preview);
    out["fixes"].push_back(std::move(j));
  }
  return out;
}

}  // namespace tamis
