// The workbench screens (design §7): one object the shells drive. A shell
// creates the window and ImGui context, calls set_look() once, then
// frame() between ImGui::NewFrame() and ImGui::Render() every frame (the
// browser from an emscripten_set_main_loop callback). Long work runs in
// slices inside frame(), so the screen never freezes and no thread is needed.
// The main window draws no background: the shell clears the frame with
// ImGui's WindowBg colour first.
#pragma once

#include <memory>
#include <string>
#include <string_view>

#include "error.hpp"
#include "look.hpp"
#include "platform.hpp"

namespace tamis::ui {

// Keyboard shortcuts, mapped from key events by the shell (Ctrl+O, Ctrl+S,
// Ctrl+F, Ctrl+Z, Ctrl+Shift+Z).
enum class Command { open, save, filter, undo, redo };

class Workbench {
 public:
  explicit Workbench(Platform& platform);
  ~Workbench();

  // Theme, interface scale and font (call before the first frame; the theme
  // can change later through the View menu).
  void set_look(Theme theme, float scale, float framebuffer_ratio);

  void frame();

  // Shows the open screen for this file (command line, drag-and-drop, the
  // browser shell's picker).
  void open_path(const std::string& path);
  // Replaces the recipe with the one in this file and replays it (the
  // browser shell's recipe picker).
  void open_recipe_path(const std::string& path);
  // A line in the status bar (the shells' own messages, e.g. a file too big).
  void show_message(std::string text, bool is_error);
  void run_command(Command command);

  // Test mode: one action of a script (see script_actions.md), run through
  // the same functions as the controls. Errors name what went wrong.
  Status run_action(std::string_view line);

  // True while work runs in slices (loading, profiling, applying steps).
  bool busy() const;
  bool wants_to_quit() const;
  // True while a measure-scroll action scrolls the grid (the shell times frames).
  bool measuring_frames() const;
  // True once a loaded table is on screen (the shell reports the time).
  bool showing_table() const;

  struct State;

 private:
  std::unique_ptr<State> state_;
};

}  // namespace tamis::ui
