// tamis-desk: the desktop workbench. A thin SDL2 + OpenGL 3 shell around the
// screens in core/workbench/ui: it owns the window, the GL context, the DPI
// scale, drag-and-drop and keyboard shortcuts, and calls Workbench::frame()
// once per frame. The test mode (--script, --screenshot) replays UI actions
// through the same code paths as clicks and saves the final frame.
#include <SDL.h>
#include <SDL_opengl.h>
#include <imgui.h>
#include <imgui_impl_opengl3.h>
#include <imgui_impl_sdl.h>
#include <malloc.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "desk_platform.hpp"
#include "look.hpp"
#include "screenshot.hpp"
#include "sdl_shortcuts.hpp"
#include "workbench.hpp"

namespace {

using Clock = std::chrono::steady_clock;

constexpr const char* kUsage =
    "usage: tamis-desk [FILE] [--demo] [--dark] [--scale S]\n"
    "                  [--script ACTIONS.txt] [--screenshot OUT.png] [--timings]\n"
    "  FILE            open this CSV/TSV file (the open screen asks how to read it)\n"
    "  --demo          open the demo file (a city tree-planting survey)\n"
    "  --dark          start with the dark theme\n"
    "  --scale S       interface scale (default: from the display's DPI)\n"
    "  --script FILE   replay UI actions, one per line, then quit (test mode)\n"
    "  --screenshot F  with --script: save the last frame as a PNG\n"
    "  --timings       print time to first screen and frame times to stderr; with\n"
    "                  --script also each action's time and the memory in use\n";

struct Options {
  std::optional<std::string> file;
  bool demo = false;
  bool dark = false;
  std::optional<float> scale;
  std::optional<std::string> script;
  std::optional<std::string> screenshot;
  bool timings = false;
};

std::optional<Options> parse_options(int argc, char** argv) {
  Options options;
  for (int i = 1; i < argc; ++i) {
    const std::string arg = argv[i];
    auto value = [&]() -> std::optional<std::string> {
      if (i + 1 >= argc) return std::nullopt;
      return std::string(argv[++i]);
    };
    if (arg == "--demo") {
      options.demo = true;
    } else if (arg == "--dark") {
      options.dark = true;
    } else if (arg == "--timings") {
      options.timings = true;
    } else if (arg == "--scale") {
      const std::optional<std::string> text = value();
      if (!text) return std::nullopt;
      const float scale = std::strtof(text->c_str(), nullptr);
      if (!(scale >= 0.5f && scale <= 4.0f)) return std::nullopt;
      options.scale = scale;
    } else if (arg == "--script") {
      options.script = value();
      if (!options.script) return std::nullopt;
    } else if (arg == "--screenshot") {
      options.screenshot = value();
      if (!options.screenshot) return std::nullopt;
    } else if (arg == "--help" || arg == "-h") {
      std::fputs(kUsage, stdout);
      std::exit(0);
    } else if (!arg.empty() && arg[0] == '-') {
      return std::nullopt;
    } else if (!options.file) {
      options.file = arg;
    } else {
      return std::nullopt;
    }
  }
  if (options.screenshot && !options.script) return std::nullopt;
  return options;
}

// Resident memory now and at its peak, in MB, from /proc/self/status
// (Linux; both stay 0 elsewhere).
struct MemoryUse {
  double now_mb = 0;
  double peak_mb = 0;
};

MemoryUse memory_use() {
  MemoryUse use;
  std::ifstream status("/proc/self/status");
  std::string line;
  while (std::getline(status, line)) {
    const double kb = std::strtod(line.c_str() + std::min(line.size(), size_t{6}), nullptr);
    if (line.rfind("VmRSS:", 0) == 0) use.now_mb = kb / 1024.0;
    if (line.rfind("VmHWM:", 0) == 0) use.peak_mb = kb / 1024.0;
  }
  return use;
}

// Runs one script line. `drop PATH` is the shell's own action: the file
// arrives as a file dropped on the window does, as SDL's drop event through
// the event loop; every other line is a workbench action.
tamis::Status run_script_line(tamis::ui::Workbench& workbench, const std::string& line) {
  constexpr std::string_view drop_action = "drop ";
  if (line.rfind(drop_action, 0) != 0) return workbench.run_action(line);
  SDL_Event drop{};
  drop.type = SDL_DROPFILE;
  drop.drop.file = SDL_strdup(line.c_str() + drop_action.size());
  drop.drop.windowID = SDL_GetWindowID(SDL_GL_GetCurrentWindow());
  if (SDL_PushEvent(&drop) == 1) return tamis::Ok{};
  SDL_free(drop.drop.file);
  return tamis::usage_error(std::string("cannot queue the drop event: ") + SDL_GetError());
}

// The interface scale: the display's DPI over 96 (the reference of most
// desktops), in quarter steps so borders stay on whole pixels.
float display_scale(SDL_Window* window) {
  float dpi = 0;
  const int display = std::max(0, SDL_GetWindowDisplayIndex(window));
  if (SDL_GetDisplayDPI(display, &dpi, nullptr, nullptr) != 0 || !(dpi > 0)) return 1.0f;
  const float scale = std::round(dpi / 96.0f * 4.0f) / 4.0f;
  return std::clamp(scale, 1.0f, 3.0f);
}

float framebuffer_ratio(SDL_Window* window) {
  int window_width = 0, window_height = 0, drawable_width = 0, drawable_height = 0;
  SDL_GetWindowSize(window, &window_width, &window_height);
  SDL_GL_GetDrawableSize(window, &drawable_width, &drawable_height);
  if (window_width <= 0) return 1.0f;
  return std::max(1.0f, static_cast<float>(drawable_width) / static_cast<float>(window_width));
}

double median_of(std::vector<double> values) {
  if (values.empty()) return 0;
  std::sort(values.begin(), values.end());
  const size_t n = values.size();
  return n % 2 ? values[n / 2] : (values[n / 2 - 1] + values[n / 2]) / 2;
}

// Nearest-rank percentile.
double percentile_of(std::vector<double> values, double p) {
  if (values.empty()) return 0;
  std::sort(values.begin(), values.end());
  const size_t rank = static_cast<size_t>(std::ceil(p * static_cast<double>(values.size())));
  return values[std::clamp<size_t>(rank, 1, values.size()) - 1];
}

}  // namespace

