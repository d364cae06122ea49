// The browser's side of the workbench platform interface. Files come from
// the page's file picker or a drop: the page reads them in slices straight
// into the WebAssembly heap and hands the buffer over (add_file); saving is a
// download. No folders, no network: the page's Content-Security-Policy
// blocks every connection.
#pragma once

#include <cstdint>
#include <map>
#include <memory>
#include <string>

#include "platform.hpp"

namespace tamis::web {

class WebPlatform final : public ui::Platform {
 public:
  bool can_browse_folders() const override { return false; }
  std::string start_folder() const override { return {}; }
  Result<std::vector<ui::FolderEntry>> list_folder(const std::string& folder) const override;
  std::string parent_folder(const std::string& folder) const override { return folder; }
  std::string join_path(const std::string&, const std::string& name) const override { return name; }
  Result<std::unique_ptr<ByteSource>> open_for_reading(const std::string& path) override;
  Status save(const std::string& path, std::string_view bytes) override;
  bool request_open_picker(Pick pick) override;
  bool can_quit() const override { return false; }
  std::string privacy_statement() const override;
  std::string demo_file() const override { return kDemoName; }
  static constexpr const char* kDemoName = "tree_survey.csv";

  // Takes ownership of a malloc'd buffer the page filled. A new data file
  // replaces the previous ones (their bytes are freed once no reader is
  // left); recipes and the demo are kept.
  void add_file(const std::string& name, char* bytes, size_t size, bool is_recipe);

 private:
  struct Buffer {
    std::shared_ptr<const char> bytes;  // shared with readers still reading it
    size_t size = 0;
    bool is_recipe = false;
  };
  std::map<std::string, Buffer> files_;
};

}  // namespace tamis::web
