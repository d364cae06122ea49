#include "document.hpp"

#include <algorithm>

#include "input_check.hpp"
#include "steps/registry.hpp"
#include "stepping.hpp"

namespace tamis::workbench {

namespace {

using json = nlohmann::json;

// Step parameter errors read "(op) 'key': message" (steps/step_params.cpp).
std::string key_of(const std::string& message) {
  if (message.empty() || message[0] != '(') return {};
  const size_t open = message.find(") '");
  if (open == std::string::npos) return {};
  const size_t close = message.find("':", open + 3);
  if (close == std::string::npos) return {};
  return message.substr(open + 3, close - open - 3);
}

// Expression errors say "at character N: " (core/engine/expr/lexer.cpp).
std::optional<size_t> character_of(const std::string& message) {
  static constexpr std::string_view kMarker = "at character ";
  const size_t at = message.find(kMarker);
  if (at == std::string::npos) return std::nullopt;
  size_t value = 0;
  size_t i = at + kMarker.size();
  const size_t digits_start = i;
  while (i < message.size() && message[i] >= '0' && message[i] <= '9') value = value * 10 + static_cast<size_t>(message[i++] - '0');
  if (i == digits_start) return std::nullopt;
  return value;
}

StepProblem problem_of(const Error& error, std::optional<size_t> step) {
  StepProblem p;
  p.step = error.step ? std::optional<size_t>(static_cast<size_t>(*error.step)) : step;
  p.key = key_of(error.message);
  p.message = error.message;
  p.character = character_of(error.message);
  return p;
}

// A step's definition as far as its result is concerned: the note changes nothing.
json without_note(const RecipeStep& step) {
  json d = step.definition;
  d.erase("note");
  d["enabled"] = step.enabled;
  return d;
}

std::string input_section_text(const Recipe& recipe) {
  Recipe only_input;
  only_input.input = recipe.input;
  return recipe_to_json(only_input);
}

// The first step whose result can differ between the two recipes.
size_t first_difference(const Recipe& a, const Recipe& b) {
  const size_t common = std::min(a.steps.size(), b.steps.size());
  for (size_t i = 0; i < common; ++i)
    if (without_note(a.steps[i]) != without_note(b.steps[i])) return i;
  return common;
}

json to_plain_json(const nlohmann::ordered_json& j) { return json::parse(j.dump()); }

// Where the recipe's input section would read the file differently from how
// it was opened: `tamis run` would then see other records or columns.
std::vector<StepProblem> dialect_problems(const RecipeInput& input, const LoadedFile& file) {
  const ReadReport& read = file.read;
  std::vector<StepProblem> out;
  auto shown = [](char c) { return c == '\t' ? std::string("tab") : "'" + std::string(1, c) + "'"; };
  if (input.delimiter && *input.delimiter != read.delimiter)
    out.push_back({std::nullopt, "delimiter",
                   "input.delimiter: the recipe reads fields separated by " + shown(*input.delimiter) +
                       ", but this file was opened with " + shown(read.delimiter)});
  if (input.quote != file.quote)
    out.push_back({std::nullopt, "quoteChar",
                   "input.quoteChar: the recipe quotes fields with " + shown(input.quote) +
                       ", but this file was opened with " + shown(file.quote)});
  if (input.skip_rows != file.skip_rows)
    out.push_back({std::nullopt, "skipRows",
                   "input.skipRows: the recipe skips " + std::to_string(input.skip_rows) +
                       " lines before the header, but this file was opened skipping " +
                       std::to_string(file.skip_rows)});
  if (input.header && *input.header != read.header)
    out.push_back({std::nullopt, "header",
                   std::string("input.header: the recipe expects ") + (*input.header ? "a" : "no") +
                       " header row, but this file was opened " + (read.header ? "with" : "without") + " one"});
  if (input.encoding) {
    const auto expected = encoding_from_name(*input.encoding);
    if (expected && *expected != read.encoding)
      out.push_back({std::nullopt, "encoding",
                     "input.encoding: the recipe reads " + *input.encoding + ", but this file was opened as " +
                         std::string(encoding_name(read.encoding))});
  }
  return out;
}

}  // namespace

nlohmann::ordered_json similar_values_step(std::string_view column, std::span<const SimilarChoice> choices) {
  std::vector<SimilarGroup> groups;
  for (const SimilarChoice& choice : choices) {
    SimilarGroup g;
    g.canonical = choice.canonical.empty() ? choice.group.canonical : choice.canonical;
    for (const SimilarMember& m : choice.group.members)
      if (m.value == g.canonical ||
          std::find(choice.unticked.begin(), choice.unticked.end(), m.value) == choice.unticked.end())
        g.members.push_back(m);
    groups.push_back(std::move(g));
  }
  return map_values_step(column, groups);
}

struct Document::State {
  struct Slot {
    std::shared_ptr<const Step> step;  // parsed against the columns it sees (also when disabled)
    std::optional<StepProblem> problem;
  };
  // A computed stage keeps its serial and schema when its table is evicted;
  // recomputing it gives the same table (steps are deterministic).
  struct Stage {
    std::optional<Table> table;
    uint64_t serial = 0;  // 0: not computed for the current recipe
    Schema schema;
  };
  struct Snapshot {
    std::string label;
    Recipe before;
    Recipe after;
  };

