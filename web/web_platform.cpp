#include "web_platform.hpp"

#include <emscripten.h>

#include <cstdlib>

namespace tamis::web {

Result<std::vector<ui::FolderEntry>> WebPlatform::list_folder(const std::string& folder) const {
  return io_error(folder, "a web page cannot list folders; open files through the file picker");
}

Result<std::unique_ptr<ByteSource>> WebPlatform::open_for_reading(const std::string& path) {
  const auto found = files_.find(path);
  if (found == files_.end())
    return io_error(path, "this file has not been opened in the page; choose it with File > Open file or drop it here");
  return shared_memory_source(found->second.bytes, found->second.size);
}

Status WebPlatform::save(const std::string& path, std::string_view bytes) {
  // The page copies the bytes into a Blob and starts a download; nothing
  // leaves the machine (a blob: URL is local to this tab).
  EM_ASM({ Module.tamisDownload(UTF8ToString($0), $1, $2); }, path.c_str(), bytes.data(), bytes.size());
  return Ok{};
}

bool WebPlatform::request_open_picker(Pick pick) {
  EM_ASM({ Module.tamisPick($0 ? 'recipe' : 'data'); }, pick == Pick::recipe ? 1 : 0);
  return true;
}

std::string WebPlatform::privacy_statement() const {
  return "This page cannot send data anywhere. Everything runs inside this browser tab: its security policy "
         "(Content-Security-Policy connect-src 'none', default-src 'none') blocks every network request, so the "
         "files you open never leave this computer and the file itself is never changed. Results are saved "
         "as downloads.";
}

void WebPlatform::add_file(const std::string& name, char* bytes, size_t size, bool is_recipe) {
  if (!is_recipe)
    std::erase_if(files_, [](const auto& entry) { return !entry.second.is_recipe && entry.first != kDemoName; });
  files_.erase(name);
  files_.emplace(name, Buffer{std::shared_ptr<const char>(bytes, [](const char* p) { std::free(const_cast<char*>(p)); }),
                              size, is_recipe});
}

}  // namespace tamis::web
