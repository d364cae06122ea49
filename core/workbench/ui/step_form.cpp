#include "step_form.hpp"

#include <imgui.h>
#include <imgui_stdlib.h>

#include <algorithm>
#include <cstdlib>
#include <sstream>

#include "data_grid.hpp"
#include "look.hpp"
#include "text_format.hpp"

namespace tamis::ui {
namespace {

// Rows previewed at once; the counts say when they are not the whole table.
constexpr size_t kPreviewRows = 50000;

const char* const kOnErrorTip =
    "What happens to a value that cannot be read: null = it becomes NULL, keep = it stays as it is (the column stays text), reject = the row goes to the rejects with its line.";

std::vector<StepSpec> make_specs() {
  using K = FieldKind;
  return {
      {"trim", "Trim white space at the ends",
       {{"columns", K::columns, "Columns", "The text columns to trim."},
        {"side", K::choice, "Side", "Which end of each value to trim.", {"both", "leading", "trailing"}},
        {"chars", K::optional_text, "Only these characters", "Leave empty to trim Unicode white space; otherwise exactly the characters typed here are removed."}}},
      {"collapse_spaces", "Collapse inner spaces",
       {{"columns", K::columns, "Columns", "Runs of white space inside these columns become one space."}}},
      {"change_case", "Change letter case",
       {{"columns", K::columns, "Columns", "The text columns to convert."},
        {"to", K::choice, "To", "lower, UPPER or Title Case (Unicode full case mapping).", {"lower", "upper", "title"}},
        {"locale", K::optional_text, "Locale", "Only for languages with their own rules (e.g. tr, lt); leave empty otherwise."}}},
      {"normalize_unicode", "Normalize Unicode",
       {{"columns", K::columns, "Columns", "The text columns to normalize."},
        {"form", K::choice, "Form", "NFC joins letters and accents; NFKC also folds look-alike forms (ligatures, full-width digits).", {"NFC", "NFKC"}},
        {"strip_accents", K::boolean, "Remove accents", "Also drop accents and other combining marks (é becomes e)."}}},
      {"replace_text", "Replace text",
       {{"columns", K::columns, "Columns", "The text columns to search."},
        {"find", K::text, "Find", "The text to look for (a regular expression when match is regex)."},
        {"replace", K::text, "Replace with", "The new text; empty deletes what was found."},
        {"match", K::choice, "Match", "literal: every occurrence; entire: whole values only; regex: ICU regular expression.", {"literal", "entire", "regex"}}}},
      {"map_values", "Map values to preferred spellings",
       {{"column", K::column, "Column", "The column whose values are mapped."},
        {"map", K::value_map, "Map", "One pair per line: old value => new value."},
        {"ignore_case", K::boolean, "Ignore letter case", "Also map values that differ from an old value only in letter case."}}},
      {"to_null", "Turn placeholders into NULL",
       {{"columns", K::columns, "Columns", "The columns to check."},
        {"values", K::text_lines, "Values", "One per line: exact values that mean 'no value' (e.g. N/A)."},
        {"blank", K::boolean, "Blank values too", "Also turn empty values and values of only white space into NULL."}}},
      {"split_column", "Split a column",
       {{"column", K::column, "Column", "The text column to split."},
        {"separator", K::text, "Separator", "The text between the parts."},
        {"into", K::text_lines, "New columns", "One name per line, in order."}}},
      {"keep_rows", "Keep rows where a condition holds",
       {{"where", K::expression, "Condition", "An SQL condition, e.g. planted_count > 0 AND site IS NOT NULL. Rows where it is false or unknown (NULL) are removed."}}},
      {"drop_rows", "Remove rows where a condition holds",
       {{"where", K::expression, "Condition", "An SQL condition, e.g. status = 'Test'. Rows where it is true are removed; false or unknown rows stay."}}},
      {"derive_column", "Add a computed column",
       {{"name", K::text, "New column", "The name of the column to add."},
        {"expr", K::expression, "Expression", "An SQL expression over the other columns, e.g. planted_count * survival_pct / 100."}}},
      {"parse_date", "Read text as dates",
       {{"column", K::column, "Column", "The text column holding dates."},
        {"formats", K::text_lines, "Formats", "One strptime format per line, tried in order, e.g. %Y-%m-%d or %m/%d/%Y. %Y is four digits, %y two."},
        {"on_error", K::choice, "Unreadable values", kOnErrorTip, {"null", "keep", "reject"}}}},
      {"parse_number", "Read text as numbers",
       {{"column", K::column, "Column", "The text column holding numbers."},
        {"decimal_mark", K::choice, "Decimal mark", "The character before the decimals.", {".", ","}},
        {"group_mark", K::optional_text, "Group mark", "The thousands separator, if any: , . ' or a space."},
        {"strip", K::optional_text, "Remove characters", "Characters to remove first, e.g. currency signs."},
        {"percent", K::boolean, "Percent", "Values are percentages: 36% becomes 0.36."},
        {"scale", K::optional_integer, "Decimals", "Keep this many decimals (leave empty to decide from the data)."},
        {"on_error", K::choice, "Unreadable values", kOnErrorTip, {"null", "keep", "reject"}}}},
      {"cast", "Convert to another type",
       {{"column", K::column, "Column", "The column to convert."},
        {"to", K::choice, "To", "The new type, converted as SQL CAST does.", {"integer", "decimal", "date", "boolean", "text"}},
        {"scale", K::optional_integer, "Decimals", "For decimal: the number of decimals (0 to 18)."},
        {"on_error", K::choice, "Unconvertible values", kOnErrorTip, {"null", "keep", "reject"}}}},
      {"fill_from_group", "Fill NULLs from matching rows",
       {{"column", K::column, "Column", "The column whose NULLs are filled."},
        {"keys", K::columns, "Matching on", "Rows with equal values here form a group; a NULL is filled only when the group agrees on one value."}}},
      {"carry_forward", "Fill NULLs from the row above",
       {{"column", K::column, "Column", "The column whose NULLs take the last value above them."},
        {"group_by", K::columns, "Within groups of", "Optional: only carry values within rows that share these columns."}}},
      {"deduplicate", "Remove repeated rows",
       {{"columns", K::columns_or_all, "Compare", "Rows that are equal in these columns repeat each other (all ticked: whole rows)."},
        {"keep", K::choice, "Keep", "Which of the repeated rows stays.", {"first", "last"}},
        {"compare", K::choice, "Equal means", "exact; trimmed: spaces at the ends ignored; casefold: letter case ignored too.", {"exact", "trimmed", "casefold"}}}},
      {"require", "Check a rule",
       {{"rule", K::choice, "Rule", "not_null, unique, in_set (allowed values), pattern (regular expression), range (min/max), row_count.", {"not_null", "unique", "in_set", "pattern", "range", "row_count"}},
        {"columns", K::columns, "Columns", "The columns the rule checks (none for row_count)."},
        {"values", K::text_lines, "Allowed values", "in_set: one allowed value per line."},
        {"pattern", K::optional_text, "Pattern", "pattern: an ICU regular expression each value must match whole."},
        {"min", K::optional_bound, "Minimum", "range or row_count: the lowest allowed value (a number, or a date as YYYY-MM-DD)."},
        {"max", K::optional_bound, "Maximum", "range or row_count: the highest allowed value."},
        {"on_fail", K::choice, "When it fails", "stop: the run fails; reject: failing rows go to the rejects; warn: only reported.", {"stop", "reject", "warn"}}}},
      {"drop_columns", "Remove columns",
       {{"columns", K::columns, "Columns", "The columns to remove."}}},
      {"rename_columns", "Rename columns",
       {{"map", K::value_map, "Names", "One pair per line: old name => new name."}}},
      {"reorder_columns", "Reorder columns",
       {{"columns", K::column_order, "Order", "Every column, one per line, in the order wanted."}}},
  };
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);)
    if (!line.empty()) lines.push_back(line);
  return lines;
}

