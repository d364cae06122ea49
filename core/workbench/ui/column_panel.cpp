// The Column panel: what the selected column holds at the selected step.
// Column health is told in words and counts with small bars of our own (no
// coloured strip under the header): each fact is a line with its share.
#include <imgui.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <optional>

#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

namespace {

constexpr size_t kHistogramBins = 24;
constexpr size_t kLongestLengthShown = 40;

// Days since 1970-01-01 as YYYY-MM-DD (proleptic Gregorian), for the date
// histogram's labels. The algorithm is H. Hinnant's civil_from_days
// ("chrono-Compatible Low-Level Date Algorithms"), from memory.
std::string date_text(int64_t days) {
  days += 719468;
  const int64_t era = (days >= 0 ? days : days - 146096) / 146097;
  const int64_t day_of_era = days - era * 146097;
  const int64_t year_of_era = (day_of_era - day_of_era / 1460 + day_of_era / 36524 - day_of_era / 146096) / 365;
  const int64_t day_of_year = day_of_era - (365 * year_of_era + year_of_era / 4 - year_of_era / 100);
  const int64_t mp = (5 * day_of_year + 2) / 153;
  const int64_t day = day_of_year - (153 * mp + 2) / 5 + 1;
  const int64_t month = mp < 10 ? mp + 3 : mp - 9;
  const int64_t year = year_of_era + era * 400 + (month <= 2 ? 1 : 0);
  char text[72];
  std::snprintf(text, sizeof text, "%04lld-%02lld-%02lld", static_cast<long long>(year), static_cast<long long>(month),
                static_cast<long long>(day));
  return text;
}

size_t code_points(std::string_view text) {
  size_t count = 0;
  for (unsigned char byte : text)
    if ((byte & 0xC0) != 0x80) ++count;
  return count;
}

// One fact line: a label, the count, and a thin bar for its share of the rows.
void fact(const char* label, uint64_t count, uint64_t rows, const char* tip) {
  const float share = rows ? static_cast<float>(count) / static_cast<float>(rows) : 0.0f;
  ImGui::TextUnformatted(label);
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", tip);
  ImGui::SameLine(ImGui::GetFontSize() * 9);
  ImGui::Text("%s", count_text(count).c_str());
  ImGui::SameLine(ImGui::GetFontSize() * 14);
  const ImVec2 at = ImGui::GetCursorScreenPos();
  const float width = ImGui::GetContentRegionAvail().x;
  const float height = ImGui::GetTextLineHeight() * 0.35f;
  const float top = at.y + (ImGui::GetTextLineHeight() - height) / 2;
  ImDrawList* draw = ImGui::GetWindowDrawList();
  draw->AddRectFilled(ImVec2(at.x, top), ImVec2(at.x + width, top + height), ImGui::GetColorU32(ImGuiCol_FrameBg));
  if (count > 0)
    draw->AddRectFilled(ImVec2(at.x, top), ImVec2(at.x + std::max(2.0f, width * share), top + height), palette().bar);
  ImGui::Dummy(ImVec2(width, ImGui::GetTextLineHeight()));
}

// A small bar chart of our own: one bar per bin, the hovered bar's range and
// count in a tooltip (bin_label writes it).
template <class BinLabel>
void draw_bars(const char* id, const std::vector<float>& bins, float height, BinLabel bin_label) {
  ImGui::PushID(id);
  const ImVec2 at = ImGui::GetCursorScreenPos();
  const float width = ImGui::GetContentRegionAvail().x;
  ImGui::InvisibleButton("##bars", ImVec2(width, height));
  ImDrawList* draw = ImGui::GetWindowDrawList();
  draw->AddRectFilled(at, ImVec2(at.x + width, at.y + height), ImGui::GetColorU32(ImGuiCol_FrameBg));
  const float top = *std::max_element(bins.begin(), bins.end());
  const float step = width / static_cast<float>(bins.size());
  const float gap = step > 4 ? 1.0f : 0.0f;
  std::optional<size_t> hovered;
  if (ImGui::IsItemHovered()) {
    const float x = ImGui::GetIO().MousePos.x - at.x;
    hovered = std::min(bins.size() - 1, static_cast<size_t>(std::max(0.0f, x / step)));
  }
  for (size_t i = 0; i < bins.size(); ++i) {
    if (bins[i] <= 0 || top <= 0) continue;
    const float bar = std::max(1.0f, (height - 2) * bins[i] / top);
    const float left = at.x + step * static_cast<float>(i);
    draw->AddRectFilled(ImVec2(left + gap, at.y + height - bar), ImVec2(left + step - gap, at.y + height),
                        hovered == i ? palette().bar_selected : palette().bar);
  }
  if (hovered) ImGui::SetTooltip("%s: %s", bin_label(*hovered).c_str(), count_text(static_cast<uint64_t>(bins[*hovered])).c_str());
  ImGui::PopID();
}

void compute_shape(const Table& table, size_t column, Type profiled_type, ColumnShape& shape) {
  const Column& values = table.column(column);
  shape.histogram.clear();
  shape.lengths.assign(kLongestLengthShown + 2, 0.0f);
  std::vector<double> numbers;
  const bool typed_number = values.type() == Type::integer || values.type() == Type::decimal || values.type() == Type::date;
  const bool text_number = values.type() == Type::text && (profiled_type == Type::integer || profiled_type == Type::decimal);
  const double divisor = values.type() == Type::decimal ? std::pow(10.0, values.scale()) : 1.0;
  for (size_t k = 0; k < values.chunk_count(); ++k) {
    const ColumnChunk& chunk = values.chunk(k);
    for (size_t i = 0; i < chunk.rows; ++i) {
      if (chunk.is_null(i)) continue;
      if (typed_number) {
        numbers.push_back(static_cast<double>(chunk.numbers[i]) / divisor);
      } else if (values.type() == Type::text) {
        const std::string_view text = chunk.text(i);
        shape.lengths[std::min(code_points(text), kLongestLengthShown + 1)] += 1.0f;
        if (text_number && !text.empty()) {
          const std::string copy(text);
          char* end = nullptr;
          const double number = std::strtod(copy.c_str(), &end);
          if (end && end != copy.c_str() && *end == '\0' && std::isfinite(number)) numbers.push_back(number);
        }
      }
    }
  }
  shape.longest_shown = 0;
  for (size_t i = 0; i < shape.lengths.size(); ++i)
    if (shape.lengths[i] > 0) shape.longest_shown = i;
  shape.lengths.resize(shape.longest_shown + 1);
  if (numbers.empty()) return;
  const auto [low, high] = std::minmax_element(numbers.begin(), numbers.end());
  shape.histogram_min = *low;
  shape.histogram_max = *high;
  shape.histogram.assign(kHistogramBins, 0.0f);
  const double span = shape.histogram_max - shape.histogram_min;
  for (double number : numbers) {
    size_t bin = span > 0 ? static_cast<size_t>((number - shape.histogram_min) / span * kHistogramBins) : 0;
    shape.histogram[std::min(bin, kHistogramBins - 1)] += 1.0f;
  }
}

}  // namespace

