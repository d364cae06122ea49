// The Findings panel: problems found across the table as of the selected
// step, most rows first, each with its fixes previewed (before -> after) and
// a button that adds the fix as a step after the selected one.
#include <imgui.h>

#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

void Workbench::State::draw_findings_panel() {
  if (!document) return;
  const std::vector<Finding>* findings = document->findings();
  if (!findings) {
    draw_waiting("Looking for problems...");
    return;
  }
  if (findings->empty()) {
    ImGui::TextColored(ImColor(palette().good_text), "No problems found at this step.");
    return;
  }
  ImGui::PushStyleColor(ImGuiCol_Text, palette().muted_text);
  ImGui::TextWrapped("%s, most rows first. Fixes are added after step %zu.", plural(findings->size(), "finding", "findings").c_str(),
                     document->selected_stage());
  ImGui::PopStyleColor();
  for (size_t i = 0; i < findings->size(); ++i) {
    const Finding& finding = (*findings)[i];
    ImGui::PushID(static_cast<int>(i));
    std::string heading = std::to_string(i + 1) + ". " + finding.title + "###finding";
    const bool open = ImGui::CollapsingHeader(heading.c_str(), i < 3 ? ImGuiTreeNodeFlags_DefaultOpen : 0);
    if (ImGui::IsItemHovered()) {
      std::string columns;
      for (const std::string& column : finding.columns) {
        if (!columns.empty()) columns += ", ";
        columns += column;
      }
      ImGui::SetTooltip("%s\n%s rows affected%s%s", finding.title.c_str(), count_text(finding.rows_affected).c_str(),
                        columns.empty() ? "" : " in ", columns.c_str());
    }
    if (open) {
      ImGui::PushTextWrapPos(0.0f);
      ImGui::TextUnformatted(finding.explanation.c_str());
      ImGui::PushStyleColor(ImGuiCol_Text, palette().muted_text);
      for (const std::string& detail : finding.details) ImGui::TextUnformatted(detail.c_str());
      ImGui::PopStyleColor();
      ImGui::PopTextWrapPos();
      for (size_t f = 0; f < finding.fixes.size(); ++f) {
        const SuggestedFix& fix = finding.fixes[f];
        ImGui::PushID(static_cast<int>(f));
        ImGui::Separator();
        const auto op_field = fix.step.find("op");
        const std::string op = op_field != fix.step.end() && op_field->is_string() ? op_field->get<std::string>() : "step";
        ImGui::Text("%s %s", f == 0 ? "Suggested fix:" : "Other fix:", op.c_str());
        ImGui::TextDisabled("%s changed, %s removed", plural(fix.preview.cells_changed, "cell", "cells").c_str(),
                            plural(fix.preview.rows_removed, "row", "rows").c_str());
        if (!fix.safe) {
          ImGui::PushTextWrapPos(0.0f);
          ImGui::TextColored(ImColor(palette().error_text), "Check first: %s", fix.why_review.c_str());
          ImGui::PopTextWrapPos();
        }
        for (const FixExample& example : fix.preview.examples) {
          ImGui::TextDisabled("line %llu", static_cast<unsigned long long>(example.source_line));
          ImGui::SameLine();
          if (example.removed) {
            ImGui::TextDisabled("row removed:");
            ImGui::SameLine();
            ImGui::TextUnformatted(example.before.c_str());
          } else {
            draw_value(example.before, example.before == "NULL");
            ImGui::SameLine();
            ImGui::TextDisabled("\xE2\x86\x92");  // →
            ImGui::SameLine();
            draw_value(example.after, example.after == "NULL");
          }
        }
        for (const std::string& warning : fix.preview.warnings)
          warning_text(warning);
        if (ImGui::Button("Add step")) {
          if (Status added = add_finding_fix(i, f); !added) say(added.error().message, true);
          ImGui::PopID();
          ImGui::PopID();
          return;  // the findings are recomputed for the new step
        }
        if (ImGui::IsItemHovered())
          ImGui::SetTooltip("Add this fix to the recipe after step %zu, exactly as previewed. Undo removes it.",
                            document->selected_stage());
        ImGui::SameLine();
        if (const StepSpec* spec = find_step_spec(op); spec && ImGui::Button("Edit first...")) {
          const size_t at = document->selected_stage();
          const nlohmann::json definition = nlohmann::json::parse(fix.step.dump());
          form.open_new(*spec, at, document->schema_at(at), &definition);
        }
        if (ImGui::IsItemHovered()) ImGui::SetTooltip("Open the fix in the step form to change it before adding.");
        ImGui::PopID();
      }
    }
    ImGui::PopID();
  }
}

}  // namespace tamis::ui
