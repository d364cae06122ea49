// The workbench's model (design §7), with no window: the file as loaded
// (never modified), the recipe being built, the table as of every step, what
// every step changed, and the undoable commands that edit the recipe.
//
// Stages: stage 0 is the file as the recipe's input section lets it through
// (expected columns kept, rows whose values do not fit a declared type set
// aside, as `tamis run` does); stage k is the table after the first k steps;
// stage step_count() is the cleaned result. A disabled step, or one that does
// not fit (its parameters name a missing column, say), passes its input
// through unchanged and reports a StepProblem, so the later steps still show.
//
// Stages are computed lazily and cached; an edit drops the cache from the
// first step it changes. table_at() computes what is missing at once (tests,
// small files); the shells instead check stage_ready() and run
// make_apply_job() in slices. Tables share their unchanged columns
// (copy-on-write). To bound memory on big files, only these tables stay at
// hand: the file (stage 0), the selected stage and the one before it, and
// the result; the others are dropped once computed (their change records,
// serial and schema stay) and recomputed when asked for.
//
// Opening a recipe checks its input section against the file as opened
// (delimiter, header, encoding, expected columns): a difference is a problem
// of the input section, since `tamis run` would read the file differently.
//
// Threads: a Document and the jobs it makes belong to one thread at a time,
// and the jobs must not outlive it.
// A shell that steps a job on a worker thread must not touch the document
// until the job has ended. An edit made between two slices is safe: jobs
// notice it and carry on with the new recipe.
#pragma once

#include <nlohmann/json.hpp>

#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "change.hpp"
#include "findings/findings.hpp"
#include "job.hpp"
#include "load.hpp"
#include "profile.hpp"
#include "recipe.hpp"
#include "similar/similar_values.hpp"
#include "table.hpp"

namespace tamis::workbench {

// Why a step (or the recipe's input section) does not fit the table it sees.
struct StepProblem {
  std::optional<size_t> step;  // 0-based recipe index; nullopt: the input section
  std::string key;             // the parameter at fault ("column", "map", ...); empty when none is named
  std::string message;         // the engine's message, naming step, key and what was expected
  // For SQL expressions (keep_rows, drop_rows, derive_column): the 1-based
  // character of the parameter's text where the problem is.
  std::optional<size_t> character = std::nullopt;
};

// The result of an edit command. Commands that take step parameters (add,
// edit) refuse parameters that do not fit and leave the document unchanged;
// every other command is applied and lists the problems the recipe now has
// (moving a step before the one that creates its column, say).
struct EditOutcome {
  bool applied = false;
  std::vector<StepProblem> problems;
  explicit operator bool() const { return applied; }
};

struct RowRange {
  size_t begin = 0;
  size_t end = 0;
};

// A candidate step tried at a position without changing the document.
struct Preview {
  size_t position = 0;  // the step would become recipe step `position`, seeing stage `position`
  nlohmann::json definition;
  std::optional<StepProblem> problem;  // the step does not fit: nothing below is set
  std::string description;             // the step's plain sentence
  RowRange rows;                       // the input rows covered
  bool complete = false;               // covers every row: the counts are final
  // The step's result on a row depends on other rows (deduplicate,
  // fill_from_group, carry_forward, some require rules): a window preview
  // can differ from the complete one beyond its counts.
  bool depends_on_other_rows = false;
  Table before;                        // the covered input rows
  Table after;                         // what the step made of them
  ChangeRecord change;
  uint64_t input_serial = 0;           // identifies the stage it was computed on
};

// A similar-values group as the analyst settled it in the Similar values panel.
struct SimilarChoice {
  SimilarGroup group;
  std::string canonical;                // the chosen spelling (one of the members)
  std::vector<std::string> unticked;    // members to leave as they are
};

// {"op": "map_values", ...} for the chosen groups (core/engine/similar).
nlohmann::ordered_json similar_values_step(std::string_view column, std::span<const SimilarChoice> choices);

struct SimilarResult {
  std::string column;
  SimilarOptions options;
  std::vector<SimilarGroup> groups;
  SimilarStats stats;
};

class Document {
 public:
  // A new document with an empty recipe whose input section describes the
  // file as read (dialect, columns as text).
  explicit Document(LoadedFile file);
  ~Document();
  Document(const Document&) = delete;
  Document& operator=(const Document&) = delete;

  const LoadedFile& file() const { return file_; }
  const Recipe& recipe() const { return recipe_; }
  size_t step_count() const { return recipe_.steps.size(); }
  size_t stage_count() const { return recipe_.steps.size() + 1; }
  // Changes with every edit, undo and redo (shells redraw, caches compare it).
  uint64_t revision() const { return revision_; }