void tooltip(std::string_view text) {
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("%.*s", static_cast<int>(text.size()), text.data());
}

}  // namespace

std::span<const StepSpec> step_specs() {
  static const std::vector<StepSpec> specs = make_specs();
  return specs;
}

const StepSpec* find_step_spec(std::string_view op) {
  for (const StepSpec& spec : step_specs())
    if (spec.op == op) return &spec;
  return nullptr;
}

std::optional<size_t> error_character(std::string_view message) {
  const std::string_view marker = "at character ";
  const size_t at = message.find(marker);
  if (at == std::string_view::npos) return std::nullopt;
  size_t i = at + marker.size();
  size_t value = 0;
  bool digits = false;
  while (i < message.size() && message[i] >= '0' && message[i] <= '9') {
    value = value * 10 + static_cast<size_t>(message[i] - '0');
    digits = true;
    ++i;
  }
  if (!digits) return std::nullopt;
  return value;
}

void StepForm::open_new(const StepSpec& spec, size_t position, const Schema& columns, const nlohmann::json* prefill) {
  spec_ = &spec;
  edited_step_.reset();
  position_ = position;
  columns_ = columns;
  values_.assign(spec.fields.size(), FieldValue{});
  for (size_t i = 0; i < spec.fields.size(); ++i) {
    values_[i].ticked.assign(columns.size(), 0);
    if (spec.fields[i].kind == FieldKind::column_order)
      for (const ColumnSchema& column : columns) values_[i].text += column.name + "\n";
  }
  note_.clear();
  visible_ = true;
  just_opened_ = true;
  preview_stale_ = true;
  preview_.reset();
  if (prefill) fill_from(*prefill);
}

