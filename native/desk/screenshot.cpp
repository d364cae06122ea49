#include "screenshot.hpp"

#include <SDL_opengl.h>
// The implementation comes from Debian's libstb (linked through imgui's stb dependency).
#include <stb_image_write.h>

#include <vector>

namespace tamis::desk {

Status save_framebuffer_png(const std::string& path, int width, int height) {
  std::vector<unsigned char> pixels(static_cast<size_t>(width) * static_cast<size_t>(height) * 3);
  glPixelStorei(GL_PACK_ALIGNMENT, 1);
  glReadBuffer(GL_BACK);
  glReadPixels(0, 0, width, height, GL_RGB, GL_UNSIGNED_BYTE, pixels.data());
  // OpenGL's rows start at the bottom; PNG's at the top.
  stbi_flip_vertically_on_write(1);
  if (!stbi_write_png(path.c_str(), width, height, 3, pixels.data(), width * 3))
    return io_error(path, "cannot write the screenshot");
  return Ok{};
}

}  // namespace tamis::desk
