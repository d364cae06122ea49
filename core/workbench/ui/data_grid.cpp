#include "data_grid.hpp"

#include <imgui.h>

#include <algorithm>
#include <cstdio>

#include "look.hpp"
#include "text_format.hpp"

namespace tamis::ui {
namespace {

// Length of the edge white-space character at the start of s, or 0.
size_t edge_space_at_start(std::string_view s) {
  if (s.empty()) return 0;
  if (s[0] == ' ' || s[0] == '\t') return 1;
  if (s.size() >= 2 && static_cast<unsigned char>(s[0]) == 0xC2 && static_cast<unsigned char>(s[1]) == 0xA0) return 2;
  return 0;
}

size_t edge_space_at_end(std::string_view s) {
  if (s.empty()) return 0;
  if (s.back() == ' ' || s.back() == '\t') return 1;
  if (s.size() >= 2 && static_cast<unsigned char>(s[s.size() - 2]) == 0xC2 &&
      static_cast<unsigned char>(s.back()) == 0xA0)
    return 2;
  return 0;
}

// One visible mark per edge character: a middle dot for a space, an arrow for
// a tab, a degree-like ring for a no-break space.
std::string edge_marks(std::string_view edge) {
  std::string marks;
  size_t i = 0;
  while (i < edge.size()) {
    if (edge[i] == ' ') {
      marks += "\xC2\xB7";  // ·
      ++i;
    } else if (edge[i] == '\t') {
      marks += "\xE2\x86\x92";  // →
      ++i;
    } else {
      marks += "\xE2\x90\xA3";  // ␣ for the no-break space
      i += 2;
    }
  }
  return marks;
}

}  // namespace

EdgeSplit split_edges(std::string_view value) {
  size_t start = 0;
  while (size_t n = edge_space_at_start(value.substr(start))) start += n;
  size_t end = value.size();
  while (end > start) {
    size_t n = edge_space_at_end(value.substr(start, end - start));
    if (n == 0) break;
    end -= n;
  }
  return {value.substr(0, start), value.substr(start, end - start), value.substr(end)};
}

void draw_value(std::string_view value, bool is_null) {
  const Palette& colours = palette();
  if (is_null) {
    ImGui::PushStyleColor(ImGuiCol_Text, colours.null_cell);
    ImGui::TextUnformatted("\xE2\x88\x85 NULL");  // ∅ NULL
    ImGui::PopStyleColor();
    return;
  }
  if (value.empty()) {
    ImGui::PushStyleColor(ImGuiCol_Text, colours.empty_cell);
    ImGui::TextUnformatted("\xE2\x80\x9C\xE2\x80\x9D empty");  // “” empty
    ImGui::PopStyleColor();
    return;
  }
  const EdgeSplit parts = split_edges(value);
  // Line breaks inside a value would break the row height: show them as ↵.
  std::string core;
  if (parts.core.find_first_of("\r\n") != std::string_view::npos) {
    for (char c : parts.core) {
      if (c == '\n') {
        core += "\xE2\x86\xB5";
      } else if (c != '\r') {
        core += c;
      }
    }
  }
  const std::string_view shown = core.empty() ? parts.core : std::string_view(core);
  if (!parts.leading.empty()) {
    ImGui::PushStyleColor(ImGuiCol_Text, colours.edge_space);
    const std::string marks = edge_marks(parts.leading);
    ImGui::TextUnformatted(marks.data(), marks.data() + marks.size());
    ImGui::PopStyleColor();
    ImGui::SameLine(0, 0);
  }
  ImGui::TextUnformatted(shown.data(), shown.data() + shown.size());
  if (!parts.trailing.empty()) {
    ImGui::SameLine(0, 0);
    ImGui::PushStyleColor(ImGuiCol_Text, colours.edge_space);
    const std::string marks = edge_marks(parts.trailing);
    ImGui::TextUnformatted(marks.data(), marks.data() + marks.size());
    ImGui::PopStyleColor();
  }
}

void warning_text(const std::string& text) {
  ImGui::PushStyleColor(ImGuiCol_Text, palette().error_text);
  ImGui::PushTextWrapPos(0.0f);
  ImGui::TextUnformatted(text.c_str());
  ImGui::PopTextWrapPos();
  ImGui::PopStyleColor();
}

void change_samples_table(const char* id, const ChangeRecord& change, const char* count_heading, float height) {
  constexpr ImGuiTableFlags flags =
      ImGuiTableFlags_RowBg | ImGuiTableFlags_BordersInnerV | ImGuiTableFlags_ScrollY | ImGuiTableFlags_Resizable;
  if (!ImGui::BeginTable(id, 4, flags, ImVec2(0, height))) return;
  ImGui::TableSetupScrollFreeze(0, 1);
  ImGui::TableSetupColumn("column");
  ImGui::TableSetupColumn("before");
  ImGui::TableSetupColumn("after");
  ImGui::TableSetupColumn(count_heading, ImGuiTableColumnFlags_WidthFixed, ImGui::GetFontSize() * 4);
  ImGui::TableHeadersRow();
  for (const ValueChange& sample : change.samples()) {
    ImGui::TableNextRow();
    ImGui::TableNextColumn();
    ImGui::TextUnformatted(sample.column.c_str());
    ImGui::TableNextColumn();
    draw_value(sample.before, sample.before == "NULL");
    ImGui::TableNextColumn();
    draw_value(sample.after, sample.after == "NULL");
    ImGui::TableNextColumn();
    ImGui::TextUnformatted(count_text(sample.count).c_str());
  }
  ImGui::EndTable();
}

DataGrid::Events DataGrid::draw(const GridSource& source, std::optional<size_t> selected_column) {
  Events events;
  const size_t columns = source.column_count();
  if (columns > kColumnsPerWindow) {
    int first = static_cast<int>(first_column_);
    const int last_start = static_cast<int>(columns - kColumnsPerWindow);
    ImGui::SetNextItemWidth(ImGui::GetFontSize() * 16);
    if (ImGui::SliderInt("##first-column", &first, 0, last_start, "from column %d")) first_column_ = first;
    if (ImGui::IsItemHovered())
      ImGui::SetTooltip("This file has %zu columns; the grid shows %zu at a time starting here.", columns,
                        kColumnsPerWindow);
  } else {
    first_column_ = 0;
  }
  const size_t shown_columns = std::min(columns - std::min(first_column_, columns), kColumnsPerWindow);

  const ImGuiTableFlags flags = ImGuiTableFlags_ScrollX | ImGuiTableFlags_ScrollY | ImGuiTableFlags_RowBg |
                                ImGuiTableFlags_BordersInnerV | ImGuiTableFlags_BordersOuter |
                                ImGuiTableFlags_Resizable | ImGuiTableFlags_Sortable |
                                ImGuiTableFlags_SortTristate;
  if (!ImGui::BeginTable("##data-grid", static_cast<int>(shown_columns + 1), flags)) return events;
  ImGui::TableSetupScrollFreeze(1, 1);
  ImGui::TableSetupColumn("line", ImGuiTableColumnFlags_WidthFixed | ImGuiTableColumnFlags_NoHide |
                                      ImGuiTableColumnFlags_NoSort,
                          ImGui::GetFontSize() * 4.0f);
  for (size_t k = 0; k < shown_columns; ++k) {
    const size_t c = first_column_ + k;
    std::string label(source.column_name(c));
    label += "##col";
    label += std::to_string(c);
    ImGui::TableSetupColumn(label.c_str(), ImGuiTableColumnFlags_WidthFixed, ImGui::GetFontSize() * 9.0f);
  }

  // Header row by hand so each header carries its type and a tooltip.
  ImGui::TableNextRow(ImGuiTableRowFlags_Headers);
  ImGui::TableSetColumnIndex(0);
  ImGui::TableHeader("line");
  if (ImGui::IsItemHovered())
    ImGui::SetTooltip("The line in the source file where the row's record starts (what a text editor shows).");
  for (size_t k = 0; k < shown_columns; ++k) {
    const size_t c = first_column_ + k;
    ImGui::TableSetColumnIndex(static_cast<int>(k + 1));
    if (selected_column == c) ImGui::TableSetBgColor(ImGuiTableBgTarget_CellBg, ImGui::GetColorU32(ImGuiCol_HeaderActive));
    std::string label(source.column_name(c));
    label += "##col";
    label += std::to_string(c);
    ImGui::TableHeader(label.c_str());
    if (ImGui::IsItemClicked(ImGuiMouseButton_Right)) events.column_inspected = c;
    if (ImGui::IsItemHovered()) {
      const std::string_view name = source.column_name(c);
      const std::string_view type = source.column_type(c);
      ImGui::SetTooltip("%.*s (%.*s)\nClick to sort the view (the recipe is not changed); right-click to inspect the column.",
                        static_cast<int>(name.size()), name.data(), static_cast<int>(type.size()), type.data());
    }
  }

  if (ImGuiTableSortSpecs* specs = ImGui::TableGetSortSpecs(); specs && specs->SpecsDirty) {
    if (specs->SpecsCount == 0) {
      events.sort = std::optional<GridSort>();
    } else {
      const ImGuiTableColumnSortSpecs& spec = specs->Specs[0];
      events.sort = std::optional<GridSort>(GridSort{first_column_ + static_cast<size_t>(spec.ColumnIndex - 1),
                                                     spec.SortDirection != ImGuiSortDirection_Descending});
    }
    specs->SpecsDirty = false;
  }

  const float row_height = ImGui::GetTextLineHeight() + ImGui::GetStyle().CellPadding.y * 2.0f;
  if (pending_scroll_row_) {
    ImGui::SetScrollY(static_cast<float>(*pending_scroll_row_) * row_height);
    pending_scroll_row_.reset();
  }
  if (pending_scroll_delta_ != 0) {
    ImGui::SetScrollY(std::max(0.0f, ImGui::GetScrollY() + static_cast<float>(pending_scroll_delta_) * row_height));
    pending_scroll_delta_ = 0;
  }

  const Palette& colours = palette();
  ImGuiListClipper clipper;
  clipper.Begin(static_cast<int>(source.row_count()), row_height);
  bool first_range = true;
  while (clipper.Step()) {
    if (first_range) {
      first_visible_row_ = static_cast<size_t>(clipper.DisplayStart);
      visible_rows_ = static_cast<size_t>(clipper.DisplayEnd - clipper.DisplayStart);
      first_range = false;
    }
    for (int row = clipper.DisplayStart; row < clipper.DisplayEnd; ++row) {
      const size_t r = static_cast<size_t>(row);
      ImGui::TableNextRow(ImGuiTableRowFlags_None, row_height);
      ImGui::TableSetColumnIndex(0);
      ImGui::TextDisabled("%llu", static_cast<unsigned long long>(source.source_line(r)));
      for (size_t k = 0; k < shown_columns; ++k) {
        const size_t c = first_column_ + k;
        if (!ImGui::TableSetColumnIndex(static_cast<int>(k + 1))) continue;
        if (source.changed(r, c)) ImGui::TableSetBgColor(ImGuiTableBgTarget_CellBg, colours.changed_cell_bg);
        const bool present = source.cell(r, c, cell_text_);
        draw_value(cell_text_, !present);
        if (ImGui::IsItemClicked()) events.column_clicked = c;
      }
    }
  }
  ImGui::EndTable();
  return events;
}

}  // namespace tamis::ui
