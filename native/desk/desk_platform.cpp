#include "desk_platform.hpp"

#include <filesystem>
#include <system_error>

namespace tamis::desk {

namespace fs = std::filesystem;

std::string DeskPlatform::start_folder() const {
  std::error_code error;
  const fs::path here = fs::current_path(error);
  return error ? std::string("/") : here.string();
}

Result<std::vector<ui::FolderEntry>> DeskPlatform::list_folder(const std::string& folder) const {
  std::error_code error;
  fs::directory_iterator it(folder, fs::directory_options::skip_permission_denied, error);
  if (error) return io_error(folder, "cannot list this folder: " + error.message());
  std::vector<ui::FolderEntry> entries;
  for (; it != fs::directory_iterator(); it.increment(error)) {
    if (error) break;
    ui::FolderEntry entry;
    entry.name = it->path().filename().string();
    if (!entry.name.empty() && entry.name[0] == '.') continue;  // hidden files, as file managers do
    std::error_code entry_error;
    entry.is_folder = it->is_directory(entry_error);
    if (!entry.is_folder) {
      const uintmax_t size = it->file_size(entry_error);
      entry.size = entry_error ? 0 : static_cast<uint64_t>(size);
    }
    entries.push_back(std::move(entry));
  }
  return entries;
}

std::string DeskPlatform::parent_folder(const std::string& folder) const {
  const fs::path path = fs::path(folder).lexically_normal();
  const fs::path parent = path.has_relative_path() && path.filename().empty() ? path.parent_path().parent_path()
                                                                              : path.parent_path();
  return parent.empty() ? folder : parent.string();
}

std::string DeskPlatform::join_path(const std::string& folder, const std::string& name) const {
  if (fs::path(name).is_absolute()) return name;
  return (fs::path(folder) / name).lexically_normal().string();
}

Result<std::unique_ptr<ByteSource>> DeskPlatform::open_for_reading(const std::string& path) {
  return open_file_source(path);
}

Status DeskPlatform::save(const std::string& path, std::string_view bytes) {
  Result<std::unique_ptr<ByteSink>> sink = open_file_sink(path);
  if (!sink) return sink.take_error();
  if (Status written = sink.value()->write(bytes); !written) return written;
  return sink.value()->commit();
}

std::string DeskPlatform::privacy_statement() const {
  return "tamis-desk works only on this computer: it reads the files you open, writes only the files you save, "
         "never changes the file it cleans, and makes no network connections.";
}

}  // namespace tamis::desk