  std::vector<StepProblem> input_problems;
  std::vector<RemovedRow> input_rejects;
  uint64_t input_rejected = 0;
  std::vector<Slot> slots;
  std::vector<Schema> schema_before;  // per step, as compiled (the last entry: the result)
  std::vector<Stage> stages;
  std::vector<ChangeRecord> changes;
  std::vector<std::optional<StepProblem>> run_problems;
  uint64_t next_serial = 1;
  std::vector<Snapshot> undo, redo;

  std::optional<TableProfile> profile;
  uint64_t profile_serial = 0;
  std::optional<std::vector<Finding>> findings;
  uint64_t findings_serial = 0;
  std::optional<SimilarResult> similar;
  uint64_t similar_serial = 0;

  static void compute_input(Document& d) {
    State& s = *d.state_;
    const Table& raw = d.file_.table;
    s.input_problems = dialect_problems(d.recipe_.input, d.file_);
    s.input_rejects.clear();
    s.input_rejected = 0;
    auto check = InputCheck::make(d.recipe_.input, raw.names(), d.file_.name);
    Table table = raw;
    if (!check) {
      // Shown as far as it goes: the expected columns the file has when the
      // others are to be ignored, else every column.
      s.input_problems.push_back(StepProblem{std::nullopt, "columns", check.error().message});
      const RecipeInput& in = d.recipe_.input;
      std::vector<size_t> shown;
      for (size_t c = 0; c < raw.column_count(); ++c)
        if (in.unknown_columns != "ignore" ||
            std::any_of(in.columns.begin(), in.columns.end(), [&](const InputColumn& e) { return e.name == raw.name(c); }))
          shown.push_back(c);
      table = raw.with_columns(shown);
    } else {
      // The rows tamis run would take out for values not fitting input.columns.
      std::vector<RemovedRow> failing;
      table = check->apply(raw, failing);
      s.input_rejected = failing.size();
      if (failing.size() > ChangeRecord::kListedRows) failing.resize(ChangeRecord::kListedRows);
      s.input_rejects = std::move(failing);
    }
    Schema schema = schema_of(table);
    s.stages.assign(1, Stage{std::move(table), s.next_serial++, std::move(schema)});
  }

  static void compile_all(Document& d) {
    State& s = *d.state_;
    const size_t n = d.recipe_.steps.size();
    s.slots.assign(n, Slot{});
    s.schema_before.assign(1, schema_of(*s.stages[0].table));
    for (size_t i = 0; i < n; ++i) {
      const RecipeStep& rs = d.recipe_.steps[i];
      Schema schema = s.schema_before.back();
      auto step = parse_step(rs.definition, static_cast<int>(i), schema);
      if (step) {
        if (rs.enabled) schema = (*step)->output_schema(schema);
        s.slots[i].step = std::shared_ptr<const Step>(std::move(*step));
      } else {
        s.slots[i].problem = problem_of(step.error(), i);
      }
      s.schema_before.push_back(std::move(schema));
    }
  }

  // Keeps stages 0..first (the input of step `first` is unchanged) and the
  // records of the steps before `first`.
  static void invalidate_from(Document& d, size_t first) {
    State& s = *d.state_;
    const size_t n = d.recipe_.steps.size();
    s.stages.resize(std::min(s.stages.size(), first + 1));
    s.stages.resize(n + 1);
    s.changes.resize(std::min(s.changes.size(), first));
    s.changes.resize(n);
    s.run_problems.resize(std::min(s.run_problems.size(), first));
    s.run_problems.resize(n);
  }

