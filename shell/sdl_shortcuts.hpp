// The workbench's keyboard shortcuts as SDL key events, shared by the two
// SDL shells (native/desk and web). Ctrl on Linux and Windows, Cmd on macOS.
#pragma once

#include <SDL.h>

#include <optional>

#include "workbench.hpp"

namespace tamis::shell {

inline std::optional<ui::Command> shortcut_for(const SDL_KeyboardEvent& key) {
  const bool ctrl = (key.keysym.mod & (KMOD_CTRL | KMOD_GUI)) != 0;
  if (!ctrl || key.repeat != 0) return std::nullopt;
  const bool shift = (key.keysym.mod & KMOD_SHIFT) != 0;
  switch (key.keysym.sym) {
    case SDLK_o: return ui::Command::open;
    case SDLK_s: return ui::Command::save;
    case SDLK_f: return ui::Command::filter;
    case SDLK_z: return shift ? ui::Command::redo : ui::Command::undo;
    default: return std::nullopt;
  }
}

}  // namespace tamis::shell
