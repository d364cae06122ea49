// The workbench's frame: menu bar, About box, welcome screen, status bar and
// the panels' layout, drawn once per frame after this frame's share of work.
#include <imgui.h>

#include "text_format.hpp"
#include "workbench.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

namespace {

// While work runs, each frame gives it about 5.7 times what the rest of the
// previous frame cost (drawing, and the wait for the previous frame: about
// 45 ms in headless Chromium on SwiftShader, 20-40 ms under Mesa's llvmpipe),
// so about 85% of the time goes to the work; at least 12 ms, which keeps 60
// frames a second where drawing is fast (common practice: leave a few ms of
// a 16.7 ms frame for drawing), and never so much that a frame takes longer
// than kLongestBusyFrameMs (a click on Cancel is seen within it). Measured on
// a million rows in the page: a 75% share and 150 ms frames made loading 50%
// slower than letting each finding detector run whole (with gaps of 3 s).
constexpr double kWorkShareOfBusyFrame = 0.85;
constexpr double kLeastWorkMs = 12.0;
constexpr double kLongestBusyFrameMs = 250.0;

double milliseconds_between(Clock::time_point from, Clock::time_point to) {
  return std::chrono::duration<double, std::milli>(to - from).count();
}

void tip(const char* text) {
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", text);
}

}  // namespace

const Table* Workbench::State::shown_table() const {
  if (!document) return nullptr;
  const size_t stage = document->selected_stage();
  if (!document->stage_ready(stage)) return nullptr;
  return &document->table_at(stage);
}

