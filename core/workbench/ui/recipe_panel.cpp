// The Recipe panel (the steps in plain words, numbered, with what each
// changed; enable, edit, move, delete; click a step to see the table as of
// that step) and the Changes panel (what the selected step did: before ->
// after values, removed rows with their source lines and reasons).
#include <imgui.h>

#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

namespace {

std::string change_summary(const ChangeRecord& change) {
  uint64_t cells = 0;
  for (const auto& entry : change.cells_changed) cells += entry.second;
  std::string out = plural(cells, "cell", "cells") + " changed";
  if (change.rows_removed) out += ", " + plural(change.rows_removed, "row", "rows") + " removed";
  if (change.rows_rejected) out += ", " + plural(change.rows_rejected, "row", "rows") + " rejected";
  if (!change.conflicts.empty()) out += ", " + plural(change.conflicts.size(), "conflict", "conflicts");
  return out;
}

}  // namespace

void Workbench::State::draw_recipe_panel() {
  if (!document) return;
  ImGui::TextUnformatted("Recipe");
  ImGui::SameLine();
  ImGui::BeginDisabled(!document->can_undo());
  if (ImGui::SmallButton("Undo")) undo();
  ImGui::EndDisabled();
  if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled))
    ImGui::SetTooltip(document->can_undo() ? "Undo %s (Ctrl+Z)" : "Nothing to undo%s", document->undo_label().c_str());
  ImGui::SameLine();
  ImGui::BeginDisabled(!document->can_redo());
  if (ImGui::SmallButton("Redo")) redo();
  ImGui::EndDisabled();
  if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled))
    ImGui::SetTooltip(document->can_redo() ? "Redo %s (Ctrl+Shift+Z)" : "Nothing to redo%s", document->redo_label().c_str());
  ImGui::TextDisabled("Click a step to see the table after it.");
  ImGui::Separator();

  const size_t selected = document->selected_stage();
  if (ImGui::Selectable("0. The file as read", selected == 0)) select_stage(0);
  if (ImGui::IsItemHovered())
    ImGui::SetTooltip("%s, %s", document->file().name.c_str(), plural(document->file().read.rows, "row", "rows").c_str());

  std::optional<size_t> move_from, move_to, remove, edit;
  std::optional<std::pair<size_t, bool>> toggle;
  const size_t steps = document->step_count();
  for (size_t i = 0; i < steps; ++i) {
    const RecipeStep& step = document->recipe().steps[i];
    ImGui::PushID(static_cast<int>(i));
    ImGui::Separator();
    bool enabled = step.enabled;
    if (ImGui::Checkbox("##enabled", &enabled)) toggle = std::make_pair(i, enabled);
    if (ImGui::IsItemHovered())
      ImGui::SetTooltip(enabled ? "Untick to skip this step (it stays in the recipe)." : "Tick to run this step again.");
    ImGui::SameLine();
    // A selectable as tall as the wrapped sentence, with the sentence drawn on it.
    const std::string sentence = std::to_string(i + 1) + ". " + document->describe_step(i);
    const float wrap_width = ImGui::GetContentRegionAvail().x;
    const ImVec2 text_size = ImGui::CalcTextSize(sentence.c_str(), nullptr, false, wrap_width);
    const ImVec2 at = ImGui::GetCursorScreenPos();
    if (ImGui::Selectable("##step", selected == i + 1, 0, ImVec2(wrap_width, text_size.y))) select_stage(i + 1);
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Show the table after this step, and what it changed.");
    ImGui::GetWindowDrawList()->AddText(ImGui::GetFont(), ImGui::GetFontSize(), at,
                                        ImGui::GetColorU32(step.enabled ? ImGuiCol_Text : ImGuiCol_TextDisabled),
                                        sentence.c_str(), nullptr, wrap_width);
    if (!step.note.empty()) ImGui::TextDisabled("   %s", step.note.c_str());
    if (std::optional<wb::StepProblem> problem = document->step_problem(i)) {
      ImGui::PushTextWrapPos(0.0f);
      ImGui::TextColored(ImColor(palette().error_text), "%s", problem->message.c_str());
      ImGui::PopTextWrapPos();
    } else if (step.enabled && document->step_computed(i)) {
      ImGui::TextDisabled("   %s", change_summary(document->change(i)).c_str());
    }
    ImGui::Indent();
    if (ImGui::SmallButton("Edit")) edit = i;
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Change this step's settings in a form, with a preview.");
    ImGui::SameLine();
    ImGui::BeginDisabled(i == 0);
    if (ImGui::SmallButton("\xE2\x86\x91")) {  // ↑
      move_from = i;
      move_to = i - 1;
    }
    ImGui::EndDisabled();
    if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled)) ImGui::SetTooltip("Run this step one place earlier.");
    ImGui::SameLine();
    ImGui::BeginDisabled(i + 1 == steps);
    if (ImGui::SmallButton("\xE2\x86\x93")) {  // ↓
      move_from = i;
      move_to = i + 1;
    }
    ImGui::EndDisabled();
    if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled)) ImGui::SetTooltip("Run this step one place later.");
    ImGui::SameLine();
    if (ImGui::SmallButton("Delete")) remove = i;
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Remove this step from the recipe (Ctrl+Z brings it back).");
    ImGui::Unindent();
    ImGui::PopID();
  }
  if (steps == 0) {
    ImGui::Spacing();
    ImGui::TextDisabled("No steps yet. Add one from Findings, Similar values or the Step menu.");
  }

  if (toggle) after_edit(document->set_enabled(toggle->first, toggle->second), std::nullopt);
  if (move_from) after_edit(document->move_step(*move_from, *move_to), *move_to + 1);
  if (remove) after_edit(document->delete_step(*remove), std::min(*remove, document->step_count()));
  if (edit) {
    const nlohmann::json definition = document->recipe().steps[*edit].definition;
    form.open_edit(*edit, definition, document->schema_at(*edit));
  }
}

