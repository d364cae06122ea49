#include "workbench.hpp"

#include <imgui.h>

#include <algorithm>
#include <chrono>
#include <new>
#include <sstream>

#include "exports.hpp"
#include "load.hpp"
#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

namespace {

using Clock = std::chrono::steady_clock;

// Work per frame: about 12 ms, so the screen keeps about 60 frames a second
// while a job runs (common practice: leave a few ms of a 16.7 ms frame for drawing).
constexpr double kWorkMillisecondsPerFrame = 12.0;

void tip(const char* text) {
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("%s", text);
}

std::string file_name_of(const std::string& path) {
  const size_t slash = path.find_last_of("/\\");
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

std::string without_extension(const std::string& name) {
  const size_t dot = name.find_last_of('.');
  return dot == std::string::npos || dot == 0 ? name : name.substr(0, dot);
}

}  // namespace

Workbench::State::State(Platform& p) : platform(p), browser(p), open_screen(p) {}

Workbench::Workbench(Platform& platform) : state_(std::make_unique<State>(platform)) {}
Workbench::~Workbench() = default;

void Workbench::set_look(Theme theme, float scale, float framebuffer_ratio) {
  state_->theme = theme;
  state_->scale = scale;
  apply_theme(theme, scale);
  load_ui_font(15.0f, scale, framebuffer_ratio);
}

bool Workbench::busy() const { return !state_->jobs.empty() || state_->has_pending_work() || state_->measure_frames_left > 0; }
bool Workbench::wants_to_quit() const { return state_->quit; }
bool Workbench::measuring_frames() const { return state_->measure_frames_left > 0; }
bool Workbench::showing_table() const { return !state_->open_screen.active() && state_->shown_table() != nullptr; }

void Workbench::open_path(const std::string& path) {
  state_->browser.close();
  state_->open_screen.start(path);
}

void Workbench::open_recipe_path(const std::string& path) {
  if (Status opened = state_->open_recipe(path); !opened) state_->say(opened.error().to_string(), true);
}

void Workbench::show_message(std::string text, bool is_error) { state_->say(std::move(text), is_error); }

void Workbench::work_for(double milliseconds) {
  state_->ask_for_missing_work();
  state_->run_jobs_for(milliseconds);
}

// ---------------------------------------------------------------------------
// Jobs

void Workbench::State::queue(std::unique_ptr<wb::Job> job, std::function<void(wb::Job&)> on_success, bool cancellable) {
  jobs.push_back(QueuedJob{std::move(job), std::move(on_success), cancellable});
}

void Workbench::State::run_jobs_for(double milliseconds) {
  const Clock::time_point start = Clock::now();
  while (!jobs.empty()) {
    QueuedJob& current = jobs.front();
    bool ended = false;
    try {
      ended = current.job->step(wb::kSliceBudget);
    } catch (const std::bad_alloc&) {
      // A browser tab has a hard memory limit; running out ends the work with
      // a message instead of ending the program.
      cancel_jobs();
      jobs.clear();
      say("Out of memory: this table does not fit in the memory this program may use here. "
          "The desktop program tamis-desk, or tamis run (which streams files of any size), can clean it.",
          true);
      return;
    }
    if (ended) {
      QueuedJob done = std::move(current);
      jobs.erase(jobs.begin());
      if (done.job->error()) {
        say(done.job->error()->to_string(), true);
      } else if (!done.job->cancelled() && done.on_success) {
        done.on_success(*done.job);
      }
    }
    if (std::chrono::duration<double, std::milli>(Clock::now() - start).count() >= milliseconds) break;
  }
}

void Workbench::State::cancel_jobs() {
  for (QueuedJob& queued : jobs)
    if (queued.cancellable) queued.job->cancel();
  work_stopped = true;
}

void Workbench::State::draw_waiting(const char* working_text) {
  if (!work_stopped) {
    ImGui::TextDisabled("%s", working_text);
    return;
  }
  ImGui::TextDisabled("Stopped.");
  ImGui::SameLine();
  if (ImGui::SmallButton("Continue")) {
    work_stopped = false;
    profile_asked_for = findings_asked_for = 0;
    view_dirty = true;
  }
  if (ImGui::IsItemHovered()) ImGui::SetTooltip("Start the stopped work again.");
}

// The selected stage must be computed, then profiled, then searched for
// problems; each is queued once per stage serial.
bool Workbench::State::has_pending_work() const {
  if (!document || work_stopped) return false;
  const size_t stage = document->selected_stage();
  if (!document->stage_ready(stage)) return true;
  const uint64_t serial = document->stage_serial(stage);
  return (!document->profile() && profile_asked_for != serial) || (!document->findings() && findings_asked_for != serial) ||
         (stage > 0 && !document->stage_ready(stage - 1));
}

void Workbench::State::ask_for_missing_work() {
  if (!document || !jobs.empty() || work_stopped) return;
  const size_t stage = document->selected_stage();
  if (!document->stage_ready(stage)) {
    queue(document->make_apply_job(stage), nullptr);
    return;
  }
  const uint64_t serial = document->stage_serial(stage);
  if (!document->profile() && profile_asked_for != serial) {
    profile_asked_for = serial;
    queue(document->make_profile_job(), nullptr);
    return;
  }
  if (!document->findings() && findings_asked_for != serial) {
    findings_asked_for = serial;
    queue(document->make_findings_job(), nullptr);
    return;
  }
  // The stage before the selected one, for the Data panel's changed cells
  // (the model drops stages nobody looks at).
  if (stage > 0 && !document->stage_ready(stage - 1)) queue(document->make_apply_job(stage - 1), nullptr);
}

// ---------------------------------------------------------------------------
// Opening

void Workbench::State::say(std::string text, bool is_error) {
  message = std::move(text);
  message_is_error = is_error;
}

void Workbench::State::show_open_browser() {
  browsing_for_recipe = false;
  pending_export.reset();
  if (platform.can_browse_folders()) {
    browser.show(FileBrowser::Purpose::open, "Open a CSV or TSV file");
  } else {
    platform.request_open_picker(Platform::Pick::data_file);
  }
}

void Workbench::State::start_loading() {
  const std::string path = open_screen.path();
  Result<std::unique_ptr<ByteSource>> source = platform.open_for_reading(path);
  if (!source) {
    say(source.error().to_string(), true);
    return;
  }
  CsvOptions options = open_screen.options();
  options.lenient = true;  // malformed records are set aside and listed, as tamis run --max-rejects would
  Result<std::unique_ptr<wb::LoadJob>> job = wb::LoadJob::start(std::move(source.value()), file_name_of(path), options);
  if (!job) {
    say(job.error().to_string(), true);
    return;
  }
  open_screen.close();
  cancel_jobs();
  jobs.clear();
  work_stopped = false;
  queue(std::move(job.value()), [this](wb::Job& done) {
    document = std::make_unique<wb::Document>(static_cast<wb::LoadJob&>(done).take_result());
    recipe_path.clear();
    filters.clear();
    sort.reset();
    view_dirty = true;
    diff.reset();
    diff_serial = 0;
    selected_column.reset();
    profile_asked_for = findings_asked_for = 0;
    similar = SimilarPanelState{};
    const ReadReport& read = document->file().read;
    say("Loaded " + document->file().name + ": " + plural(read.rows, "row", "rows") +
        (read.rejected ? ", " + plural(read.rejected, "malformed record", "malformed records") + " set aside" : std::string()));
  });
}

// ---------------------------------------------------------------------------
// Editing

void Workbench::State::select_stage(size_t stage) {
  if (!document) return;
  document->select_stage(stage);
  view_dirty = true;
  work_stopped = false;
}

void Workbench::State::after_edit(const wb::EditOutcome& outcome, std::optional<size_t> select_after) {
  if (!outcome.applied) {
    say(outcome.problems.empty() ? std::string("the change was refused") : outcome.problems.front().message, true);
    return;
  }
  if (select_after) document->select_stage(*select_after);
  view_dirty = true;
  work_stopped = false;
  if (!outcome.problems.empty()) {
    say("The recipe now has a problem: " + outcome.problems.front().message, true);
  } else {
    say("Recipe: " + plural(document->step_count(), "step", "steps"));
  }
}

Status Workbench::State::add_step(const nlohmann::json& definition, std::optional<size_t> position) {
  if (!document) return usage_error("no file is open");
  const size_t at = position.value_or(document->selected_stage());
  const wb::EditOutcome outcome = document->add_step(definition, at);
  after_edit(outcome, at + 1);
  if (!outcome.applied) return usage_error(message);
  return Ok{};
}

Status Workbench::State::add_finding_fix(size_t finding, size_t fix) {
  if (!document) return usage_error("no file is open");
  const std::vector<Finding>* findings = document->findings();
  if (!findings) return usage_error("the findings are not ready");
  if (finding >= findings->size()) return usage_error("there are only " + std::to_string(findings->size()) + " findings");
  const size_t at = document->selected_stage();
  const wb::EditOutcome outcome = document->add_fix((*findings)[finding], fix);
  after_edit(outcome, at + 1);
  if (!outcome.applied) return usage_error(message);
  return Ok{};
}

Status Workbench::State::merge_similar_groups(const std::vector<size_t>& groups) {
  if (!document) return usage_error("no file is open");
  const wb::SimilarResult* result = document->similar();
  if (!result || result != similar.result) return usage_error("no similar-value groups are shown");
  std::vector<wb::SimilarChoice> choices;
  for (size_t g : groups) {
    if (g >= result->groups.size()) return usage_error("there are only " + std::to_string(result->groups.size()) + " groups");
    wb::SimilarChoice choice;
    choice.group = result->groups[g];
    choice.canonical = similar.canonical[g];
    for (size_t m = 0; m < choice.group.members.size(); ++m)
      if (!similar.keep_member[g][m]) choice.unticked.push_back(choice.group.members[m].value);
    choices.push_back(std::move(choice));
  }
  if (choices.empty()) return usage_error("no group is ticked");
  const size_t at = document->selected_stage();
  const wb::EditOutcome outcome = document->add_similar_groups(result->column, choices);
  after_edit(outcome, at + 1);
  if (!outcome.applied) return usage_error(message);
  return Ok{};
}

void Workbench::State::undo() {
  if (!document || !document->can_undo()) return;
  const std::string label = document->undo_label();
  // Looking at the result stays looking at the result.
  const bool at_result = document->selected_stage() == document->step_count();
  document->undo();
  if (at_result) document->select_stage(document->step_count());
  view_dirty = true;
  work_stopped = false;
  say("Undid " + label);
}

void Workbench::State::redo() {
  if (!document || !document->can_redo()) return;
  const std::string label = document->redo_label();
  const bool at_result = document->selected_stage() == document->step_count();
  document->redo();
  if (at_result) document->select_stage(document->step_count());
  view_dirty = true;
  work_stopped = false;
  say("Redid " + label);
}

void Workbench::run_command(Command command) {
  State& s = *state_;
  // Inside a text field, Ctrl+Z belongs to the field.
  const bool typing = ImGui::GetCurrentContext() && ImGui::GetIO().WantTextInput;
  switch (command) {
    case Command::open: s.show_open_browser(); break;
    case Command::save:
      if (!s.document) break;
      if (s.recipe_path.empty()) {
        s.ask_export_path(ExportKind::recipe, Dialect::postgres);
      } else if (Status saved = s.export_to(ExportKind::recipe, Dialect::postgres, s.recipe_path); !saved) {
        s.say(saved.error().to_string(), true);
      }
      break;
    case Command::filter: s.focus_filter = true; break;
    case Command::undo:
      if (!typing) s.undo();
      break;
    case Command::redo:
      if (!typing) s.redo();
      break;
  }
}

// ---------------------------------------------------------------------------
// Exports

Result<std::string> Workbench::State::export_bytes(ExportKind kind, Dialect dialect) {
  if (!document) return usage_error("no file is open");
  switch (kind) {
    case ExportKind::cleaned_csv: return wb::export_cleaned(*document, std::string("csv"));
    case ExportKind::cleaned_tsv: return wb::export_cleaned(*document, std::string("tsv"));
    case ExportKind::recipe: return wb::export_recipe(*document);
    case ExportKind::sql: return wb::export_sql_script(*document, dialect);
    case ExportKind::report: return wb::export_run_report(*document);
  }
  return usage_error("unknown export");
}

Status Workbench::State::export_to(ExportKind kind, Dialect dialect, const std::string& path) {
  Result<std::string> bytes = export_bytes(kind, dialect);
  if (!bytes) return bytes.take_error();
  if (Status saved = platform.save(path, bytes.value()); !saved) return saved;
  if (kind == ExportKind::recipe) recipe_path = path;
  say("Saved " + path);
  return Ok{};
}

void Workbench::State::ask_export_path(ExportKind kind, Dialect dialect) {
  if (!document) return;
  const std::string stem = without_extension(document->file().name);
  std::string name;
  switch (kind) {
    case ExportKind::cleaned_csv: name = stem + ".cleaned.csv"; break;
    case ExportKind::cleaned_tsv: name = stem + ".cleaned.tsv"; break;
    case ExportKind::recipe: name = stem + ".recipe.json"; break;
    case ExportKind::sql: name = stem + "." + std::string(dialect_name(dialect)) + ".sql"; break;
    case ExportKind::report: name = stem + ".report.json"; break;
  }
  if (!platform.can_browse_folders()) {
    // A browser saves through a download; the browser asks where, or uses its Downloads folder.
    if (Status saved = export_to(kind, dialect, name); !saved) say(saved.error().to_string(), true);
    return;
  }
  pending_export = kind;
  pending_dialect = dialect;
  browsing_for_recipe = false;
  browser.show(FileBrowser::Purpose::save, "Save as", name);
}

Status Workbench::State::open_recipe(const std::string& path) {
  if (!document) return usage_error("open a data file first; the recipe is replayed on it");
  Result<std::unique_ptr<ByteSource>> source = platform.open_for_reading(path);
  if (!source) return source.take_error();
  std::string text;
  char buffer[65536];
  for (;;) {
    Result<size_t> got = source.value()->read(buffer, sizeof buffer);
    if (!got) return got.take_error();
    if (got.value() == 0) break;
    text.append(buffer, got.value());
  }
  const wb::EditOutcome outcome = document->open_recipe(text, file_name_of(path));
  after_edit(outcome, document->step_count());
  if (!outcome.applied) return usage_error(message);
  recipe_path = path;
  return Ok{};
}

// ---------------------------------------------------------------------------
// Frame

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
  s.run_jobs_for(kWorkMillisecondsPerFrame);
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
