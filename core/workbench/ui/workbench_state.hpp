// Internal to the screens: what the workbench remembers between frames. Each
// panel is drawn by one member function, in its own file.
#pragma once

#include <nlohmann/json.hpp>

#include <chrono>
#include <cstdint>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "data_grid.hpp"
#include "data_view.hpp"
#include "document.hpp"
#include "file_browser.hpp"
#include "job.hpp"
#include "look.hpp"
#include "open_screen.hpp"
#include "platform.hpp"
#include "step_form.hpp"
#include "workbench.hpp"

namespace tamis::ui {

using Clock = std::chrono::steady_clock;

enum class SidePanel { column, findings, similar };

// What a "Save as" in the file browser is for.
enum class ExportKind { cleaned_csv, cleaned_tsv, recipe, sql, report };

struct QueuedJob {
  std::unique_ptr<workbench::Job> job;
  std::function<void(workbench::Job&)> on_success;
  bool cancellable = true;
};

// Per-column numbers the Column panel draws (histogram and lengths), computed
// once per stage and column.
struct ColumnShape {
  uint64_t serial = 0;
  size_t column = 0;
  std::vector<float> histogram;  // counts per equal-width bin of the numeric values
  double histogram_min = 0, histogram_max = 0;
  std::vector<float> lengths;  // counts per length in code points (last bin: longer)
  size_t longest_shown = 0;
};

// A filter or sort of the Data view names its column, so it keeps meaning
// the same column when another step is selected (columns move, appear and go).
struct ViewFilter {
  std::string column;
  workbench::FilterKind kind = workbench::FilterKind::contains;
  std::string text;
};
struct ViewSort {
  std::string column;
  bool descending = false;
};

struct SimilarPanelState {
  size_t column = 0;
  SimilarMethod method = SimilarMethod::token_key;
  float threshold = 0.85f;
  // Per group of the current result: merge it, chosen canonical, unticked members.
  uint64_t result_serial = 0;
  const workbench::SimilarResult* result = nullptr;
  std::vector<bool> merge;
  std::vector<std::string> canonical;
  std::vector<std::vector<bool>> keep_member;
};

struct Workbench::State {
  explicit State(Platform& p);

  Platform& platform;
  Theme theme = Theme::light;
  float scale = 1.0f;
  FileBrowser browser;
  OpenScreen open_screen;
  bool quit = false;
  std::string message;        // the last outcome, shown in the status bar
  bool message_is_error = false;

  // The open file and its recipe.
  std::unique_ptr<workbench::Document> document;
  std::string recipe_path;
  std::vector<QueuedJob> jobs;  // the first runs; the rest wait
  // Set by Cancel: nothing new starts until the next edit, selection or Continue.
  bool work_stopped = false;
  uint64_t profile_asked_for = 0, findings_asked_for = 0;  // stage serials already queued

  // Data panel.
  DataGrid grid;
  std::vector<ViewFilter> filters;
  std::optional<ViewSort> sort;
  std::vector<size_t> view;  // rows of the shown stage, after filters and sort
  bool view_is_all = true;   // no filter, no sort: the view is every row in order
  uint64_t view_serial = 0;  // stage serial the view was made for
  bool view_dirty = true;
  uint64_t view_request = 0;   // the latest view asked of a background job
  bool view_computing = false;
  std::optional<size_t> selected_column;
  std::unique_ptr<workbench::StepDiff> diff;  // cells changed by the selected step
  uint64_t diff_serial = 0;
  bool focus_filter = false;
  workbench::RowFilter new_filter;  // the filter bar's fields
  std::optional<DateFormat> date_format;

  SidePanel side = SidePanel::findings;
  bool side_forced = false;  // set the tab on the next frame (actions, clicks elsewhere)
  ColumnShape column_shape;
  SimilarPanelState similar;
  StepForm form;

  // Test mode: rows to scroll per frame and frames left to measure.
  long scroll_per_frame = 0;
  size_t measure_frames_left = 0;

  // Jobs and background work.
  void queue(std::unique_ptr<workbench::Job> job, std::function<void(workbench::Job&)> on_success,
             bool cancellable = true);
  void run_jobs_for(double milliseconds);
  Clock::time_point last_frame_start;  // of the previous frame, for the share of work (workbench_frame.cpp)
  double last_work_ms = 0;             // how long that frame's work ran
  void ask_for_missing_work();
  bool has_pending_work() const;
  void cancel_jobs();
  // "Stopped" with a Continue button, where a panel waits for work that was cancelled.
  void draw_waiting(const char* working_text);

  // Opening.
  void show_open_browser();
  void start_loading();
  void say(std::string text, bool is_error = false);

  // Editing: every control and script action goes through these.
  void after_edit(const workbench::EditOutcome& outcome, std::optional<size_t> select_after);
  Status add_step(const nlohmann::json& definition, std::optional<size_t> position);
  Status add_finding_fix(size_t finding, size_t fix);
  Status merge_similar_groups(const std::vector<size_t>& groups);
  // Fresh choices (every group ticked, its own canonical, every member kept)
  // when the document has a new similar-values result; the current one otherwise.
  const workbench::SimilarResult* sync_similar_choices();
  void select_stage(size_t stage);
  void undo();
  void redo();

  // Exports.
  Result<std::string> export_bytes(ExportKind kind, Dialect dialect);
  Status export_to(ExportKind kind, Dialect dialect, const std::string& path);
  void ask_export_path(ExportKind kind, Dialect dialect);
  std::optional<ExportKind> pending_export;
  Dialect pending_dialect = Dialect::postgres;
  bool browsing_for_recipe = false;
  Status open_recipe(const std::string& path);

  // Drawing.
  void draw_menu();
  void draw_welcome();
  void draw_about();
  bool show_about = false;
  void draw_status_bar();
  void draw_workspace();
  void draw_data_panel();
  void draw_filter_bar();
  void refresh_view();
  void draw_column_panel();
  void draw_findings_panel();
  void draw_similar_panel();
  void draw_recipe_panel();
  void draw_changes_panel();
  const Table* shown_table() const;
};

}  // namespace tamis::ui
