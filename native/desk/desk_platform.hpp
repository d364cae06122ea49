// The desktop's side of the workbench platform interface: the local file
// system through std::filesystem.
#pragma once

#include "platform.hpp"

namespace tamis::desk {

class DeskPlatform final : public ui::Platform {
 public:
  bool can_browse_folders() const override { return true; }
  std::string start_folder() const override;
  Result<std::vector<ui::FolderEntry>> list_folder(const std::string& folder) const override;
  std::string parent_folder(const std::string& folder) const override;
  std::string join_path(const std::string& folder, const std::string& name) const override;
  Result<std::unique_ptr<ByteSource>> open_for_reading(const std::string& path) override;
  Status save(const std::string& path, std::string_view bytes) override;
  std::string privacy_statement() const override;
  std::string demo_file() const override { return TAMIS_DEMO_FILE; }
};

}  // namespace tamis::desk