void StepForm::open_edit(size_t step, const nlohmann::json& definition, const Schema& columns) {
  const auto op = definition.find("op");
  const StepSpec* spec = op != definition.end() && op->is_string() ? find_step_spec(op->get<std::string>()) : nullptr;
  if (!spec) return;
  open_new(*spec, step, columns);
  edited_step_ = step;
  fill_from(definition);
}

void StepForm::fill_from(const nlohmann::json& definition) {
  const auto note = definition.find("note");
  note_ = note != definition.end() && note->is_string() ? note->get<std::string>() : std::string();
  auto column_index = [&](const std::string& name) -> std::optional<size_t> {
    for (size_t c = 0; c < columns_.size(); ++c)
      if (columns_[c].name == name) return c;
    return std::nullopt;
  };
  for (size_t i = 0; i < spec_->fields.size(); ++i) {
    const FieldSpec& field = spec_->fields[i];
    FieldValue& value = values_[i];
    const auto found = definition.find(std::string(field.key));
    if (found == definition.end()) continue;
    const nlohmann::json& v = *found;
    switch (field.kind) {
      case FieldKind::columns:
      case FieldKind::columns_or_all:
        if (v.is_string() && v.get<std::string>() == "*") {
          std::fill(value.ticked.begin(), value.ticked.end(), 1);
        } else if (v.is_array()) {
          for (const auto& name : v)
            if (name.is_string())
              if (auto c = column_index(name.get<std::string>())) value.ticked[*c] = 1;
        }
        break;
      case FieldKind::column:
        if (v.is_string())
          if (auto c = column_index(v.get<std::string>())) value.choice = static_cast<int>(*c);
        break;
      case FieldKind::choice:
        for (size_t k = 0; k < field.choices.size(); ++k)
          if (v.is_string() && v.get<std::string>() == field.choices[k]) value.choice = static_cast<int>(k);
        break;
      case FieldKind::text:
      case FieldKind::optional_text:
      case FieldKind::expression:
        if (v.is_string()) value.text = v.get<std::string>();
        break;
      case FieldKind::text_lines:
      case FieldKind::column_order:
        value.text.clear();
        if (v.is_array())
          for (const auto& item : v)
            if (item.is_string()) value.text += item.get<std::string>() + "\n";
        break;
      case FieldKind::boolean:
        if (v.is_boolean()) value.flag = v.get<bool>();
        break;
      case FieldKind::optional_integer:
      case FieldKind::optional_bound:
        value.text = v.is_string() ? v.get<std::string>() : v.dump();
        break;
      case FieldKind::value_map:
        value.text.clear();
        if (v.is_object())
          for (auto it = v.begin(); it != v.end(); ++it)
            value.text += it.key() + " => " + (it.value().is_string() ? it.value().get<std::string>() : it.value().dump()) + "\n";
        break;
    }
  }
}

