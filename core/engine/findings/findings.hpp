// Findings (issue 4): concrete problems found across a profiled table, each
// with the columns and number of rows it touches, a short plain explanation
// and ready-made v1 recipe steps that fix it.
//
// Every suggested step is previewed by really running it over the table with
// the recipe machinery (recipe.hpp) and reading its ChangeRecord, so the
// preview is what `tamis run` would do, and a step that does not compile
// never reaches the analyst. Each detector is one file pair in this folder,
// listed in the one table in findings.cpp.
//
// Safe fixes (applied by a starter recipe without asking): trim, blank and
// sentinel values to NULL, removal of exact duplicate rows. Every other fix
// carries why_review: the reason a person should decide.
//
// What each detector sees: duplicates and white space are found on the table
// as given; blanks and sentinels after the trims; everything else after the
// trims and the NULL conversions (not after duplicate removal, so row counts
// stay those of the file). Previews are computed on the same view, which is
// also the order a starter recipe applies the fixes in.
#pragma once

#include <nlohmann/json.hpp>

#include <cstdint>
#include <memory>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "profile.hpp"
#include "row_batches.hpp"
#include "table.hpp"

namespace tamis {

struct FixExample {
  std::string column;  // the changed column; empty for a removed row
  std::string before;  // canonical text, "NULL" for NULL; a removed row: its cells joined by " | "
  std::string after;   // empty when removed
  bool removed = false;
  uint64_t source_line = 0;
};

struct FixPreview {
  uint64_t cells_changed = 0;  // over every column the step changed
  uint64_t rows_removed = 0;
  std::vector<FixExample> examples;  // up to FindingOptions::examples, in source order
  std::vector<std::string> warnings;  // the step's own warnings and conflicts (e.g. fill_from_group)
};

struct SuggestedFix {
  nlohmann::ordered_json step;  // one v1 recipe step object (op + parameters + note); parse_recipe accepts it
  bool safe = false;
  std::string why_review;  // empty when safe
  FixPreview preview;
};

struct Finding {
  std::string kind;   // stable id, one of finding_kinds()
  std::string title;  // one line, e.g. "18 exact duplicate rows"
  std::vector<std::string> columns;
  uint64_t rows_affected = 0;
  std::string explanation;           // a few plain sentences
  std::vector<std::string> details;  // extra facts in words, e.g. the date values that fit no format
  nlohmann::ordered_json facts = nlohmann::ordered_json::object();  // the same facts as numbers and lists
  std::vector<SuggestedFix> fixes;   // the first is the recommended one
};

struct FindingOptions {
  // Texts that stand for "no value". Matched against the whole value,
  // ignoring letter case (Unicode full case folding) and white space at the
  // ends; the suggested to_null step lists the exact spellings found, since
  // to_null itself compares exactly.
  std::vector<std::string> sentinels{"NULL", "N/A", "-", "none", "?"};
  size_t examples = 5;  // before -> after examples per fix
  // Whole-table work (previews, the views) runs in row batches of about
  // this many cells, so that a scan can stop between any two of them.
  size_t batch_cells = kSliceCells;
};

// A detector kind and what it looks for, for --help and the workbench. The
// table's order is the order in which a starter recipe applies the fixes.
struct FindingKind {
  std::string_view kind;
  std::string_view summary;
};
std::span<const FindingKind> finding_kinds();

// All findings, ranked by rows affected (most first; ties by kind, then columns).
std::vector<Finding> find_problems(const Table& table, const TableProfile& profile,
                                   const FindingOptions& options = {});

// The same work in slices for the shells (no threads in the browser): each
// step() runs whole detectors until about `budget` cells of work are done.
class FindingScanner {
 public:
  FindingScanner(Table table, TableProfile profile, FindingOptions options = {});
  ~FindingScanner();
  bool step(size_t budget);  // true when finished
  double progress() const;   // 0..1
  // Ranked; complete once step() has returned true.
  const std::vector<Finding>& result() const { return findings_; }

 private:
  struct State;
  std::unique_ptr<State> state_;
  std::vector<Finding> findings_;
};

nlohmann::ordered_json finding_to_json(const Finding& finding);

}  // namespace tamis