  static void install(Document& d, Recipe recipe) {
    State& s = *d.state_;
    const bool input_changed = input_section_text(recipe) != input_section_text(d.recipe_);
    const size_t first = input_changed ? 0 : first_difference(d.recipe_, recipe);
    d.recipe_ = std::move(recipe);
    ++d.revision_;
    if (input_changed) {
      compute_input(d);
      s.changes.clear();
      s.run_problems.clear();
    }
    compile_all(d);
    invalidate_from(d, first);
    d.selected_ = std::min(d.selected_, d.recipe_.steps.size());
  }

  static EditOutcome commit(Document& d, Recipe recipe, std::string label) {
    State& s = *d.state_;
    s.undo.push_back({std::move(label), d.recipe_, recipe});
    s.redo.clear();
    install(d, std::move(recipe));
    return EditOutcome{true, d.problems()};
  }

  bool ready(size_t stage) const { return stage < stages.size() && stages[stage].table.has_value(); }
  bool computed(size_t stage) const { return stage < stages.size() && stages[stage].serial != 0; }
  // The highest stage at or below `stage` whose table is at hand (stage 0 always is).
  size_t nearest_ready(size_t stage) const {
    while (stage > 0 && !ready(stage)) --stage;
    return stage;
  }

  // Drops the tables of stages nobody looks at: a long recipe on a big file
  // would otherwise keep one table per step. Kept: the file (stage 0), the
  // selected stage and the one before it (the Data panel's diff), the result,
  // and `working` (the input of the next step being computed).
  static void evict(Document& d, size_t working) {
    State& s = *d.state_;
    const size_t last = d.recipe_.steps.size();
    for (size_t stage = 1; stage < s.stages.size(); ++stage) {
      if (stage == working || stage == last || stage == d.selected_ || stage + 1 == d.selected_) continue;
      s.stages[stage].table.reset();
    }
  }

  // Stores what step i made of its input (or passes the input through),
  // then evicts the tables no longer needed. A stage computed before (and
  // evicted since) only gets its table back.
  static void store(Document& d, size_t i, std::optional<Table> out, ChangeRecord change,
                    std::optional<Error> error) {
    State& s = *d.state_;
    const Stage& in = s.stages[i];
    Stage& next = s.stages[i + 1];
    const bool failed = !out || error;
    if (next.serial != 0) {
      next.table = failed ? in.table : std::move(out);
    } else {
      s.run_problems[i].reset();
      if (error) s.run_problems[i] = problem_of(*error, i);
      if (failed) {
        ChangeRecord unchanged;
        unchanged.rows_in = unchanged.rows_out = in.table->row_count();
        s.changes[i] = std::move(unchanged);
        next = Stage{in.table, in.serial, in.schema};
      } else {
        s.changes[i] = std::move(change);
        Schema schema = schema_of(*out);
        next = Stage{std::move(out), s.next_serial++, std::move(schema)};
      }
    }
    evict(d, i + 1);
  }

  // A step that does nothing here: disabled, or it does not fit.
  bool passes_through(const Document& d, size_t i) const { return !d.recipe_.steps[i].enabled || !slots[i].step; }
};

namespace {

// Brings the table of a target stage to hand, one step at a time in slices,
// from the nearest earlier stage whose table is at hand.
class ApplyJob final : public Job {
 public:
  ApplyJob(Document& d, Document::State& s, std::optional<size_t> through)
      : d_(d), s_(s), through_(through), revision_(d.revision()) {}

  bool step(size_t budget) override {
    if (cancelled()) return true;
    if (d_.revision() != revision_) {
      runner_.reset();
      revision_ = d_.revision();
      first_ready_.reset();
    }
    for (;;) {
      const size_t target = this->target();
      const size_t from = s_.nearest_ready(target);
      if (!first_ready_) first_ready_ = from;
      if (from == target) return true;
      const size_t i = from;  // step i turns stage i into stage i + 1
      if (s_.passes_through(d_, i)) {
        Document::State::store(d_, i, std::nullopt, {}, std::nullopt);
        continue;
      }
      if (!runner_ || runner_step_ != i) {
        step_ = s_.slots[i].step;
        runner_ = run_step(step_, i, *s_.stages[i].table, budget);
        runner_step_ = i;
      }
      if (WorkBudget slice{budget}; !runner_->advance(slice)) return false;
      Document::State::store(d_, i, runner_->take_output(), std::move(runner_->changes().front()), runner_->error());
      runner_.reset();
      // One step's work per slice: the next step starts in the next slice.
      return s_.ready(target);
    }
  }