void Workbench::State::draw_menu() {
  if (!ImGui::BeginMenuBar()) return;
  if (ImGui::BeginMenu("File")) {
    if (ImGui::MenuItem("Open file...", "Ctrl+O")) show_open_browser();
    tip("Choose a CSV or TSV file to clean. The file itself is never changed.");
    if (ImGui::MenuItem("Open recipe...", nullptr, false, document != nullptr)) {
      if (platform.can_browse_folders()) {
        browsing_for_recipe = true;
        pending_export.reset();
        browser.show(FileBrowser::Purpose::open, "Open a recipe (JSON) and replay it on this file");
      } else {
        platform.request_open_picker(Platform::Pick::recipe);
      }
    }
    tip("Replace the recipe with one saved earlier and replay it on this file; steps that no longer fit are marked.");
    if (ImGui::MenuItem("Save recipe", "Ctrl+S", false, document != nullptr)) {
      if (recipe_path.empty()) {
        ask_export_path(ExportKind::recipe, Dialect::postgres);
      } else if (Status saved = export_to(ExportKind::recipe, Dialect::postgres, recipe_path); !saved) {
        say(saved.error().to_string(), true);
      }
    }
    tip("Save the recipe as JSON, to replay later with tamis run.");
    ImGui::Separator();
    if (ImGui::BeginMenu("Export", document != nullptr)) {
      if (ImGui::MenuItem("Cleaned file (CSV)...")) ask_export_path(ExportKind::cleaned_csv, Dialect::postgres);
      tip("The table after every enabled step, exactly as tamis run writes it.");
      if (ImGui::MenuItem("Cleaned file (TSV)...")) ask_export_path(ExportKind::cleaned_tsv, Dialect::postgres);
      tip("The same, separated by tabs.");
      if (ImGui::MenuItem("Recipe (JSON)...")) ask_export_path(ExportKind::recipe, Dialect::postgres);
      tip("The steps as a recipe file for tamis run, tamis sql and later sessions.");
      if (ImGui::BeginMenu("SQL script")) {
        for (Dialect dialect : {Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark}) {
          const std::string label = std::string(dialect_name(dialect)) + "...";
          if (ImGui::MenuItem(label.c_str())) ask_export_path(ExportKind::sql, dialect);
          tip("The recipe as one commented SQL script for this database; it never changes the raw table.");
        }
        ImGui::EndMenu();
      }
      if (ImGui::MenuItem("Run report (JSON)...")) ask_export_path(ExportKind::report, Dialect::postgres);
      tip("What every step changed, with row counts that balance, as tamis run reports it.");
      ImGui::EndMenu();
    }
    if (platform.can_quit()) {
      ImGui::Separator();
      if (ImGui::MenuItem("Quit")) quit = true;
      tip("Close tamis. Unsaved recipe changes are lost.");
    }
    ImGui::EndMenu();
  }
  if (ImGui::BeginMenu("Edit")) {
    const std::string undo_text = document && document->can_undo() ? "Undo " + document->undo_label() : std::string("Undo");
    const std::string redo_text = document && document->can_redo() ? "Redo " + document->redo_label() : std::string("Redo");
    if (ImGui::MenuItem(undo_text.c_str(), "Ctrl+Z", false, document && document->can_undo())) undo();
    if (ImGui::MenuItem(redo_text.c_str(), "Ctrl+Shift+Z", false, document && document->can_redo())) redo();
    ImGui::Separator();
    if (ImGui::MenuItem("Filter rows", "Ctrl+F", false, document != nullptr)) focus_filter = true;
    tip("Show only some rows in the Data panel. The recipe is not changed.");
    ImGui::EndMenu();
  }
  if (ImGui::BeginMenu("Step", document != nullptr && document->stage_ready(document->selected_stage()))) {
    ImGui::TextDisabled("Add after the selected step:");
    for (const StepSpec& spec : step_specs()) {
      const std::string label = std::string(spec.title) + "##" + std::string(spec.op);
      if (ImGui::MenuItem(label.c_str())) {
        const size_t at = document->selected_stage();
        form.open_new(spec, at, document->schema_at(at));
      }
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("%.*s", static_cast<int>(spec.op.size()), spec.op.data());
    }
    ImGui::EndMenu();
  }
  if (ImGui::BeginMenu("View")) {
    if (ImGui::MenuItem("Light theme", nullptr, theme == Theme::light)) {
      theme = Theme::light;
      apply_theme(theme, scale);
    }
    tip("Dark text on a warm light background.");
    if (ImGui::MenuItem("Dark theme", nullptr, theme == Theme::dark)) {
      theme = Theme::dark;
      apply_theme(theme, scale);
    }
    tip("Light text on a slate background.");
    ImGui::EndMenu();
  }
  if (ImGui::BeginMenu("Help")) {
    if (ImGui::MenuItem("About tamis")) show_about = true;
    tip("What this program is, and where your files go.");
    ImGui::EndMenu();
  }
  ImGui::EndMenuBar();
}

void Workbench::State::draw_about() {
  if (show_about) {
    ImGui::OpenPopup("About tamis");
    show_about = false;
  }
  ImGui::SetNextWindowSize(ImVec2(ImGui::GetFontSize() * 32, 0));
  if (!ImGui::BeginPopupModal("About tamis", nullptr, ImGuiWindowFlags_NoResize)) return;
  ImGui::TextUnformatted("tamis: clean a table, keep the raw file, replay the fix.");
  ImGui::Spacing();
  const std::string privacy = platform.privacy_statement();
  ImGui::TextWrapped("%s", privacy.c_str());
  ImGui::Spacing();
  ImGui::TextWrapped("Every change becomes a step of a recipe. Review the rows a step removes before you rely on "
                     "the result, keep the raw extract, and follow your organisation's rules on keeping and "
                     "sharing data.");
  ImGui::Spacing();
  if (ImGui::Button("Close") || ImGui::IsKeyPressed(ImGuiKey_Escape)) ImGui::CloseCurrentPopup();
  ImGui::EndPopup();
}