nlohmann::json StepForm::definition() const {
  nlohmann::json step = nlohmann::json::object();
  if (!spec_) return step;
  step["op"] = std::string(spec_->op);
  for (size_t i = 0; i < spec_->fields.size(); ++i) {
    const FieldSpec& field = spec_->fields[i];
    const FieldValue& value = values_[i];
    const std::string key(field.key);
    switch (field.kind) {
      case FieldKind::columns:
      case FieldKind::columns_or_all: {
        nlohmann::json names = nlohmann::json::array();
        for (size_t c = 0; c < columns_.size(); ++c)
          if (value.ticked[c]) names.push_back(columns_[c].name);
        const bool all = !columns_.empty() && names.size() == columns_.size();
        if (field.kind == FieldKind::columns_or_all && all) {
          step[key] = "*";
        } else if (!names.empty() || spec_->op != "require") {
          // An empty group_by is the same as none; require's row_count takes no columns.
          if (!(names.empty() && spec_->op == "carry_forward")) step[key] = names;
        }
        break;
      }
      case FieldKind::column:
        if (static_cast<size_t>(value.choice) < columns_.size()) step[key] = columns_[static_cast<size_t>(value.choice)].name;
        break;
      case FieldKind::choice:
        step[key] = std::string(field.choices[static_cast<size_t>(value.choice)]);
        break;
      case FieldKind::text:
      case FieldKind::expression:
        step[key] = value.text;
        break;
      case FieldKind::optional_text:
        if (!value.text.empty()) step[key] = value.text;
        break;
      case FieldKind::text_lines:
      case FieldKind::column_order: {
        const std::vector<std::string> lines = lines_of(value.text);
        // require takes values only for in_set; an empty list elsewhere is left out.
        if (!lines.empty() || spec_->op != "require") step[key] = lines;
        break;
      }
      case FieldKind::boolean:
        step[key] = value.flag;
        break;
      case FieldKind::optional_integer:
        if (!value.text.empty()) step[key] = std::strtoll(value.text.c_str(), nullptr, 10);
        break;
      case FieldKind::optional_bound:
        if (!value.text.empty()) {
          char* end = nullptr;
          const double number = std::strtod(value.text.c_str(), &end);
          if (end && *end == '\0') {
            if (value.text.find_first_of(".eE") == std::string::npos) {
              step[key] = std::strtoll(value.text.c_str(), nullptr, 10);
            } else {
              step[key] = number;
            }
          } else {
            step[key] = value.text;
          }
        }
        break;
      case FieldKind::value_map: {
        nlohmann::json map = nlohmann::json::object();
        for (const std::string& line : lines_of(value.text)) {
          const size_t arrow = line.find(" => ");
          if (arrow == std::string::npos) continue;
          map[line.substr(0, arrow)] = line.substr(arrow + 4);
        }
        step[key] = map;
        break;
      }
    }
  }
  if (!note_.empty()) step["note"] = note_;
  return step;
}

