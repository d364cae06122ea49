#include "workbench.hpp"

#include <imgui.h>

#include <optional>
#include <sstream>
#include <vector>

#include "file_browser.hpp"
#include "open_screen.hpp"

namespace tamis::ui {

struct Workbench::State {
  explicit State(Platform& p) : platform(p), browser(p), open_screen(p) {}

  Platform& platform;
  Theme theme = Theme::light;
  float scale = 1.0f;
  FileBrowser browser;
  OpenScreen open_screen;
  bool quit = false;
  std::string status_line;

  void draw_menu();
  void draw_welcome();
  void show_open_browser();
};

Workbench::Workbench(Platform& platform) : state_(std::make_unique<State>(platform)) {}
Workbench::~Workbench() = default;

void Workbench::set_look(Theme theme, float scale, float framebuffer_ratio) {
  state_->theme = theme;
  state_->scale = scale;
  apply_theme(theme, scale);
  load_ui_font(15.0f, scale, framebuffer_ratio);
}

bool Workbench::busy() const { return false; }
bool Workbench::wants_to_quit() const { return state_->quit; }
bool Workbench::measuring_frames() const { return false; }

void Workbench::open_path(const std::string& path) { state_->open_screen.start(path); }

void Workbench::State::show_open_browser() {
  if (platform.can_browse_folders()) {
    browser.show(FileBrowser::Purpose::open, "Open a CSV or TSV file");
  } else {
    platform.request_open_picker();
  }
}

void Workbench::run_command(Command command) {
  switch (command) {
    case Command::open: state_->show_open_browser(); break;
    case Command::save:
    case Command::filter:
    case Command::undo:
    case Command::redo: break;
  }
}

void Workbench::State::draw_menu() {
  if (!ImGui::BeginMenuBar()) return;
  if (ImGui::BeginMenu("File")) {
    if (ImGui::MenuItem("Open file...", "Ctrl+O")) show_open_browser();
    ImGui::Separator();
    if (ImGui::MenuItem("Quit")) quit = true;
    ImGui::EndMenu();
  }
  if (ImGui::BeginMenu("View")) {
    if (ImGui::MenuItem("Light theme", nullptr, theme == Theme::light)) {
      theme = Theme::light;
      apply_theme(theme, scale);
    }
    if (ImGui::MenuItem("Dark theme", nullptr, theme == Theme::dark)) {
      theme = Theme::dark;
      apply_theme(theme, scale);
    }
    ImGui::EndMenu();
  }
  ImGui::EndMenuBar();
}

void Workbench::State::draw_welcome() {
  ImGui::Spacing();
  ImGui::TextUnformatted("tamis: clean a table, keep the raw file, replay the fix.");
  ImGui::TextDisabled("Open a CSV or TSV file with Ctrl+O, or drop it on this window.");
  ImGui::Spacing();
  if (ImGui::Button("Open file...")) show_open_browser();
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Choose a file to clean. The file itself is never changed.");
}

void Workbench::frame() {
  State& s = *state_;
  const ImGuiViewport* viewport = ImGui::GetMainViewport();
  ImGui::SetNextWindowPos(viewport->WorkPos);
  ImGui::SetNextWindowSize(viewport->WorkSize);
  const ImGuiWindowFlags flags = ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove |
                                 ImGuiWindowFlags_NoBringToFrontOnFocus | ImGuiWindowFlags_MenuBar |
                                 ImGuiWindowFlags_NoSavedSettings;
  ImGui::Begin("tamis##main", nullptr, flags);
  s.draw_menu();
  if (s.open_screen.active()) {
    if (s.open_screen.draw() == OpenScreen::Choice::cancel) s.open_screen.close();
  } else {
    s.draw_welcome();
  }
  ImGui::End();
  if (std::optional<std::string> chosen = s.browser.draw()) open_path(*chosen);
}

Status Workbench::run_action(std::string_view line) {
  std::istringstream words{std::string(line)};
  std::string verb;
  words >> verb;
  if (verb.empty() || verb[0] == '#') return Ok{};
  std::string rest;
  std::getline(words >> std::ws, rest);
  if (verb == "open") {
    open_path(rest);
    return Ok{};
  }
  if (verb == "read-option") {
    std::istringstream parts(rest);
    std::string key, value;
    parts >> key >> value;
    return state_->open_screen.set_option(key, value);
  }
  if (verb == "theme") {
    if (rest != "light" && rest != "dark") return usage_error("theme is light or dark");
    state_->theme = rest == "dark" ? Theme::dark : Theme::light;
    apply_theme(state_->theme, state_->scale);
    return Ok{};
  }
  return usage_error("unknown action: " + verb);
}

}  // namespace tamis::ui
