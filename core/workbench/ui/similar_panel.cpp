// The Similar values panel: groups of variant spellings in one text column,
// with counts and scores; the analyst picks the preferred spelling, unticks
// members that do not belong, and merges the ticked groups into one
// map_values step.
#include <imgui.h>

#include <cstdio>

#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

const wb::SimilarResult* Workbench::State::sync_similar_choices() {
  const wb::SimilarResult* result = document ? document->similar() : nullptr;
  if (!result) {
    similar.result = nullptr;
    return nullptr;
  }
  if (result != similar.result || similar.merge.size() != result->groups.size()) {
    similar.result = result;
    similar.merge.assign(result->groups.size(), true);
    similar.canonical.clear();
    similar.keep_member.clear();
    for (const SimilarGroup& group : result->groups) {
      similar.canonical.push_back(group.canonical);
      similar.keep_member.emplace_back(group.members.size(), true);
    }
  }
  return result;
}

void Workbench::State::draw_similar_panel() {
  const Table* table = shown_table();
  if (!table || table->column_count() == 0) return;
  if (similar.column >= table->column_count()) similar.column = 0;

  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted("Column");
  ImGui::SameLine(ImGui::GetFontSize() * 6);
  ImGui::SetNextItemWidth(-1);
  if (ImGui::BeginCombo("##similar-column", table->name(similar.column).c_str())) {
    for (size_t c = 0; c < table->column_count(); ++c) {
      if (table->column(c).type() != Type::text) continue;
      if (ImGui::Selectable((table->name(c) + "##s" + std::to_string(c)).c_str(), c == similar.column)) similar.column = c;
    }
    ImGui::EndCombo();
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("The text column whose values are compared.");

  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted("Method");
  ImGui::SameLine(ImGui::GetFontSize() * 6);
  ImGui::SetNextItemWidth(-1);
  if (ImGui::BeginCombo("##similar-method", std::string(similar_method_name(similar.method)).c_str())) {
    for (SimilarMethod method : all_similar_methods())
      if (ImGui::Selectable(std::string(similar_method_name(method)).c_str(), method == similar.method)) similar.method = method;
    ImGui::EndCombo();
  }
  if (ImGui::IsItemHovered())
    ImGui::SetTooltip(
        "token_key: same words in any order, case and accents ignored\n"
        "soundex: words that sound alike (English)\n"
        "qgram: share of common three-letter pieces\n"
        "levenshtein / osa: few typing edits apart\n"
        "jaro_winkler: similar, especially at the start");
  const bool key_method = is_key_method(similar.method);
  ImGui::AlignTextToFramePadding();
  ImGui::TextUnformatted("Threshold");
  ImGui::SameLine(ImGui::GetFontSize() * 6);
  ImGui::SetNextItemWidth(-1);
  ImGui::BeginDisabled(key_method);
  ImGui::SliderFloat("##similar-threshold", &similar.threshold, 0.5f, 1.0f, "%.2f");
  ImGui::EndDisabled();
  if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled))
    ImGui::SetTooltip(key_method ? "Key methods group equal keys; they have no threshold."
                                 : "How similar two values must be (1 = the same after ignoring case, accents and spacing).");
  if (ImGui::Button("Find groups")) {
    queue(document->make_similar_job(similar.column, SimilarOptions{similar.method, similar.threshold}), nullptr);
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Group the values of this column at this step (runs in the background).");

  const wb::SimilarResult* result = sync_similar_choices();
  if (!result) {
    ImGui::TextDisabled("No groups yet: choose a column and press Find groups.");
    return;
  }
  ImGui::Separator();
  ImGui::TextDisabled("%s in %s (%s, %s distinct values)", plural(result->groups.size(), "group", "groups").c_str(),
                      result->column.c_str(), std::string(similar_method_name(result->options.method)).c_str(),
                      count_text(result->stats.values).c_str());
  if (result->groups.empty()) return;
  size_t ticked = 0;
  for (bool merge : similar.merge) ticked += merge ? 1 : 0;
  ImGui::BeginDisabled(ticked == 0);
  if (ImGui::Button("Merge ticked groups")) {
    std::vector<size_t> groups;
    for (size_t g = 0; g < similar.merge.size(); ++g)
      if (similar.merge[g]) groups.push_back(g);
    if (Status merged = merge_similar_groups(groups); !merged) say(merged.error().message, true);
    ImGui::EndDisabled();
    return;
  }
  ImGui::EndDisabled();
  if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled))
    ImGui::SetTooltip("Add one map_values step that rewrites every ticked member to its group's preferred spelling.");

  if (!ImGui::BeginChild("##groups")) {
    ImGui::EndChild();
    return;
  }
  for (size_t g = 0; g < result->groups.size(); ++g) {
    const SimilarGroup& group = result->groups[g];
    ImGui::PushID(static_cast<int>(g));
    bool merge = similar.merge[g];
    if (ImGui::Checkbox("##merge", &merge)) similar.merge[g] = merge;
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("Include this group when merging.");
    ImGui::SameLine();
    ImGui::Text("%zu. %s", g + 1, similar.canonical[g].c_str());
    ImGui::SameLine();
    ImGui::TextDisabled("(%s to change)", plural(group.rows, "row", "rows").c_str());
    ImGui::Indent();
    for (size_t m = 0; m < group.members.size(); ++m) {
      const SimilarMember& member = group.members[m];
      ImGui::PushID(static_cast<int>(m));
      const bool is_canonical = member.value == similar.canonical[g];
      if (ImGui::RadioButton("##canonical", is_canonical)) {
        similar.canonical[g] = member.value;
        similar.keep_member[g][m] = true;
      }
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("Make this the preferred spelling of the group.");
      ImGui::SameLine();
      bool keep = similar.keep_member[g][m];
      ImGui::BeginDisabled(is_canonical);
      if (ImGui::Checkbox("##member", &keep)) similar.keep_member[g][m] = keep;
      ImGui::EndDisabled();
      if (ImGui::IsItemHovered(ImGuiHoveredFlags_AllowWhenDisabled))
        ImGui::SetTooltip("Untick a value that does not belong in this group: it is left as it is.");
      ImGui::SameLine();
      draw_value(member.value, false);
      ImGui::SameLine();
      char score[32];
      std::snprintf(score, sizeof score, "%.2f", member.score);
      ImGui::TextDisabled("%s rows, score %s", count_text(member.count).c_str(), score);
      ImGui::PopID();
    }
    ImGui::Unindent();
    ImGui::PopID();
  }
  ImGui::EndChild();
}

}  // namespace tamis::ui