void Workbench::State::draw_welcome() {
  ImGui::Spacing();
  ImGui::TextUnformatted("tamis: clean a table, keep the raw file, replay the fix.");
  ImGui::TextDisabled("Open a CSV or TSV file with Ctrl+O, or drop it on this window.");
  ImGui::Spacing();
  if (ImGui::Button("Open file...")) show_open_browser();
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Choose a file to clean. The file itself is never changed.");
  if (const std::string demo = platform.demo_file(); !demo.empty()) {
    ImGui::SameLine();
    if (ImGui::Button("Open the demo")) open_screen.start(demo);
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("An invented city tree-planting survey with typical problems to try the screens on.");
  }
}

void Workbench::State::draw_status_bar() {
  ImGui::Separator();
  if (!jobs.empty()) {
    const wb::Job& job = *jobs.front().job;
    const std::string label = job.label();
    ImGui::ProgressBar(static_cast<float>(job.progress()), ImVec2(ImGui::GetFontSize() * 16, 0), label.c_str());
    if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", label.c_str());
    if (jobs.front().cancellable) {
      ImGui::SameLine();
      if (ImGui::SmallButton("Cancel")) cancel_jobs();
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("Stop this work. Nothing is changed by stopping it.");
    }
    ImGui::SameLine();
  }
  if (document) {
    const size_t stage = document->selected_stage();
    ImGui::TextDisabled("%s", document->file().name.c_str());
    ImGui::SameLine();
    if (const Table* table = shown_table()) {
      ImGui::TextDisabled("| %s x %s | %s", count_text(table->row_count()).c_str(),
                          plural(table->column_count(), "column", "columns").c_str(),
                          stage == 0 ? "as read" : ("after step " + std::to_string(stage)).c_str());
      ImGui::SameLine();
    }
  }
  if (!message.empty()) {
    if (message_is_error) {
      ImGui::TextColored(ImColor(palette().error_text), "%s", message.c_str());
    } else {
      ImGui::TextUnformatted(message.c_str());
    }
  }
}

void Workbench::State::draw_workspace() {
  const ImVec2 available = ImGui::GetContentRegionAvail();
  const float status_height = ImGui::GetFrameHeightWithSpacing() + ImGui::GetStyle().ItemSpacing.y;
  const float height = available.y - status_height;
  const float left_width = std::max(ImGui::GetFontSize() * 14, available.x * 0.2f);
  const float right_width = std::max(ImGui::GetFontSize() * 17, available.x * 0.27f);
  const float centre_width = available.x - left_width - right_width - ImGui::GetStyle().ItemSpacing.x * 2;

  ImGui::BeginChild("##recipe-panel", ImVec2(left_width, height), true);
  draw_recipe_panel();
  ImGui::EndChild();
  ImGui::SameLine();

  ImGui::BeginGroup();
  const float changes_height = height * 0.3f;
  ImGui::BeginChild("##data-panel", ImVec2(centre_width, height - changes_height - ImGui::GetStyle().ItemSpacing.y), true);
  draw_data_panel();
  ImGui::EndChild();
  ImGui::BeginChild("##changes-panel", ImVec2(centre_width, changes_height), true);
  draw_changes_panel();
  ImGui::EndChild();
  ImGui::EndGroup();
  ImGui::SameLine();

  ImGui::BeginChild("##side-panel", ImVec2(right_width, height), true);
  if (ImGui::BeginTabBar("##side-tabs")) {
    auto tab = [&](const char* label, SidePanel panel, const char* tip) {
      ImGuiTabItemFlags flags = side_forced && side == panel ? ImGuiTabItemFlags_SetSelected : 0;
      const bool open = ImGui::BeginTabItem(label, nullptr, flags);
      if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", tip);
      if (open) {
        if (!side_forced) side = panel;
        switch (panel) {
          case SidePanel::column: draw_column_panel(); break;
          case SidePanel::findings: draw_findings_panel(); break;
          case SidePanel::similar: draw_similar_panel(); break;
        }
        ImGui::EndTabItem();
      }
    };
    tab("Findings", SidePanel::findings, "Problems found across the table, most rows first, each with a fix you can preview and add.");
    tab("Column", SidePanel::column, "What is in the selected column: type, counts, values, shapes.");
    tab("Similar values", SidePanel::similar, "Variant spellings of the same value, grouped; merge them into one.");
    side_forced = false;
    ImGui::EndTabBar();
  }
  ImGui::EndChild();
  draw_status_bar();
}