  double progress() const override {
    const size_t target = this->target();
    const size_t from = s_.nearest_ready(target);
    const size_t start = std::min(first_ready_.value_or(from), from);
    if (from >= target) return 1.0;
    const double partial = runner_ ? runner_->progress() : 0.0;
    return std::min(1.0, (static_cast<double>(from - start) + partial) / static_cast<double>(target - start));
  }

  std::string label() const override {
    if (runner_) return "Applying step " + std::to_string(runner_step_ + 1) + " (" + std::string(step_->op()) + ")";
    return "Applying the recipe";
  }

 private:
  size_t target() const { return std::min(through_.value_or(d_.step_count()), d_.step_count()); }

  Document& d_;
  Document::State& s_;
  std::optional<size_t> through_;
  uint64_t revision_;
  std::optional<size_t> first_ready_;
  std::shared_ptr<const Step> step_;
  std::unique_ptr<BatchedRun> runner_;
  size_t runner_step_ = 0;
};

// A job on the table of one stage: computes the stage first, then does its
// own work; starts its own work over when the stage's table changes.
class StageJob : public Job {
 public:
  StageJob(Document& d, Document::State& s, size_t stage) : d_(d), s_(s), stage_(stage), apply_(d, s, stage) {}

  bool step(size_t budget) override {
    if (cancelled() || done_) return true;
    if (stage_ > d_.step_count()) {
      error_ = usage_error("the step this job was for has been deleted");
      return true;
    }
    // The work holds its own copy of the table: once started, it goes on
    // even if the stage's table is dropped, unless the stage itself changed.
    if (serial_ == 0 || d_.stage_serial(stage_) != serial_) {
      if (!apply_.step(budget)) return false;
      serial_ = d_.stage_serial(stage_);
      start(*s_.stages[stage_].table);
    }
    done_ = work(budget);
    if (done_) deliver(serial_);
    return done_;
  }
  double progress() const override {
    return serial_ ? 0.2 + 0.8 * work_progress() : 0.2 * apply_.progress();
  }
  std::string label() const override { return serial_ ? work_label() : apply_.label(); }

 protected:
  virtual void start(const Table& table) = 0;
  virtual bool work(size_t budget) = 0;
  virtual double work_progress() const = 0;
  virtual std::string work_label() const = 0;
  virtual void deliver(uint64_t serial) = 0;

  Document& d_;
  Document::State& s_;
  size_t stage_;

 private:
  ApplyJob apply_;
  uint64_t serial_ = 0;
  bool done_ = false;
};

class ProfileJob final : public StageJob {
 public:
  using StageJob::StageJob;

 private:
  void start(const Table& table) override { profiler_ = std::make_unique<TableProfiler>(table); }
  bool work(size_t budget) override { return profiler_->step(budget); }
  double work_progress() const override { return profiler_->progress(); }
  std::string work_label() const override { return "Profiling the columns"; }
  void deliver(uint64_t serial) override {
    s_.profile = profiler_->result();
    s_.profile_serial = serial;
  }
  std::unique_ptr<TableProfiler> profiler_;
};

class FindingsJob final : public StageJob {
 public:
  FindingsJob(Document& d, Document::State& s, size_t stage, FindingOptions options)
      : StageJob(d, s, stage), options_(std::move(options)) {}

