// The Data panel: the table as of the selected step, with a view (filters and
// sort) that never changes the recipe.
#include <imgui.h>
#include <imgui_stdlib.h>

#include <chrono>
#include <cstdio>

#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

namespace {

// Above this many rows a filtered or sorted view is made in slices in the
// background (a sort of a million rows takes more than half a second).
constexpr size_t kSlicedViewRows = 200000;

class TableGridSource final : public GridSource {
 public:
  TableGridSource(const Table& table, const std::vector<size_t>* view, const wb::StepDiff* diff,
                  const DateFormat& date_format)
      : table_(table), view_(view), diff_(diff), date_format_(date_format) {}

  size_t row_count() const override { return view_ ? view_->size() : table_.row_count(); }
  size_t column_count() const override { return table_.column_count(); }
  std::string_view column_name(size_t column) const override { return table_.name(column); }
  std::string_view column_type(size_t column) const override { return type_name(table_.column(column).type()); }
  bool cell(size_t row, size_t column, std::string& text) const override {
    const wb::CellText cell = wb::cell_text(table_, row_of(row), column, date_format_);
    text = cell.value;
    return !cell.is_null;
  }
  uint64_t source_line(size_t row) const override { return table_.source_line(row_of(row)); }
  bool changed(size_t row, size_t column) const override { return diff_ && diff_->cell_changed(row_of(row), column); }

 private:
  size_t row_of(size_t row) const { return view_ ? (*view_)[row] : row; }
  const Table& table_;
  const std::vector<size_t>* view_;
  const wb::StepDiff* diff_;
  const DateFormat& date_format_;
};

const char* filter_kind_label(wb::FilterKind kind) {
  switch (kind) {
    case wb::FilterKind::contains: return "contains";
    case wb::FilterKind::equals: return "equals";
    case wb::FilterKind::is_null: return "is NULL";
    case wb::FilterKind::is_empty: return "is empty text";
    case wb::FilterKind::not_null: return "is not NULL";
    case wb::FilterKind::edge_space: return "has spaces at an end";
  }
  return "";
}

constexpr wb::FilterKind kFilterKinds[] = {wb::FilterKind::contains, wb::FilterKind::equals, wb::FilterKind::is_null,
                                           wb::FilterKind::is_empty, wb::FilterKind::not_null, wb::FilterKind::edge_space};

bool filter_takes_text(wb::FilterKind kind) { return kind == wb::FilterKind::contains || kind == wb::FilterKind::equals; }

}  // namespace

void Workbench::State::refresh_view() {
  const Table* table = shown_table();
  if (!table) return;
  const size_t stage = document->selected_stage();
  const uint64_t serial = document->stage_serial(stage);
  if (!date_format) {
    Result<DateFormat> compiled = DateFormat::compile(document->recipe().output.date_format);
    if (compiled) date_format = compiled.value();
  }
  if (view_dirty || view_serial != serial) {
    // Filters and the sort name a column; at a step without it they are dropped.
    std::vector<wb::RowFilter> row_filters;
    std::erase_if(filters, [&](const ViewFilter& filter) { return !table->find(filter.column); });
    for (const ViewFilter& filter : filters) row_filters.push_back({*table->find(filter.column), filter.kind, filter.text});
    std::vector<wb::SortKey> keys;
    if (sort && !table->find(sort->column)) sort.reset();
    if (sort) keys.push_back({*table->find(sort->column), sort->descending});
    if (selected_column && *selected_column >= table->column_count()) selected_column.reset();
    view_is_all = filters.empty() && !sort;
    view_computing = false;
    ++view_request;
    if (view_is_all) {
      view.clear();
    } else if (date_format && table->row_count() > kSlicedViewRows) {
      // Every row in file order until the job delivers the view.
      view_is_all = true;
      view.clear();
      view_computing = true;
      const uint64_t request = view_request;
      const auto started = std::chrono::steady_clock::now();
      queue(std::make_unique<wb::RowViewJob>(*table, std::move(row_filters), std::move(keys), *date_format),
            [this, request, serial, started](wb::Job& done) {
              if (request != view_request || serial != view_serial) return;
              view = static_cast<wb::RowViewJob&>(done).take_result();
              view_is_all = false;
              view_computing = false;
              const double ms = std::chrono::duration<double, std::milli>(std::chrono::steady_clock::now() - started).count();
              char took[32];
              std::snprintf(took, sizeof took, "%.0f ms", ms);
              say("View: " + count_text(view.size()) + " rows (made in the background in " + took + ")");
            });
    } else if (date_format) {
      view = wb::make_row_view(*table, row_filters, keys, *date_format);
    }
    view_serial = serial;
    view_dirty = false;
  }
  // The cells the selected step changed: stage k against stage k - 1 (once
  // that is at hand again, when the model had dropped it).
  if (diff_serial != serial) {
    diff.reset();
    if (stage == 0) {
      diff_serial = serial;
    } else if (document->stage_ready(stage - 1)) {
      diff = std::make_unique<wb::StepDiff>(document->table_at(stage - 1), *table);
      diff_serial = serial;
    }
  }
}

