// Saves the current OpenGL framebuffer as a PNG (test mode --screenshot).
#pragma once

#include <string>

#include "error.hpp"

namespace tamis::desk {

Status save_framebuffer_png(const std::string& path, int width, int height);

}  // namespace tamis::desk