 private:
  void start(const Table& table) override {
    schema_ = schema_of(table);
    table_ = as_text(table);
    scanner_.reset();
    profiler_.reset();
    if (s_.profile && s_.profile_serial == d_.stage_serial(stage_))
      scanner_ = std::make_unique<FindingScanner>(table_, *s_.profile, options_);
    else
      profiler_ = std::make_unique<TableProfiler>(table_);
  }
  bool work(size_t budget) override {
    if (!scanner_) {
      if (!profiler_->step(budget)) return false;
      scanner_ = std::make_unique<FindingScanner>(table_, profiler_->result(), options_);
      return false;
    }
    return scanner_->step(budget);
  }
  double work_progress() const override {
    if (!scanner_) return 0.5 * profiler_->progress();
    return (profiler_ ? 0.5 : 0.0) + (profiler_ ? 0.5 : 1.0) * scanner_->progress();
  }
  std::string work_label() const override { return scanner_ ? "Looking for problems" : "Profiling the columns"; }
  void deliver(uint64_t serial) override {
    if (profiler_ && !(s_.profile && s_.profile_serial == serial)) {
      s_.profile = profiler_->result();
      s_.profile_serial = serial;
    }
    s_.findings = fitting_findings(scanner_->result());
    s_.findings_serial = serial;
  }
  // The detectors saw typed columns as text (some of them read text only),
  // and the profile describes a typed column by its canonical text: a finding about a typed column whose fixes all need text
  // ("dates stored as text" on a date column) is not a problem of this stage.
  std::vector<Finding> fitting_findings(const std::vector<Finding>& found) const {
    std::vector<Finding> out;
    for (const Finding& f : found) {
      const bool typed = std::any_of(f.columns.begin(), f.columns.end(), [&](const std::string& name) {
        return std::any_of(schema_.begin(), schema_.end(),
                           [&](const ColumnSchema& c) { return c.name == name && c.type != Type::text; });
      });
      if (!typed || f.fixes.empty()) {
        out.push_back(f);
        continue;
      }
      Finding kept = f;
      kept.fixes.clear();
      for (const SuggestedFix& fix : f.fixes)
        if (parse_step(to_plain_json(fix.step), static_cast<int>(stage_), schema_)) kept.fixes.push_back(fix);
      if (!kept.fixes.empty()) out.push_back(std::move(kept));
    }
    return out;
  }
  FindingOptions options_;
  Schema schema_;
  Table table_;
  std::unique_ptr<TableProfiler> profiler_;
  std::unique_ptr<FindingScanner> scanner_;
};

class SimilarJob final : public StageJob {
 public:
  SimilarJob(Document& d, Document::State& s, size_t stage, size_t column, SimilarOptions options)
      : StageJob(d, s, stage), column_(column), options_(options) {}