void Workbench::State::draw_filter_bar() {
  const Table* table = shown_table();
  if (!table || table->column_count() == 0) return;
  if (new_filter.column >= table->column_count()) new_filter.column = 0;
  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted("Rows where");
  ImGui::SameLine();
  ImGui::SetNextItemWidth(ImGui::GetFontSize() * 7);
  if (ImGui::BeginCombo("##filter-column", table->name(new_filter.column).c_str())) {
    for (size_t c = 0; c < table->column_count(); ++c)
      if (ImGui::Selectable((table->name(c) + "##f" + std::to_string(c)).c_str(), c == new_filter.column)) new_filter.column = c;
    ImGui::EndCombo();
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("The column to test.");
  ImGui::SameLine();
  ImGui::SetNextItemWidth(ImGui::GetFontSize() * 7);
  if (ImGui::BeginCombo("##filter-kind", filter_kind_label(new_filter.kind))) {
    for (wb::FilterKind kind : kFilterKinds)
      if (ImGui::Selectable(filter_kind_label(kind), kind == new_filter.kind)) new_filter.kind = kind;
    ImGui::EndCombo();
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("How to test it. Text is compared exactly, letter case included.");
  bool apply = false;
  if (filter_takes_text(new_filter.kind)) {
    ImGui::SameLine();
    ImGui::SetNextItemWidth(ImGui::GetFontSize() * 7);
    if (focus_filter) {
      ImGui::SetKeyboardFocusHere();
      focus_filter = false;
    }
    apply = ImGui::InputTextWithHint("##filter-text", "text", &new_filter.text, ImGuiInputTextFlags_EnterReturnsTrue);
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Press Enter to filter (Ctrl+F comes here).");
  }
  focus_filter = false;
  ImGui::SameLine();
  apply |= ImGui::Button("Filter");
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Show only matching rows. This changes the view, not the recipe.");
  if (apply) {
    filters.push_back({table->name(new_filter.column), new_filter.kind, new_filter.text});
    view_dirty = true;
  }
  if (!filters.empty() || sort) {
    ImGui::SameLine();
    if (ImGui::Button("Show all rows")) {
      filters.clear();
      sort.reset();
      view_dirty = true;
    }
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Remove every filter and the sort: back to the rows in file order.");
  }
  for (size_t i = 0; i < filters.size(); ++i) {
    const ViewFilter& filter = filters[i];
    std::string chip = filter.column + " " + filter_kind_label(filter.kind);
    if (filter_takes_text(filter.kind)) chip += " \"" + filter.text + "\"";
    chip += "  \xC3\x97##chip" + std::to_string(i);  // ×
    if (i > 0) ImGui::SameLine();
    if (ImGui::SmallButton(chip.c_str())) {
      filters.erase(filters.begin() + static_cast<std::ptrdiff_t>(i));
      view_dirty = true;
      break;
    }
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Click to remove this filter.");
  }
}

void Workbench::State::draw_data_panel() {
  if (!document) return;
  const size_t stage = document->selected_stage();
  ImGui::TextUnformatted("Data");
  ImGui::SameLine();
  ImGui::TextDisabled(stage == 0 ? "the file as read" : "as of step %zu", stage);
  const Table* table = shown_table();
  if (!table) {
    draw_waiting("Working out the table as of this step...");
    return;
  }
  refresh_view();
  if (!view_is_all) {
    ImGui::SameLine();
    ImGui::TextDisabled("| showing %s of %s", count_text(view.size()).c_str(), count_text(table->row_count()).c_str());
  } else if (view_computing && !work_stopped) {
    ImGui::SameLine();
    ImGui::TextDisabled("| filtering and sorting in the background...");
  }
  if (diff) {
    ImGui::SameLine();
    ImGui::TextDisabled("| cells this step changed are highlighted");
  }
  draw_filter_bar();
  if (!date_format) return;
  const TableGridSource source(*table, view_is_all ? nullptr : &view, diff.get(), *date_format);
  const DataGrid::Events events = grid.draw(source, selected_column);
  if (events.sort) {
    if (*events.sort) {
      sort = ViewSort{table->name((*events.sort)->column), !(*events.sort)->ascending};
    } else {
      sort.reset();
    }
    view_dirty = true;
  }
  if (events.column_clicked) selected_column = events.column_clicked;
  if (events.column_inspected) {
    selected_column = events.column_inspected;
    side = SidePanel::column;
    side_forced = true;
  }
}

}  // namespace tamis::ui