int main(int argc, char** argv) {
  const Clock::time_point started = Clock::now();
  const std::optional<Options> parsed = parse_options(argc, argv);
  if (!parsed) {
    std::fputs(kUsage, stderr);
    return 2;
  }
  const Options& options = *parsed;

  std::vector<std::string> script;
  if (options.script) {
    std::ifstream in(*options.script);
    if (!in) {
      std::fprintf(stderr, "tamis-desk: cannot read %s\n", options.script->c_str());
      return 4;
    }
    for (std::string line; std::getline(in, line);) script.push_back(line);
  }

  if (SDL_Init(SDL_INIT_VIDEO | SDL_INIT_TIMER) != 0) {
    std::fprintf(stderr, "tamis-desk: cannot start SDL: %s\n", SDL_GetError());
    return 4;
  }
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_FLAGS, 0);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_PROFILE_MASK, SDL_GL_CONTEXT_PROFILE_CORE);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_MAJOR_VERSION, 3);
  SDL_GL_SetAttribute(SDL_GL_CONTEXT_MINOR_VERSION, 0);
  SDL_GL_SetAttribute(SDL_GL_DOUBLEBUFFER, 1);
  SDL_GL_SetAttribute(SDL_GL_DEPTH_SIZE, 0);
  SDL_GL_SetAttribute(SDL_GL_STENCIL_SIZE, 8);
  const Uint32 window_flags = SDL_WINDOW_OPENGL | SDL_WINDOW_RESIZABLE | SDL_WINDOW_ALLOW_HIGHDPI;
  SDL_Window* window = SDL_CreateWindow("tamis", SDL_WINDOWPOS_CENTERED, SDL_WINDOWPOS_CENTERED, 1280, 800, window_flags);
  if (!window) {
    std::fprintf(stderr, "tamis-desk: cannot open a window: %s\n", SDL_GetError());
    return 4;
  }
  const float scale = options.scale ? *options.scale : display_scale(window);
  if (scale > 1.0f && !options.script) {
    SDL_SetWindowSize(window, static_cast<int>(1280 * scale), static_cast<int>(800 * scale));
    SDL_SetWindowPosition(window, SDL_WINDOWPOS_CENTERED, SDL_WINDOWPOS_CENTERED);
  }
  SDL_GLContext gl_context = SDL_GL_CreateContext(window);
  if (!gl_context) {
    std::fprintf(stderr, "tamis-desk: cannot create an OpenGL 3 context: %s\n", SDL_GetError());
    return 4;
  }
  SDL_GL_MakeCurrent(window, gl_context);
  // The test mode measures frames, so it must not wait for the display.
  SDL_GL_SetSwapInterval(options.script ? 0 : 1);
  SDL_EventState(SDL_DROPFILE, SDL_ENABLE);

  IMGUI_CHECKVERSION();
  ImGui::CreateContext();
  ImGuiIO& io = ImGui::GetIO();
  io.IniFilename = nullptr;  // panel layout is the program's, not a file in the working folder
  io.ConfigFlags |= ImGuiConfigFlags_NavEnableKeyboard;
  ImGui_ImplSDL2_InitForOpenGL(window, gl_context);
  ImGui_ImplOpenGL3_Init("#version 130");

  tamis::desk::DeskPlatform platform;
  tamis::ui::Workbench workbench(platform);
  workbench.set_look(options.dark ? tamis::ui::Theme::dark : tamis::ui::Theme::light, scale,
                     framebuffer_ratio(window));
  if (options.demo) {
    workbench.open_path(TAMIS_DEMO_FILE);
  } else if (options.file) {
    workbench.open_path(*options.file);
  }

  size_t next_action = 0;
  int exit_status = 0;
  int settle_frames = 0;  // frames drawn after the script's last action, so the screen is final
  bool first_frame = true;
  std::vector<double> measured_ms;
  std::vector<double> measured_ui_ms;  // the workbench's own share: events, layout and draw lists, no GL
  bool was_busy = false;
  bool table_seen = false;
  double longest_action_frame_ms = 0;  // how long the window went without a new frame during the action
  // Set while a script action runs (its work included); --timings reports it.
  bool timing_action = false;
  Clock::time_point action_started;
  bool running = true;
  // ImGui settles over a few frames after input (a click opens a popup on
  // the next frame), so a few frames are drawn after each event before the
  // loop sleeps again.
  int frames_before_sleep = 3;
  while (running) {
    const Clock::time_point frame_start = Clock::now();
    SDL_Event event;
    while (SDL_PollEvent(&event)) {
      frames_before_sleep = 3;
      ImGui_ImplSDL2_ProcessEvent(&event);
      if (event.type == SDL_QUIT) running = false;
      if (event.type == SDL_WINDOWEVENT && event.window.event == SDL_WINDOWEVENT_CLOSE &&
          event.window.windowID == SDL_GetWindowID(window))
        running = false;
      if (event.type == SDL_DROPFILE) {
        workbench.open_path(event.drop.file);
        SDL_free(event.drop.file);
      }
      if (event.type == SDL_KEYDOWN) {
        if (const std::optional<tamis::ui::Command> command = tamis::shell::shortcut_for(event.key))
          workbench.run_command(*command);
      }
    }

    if (options.script && !workbench.busy()) {
      if (timing_action && options.timings) {
        const double ms = std::chrono::duration<double, std::milli>(Clock::now() - action_started).count();
        const MemoryUse memory = memory_use();
        std::fprintf(stderr,
                     "tamis-desk: line %zu (%s) done in %.1f ms; memory %.1f MB, peak %.1f MB; longest frame %.1f ms\n",
                     next_action, script[next_action - 1].substr(0, script[next_action - 1].find(' ')).c_str(), ms,
                     memory.now_mb, memory.peak_mb, longest_action_frame_ms);
      }
      timing_action = false;
      if (next_action < script.size()) {
        const std::string& line = script[next_action];
        timing_action = !line.empty() && line[0] != '#';
        action_started = Clock::now();
        longest_action_frame_ms = 0;
        const tamis::Status done = run_script_line(workbench, script[next_action]);
        if (!done) {
          std::fprintf(stderr, "tamis-desk: script line %zu: %s\n", next_action + 1, done.error().message.c_str());
          exit_status = 1;
          running = false;
        }
        ++next_action;
      } else if (++settle_frames > 3) {
        running = false;
      }
    }

    const Clock::time_point ui_start = Clock::now();
    ImGui_ImplOpenGL3_NewFrame();
    ImGui_ImplSDL2_NewFrame();
    ImGui::NewFrame();
    workbench.frame();
    if (workbench.wants_to_quit()) running = false;
    ImGui::Render();
    const double ui_ms = std::chrono::duration<double, std::milli>(Clock::now() - ui_start).count();
    glViewport(0, 0, static_cast<int>(io.DisplaySize.x * io.DisplayFramebufferScale.x),
               static_cast<int>(io.DisplaySize.y * io.DisplayFramebufferScale.y));
    const ImVec4 clear = ImGui::GetStyle().Colors[ImGuiCol_WindowBg];
    glClearColor(clear.x, clear.y, clear.z, 1.0f);
    glClear(GL_COLOR_BUFFER_BIT);
    ImGui_ImplOpenGL3_RenderDrawData(ImGui::GetDrawData());
    if (!running && options.screenshot && exit_status == 0) {
      int width = 0, height = 0;
      SDL_GL_GetDrawableSize(window, &width, &height);
      if (const tamis::Status saved = tamis::desk::save_framebuffer_png(*options.screenshot, width, height); !saved) {
        std::fprintf(stderr, "tamis-desk: %s\n", saved.error().to_string().c_str());
        exit_status = 4;
      }
    }
    SDL_GL_SwapWindow(window);
    if (first_frame && options.timings) {
      const double ms = std::chrono::duration<double, std::milli>(Clock::now() - started).count();
      std::fprintf(stderr, "tamis-desk: first screen after %.1f ms\n", ms);
    }
    first_frame = false;
    const bool busy = workbench.busy();
    // The jobs' scratch tables (previews, profiles, the findings' tidied
    // copy) are freed in many small blocks between live ones; glibc keeps
    // such pages until asked, so the memory of the tables no longer held
    // goes back to the system once the work is done.
    if (was_busy && !busy) malloc_trim(0);
    if (options.timings) {
      const double since_start = std::chrono::duration<double, std::milli>(Clock::now() - started).count();
      if (!table_seen && workbench.showing_table()) {
        table_seen = true;
        std::fprintf(stderr, "tamis-desk: table shown after %.1f ms\n", since_start);
      }
      if (was_busy && !busy) std::fprintf(stderr, "tamis-desk: all work done after %.1f ms\n", since_start);
      if (timing_action)
        longest_action_frame_ms = std::max(
            longest_action_frame_ms, std::chrono::duration<double, std::milli>(Clock::now() - frame_start).count());
    }
    was_busy = busy;
    if (workbench.measuring_frames()) {
      measured_ms.push_back(std::chrono::duration<double, std::milli>(Clock::now() - frame_start).count());
      measured_ui_ms.push_back(ui_ms);
    } else if (!measured_ms.empty()) {
      std::fprintf(stderr,
                   "tamis-desk: %zu frames while scrolling: whole frame median %.2f ms, p99 %.2f ms; "
                   "workbench share (no GL) median %.2f ms, p99 %.2f ms\n",
                   measured_ms.size(), median_of(measured_ms), percentile_of(measured_ms, 0.99),
                   median_of(measured_ui_ms), percentile_of(measured_ui_ms, 0.99));
      measured_ms.clear();
      measured_ui_ms.clear();
    }
    if (!options.script && !workbench.busy() && --frames_before_sleep <= 0) {
      // Nothing running: sleep until the next event instead of spinning.
      SDL_WaitEventTimeout(nullptr, 250);
      frames_before_sleep = 1;
    }
  }

  ImGui_ImplOpenGL3_Shutdown();
  ImGui_ImplSDL2_Shutdown();
  ImGui::DestroyContext();
  SDL_GL_DeleteContext(gl_context);
  SDL_DestroyWindow(window);
  SDL_Quit();
  return exit_status;
}