bool StepForm::draw_field(const FieldSpec& field, FieldValue& value) {
  bool changed = false;
  ImGui::PushID(field.key.data(), field.key.data() + field.key.size());
  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted(field.label.data(), field.label.data() + field.label.size());
  tooltip(field.tooltip);
  ImGui::SameLine(ImGui::GetFontSize() * 10);
  const float width = -1;
  switch (field.kind) {
    case FieldKind::columns:
    case FieldKind::columns_or_all: {
      ImGui::BeginGroup();
      const float wrap = ImGui::GetContentRegionAvail().x;
      float used = 0;
      for (size_t c = 0; c < columns_.size(); ++c) {
        const std::string& name = columns_[c].name;
        const float item = ImGui::CalcTextSize(name.c_str()).x + ImGui::GetFrameHeight() * 2;
        if (c > 0 && used + item < wrap) {
          ImGui::SameLine();
        } else {
          used = 0;
        }
        used += item;
        bool ticked = value.ticked[c] != 0;
        if (ImGui::Checkbox((name + "##c" + std::to_string(c)).c_str(), &ticked)) {
          value.ticked[c] = ticked ? 1 : 0;
          changed = true;
        }
        tooltip(type_name(columns_[c].type));
      }
      ImGui::EndGroup();
      break;
    }
    case FieldKind::column: {
      ImGui::SetNextItemWidth(width);
      const char* shown = static_cast<size_t>(value.choice) < columns_.size()
                              ? columns_[static_cast<size_t>(value.choice)].name.c_str()
                              : "";
      if (ImGui::BeginCombo("##column", shown)) {
        for (size_t c = 0; c < columns_.size(); ++c)
          if (ImGui::Selectable((columns_[c].name + "##" + std::to_string(c)).c_str(), value.choice == static_cast<int>(c))) {
            value.choice = static_cast<int>(c);
            changed = true;
          }
        ImGui::EndCombo();
      }
      break;
    }
    case FieldKind::choice:
      for (size_t k = 0; k < field.choices.size(); ++k) {
        if (k > 0) ImGui::SameLine();
        const std::string label(field.choices[k]);
        if (ImGui::RadioButton(label.c_str(), value.choice == static_cast<int>(k))) {
          value.choice = static_cast<int>(k);
          changed = true;
        }
      }
      break;
    case FieldKind::text:
    case FieldKind::optional_text:
    case FieldKind::optional_integer:
    case FieldKind::optional_bound:
      ImGui::SetNextItemWidth(width);
      changed = ImGui::InputText("##text", &value.text);
      break;
    case FieldKind::text_lines:
    case FieldKind::column_order:
    case FieldKind::value_map:
      changed = ImGui::InputTextMultiline("##lines", &value.text, ImVec2(-1, ImGui::GetTextLineHeight() * 5));
      break;
    case FieldKind::boolean:
      changed = ImGui::Checkbox("##flag", &value.flag);
      break;
    case FieldKind::expression: {
      ImGui::SetNextItemWidth(width);
      changed = ImGui::InputText("##expr", &value.text);
      // The parse error's position, under the text.
      if (preview_ && preview_->problem && preview_->problem->key == field.key) {
        if (const std::optional<size_t> at = error_character(preview_->problem->message)) {
          const float left = ImGui::GetItemRectMin().x + ImGui::GetStyle().FramePadding.x;
          const size_t before = std::min(value.text.size(), *at > 0 ? *at - 1 : 0);
          const float x = left + ImGui::CalcTextSize(value.text.c_str(), value.text.c_str() + before).x;
          ImGui::SetCursorScreenPos(ImVec2(x, ImGui::GetCursorScreenPos().y));
          ImGui::TextColored(ImColor(palette().error_text), "\xE2\x96\xB2 here");  // ▲
        }
      }
      break;
    }
  }
  ImGui::PopID();
  return changed;
}

std::optional<std::pair<nlohmann::json, size_t>> StepForm::take_full_count_request() {
  if (!full_count_requested_) return std::nullopt;
  full_count_requested_ = false;
  counting_ = true;
  return std::make_pair(definition(), edited_step_.value_or(position_));
}

void StepForm::set_full_preview(workbench::Preview preview) {
  counting_ = false;
  if (visible_ && preview.definition == definition()) preview_ = std::move(preview);
}

void StepForm::refresh_preview(workbench::Document& document) {
  preview_stale_ = false;
  counting_ = false;
  const nlohmann::json candidate = definition();
  if (edited_step_) {
    // An edit is previewed as the new definition in place of the old step.
    preview_ = document.preview(candidate, *edited_step_, workbench::RowRange{0, kPreviewRows});
  } else {
    preview_ = document.preview(candidate, position_, workbench::RowRange{0, kPreviewRows});
  }
}

