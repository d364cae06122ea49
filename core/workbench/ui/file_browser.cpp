#include "file_browser.hpp"

#include <imgui.h>
#include <imgui_stdlib.h>

#include <algorithm>

#include "look.hpp"
#include "text_format.hpp"

namespace tamis::ui {

FileBrowser::FileBrowser(Platform& platform) : platform_(platform) {}

void FileBrowser::show(Purpose purpose, std::string title, std::string suggested_name) {
  purpose_ = purpose;
  title_ = std::move(title);
  name_ = std::move(suggested_name);
  if (folder_.empty()) folder_ = platform_.start_folder();
  visible_ = true;
  just_opened_ = true;
  reload();
}

void FileBrowser::set_folder(std::string folder) {
  folder_ = std::move(folder);
  reload();
}

void FileBrowser::reload() {
  selected_ = -1;
  entries_.clear();
  listing_error_.clear();
  Result<std::vector<FolderEntry>> listing = platform_.list_folder(folder_);
  if (!listing) {
    listing_error_ = listing.error().to_string();
    return;
  }
  entries_ = std::move(listing.value());
  // Folders first, then files, each by name.
  std::sort(entries_.begin(), entries_.end(), [](const FolderEntry& a, const FolderEntry& b) {
    if (a.is_folder != b.is_folder) return a.is_folder;
    return a.name < b.name;
  });
}

std::optional<std::string> FileBrowser::draw() {
  if (!visible_) return std::nullopt;
  const char* popup_id = "##file-browser";
  if (just_opened_) {
    ImGui::OpenPopup(popup_id);
    just_opened_ = false;
  }
  const ImGuiViewport* viewport = ImGui::GetMainViewport();
  ImGui::SetNextWindowPos(viewport->GetCenter(), ImGuiCond_Appearing, ImVec2(0.5f, 0.5f));
  ImGui::SetNextWindowSize(ImVec2(viewport->Size.x * 0.6f, viewport->Size.y * 0.7f), ImGuiCond_Appearing);
  std::optional<std::string> chosen;
  bool open = true;
  if (!ImGui::BeginPopupModal(popup_id, &open, ImGuiWindowFlags_NoTitleBar)) {
    visible_ = false;
    return std::nullopt;
  }
  ImGui::TextUnformatted(title_.c_str());
  ImGui::Separator();
  if (ImGui::Button("Up")) set_folder(platform_.parent_folder(folder_));
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Go to the folder that contains this one.");
  ImGui::SameLine();
  ImGui::SetNextItemWidth(-1);
  std::string typed_folder = folder_;
  if (ImGui::InputText("##folder", &typed_folder, ImGuiInputTextFlags_EnterReturnsTrue)) set_folder(typed_folder);
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("The folder shown below. Type a path and press Enter to go there.");
  ImGui::SetNextItemWidth(ImGui::GetFontSize() * 14);
  ImGui::InputTextWithHint("##narrow", "narrow the list", &filter_);
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Show only entries whose name contains this text.");

  const float footer = ImGui::GetFrameHeightWithSpacing() + ImGui::GetStyle().ItemSpacing.y;
  if (ImGui::BeginChild("##entries", ImVec2(0, -footer), true)) {
    if (!listing_error_.empty()) ImGui::TextColored(ImColor(palette().error_text), "%s", listing_error_.c_str());
    std::optional<std::string> enter_folder;
    for (size_t i = 0; i < entries_.size(); ++i) {
      const FolderEntry& entry = entries_[i];
      if (!filter_.empty() && !contains_ignoring_ascii_case(entry.name, filter_)) continue;
      std::string label = entry.is_folder ? "\xE2\x96\xB8 " : "  ";  // ▸ marks folders
      label += entry.name;
      ImGui::PushID(static_cast<int>(i));
      if (ImGui::Selectable(label.c_str(), selected_ == static_cast<int>(i),
                            ImGuiSelectableFlags_AllowDoubleClick | ImGuiSelectableFlags_SpanAllColumns)) {
        selected_ = static_cast<int>(i);
        if (!entry.is_folder) name_ = entry.name;
        if (ImGui::IsMouseDoubleClicked(0)) {
          if (entry.is_folder) {
            enter_folder = entry.name;
          } else {
            chosen = platform_.join_path(folder_, entry.name);
          }
        }
      }
      if (!entry.is_folder) {
        ImGui::SameLine(ImGui::GetContentRegionAvail().x - ImGui::GetFontSize() * 6);
        ImGui::TextDisabled("%s", byte_size_text(entry.size).c_str());
      }
      ImGui::PopID();
    }
    if (enter_folder) set_folder(platform_.join_path(folder_, *enter_folder));
  }
  ImGui::EndChild();

  ImGui::SetNextItemWidth(-ImGui::GetFontSize() * 12);
  const bool entered = ImGui::InputTextWithHint("##name", "file name", &name_, ImGuiInputTextFlags_EnterReturnsTrue);
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("The file to %s, in the folder shown above.",
                                                purpose_ == Purpose::open ? "open" : "write");
  ImGui::SameLine();
  const char* action = purpose_ == Purpose::open ? "Open" : "Save";
  if ((ImGui::Button(action) || entered) && !name_.empty()) chosen = platform_.join_path(folder_, name_);
  ImGui::SameLine();
  if (ImGui::Button("Cancel") || ImGui::IsKeyPressed(ImGui::GetKeyIndex(ImGuiKey_Escape))) {
    visible_ = false;
    ImGui::CloseCurrentPopup();
  }
  if (chosen) {
    visible_ = false;
    ImGui::CloseCurrentPopup();
  }
  ImGui::EndPopup();
  if (!open) visible_ = false;
  return chosen;
}

}  // namespace tamis::ui
