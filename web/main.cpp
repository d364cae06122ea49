// tamis.html: the workbench in a browser tab. A thin SDL2 + WebGL 2 shell
// around the screens in core/workbench/ui, driven by the browser's animation
// frames. The page's script (shell.html) reads picked or dropped files into
// the WebAssembly heap and calls the tamis_web_* functions below; tests drive
// the same screens through window.tamis.action(), which runs one script
// action (core/workbench/ui/script_actions.md) like the desktop's test mode.
#include <SDL.h>
#include <emscripten.h>
#include <emscripten/html5.h>
#include <imgui.h>
#include <imgui_impl_opengl3.h>
#include <imgui_impl_sdl.h>
#include <malloc.h>

#include <GLES3/gl3.h>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <span>
#include <deque>
#include <optional>
#include <string>

#include "look.hpp"
#include "sdl_shortcuts.hpp"
#include "web_platform.hpp"
#include "workbench.hpp"

namespace tamis::ui {
std::span<const unsigned char> demo_table();  // generated from assets/demo/tree_survey.csv
}

namespace {

// A browser tab's WebAssembly memory is capped (the module's maximum is
// 2 GiB) and never shrinks. Loading a file (the bytes as read stay in memory,
// the loaded table, its profile and findings) grew it by 4.2x the file size
// on the 1,000,000-row bench file (98 MB: 17 MB before opening, 432 MB once
// loaded; tests/bench/web_bench.js). A file that cannot be loaded within the
// room left is refused up front with advice instead of failing half way.
// Steps may need more (the demo recipe replayed on that file: 7.5x); running
// out then ends the work with a message (Workbench::State::run_jobs_for).
constexpr double kPeakBytesPerFileByte = 4.5;
constexpr double kModuleMaximumBytes = 2147483648.0;

struct PendingAction {
  int id = 0;
  std::string line;
};

struct Shell {
  SDL_Window* window = nullptr;
  tamis::web::WebPlatform platform;
  std::optional<tamis::ui::Workbench> workbench;
  std::deque<PendingAction> actions;
  std::optional<PendingAction> running;  // ran; answered once its work is done
  tamis::Status running_status = tamis::Ok{};
  int next_action_id = 1;
  // The room a newly opened file may take at its peak; by default what the
  // module may still grow into. Tests set a small one.
  std::optional<double> memory_budget;
  std::string reading_name;  // a file the page is reading into memory
  double reading_done = 0, reading_total = 0;
  bool reading_cancelled = false;
  bool first_frame = true;
  bool table_seen = false;
  bool was_busy = false;
};

Shell* shell = nullptr;

void tell_page(const char* kind, const std::string& text) {
  EM_ASM({ console.log(UTF8ToString($0) + ' ' + UTF8ToString($1)); }, kind, text.c_str());
}

void say(const std::string& text, bool is_error) {
  shell->workbench->show_message(text, is_error);
  tell_page("TAMIS_MESSAGE", text);
}

std::string megabytes(double bytes) {
  char text[32];
  std::snprintf(text, sizeof text, "%.0f MB", std::ceil(bytes / 1e6));
  return text;
}

void answer_actions() {
  Shell& s = *shell;
  const bool idle = !s.workbench->busy() && s.reading_name.empty();
  if (s.running && idle) {
    const bool ok = static_cast<bool>(s.running_status);
    const std::string message = ok ? std::string() : s.running_status.error().message;
    EM_ASM({ Module.tamisActionDone($0, $1, UTF8ToString($2)); }, s.running->id, ok ? 1 : 0, message.c_str());
    s.running.reset();
  }
  if (!s.running && idle && !s.actions.empty()) {
    s.running = std::move(s.actions.front());
    s.actions.pop_front();
    s.running_status = s.workbench->run_action(s.running->line);
  }
}

// Milestones for benchmarks, in ms since the page started loading (the
// desktop's --timings prints the same ones).
void log_timings() {
  Shell& s = *shell;
  const bool table = s.workbench->showing_table();
  if (table && !s.table_seen) std::printf("TAMIS_TIMING table-shown %.0f\n", emscripten_get_now());
  s.table_seen = table;
  const bool busy = s.workbench->busy();
  if (s.was_busy && !busy) std::printf("TAMIS_TIMING work-done %.0f\n", emscripten_get_now());
  s.was_busy = busy;
}

void draw_reading_progress() {
  Shell& s = *shell;
  if (s.reading_name.empty()) return;
  const ImGuiViewport* viewport = ImGui::GetMainViewport();
  ImGui::SetNextWindowPos(ImVec2(viewport->WorkPos.x + viewport->WorkSize.x * 0.5f, viewport->WorkPos.y + viewport->WorkSize.y * 0.5f),
                          ImGuiCond_Always, ImVec2(0.5f, 0.5f));
  ImGui::Begin("Reading##tamis-reading", nullptr,
               ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_AlwaysAutoResize | ImGuiWindowFlags_NoSavedSettings);
  ImGui::Text("Reading %s into this tab", s.reading_name.c_str());
  const float fraction = s.reading_total > 0 ? static_cast<float>(s.reading_done / s.reading_total) : 0.0f;
  ImGui::ProgressBar(fraction, ImVec2(ImGui::GetFontSize() * 20, 0));
  if (ImGui::Button("Cancel")) s.reading_cancelled = true;
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Stop reading this file. Nothing is changed.");
  ImGui::End();
}

void frame() {
  Shell& s = *shell;
  SDL_Event event;
  while (SDL_PollEvent(&event)) {
    ImGui_ImplSDL2_ProcessEvent(&event);
    if (event.type == SDL_KEYDOWN) {
      if (const std::optional<tamis::ui::Command> command = tamis::shell::shortcut_for(event.key))
        s.workbench->run_command(*command);
    }
  }
  answer_actions();

  ImGui_ImplOpenGL3_NewFrame();
  ImGui_ImplSDL2_NewFrame();
  ImGui::NewFrame();
  s.workbench->frame();
  draw_reading_progress();
  ImGui::Render();
  const ImGuiIO& io = ImGui::GetIO();
  glViewport(0, 0, static_cast<int>(io.DisplaySize.x * io.DisplayFramebufferScale.x),
             static_cast<int>(io.DisplaySize.y * io.DisplayFramebufferScale.y));
  const ImVec4 clear = ImGui::GetStyle().Colors[ImGuiCol_WindowBg];
  glClearColor(clear.x, clear.y, clear.z, 1.0f);
  glClear(GL_COLOR_BUFFER_BIT);
  ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());
  if (s.first_frame) {
    s.first_frame = false;
    std::printf("TAMIS_TIMING first-frame %.0f\n", emscripten_get_now());
    std::puts("TAMIS_READY");
  }
  log_timings();
}

}  // namespace

