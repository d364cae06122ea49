// What a shell provides to the workbench screens (design §2): the screens
// never touch files, folders or the clipboard themselves. The desktop shell
// implements this with the file system; the browser shell with its file
// picker and downloads.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "byte_io.hpp"
#include "error.hpp"

namespace tamis::ui {

struct FolderEntry {
  std::string name;
  bool is_folder = false;
  uint64_t size = 0;  // bytes, files only
};

class Platform {
 public:
  virtual ~Platform() = default;

  // Whether the built-in file browser can list folders here (the desktop);
  // a browser shell opens files through its own picker instead.
  virtual bool can_browse_folders() const = 0;
  virtual std::string start_folder() const = 0;
  // Entries of a folder, without "." and "..".
  virtual Result<std::vector<FolderEntry>> list_folder(const std::string& folder) const = 0;
  virtual std::string parent_folder(const std::string& folder) const = 0;
  virtual std::string join_path(const std::string& folder, const std::string& name) const = 0;

  virtual Result<std::unique_ptr<ByteSource>> open_for_reading(const std::string& path) = 0;
  // Writes the whole file (atomically where the platform can).
  virtual Status save(const std::string& path, std::string_view bytes) = 0;

  // What the shell's own file picker is asked for (browser shells).
  enum class Pick { data_file, recipe };
  // Asks the shell's own picker for a file (browser shells); the shell then
  // calls Workbench::open_path or Workbench::open_recipe_path. False when there is none.
  virtual bool request_open_picker(Pick) { return false; }

  // A demo table this shell can open (the welcome screen offers it), or "".
  virtual std::string demo_file() const { return {}; }
  // Whether File > Quit makes sense (a browser tab is closed by the browser).
  virtual bool can_quit() const { return true; }
  // One paragraph for the About box: where files go and what the program
  // can reach, in the words of this shell.
  virtual std::string privacy_statement() const = 0;
};

}  // namespace tamis::ui