 private:
  void start(const Table& table) override {
    grouper_.reset();
    if (column_ >= table.column_count()) {
      error_ = usage_error("no column " + std::to_string(column_ + 1) + " at this step");
      return;
    }
    name_ = table.name(column_);
    grouper_ = std::make_unique<SimilarValueGrouper>(distinct_values(table, column_), options_);
  }
  bool work(size_t budget) override { return !grouper_ || grouper_->step(budget); }
  double work_progress() const override { return grouper_ ? grouper_->progress() : 1.0; }
  std::string work_label() const override { return "Grouping similar values of " + name_; }
  void deliver(uint64_t serial) override {
    if (!grouper_) return;
    s_.similar = SimilarResult{name_, options_, grouper_->result(), grouper_->stats()};
    s_.similar_serial = serial;
  }
  size_t column_;
  SimilarOptions options_;
  std::string name_;
  std::unique_ptr<SimilarValueGrouper> grouper_;
};

}  // namespace

// ---------------------------------------------------------------------------

Document::Document(LoadedFile file) : file_(std::move(file)), state_(std::make_unique<State>()) {
  const ReadReport& read = file_.read;
  recipe_.input.format = read.delimiter == '\t' ? "tsv" : "csv";
  recipe_.input.delimiter = read.delimiter;
  recipe_.input.encoding = std::string(encoding_name(read.encoding));
  recipe_.input.header = read.header;
  recipe_.input.quote = file_.quote;
  recipe_.input.skip_rows = file_.skip_rows;
  for (const std::string& name : file_.table.names()) recipe_.input.columns.push_back({name, Type::text});
  recipe_.output.format = recipe_.input.format;
  State::compute_input(*this);
  State::compile_all(*this);
  State::invalidate_from(*this, 0);
}

Document::~Document() = default;

bool Document::stage_ready(size_t stage) const { return state_->ready(stage); }

uint64_t Document::stage_serial(size_t stage) const {
  return state_->computed(stage) ? state_->stages[stage].serial : 0;
}

bool Document::step_computed(size_t step) const { return state_->computed(step + 1); }

Schema Document::schema_at(size_t stage) const {
  stage = std::min(stage, step_count());
  if (state_->computed(stage)) return state_->stages[stage].schema;
  return state_->schema_before[stage];
}

const Table& Document::table_at(size_t stage) {
  stage = std::min(stage, step_count());
  if (!state_->ready(stage)) {
    ApplyJob job(*this, *state_, stage);
    run_to_end(job);
  }
  return *state_->stages[stage].table;
}

const ChangeRecord& Document::change(size_t step) {
  if (!state_->computed(step + 1)) table_at(step + 1);
  return state_->changes[step];
}

std::string Document::describe_step(size_t step) const {
  const State::Slot& slot = state_->slots[step];
  if (slot.step) return slot.step->describe();
  return recipe_.steps[step].op + ": " + (slot.problem ? slot.problem->message : std::string("does not fit"));
}

std::optional<StepProblem> Document::step_problem(size_t step) const {
  if (state_->slots[step].problem) return state_->slots[step].problem;
  if (step < state_->run_problems.size()) return state_->run_problems[step];
  return std::nullopt;
}

std::vector<StepProblem> Document::problems() const {
  std::vector<StepProblem> out;
  out = state_->input_problems;
  for (size_t i = 0; i < step_count(); ++i)
    if (recipe_.steps[i].enabled)
      if (auto p = step_problem(i)) out.push_back(*p);
  return out;
}

const std::vector<RemovedRow>& Document::input_rejects() const { return state_->input_rejects; }
uint64_t Document::input_rejected_rows() const { return state_->input_rejected; }

std::unique_ptr<Job> Document::make_apply_job(std::optional<size_t> through_stage) {
  return std::make_unique<ApplyJob>(*this, *state_, through_stage);
}

void Document::select_stage(size_t stage) { selected_ = std::min(stage, step_count()); }

EditOutcome Document::add_step(const nlohmann::json& definition, std::optional<size_t> position) {
  const size_t at = std::min(position.value_or(step_count()), step_count());
  auto parsed = parse_step(definition, static_cast<int>(at), state_->schema_before[at]);
  if (!parsed) return EditOutcome{false, {problem_of(parsed.error(), at)}};
  auto recipe = parse_recipe("{\"tamis_recipe\":1,\"steps\":[" + definition.dump() + "]}", "step");
  if (!recipe) return EditOutcome{false, {problem_of(recipe.error(), at)}};
  Recipe next = recipe_;
  next.steps.insert(next.steps.begin() + static_cast<std::ptrdiff_t>(at), std::move(recipe->steps[0]));
  EditOutcome outcome = State::commit(*this, std::move(next), "add " + definition.value("op", std::string("step")));
  selected_ = at + 1;
  return outcome;
}

EditOutcome Document::add_step(Preview&& preview) {
  if (preview.problem) return EditOutcome{false, {*preview.problem}};
  const size_t at = preview.position;
  const bool reusable = preview.complete && at <= step_count() && stage_serial(at) == preview.input_serial;
  EditOutcome outcome = add_step(preview.definition, at);
  if (outcome && reusable && state_->slots[at].step && recipe_.steps[at].enabled) {
    state_->changes[at] = std::move(preview.change);
    Schema schema = schema_of(preview.after);
    state_->stages[at + 1] = State::Stage{std::move(preview.after), state_->next_serial++, std::move(schema)};
  }
  return outcome;
}

EditOutcome Document::edit_step(size_t step, const nlohmann::json& definition) {
  if (step >= step_count()) return EditOutcome{false, {{step, "", "there is no step " + std::to_string(step + 1)}}};
  json merged = definition;
  const RecipeStep& old = recipe_.steps[step];
  if (merged.is_object()) {
    if (!merged.contains("note") && !old.note.empty()) merged["note"] = old.note;
    if (!merged.contains("enabled") && !old.enabled) merged["enabled"] = false;
  }
  auto parsed = parse_step(merged, static_cast<int>(step), state_->schema_before[step]);
  if (!parsed) return EditOutcome{false, {problem_of(parsed.error(), step)}};
  auto recipe = parse_recipe("{\"tamis_recipe\":1,\"steps\":[" + merged.dump() + "]}", "step");
  if (!recipe) return EditOutcome{false, {problem_of(recipe.error(), step)}};
  Recipe next = recipe_;
  next.steps[step] = std::move(recipe->steps[0]);
  std::string label = "edit " + next.steps[step].op;
  return State::commit(*this, std::move(next), std::move(label));
}

EditOutcome Document::set_enabled(size_t step, bool enabled) {
  if (step >= step_count()) return EditOutcome{false, {{step, "", "there is no step " + std::to_string(step + 1)}}};
  Recipe next = recipe_;
  RecipeStep& s = next.steps[step];
  s.enabled = enabled;
  if (enabled) s.definition.erase("enabled");
  else s.definition["enabled"] = false;
  std::string label = (enabled ? "enable " : "disable ") + s.op;
  return State::commit(*this, std::move(next), std::move(label));
}

EditOutcome Document::set_note(size_t step, std::string note) {
  if (step >= step_count()) return EditOutcome{false, {{step, "", "there is no step " + std::to_string(step + 1)}}};
  Recipe next = recipe_;
  RecipeStep& s = next.steps[step];
  s.note = std::move(note);
  if (s.note.empty()) s.definition.erase("note");
  else s.definition["note"] = s.note;
  std::string label = "note on " + s.op;
  return State::commit(*this, std::move(next), std::move(label));
}

EditOutcome Document::move_step(size_t from, size_t to) {
  if (from >= step_count() || to >= step_count())
    return EditOutcome{false, {{from, "", "cannot move step " + std::to_string(from + 1) + " to position " +
                                              std::to_string(to + 1)}}};
  Recipe next = recipe_;
  RecipeStep moved = std::move(next.steps[from]);
  next.steps.erase(next.steps.begin() + static_cast<std::ptrdiff_t>(from));
  next.steps.insert(next.steps.begin() + static_cast<std::ptrdiff_t>(to), std::move(moved));
  return State::commit(*this, std::move(next), "move " + recipe_.steps[from].op);
}

EditOutcome Document::delete_step(size_t step) {
  if (step >= step_count()) return EditOutcome{false, {{step, "", "there is no step " + std::to_string(step + 1)}}};
  Recipe next = recipe_;
  next.steps.erase(next.steps.begin() + static_cast<std::ptrdiff_t>(step));
  return State::commit(*this, std::move(next), "delete " + recipe_.steps[step].op);
}

EditOutcome Document::replace_recipe(Recipe recipe) {
  return State::commit(*this, std::move(recipe), "open recipe");
}

EditOutcome Document::open_recipe(std::string_view json_text, const std::string& name) {
  auto recipe = parse_recipe(json_text, name);
  if (!recipe) {
    const Error& e = recipe.error();
    StepProblem p = problem_of(e, std::nullopt);
    p.message = e.to_string();
    return EditOutcome{false, {std::move(p)}};
  }
  return replace_recipe(std::move(*recipe));
}

bool Document::can_undo() const { return !state_->undo.empty(); }
bool Document::can_redo() const { return !state_->redo.empty(); }
std::string Document::undo_label() const { return state_->undo.empty() ? "" : state_->undo.back().label; }
std::string Document::redo_label() const { return state_->redo.empty() ? "" : state_->redo.back().label; }

bool Document::undo() {
  if (state_->undo.empty()) return false;
  State::Snapshot entry = std::move(state_->undo.back());
  state_->undo.pop_back();
  State::install(*this, entry.before);
  state_->redo.push_back(std::move(entry));
  return true;
}

bool Document::redo() {
  if (state_->redo.empty()) return false;
  State::Snapshot entry = std::move(state_->redo.back());
  state_->redo.pop_back();
  State::install(*this, entry.after);
  state_->undo.push_back(std::move(entry));
  return true;
}

// --- Preview ---------------------------------------------------------------

namespace {

Preview preview_on(const Table& input, uint64_t serial, const nlohmann::json& definition, size_t position,
                   RowRange rows) {
  Preview p;
  p.position = position;
  p.definition = definition;
  p.input_serial = serial;
  auto step = parse_step(definition, static_cast<int>(position), schema_of(input));
  if (!step) {
    p.problem = problem_of(step.error(), position);
    return p;
  }
  const std::shared_ptr<const Step> parsed = std::move(*step);
  p.description = parsed->describe();
  p.depends_on_other_rows = parsed->needs_first_pass() || parsed->start() != nullptr;
  p.rows = {std::min(rows.begin, input.row_count()), std::min(rows.end, input.row_count())};
  p.complete = p.rows.begin == 0 && p.rows.end == input.row_count();
  p.before = slice_rows(input, p.rows.begin, p.rows.end);
  auto after = apply_step(parsed, position, p.before, p.change);
  if (!after) {
    p.problem = problem_of(after.error(), position);
    return p;
  }
  p.after = std::move(*after);
  return p;
}

}  // namespace

Preview Document::preview(const nlohmann::json& definition, size_t position, std::optional<RowRange> window) {
  position = std::min(position, step_count());
  const Table& input = table_at(position);
  return preview_on(input, stage_serial(position), definition, position,
                    window.value_or(RowRange{0, input.row_count()}));
}

struct Document::PreviewJob::Impl {
  Impl(Document& d, const nlohmann::json& definition, size_t position)
      : d(d), definition(definition), position(position), apply(d, *d.state_, position) {}
  Document& d;
  nlohmann::json definition;
  size_t position;
  ApplyJob apply;
  uint64_t serial = 0;
  Table input;
  std::shared_ptr<const Step> step;
  std::unique_ptr<BatchedRun> runner;
  Preview result;
  bool done = false;
};

std::unique_ptr<Document::PreviewJob> Document::make_preview_job(const nlohmann::json& definition, size_t position) {
  return std::make_unique<PreviewJob>(std::make_unique<PreviewJob::Impl>(*this, definition, std::min(position, step_count())));
}

Document::PreviewJob::PreviewJob(std::unique_ptr<Impl> impl) : impl_(std::move(impl)) {}
Document::PreviewJob::~PreviewJob() = default;

bool Document::PreviewJob::step(size_t budget) {
  Impl& m = *impl_;
  if (cancelled() || m.done) return true;
  if (m.position > m.d.step_count()) {
    error_ = usage_error("the recipe changed: the position of this preview no longer exists");
    return true;
  }
  if (m.serial == 0 || m.d.stage_serial(m.position) != m.serial) {
    if (!m.apply.step(budget)) return false;
    const Table& input = *m.d.state_->stages[m.position].table;
    m.serial = m.d.stage_serial(m.position);
    m.input = input;
    m.result = Preview{};
    m.result.position = m.position;
    m.result.definition = m.definition;
    m.result.input_serial = m.serial;
    m.runner.reset();
    auto step = parse_step(m.definition, static_cast<int>(m.position), schema_of(input));
    if (!step) {
      m.result.problem = problem_of(step.error(), m.position);
      m.done = true;
      return true;
    }
    m.step = std::shared_ptr<const Step>(std::move(*step));
    m.result.description = m.step->describe();
    m.result.depends_on_other_rows = m.step->needs_first_pass() || m.step->start() != nullptr;
    m.runner = run_step(m.step, m.position, input, budget);
  }
  if (WorkBudget slice{budget}; !m.runner->advance(slice)) return false;
  const Table& input = m.input;
  if (m.runner->error()) {
    m.result.problem = problem_of(*m.runner->error(), m.position);
  } else {
    m.result.rows = {0, input.row_count()};
    m.result.complete = true;
    m.result.before = input;
    m.result.after = m.runner->take_output();
    m.result.change = std::move(m.runner->changes().front());
  }
  m.done = true;
  return true;
}

double Document::PreviewJob::progress() const {
  const Impl& m = *impl_;
  if (m.done) return 1.0;
  return m.runner ? 0.2 + 0.8 * m.runner->progress() : 0.2 * m.apply.progress();
}

std::string Document::PreviewJob::label() const {
  return impl_->runner ? "Previewing " + impl_->definition.value("op", std::string("step")) : impl_->apply.label();
}

Preview Document::PreviewJob::take_result() { return std::move(impl_->result); }

// --- Profile, findings, similar values ----------------------------------------

const TableProfile* Document::profile() const {
  const uint64_t serial = stage_serial(selected_);
  return serial && state_->profile && state_->profile_serial == serial ? &*state_->profile : nullptr;
}

std::unique_ptr<Job> Document::make_profile_job() { return std::make_unique<ProfileJob>(*this, *state_, selected_); }

const std::vector<Finding>* Document::findings() const {
  const uint64_t serial = stage_serial(selected_);
  return serial && state_->findings && state_->findings_serial == serial ? &*state_->findings : nullptr;
}

std::unique_ptr<Job> Document::make_findings_job(FindingOptions options) {
  return std::make_unique<FindingsJob>(*this, *state_, selected_, std::move(options));
}

EditOutcome Document::add_fix(const Finding& finding, size_t fix) {
  if (fix >= finding.fixes.size())
    return EditOutcome{false, {{std::nullopt, "", "the finding '" + finding.title + "' has no fix " + std::to_string(fix + 1)}}};
  return add_step(to_plain_json(finding.fixes[fix].step), selected_);
}

const SimilarResult* Document::similar() const {
  const uint64_t serial = stage_serial(selected_);
  return serial && state_->similar && state_->similar_serial == serial ? &*state_->similar : nullptr;
}

std::unique_ptr<Job> Document::make_similar_job(size_t column, SimilarOptions options) {
  return std::make_unique<SimilarJob>(*this, *state_, selected_, column, options);
}

EditOutcome Document::add_similar_groups(const std::string& column, std::span<const SimilarChoice> choices) {
  return add_step(to_plain_json(similar_values_step(column, choices)), selected_);
}

}  // namespace tamis::workbench