extern "C" {

// "" when a file of this size may be opened, else the message to show.
EMSCRIPTEN_KEEPALIVE const char* tamis_web_check_size(double size, const char* name) {
  static std::string refusal;
  const double in_use = static_cast<double>(mallinfo().uordblks);
  const double room = shell->memory_budget.value_or(kModuleMaximumBytes - in_use);
  if (size * kPeakBytesPerFileByte <= room) return "";
  const double largest = std::max(0.0, room / kPeakBytesPerFileByte);
  refusal = std::string(name) + " is " + megabytes(size) + "; this browser tab can clean files up to about " +
            megabytes(largest) + ". Open it in the desktop program tamis-desk, or clean it with tamis run, "
            "which streams files of any size.";
  return refusal.c_str();
}

EMSCRIPTEN_KEEPALIVE void tamis_web_reading(const char* name, double done, double total) {
  shell->reading_name = name;
  shell->reading_done = done;
  shell->reading_total = total;
  if (shell->reading_name.empty()) shell->reading_cancelled = false;
}

EMSCRIPTEN_KEEPALIVE int tamis_web_reading_cancelled() { return shell->reading_cancelled ? 1 : 0; }

// The page read a whole file into bytes (from malloc); the platform owns it now.
EMSCRIPTEN_KEEPALIVE void tamis_web_file_ready(const char* name, char* bytes, double size, int is_recipe) {
  shell->platform.add_file(name, bytes, static_cast<size_t>(size), is_recipe != 0);
  if (is_recipe) {
    shell->workbench->open_recipe_path(name);
  } else {
    shell->workbench->open_path(name);
  }
}

EMSCRIPTEN_KEEPALIVE void tamis_web_message(const char* text) { say(text, true); }

EMSCRIPTEN_KEEPALIVE int tamis_web_action(const char* line) {
  const int id = shell->next_action_id++;
  shell->actions.push_back(PendingAction{id, line});
  return id;
}

EMSCRIPTEN_KEEPALIVE int tamis_web_busy() {
  return shell->workbench->busy() || shell->running || !shell->actions.empty() ? 1 : 0;
}

EMSCRIPTEN_KEEPALIVE void tamis_web_set_memory_budget(double bytes) { shell->memory_budget = bytes; }

}  // extern "C"