void StepForm::draw_preview() {
  if (!preview_) return;
  const workbench::Preview& preview = *preview_;
  const Palette& colours = palette();
  if (preview.problem) {
    ImGui::PushStyleColor(ImGuiCol_Text, colours.error_text);
    ImGui::TextWrapped("%s", preview.problem->message.c_str());
    ImGui::PopStyleColor();
    return;
  }
  ImGui::TextWrapped("%s", preview.description.c_str());
  const ChangeRecord& change = preview.change;
  uint64_t cells = 0;
  for (const auto& entry : change.cells_changed) cells += entry.second;
  std::string scope = preview.complete ? "in all " + plural(preview.rows.end - preview.rows.begin, "row", "rows")
                                       : "in the first " + plural(preview.rows.end - preview.rows.begin, "row", "rows");
  ImGui::Text("%s changed, %s removed, %s rejected %s.", plural(cells, "cell", "cells").c_str(),
              plural(change.rows_removed, "row", "rows").c_str(), count_text(change.rows_rejected).c_str(), scope.c_str());
  if (!preview.complete) {
    if (preview.depends_on_other_rows)
      warning_text("This step compares rows with each other: over the whole table its result can differ, not only its counts.");
    if (counting_) {
      ImGui::TextDisabled("Counting over every row...");
    } else if (ImGui::SmallButton("Count over every row")) {
      full_count_requested_ = true;
    }
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Preview the step on the whole table (runs in the background).");
  }
  for (const std::string& conflict : change.conflicts) warning_text(conflict);
  for (const std::string& warning : change.warnings) warning_text(warning);
  if (!change.samples().empty())
    change_samples_table("##preview-samples", change, "rows", ImGui::GetTextLineHeightWithSpacing() * 7);
  if (!change.removed.empty()) {
    ImGui::TextDisabled("Removed or rejected rows (first %zu):", change.removed.size());
    for (size_t i = 0; i < std::min<size_t>(change.removed.size(), 5); ++i)
      ImGui::BulletText("line %llu: %s", static_cast<unsigned long long>(change.removed[i].line),
                        change.removed[i].reason.c_str());
  }
}

std::optional<StepForm::Submit> StepForm::draw(workbench::Document& document) {
  if (!visible_ || !spec_) return std::nullopt;
  const char* popup_id = "##step-form";
  if (just_opened_) {
    ImGui::OpenPopup(popup_id);
    just_opened_ = false;
  }
  const ImGuiViewport* viewport = ImGui::GetMainViewport();
  ImGui::SetNextWindowPos(viewport->GetCenter(), ImGuiCond_Appearing, ImVec2(0.5f, 0.5f));
  ImGui::SetNextWindowSize(ImVec2(viewport->Size.x * 0.62f, viewport->Size.y * 0.8f), ImGuiCond_Appearing);
  std::optional<Submit> submit;
  if (!ImGui::BeginPopupModal(popup_id, nullptr, ImGuiWindowFlags_NoTitleBar)) {
    visible_ = false;
    return std::nullopt;
  }
  if (edited_step_) {
    ImGui::Text("Edit step %zu: %.*s", *edited_step_ + 1, static_cast<int>(spec_->title.size()), spec_->title.data());
  } else {
    ImGui::Text("New step %zu: %.*s", position_ + 1, static_cast<int>(spec_->title.size()), spec_->title.data());
  }
  ImGui::TextDisabled("op %.*s", static_cast<int>(spec_->op.size()), spec_->op.data());
  ImGui::Separator();
  bool changed = false;
  for (size_t i = 0; i < spec_->fields.size(); ++i) changed |= draw_field(spec_->fields[i], values_[i]);
  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted("Note");
  tooltip("Why this step is here, in your words. It is kept in the recipe and written as a comment in SQL.");
  ImGui::SameLine(ImGui::GetFontSize() * 10);
  ImGui::SetNextItemWidth(-1);
  changed |= ImGui::InputText("##note", &note_);
  if (changed) preview_stale_ = true;
  if (preview_stale_) refresh_preview(document);

  ImGui::Separator();
  ImGui::TextDisabled("Preview");
  draw_preview();

  ImGui::Separator();
  const bool fits = preview_ && !preview_->problem;
  ImGui::BeginDisabled(!fits);
  if (ImGui::Button(edited_step_ ? "Save step" : "Add step")) {
    Submit out{definition(), edited_step_, position_, std::nullopt};
    if (!edited_step_ && preview_) out.preview = std::move(preview_);
    submit = std::move(out);
  }
  ImGui::EndDisabled();
  tooltip(edited_step_ ? "Replace the step with these settings (undo brings the old ones back)."
                       : "Add the step to the recipe, as previewed above (undo removes it).");
  ImGui::SameLine();
  if (ImGui::Button("Cancel") || ImGui::IsKeyPressed(ImGui::GetKeyIndex(ImGuiKey_Escape))) {
    visible_ = false;
    ImGui::CloseCurrentPopup();
  }
  if (submit) {
    visible_ = false;
    ImGui::CloseCurrentPopup();
  }
  ImGui::EndPopup();
  return submit;
}

}  // namespace tamis::ui
