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

}  // namespace tamis::ui
