// What the Data grid needs without copying millions of rows: a view (a
// vector of row indices) sorted and filtered for display only, which never
// changes the recipe; a cell's display text with NULL told apart from empty
// text and white space at the ends made visible; and which cells a step
// changed.
#pragma once

#include <cstddef>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "dates.hpp"
#include "job.hpp"
#include "table.hpp"

namespace tamis::workbench {

struct CellText {
  bool is_null = false;
  std::string value;  // the canonical text (design §3); empty for NULL
  // `value` with every white space character at either end, and every line
  // break or tab inside, replaced by a visible mark: space ·, tab ⇥, line
  // break ↵, any other white space ␣ (U+2423).
  std::string shown;
  size_t leading_marks = 0;   // bytes of `shown` at its start that are edge white space marks
  size_t trailing_marks = 0;  // the same at its end
};

CellText cell_text(const Table& table, size_t row, size_t column, const DateFormat& date_format);

enum class FilterKind : uint8_t {
  contains,      // text contains `text` (code point by code point, case-sensitive)
  equals,        // canonical text equals `text`
  is_null,
  is_empty,      // the empty text (not NULL)
  not_null,
  edge_space,    // white space at either end
};

struct RowFilter {
  size_t column = 0;
  FilterKind kind = FilterKind::contains;
  std::string text;
};

struct SortKey {
  size_t column = 0;
  bool descending = false;
};

// Rows of `table` passing every filter, ordered by the keys (typed columns by
// value, text by code point; NULL after every value in either direction; ties
// keep source order). No keys and no filters: every row in order.
std::vector<size_t> make_row_view(const Table& table, std::span<const RowFilter> filters,
                                  std::span<const SortKey> keys, const DateFormat& date_format);

// The same view in slices, for a big table (sorting a million rows takes
// longer than a frame). The job keeps its own copy of the table.
class RowViewJob final : public Job {
 public:
  RowViewJob(Table table, std::vector<RowFilter> filters, std::vector<SortKey> keys, DateFormat date_format);
  ~RowViewJob() override;
  bool step(size_t budget) override;
  double progress() const override;
  std::string label() const override;
  // The view once step() returned true (not cancelled).
  std::vector<size_t> take_result();

 private:
  struct State;
  std::unique_ptr<State> state_;
};

// The row whose record starts at source line `line` (rows keep source
// order, so the lines ascend): for the Changes panel's removed rows, looked
// up in the table before the step.
std::optional<size_t> row_of_line(const Table& table, uint64_t line);

// Which cells of a stage a step changed: rows are matched by source line
// (steps never reorder rows), columns by name. A column the step created
// counts as changed in every row.
class StepDiff {
 public:
  StepDiff(Table before, Table after);
  bool cell_changed(size_t row, size_t column) const;  // coordinates in `after`
  bool column_is_new(size_t column) const;

 private:
  Table before_, after_;
  std::vector<std::ptrdiff_t> before_column_;  // per after column; -1 when new
  std::vector<uint64_t> before_lines_;         // source line per before row, ascending
};

}  // namespace tamis::workbench
