// The built-in file browser (Ctrl+O, and "Save as" for exports), drawn with
// ImGui over the shell's folder listing, so the desktop needs no extra
// dependency for file dialogs.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "platform.hpp"

namespace tamis::ui {

class FileBrowser {
 public:
  enum class Purpose { open, save };

  explicit FileBrowser(Platform& platform);

  // Shows the browser from the next frame on. For saving, suggested_name
  // fills the name field.
  void show(Purpose purpose, std::string title, std::string suggested_name = {});
  bool visible() const { return visible_; }
  void close() { visible_ = false; }

  // Draws the browser if visible; returns the chosen path once.
  std::optional<std::string> draw();

  const std::string& folder() const { return folder_; }
  void set_folder(std::string folder);

 private:
  void reload();

  Platform& platform_;
  bool visible_ = false;
  bool just_opened_ = false;
  Purpose purpose_ = Purpose::open;
  std::string title_;
  std::string folder_;
  std::string name_;
  std::string filter_;
  std::string listing_error_;
  std::vector<FolderEntry> entries_;
  int selected_ = -1;
};

}  // namespace tamis::ui
