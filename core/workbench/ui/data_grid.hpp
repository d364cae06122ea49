// The Data panel's grid: virtualized with ImGuiListClipper, so only the rows
// on screen are drawn and a table of millions of rows scrolls at frame rate.
// NULL is drawn as a marker of its own, never as empty text; an empty text
// value has its own faint marker; spaces and tabs at either end of a value are
// drawn as visible marks; cells the selected step changed get a background.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "change.hpp"

namespace tamis::ui {

// What the grid shows: a view of a table (rows may be filtered or sorted).
class GridSource {
 public:
  virtual ~GridSource() = default;
  virtual size_t row_count() const = 0;
  virtual size_t column_count() const = 0;
  virtual std::string_view column_name(size_t column) const = 0;
  virtual std::string_view column_type(size_t column) const = 0;
  // Writes the cell's canonical text into `text`; false when the cell is NULL.
  virtual bool cell(size_t row, size_t column, std::string& text) const = 0;
  virtual uint64_t source_line(size_t row) const = 0;
  virtual bool changed(size_t /*row*/, size_t /*column*/) const { return false; }
};

struct GridSort {
  size_t column = 0;
  bool ascending = true;
};

class DataGrid {
 public:
  // Draws the grid filling the space left; returns a sort request when the
  // user clicked a column header (nullopt column = back to source order).
  struct Events {
    std::optional<std::optional<GridSort>> sort;
    std::optional<size_t> column_clicked;   // a cell: selects its column
    std::optional<size_t> column_inspected; // a header, right-clicked: show the column's profile
  };
  Events draw(const GridSource& source, std::optional<size_t> selected_column);

  // Scrolls so that this view row is at the top (tests and "go to line").
  void scroll_to_row(size_t row) { pending_scroll_row_ = row; }
  // Scroll position and rows on screen, for tests and measurements.
  size_t first_visible_row() const { return first_visible_row_; }
  size_t visible_rows() const { return visible_rows_; }
  // Moves the view by this many rows on the next frame (test mode scrolling).
  void scroll_by_rows(long rows) { pending_scroll_delta_ += rows; }
  // Data columns are shown in windows of at most this many (an ImGui table
  // has at most 64 columns; one is the line number).
  static constexpr size_t kColumnsPerWindow = 60;

 private:
  std::optional<size_t> pending_scroll_row_;
  long pending_scroll_delta_ = 0;
  size_t first_visible_row_ = 0;
  size_t visible_rows_ = 0;
  size_t first_column_ = 0;
  std::string cell_text_;
};

// Splits a value into edge white space and the part between, so the screens
// can mark the edges. ASCII space, tab and no-break space count as edges.
struct EdgeSplit {
  std::string_view leading, core, trailing;
};
EdgeSplit split_edges(std::string_view value);

// Draws one value with its edges marked (used by the grid and the panels).
void draw_value(std::string_view value, bool is_null);

// A warning or conflict sentence, wrapped to the panel, in the warning colour.
void warning_text(const std::string& text);

// The before -> after samples of a change as a scrolling table (the Changes
// panel and the step form's preview); `height` 0 fills the space left.
void change_samples_table(const char* id, const ChangeRecord& change, const char* count_heading, float height);

}  // namespace tamis::ui