void Workbench::State::draw_column_panel() {
  const Table* table = shown_table();
  if (!table) return;
  if (table->column_count() == 0) {
    ImGui::TextDisabled("No columns at this step.");
    return;
  }
  const size_t column = selected_column.value_or(0);
  ImGui::SetNextItemWidth(-1);
  if (ImGui::BeginCombo("##column-choice", table->name(column).c_str())) {
    for (size_t c = 0; c < table->column_count(); ++c)
      if (ImGui::Selectable((table->name(c) + "##cp" + std::to_string(c)).c_str(), c == column)) selected_column = c;
    ImGui::EndCombo();
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("The column described below (or click a cell in the Data panel).");
  const TableProfile* profile = document->profile();
  if (!profile || column >= profile->columns.size()) {
    draw_waiting("Profiling...");
    return;
  }
  const ColumnProfile& p = profile->columns[column];
  const Column& stored = table->column(column);
  ImGui::Text("Stored as %s", std::string(type_name(stored.type())).c_str());
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("The column's type at this step (text until a step reads it as numbers or dates).");
  if (stored.type() == Type::text && p.type != Type::text) {
    ImGui::SameLine();
    ImGui::TextColored(ImColor(palette().good_text), "- %.0f%% of the values read as %s", p.type_share * 100.0,
                       std::string(type_name(p.type)).c_str());
    if (ImGui::IsItemHovered())
      ImGui::SetTooltip("Share of the non-blank values that fit this type: a parse_date, parse_number or cast step can convert them.");
  }
  ImGui::Spacing();
  fact("rows", p.rows, p.rows, "Rows at this step.");
  fact("NULL", p.nulls, p.rows, "Cells with no value at all (not the same as empty text).");
  fact("blank", p.blanks, p.rows, "Cells that are empty text or only white space.");
  fact("distinct", p.distinct, p.rows, "Different values in the column.");
  fact("edge spaces", p.edge_whitespace, p.rows, "Values with white space at the start or the end.");
  fact("end punctuation", p.trailing_punctuation, p.rows, "Values whose last character is punctuation, such as a stray dot.");
  if (p.min && p.max) {
    ImGui::TextUnformatted("from");
    ImGui::SameLine();
    draw_value(*p.min, false);
    ImGui::SameLine();
    ImGui::TextUnformatted("to");
    ImGui::SameLine();
    draw_value(*p.max, false);
  }
  if (p.mean && p.std_dev) ImGui::TextDisabled("mean %.4g, standard deviation %.4g", *p.mean, *p.std_dev);

  const uint64_t serial = document->stage_serial(document->selected_stage());
  if (column_shape.serial != serial || column_shape.column != column) {
    compute_shape(*table, column, p.type, column_shape);
    column_shape.serial = serial;
    column_shape.column = column;
  }
  const float plot_height = ImGui::GetTextLineHeight() * 3.5f;
  if (!column_shape.histogram.empty()) {
    ImGui::Spacing();
    const bool dates = stored.type() == Type::date;
    const double low = column_shape.histogram_min;
    const double bin_width = (column_shape.histogram_max - low) / static_cast<double>(kHistogramBins);
    auto shown = [&](double value) {
      if (dates) return date_text(static_cast<int64_t>(std::floor(value)));
      char text[32];
      std::snprintf(text, sizeof text, "%.6g", value);
      return std::string(text);
    };
    ImGui::Text("%s from %s to %s", dates ? "Dates" : "Values", shown(low).c_str(), shown(column_shape.histogram_max).c_str());
    draw_bars("histogram", column_shape.histogram, plot_height, [&](size_t bin) {
      return shown(low + bin_width * static_cast<double>(bin)) + " to " + shown(low + bin_width * static_cast<double>(bin + 1));
    });
  }
  if (stored.type() == Type::text && !column_shape.lengths.empty()) {
    ImGui::Text("Lengths 0 to %zu%s characters", column_shape.longest_shown,
                column_shape.longest_shown > kLongestLengthShown ? "+" : "");
    draw_bars("lengths", column_shape.lengths, plot_height, [&](size_t length) {
      return length > kLongestLengthShown ? "longer than " + std::to_string(kLongestLengthShown) + " characters"
                                          : plural(length, "character", "characters");
    });
  }

  ImGui::Spacing();
  ImGui::TextUnformatted("Most frequent values");
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Click a value to show only its rows in the Data panel.");
  const uint64_t top = p.top_values.empty() ? 1 : std::max<uint64_t>(1, p.top_values.front().count);
  for (size_t i = 0; i < p.top_values.size(); ++i) {
    const ValueCount& value = p.top_values[i];
    ImGui::PushID(static_cast<int>(i));
    const ImVec2 at = ImGui::GetCursorScreenPos();
    const float width = ImGui::GetContentRegionAvail().x;
    const float share = static_cast<float>(value.count) / static_cast<float>(top);
    ImGui::GetWindowDrawList()->AddRectFilled(
        at, ImVec2(at.x + width * share, at.y + ImGui::GetTextLineHeight()), ImGui::GetColorU32(ImGuiCol_Header));
    if (ImGui::Selectable("##value", false, 0, ImVec2(width, ImGui::GetTextLineHeight()))) {
      filters.push_back({table->name(column), wb::FilterKind::equals, value.value});
      view_dirty = true;
    }
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Show only the %s rows with this value.", count_text(value.count).c_str());
    ImGui::SameLine(ImGui::GetStyle().WindowPadding.x);
    draw_value(value.value, false);
    ImGui::SameLine(width - ImGui::GetFontSize() * 4);
    ImGui::TextUnformatted(count_text(value.count).c_str());
    ImGui::PopID();
  }
  if (!p.shapes.empty()) {
    ImGui::Spacing();
    ImGui::TextUnformatted("Shapes");
    if (ImGui::IsItemHovered())
      ImGui::SetTooltip("Each value written as its kind of characters: A upper-case letters, a lower-case, 9 digits.");
    for (const ValueCount& shape : p.shapes) {
      ImGui::Bullet();
      draw_value(shape.value, false);
      ImGui::SameLine(ImGui::GetWindowContentRegionMax().x - ImGui::GetFontSize() * 4);
      ImGui::TextDisabled("%s", count_text(shape.count).c_str());
    }
  }
}

}  // namespace tamis::ui