int main() {
  if (SDL_Init(SDL_INIT_VIDEO | SDL_INIT_TIMER) != 0) {
    std::fprintf(stderr, "tamis: cannot start SDL: %s\n", SDL_GetError());
    return 1;
  }
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_FLAGS, 0);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_PROFILE_MASK, SDL_GL_CONTEXT_PROFILE_ES);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_MAJOR_VERSION, 3);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_MINOR_VERSION, 0);
  SDL_GL_SetAttribute(SDL_GL_DOUBLEBUFFER, 1);
  SDL_GL_SetAttribute(SDL_GL_DEPTH_SIZE, 0);
  SDL_GL_SetAttribute(SDL_GL_STENCIL_SIZE, 8);
  double css_width = 1280, css_height = 800;
  emscripten_get_element_css_size("#canvas", &css_width, &css_height);
  shell = new Shell;
  shell->window = SDL_CreateWindow("tamis", SDL_WINDOWPOS_CENTERED, SDL_WINDOWPOS_CENTERED, static_cast<int>(css_width),
                                   static_cast<int>(css_height),
                                   SDL_WINDOW_OPENGL | SDL_WINDOW_RESIZABLE | SDL_WINDOW_ALLOW_HIGHDPI);
  SDL_GLContext gl_context = shell->window ? SDL_GL_CreateContext(shell->window) : nullptr;
  if (!gl_context) {
    std::fprintf(stderr, "tamis: cannot create a WebGL 2 context: %s\n", SDL_GetError());
    EM_ASM({ Module.tamisNoWebGL(); });
    return 1;
  }
  SDL_GL_MakeCurrent(shell->window, gl_context);

  IMGUI_CHECKVERSION();
  ImGui::CreateContext();
  ImGuiIO& io = ImGui::GetIO();
  io.IniFilename = nullptr;
  io.ConfigFlags |= ImGuiConfigFlags_NavEnableKeyboard;
  ImGui_ImplSDL2_InitForOpenGL(shell->window, gl_context);
  ImGui_ImplOpenGL3_Init("#version 300 es");

  shell->workbench.emplace(shell->platform);
  const std::span<const unsigned char> demo = tamis::ui::demo_table();
  char* demo_copy = static_cast<char*>(std::malloc(demo.size()));
  std::memcpy(demo_copy, demo.data(), demo.size());
  shell->platform.add_file(tamis::web::WebPlatform::kDemoName, demo_copy, demo.size(), false);
  const double pixel_ratio = emscripten_get_device_pixel_ratio();
  shell->workbench->set_look(tamis::ui::Theme::light, 1.0f, static_cast<float>(std::max(1.0, pixel_ratio)));
  emscripten_set_main_loop(frame, 0, true);
  return 0;
}