void Workbench::frame() {
  State& s = *state_;
  s.ask_for_missing_work();
  const Clock::time_point start = Clock::now();
  const double rest_ms = s.last_frame_start == Clock::time_point{}
                             ? 0.0
                             : std::max(0.0, milliseconds_between(s.last_frame_start, start) - s.last_work_ms);
  const double share = rest_ms * kWorkShareOfBusyFrame / (1.0 - kWorkShareOfBusyFrame);
  s.run_jobs_for(std::max(kLeastWorkMs, std::min(share, kLongestBusyFrameMs - rest_ms)));
  s.last_frame_start = start;
  s.last_work_ms = milliseconds_between(start, Clock::now());
  s.ask_for_missing_work();
  if (s.measure_frames_left > 0) {
    s.grid.scroll_by_rows(s.scroll_per_frame);
    --s.measure_frames_left;
  }

  const ImGuiViewport* viewport = ImGui::GetMainViewport();
  ImGui::SetNextWindowPos(viewport->WorkPos);
  ImGui::SetNextWindowSize(viewport->WorkSize);
  // No background of its own: the shell clears the screen with the window
  // colour, which saves a full-screen fill per frame (it counts with
  // software OpenGL).
  const ImGuiWindowFlags flags = ImGuiWindowFlags_NoDecoration | ImGuiWindowFlags_NoMove |
                                 ImGuiWindowFlags_NoBringToFrontOnFocus | ImGuiWindowFlags_MenuBar |
                                 ImGuiWindowFlags_NoSavedSettings | ImGuiWindowFlags_NoBackground;
  ImGui::Begin("tamis##main", nullptr, flags);
  s.draw_menu();
  if (s.open_screen.active()) {
    switch (s.open_screen.draw()) {
      case OpenScreen::Choice::load: s.start_loading(); break;
      case OpenScreen::Choice::cancel: s.open_screen.close(); break;
      case OpenScreen::Choice::none: break;
    }
  } else if (s.document) {
    s.draw_workspace();
  } else {
    s.draw_welcome();
    if (!s.jobs.empty() || !s.message.empty()) s.draw_status_bar();
  }
  if (s.document) {
    if (auto request = s.form.take_full_count_request()) {
      s.queue(s.document->make_preview_job(request->first, request->second), [&s](wb::Job& done) {
        s.form.set_full_preview(static_cast<wb::Document::PreviewJob&>(done).take_result());
      });
    }
    if (std::optional<StepForm::Submit> submit = s.form.draw(*s.document)) {
      if (submit->edited_step) {
        s.after_edit(s.document->edit_step(*submit->edited_step, submit->definition), *submit->edited_step + 1);
      } else if (submit->preview && submit->preview->complete) {
        s.after_edit(s.document->add_step(std::move(*submit->preview)), submit->position + 1);
      } else {
        s.after_edit(s.document->add_step(submit->definition, submit->position), submit->position + 1);
      }
    }
  }
  s.draw_about();
  ImGui::End();

  if (std::optional<std::string> chosen = s.browser.draw()) {
    if (s.pending_export) {
      if (Status saved = s.export_to(*s.pending_export, s.pending_dialect, *chosen); !saved)
        s.say(saved.error().to_string(), true);
      s.pending_export.reset();
    } else if (s.browsing_for_recipe) {
      s.browsing_for_recipe = false;
      if (Status opened = s.open_recipe(*chosen); !opened) s.say(opened.error().to_string(), true);
    } else {
      open_path(*chosen);
    }
  }
}

}  // namespace tamis::ui