void Workbench::State::draw_changes_panel() {
  if (!document) return;
  const size_t stage = document->selected_stage();
  ImGui::TextUnformatted("Changes");
  ImGui::SameLine();
  if (stage == 0) {
    ImGui::TextDisabled("made while reading the file");
    const wb::LoadedFile& file = document->file();
    const ReadReport& read = file.read;
    for (const std::string& warning : read.warnings()) warning_text(warning);
    if (file.rejected.empty() && document->input_rejects().empty()) {
      ImGui::TextDisabled("Every record was read as it is. Select a step in the Recipe panel to see what it changed.");
      return;
    }
    for (const RejectedRecord& record : file.rejected) {
      ImGui::BulletText("line %llu set aside: %s", static_cast<unsigned long long>(record.line), record.reason.c_str());
    }
    for (const RemovedRow& row : document->input_rejects())
      ImGui::BulletText("line %llu set aside: %s", static_cast<unsigned long long>(row.line), row.reason.c_str());
    return;
  }
  const size_t step = stage - 1;
  ImGui::TextDisabled("by step %zu", stage);
  if (!document->step_computed(step)) {
    draw_waiting("Working...");
    return;
  }
  const ChangeRecord& change = document->change(step);
  ImGui::SameLine();
  ImGui::TextDisabled("| rows in %s, out %s | %s", count_text(change.rows_in).c_str(), count_text(change.rows_out).c_str(),
                      change_summary(change).c_str());
  for (const std::string& conflict : change.conflicts) warning_text(conflict);
  for (const std::string& warning : change.warnings) warning_text(warning);

  const float half = ImGui::GetContentRegionAvail().x * 0.5f;
  ImGui::BeginChild("##value-changes", ImVec2(change.removed.empty() ? 0 : half, 0));
  if (change.samples().empty()) ImGui::TextDisabled("No values changed.");
  else change_samples_table("##samples", change, "cells", 0);
  ImGui::EndChild();
  if (!change.removed.empty()) {
    ImGui::SameLine();
    ImGui::BeginChild("##removed-rows");
    ImGui::TextDisabled("Rows removed or rejected (first %zu):", change.removed.size());
    for (const RemovedRow& row : change.removed)
      ImGui::BulletText("line %llu: %s", static_cast<unsigned long long>(row.line), row.reason.c_str());
    ImGui::EndChild();
  }
}

}  // namespace tamis::ui