  // --- Stages and what each step did (computed now when missing) ---
  // The reference stays valid until the next edit or computation; copy the
  // Table (cheap, copy-on-write) to keep it longer.
  const Table& table_at(size_t stage);
  const Table& result() { return table_at(step_count()); }
  // The stage's table is at hand: table_at(stage) returns at once.
  bool stage_ready(size_t stage) const;
  // The step has been computed: change(step) returns at once, even when the
  // table after it has been dropped since.
  bool step_computed(size_t step) const;
  // The columns of a stage (as computed, else as the steps declare them).
  Schema schema_at(size_t stage) const;
  // What step `step` changed; an empty record for a disabled or failing step.
  const ChangeRecord& change(size_t step);
  // The step's plain sentence (or its op and problem when it does not fit).
  std::string describe_step(size_t step) const;
  // Problems of the input section and of every step, in recipe order.
  std::vector<StepProblem> problems() const;
  std::optional<StepProblem> step_problem(size_t step) const;
  // Rows the input section set aside (declared types), with the reason.
  const std::vector<RemovedRow>& input_rejects() const;
  uint64_t input_rejected_rows() const;
  // Computes the missing stages up to `through_stage` in slices.
  std::unique_ptr<Job> make_apply_job(std::optional<size_t> through_stage = std::nullopt);

  // --- Selection: the stage shown in the Data, Column, Findings panels ---
  size_t selected_stage() const { return selected_; }
  void select_stage(size_t stage);
  // Identifies the computed table of a stage (kept when its table is
  // dropped and recomputed); 0 when not computed.
  uint64_t stage_serial(size_t stage) const;

  // --- Editing (undoable) ---
  // At the end when position is nullopt. `definition` is a recipe step object.
  // The new step becomes the selected one (its result is shown).
  EditOutcome add_step(const nlohmann::json& definition, std::optional<size_t> position = std::nullopt);
  // Adds a previewed step, reusing its result when it covered the whole
  // table and the stage it saw is unchanged.
  EditOutcome add_step(Preview&& preview);
  // Replaces the step's parameters (op included); keeps its note and enabled
  // flag unless the definition sets them.
  EditOutcome edit_step(size_t step, const nlohmann::json& definition);
  EditOutcome set_enabled(size_t step, bool enabled);
  EditOutcome set_note(size_t step, std::string note);
  // The step at `from` moves so that it ends up at index `to`.
  EditOutcome move_step(size_t from, size_t to);
  EditOutcome delete_step(size_t step);
  // Opening a recipe file: its steps replayed on this file; the outcome lists
  // where the recipe no longer fits (missing columns, invalid steps).
  EditOutcome replace_recipe(Recipe recipe);
  EditOutcome open_recipe(std::string_view json_text, const std::string& name);

  bool can_undo() const;
  bool can_redo() const;
  std::string undo_label() const;  // e.g. "add trim", empty when nothing to undo
  std::string redo_label() const;
  bool undo();
  bool redo();

  // --- Preview: never changes the document ---
  // Applies the candidate to rows `window` of stage `position` (all rows
  // when nullopt). A window keeps a preview on a million rows interactive;
  // make_preview_job() then counts over every row in slices.
  Preview preview(const nlohmann::json& definition, size_t position, std::optional<RowRange> window = std::nullopt);
  class PreviewJob;
  std::unique_ptr<PreviewJob> make_preview_job(const nlohmann::json& definition, size_t position);

  // --- Column profile, findings, similar values of the selected stage ---
  // Typed columns are profiled through their canonical text (ISO 8601 dates).
  // nullptr until the job made for the current selection has finished.
  const TableProfile* profile() const;
  std::unique_ptr<Job> make_profile_job();
  const std::vector<Finding>* findings() const;
  std::unique_ptr<Job> make_findings_job(FindingOptions options = {});
  // Inserts a finding's fix right after the selected stage (and selects it,
  // so fixes added one after another stay in that order).
  EditOutcome add_fix(const Finding& finding, size_t fix = 0);
  const SimilarResult* similar() const;
  std::unique_ptr<Job> make_similar_job(size_t column, SimilarOptions options = {});
  // Inserts the map_values step for the chosen groups after the selected stage.
  EditOutcome add_similar_groups(const std::string& column, std::span<const SimilarChoice> choices);

  struct State;  // internal; public only for the jobs in document.cpp

 private:
  LoadedFile file_;
  Recipe recipe_;
  uint64_t revision_ = 0;
  size_t selected_ = 0;
  std::unique_ptr<State> state_;
};

class Document::PreviewJob final : public Job {
 public:
  struct Impl;
  explicit PreviewJob(std::unique_ptr<Impl> impl);
  ~PreviewJob() override;
  bool step(size_t budget) override;
  double progress() const override;
  std::string label() const override;
  // The complete preview once step() returned true without error.
  Preview take_result();

 private:
  std::unique_ptr<Impl> impl_;
};

}  // namespace tamis::workbench
