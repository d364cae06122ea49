// Test mode: a script of UI actions, one per line, replayed through the same
// functions the controls call (script_actions.md lists them). A shell runs
// the next action only when the workbench is not busy, so every action sees
// the screen as a person would after the previous one finished.
#include <cstdlib>
#include <sstream>

#include "text_format.hpp"
#include "workbench_state.hpp"

namespace tamis::ui {

namespace wb = workbench;

namespace {

std::optional<size_t> number_word(const std::string& word) {
  if (word.empty() || word.size() > 12 || word.find_first_not_of("0123456789") != std::string::npos) return std::nullopt;
  return static_cast<size_t>(std::strtoull(word.c_str(), nullptr, 10));
}

// The op of a step object typed in a script, when it names a form.
const StepSpec* spec_of(const nlohmann::json& definition) {
  const auto op = definition.find("op");
  if (op == definition.end() || !op->is_string()) return nullptr;
  return find_step_spec(op->get<std::string>());
}

std::optional<Dialect> dialect_word(const std::string& word) {
  for (Dialect dialect : {Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark})
    if (dialect_name(dialect) == word) return dialect;
  return std::nullopt;
}

}  // namespace

Status Workbench::run_action(std::string_view line) {
  State& s = *state_;
  std::istringstream words{std::string(line)};
  std::string verb;
  words >> verb;
  if (verb.empty() || verb[0] == '#') return Ok{};
  std::string rest;
  std::getline(words >> std::ws, rest);
  std::istringstream args(rest);
  std::vector<std::string> arg;
  for (std::string word; args >> word;) arg.push_back(word);
  auto need_document = [&]() -> Status {
    if (!s.document) return usage_error(verb + ": no file is loaded");
    return Ok{};
  };
  auto index_arg = [&](size_t i) -> Result<size_t> {
    if (i >= arg.size()) return usage_error(verb + ": a number is missing");
    std::optional<size_t> n = number_word(arg[i]);
    if (!n) return usage_error(verb + ": expected a number, found '" + arg[i] + "'");
    return *n;
  };

  if (verb == "open") {
    open_path(rest);
    return Ok{};
  }
  if (verb == "read-option") {
    if (arg.size() != 2) return usage_error("read-option KEY VALUE");
    return s.open_screen.set_option(arg[0], arg[1]);
  }
  if (verb == "load") {
    if (!s.open_screen.active()) return usage_error("load: the open screen is not shown");
    s.start_loading();
    if (s.open_screen.active()) return usage_error(s.message);
    return Ok{};
  }
  if (verb == "key") {
    // The shortcuts as the shell maps them from key presses.
    if (rest == "ctrl+o") run_command(Command::open);
    else if (rest == "ctrl+s") run_command(Command::save);
    else if (rest == "ctrl+f") run_command(Command::filter);
    else if (rest == "ctrl+z") run_command(Command::undo);
    else if (rest == "ctrl+shift+z") run_command(Command::redo);
    else return usage_error("key: ctrl+o, ctrl+s, ctrl+f, ctrl+z or ctrl+shift+z");
    return Ok{};
  }
  if (verb == "expect-columns") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    const Table* table = s.shown_table();
    const size_t columns = s.open_screen.active() ? s.open_screen.preview_columns() : table ? table->column_count() : 0;
    if (columns != n.value())
      return usage_error("expected " + std::to_string(n.value()) + " columns, " + (s.open_screen.active() ? "the preview" : "the table") +
                         " has " + std::to_string(columns));
    return Ok{};
  }
  if (verb == "theme") {
    if (rest != "light" && rest != "dark") return usage_error("theme is light or dark");
    s.theme = rest == "dark" ? Theme::dark : Theme::light;
    apply_theme(s.theme, s.scale);
    return Ok{};
  }
  if (Status ok = need_document(); !ok) return ok;

  // Findings are numbered from 1, as the panel shows them.
  if (verb == "apply-finding") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    size_t fix = 1;
    if (arg.size() > 1) {
      Result<size_t> f = index_arg(1);
      if (!f) return f.take_error();
      fix = f.value();
    }
    if (n.value() == 0 || fix == 0) return usage_error("findings and fixes are numbered from 1");
    return s.add_finding_fix(n.value() - 1, fix - 1);
  }
  if (verb == "similar") {
    if (arg.empty()) return usage_error("similar COLUMN [METHOD [THRESHOLD]]");
    const Table* table = s.shown_table();
    if (!table) return usage_error("similar: the table is not ready");
    std::optional<size_t> column = table->find(arg[0]);
    if (!column) return usage_error("similar: no column " + arg[0]);
    s.similar.column = *column;
    if (arg.size() > 1) {
      std::optional<SimilarMethod> method = parse_similar_method(arg[1]);
      if (!method) return usage_error("similar: unknown method " + arg[1]);
      s.similar.method = *method;
    }
    if (arg.size() > 2) {
      char* end = nullptr;
      const float threshold = std::strtof(arg[2].c_str(), &end);
      if (end == arg[2].c_str() || *end != '\0' || !(threshold >= 0.0f && threshold <= 1.0f))
        return usage_error("similar: the threshold is a number from 0 to 1");
      s.similar.threshold = threshold;
    }
    s.side = SidePanel::similar;
    s.side_forced = true;
    s.queue(s.document->make_similar_job(*column, SimilarOptions{s.similar.method, s.similar.threshold}), nullptr);
    return Ok{};
  }
  if (verb == "merge-group") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    if (n.value() == 0) return usage_error("groups are numbered from 1");
    if (!s.sync_similar_choices()) return usage_error("merge-group: no groups were found");
    return s.merge_similar_groups({n.value() - 1});
  }
  if (verb == "untick" || verb == "canonical") {
    // Similar values: a member's tick box, or its preferred-spelling button.
    Result<size_t> group = index_arg(0);
    Result<size_t> member = index_arg(1);
    if (!group || !member || group.value() == 0 || member.value() == 0) return usage_error(verb + " GROUP MEMBER (numbered from 1)");
    const wb::SimilarResult* result = s.sync_similar_choices();
    if (!result) return usage_error(verb + ": no groups were found");
    const size_t g = group.value() - 1, m = member.value() - 1;
    if (g >= result->groups.size() || m >= result->groups[g].members.size()) return usage_error(verb + ": no such member");
    if (verb == "untick") {
      s.similar.keep_member[g][m] = false;
    } else {
      s.similar.canonical[g] = result->groups[g].members[m].value;
      s.similar.keep_member[g][m] = true;
    }
    return Ok{};
  }
  if (verb == "add-step") {
    nlohmann::json definition = nlohmann::json::parse(rest, nullptr, false);
    if (definition.is_discarded() || !definition.is_object()) return usage_error("add-step: not a JSON object: " + rest);
    const StepSpec* spec = spec_of(definition);
    if (!spec) return usage_error("add-step: unknown op");
    // Through the form's fields, as a person would fill them, then added.
    const size_t at = s.document->selected_stage();
    StepForm filled;
    filled.open_new(*spec, at, s.document->schema_at(at), &definition);
    return s.add_step(filled.definition(), at);
  }
  if (verb == "open-form") {
    nlohmann::json definition = nlohmann::json::parse(rest, nullptr, false);
    if (definition.is_discarded() || !definition.is_object()) return usage_error("open-form: not a JSON object: " + rest);
    const StepSpec* spec = spec_of(definition);
    if (!spec) return usage_error("open-form: unknown op");
    const size_t at = s.document->selected_stage();
    s.form.open_new(*spec, at, s.document->schema_at(at), &definition);
    return Ok{};
  }
  if (verb == "select-step") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    if (n.value() > s.document->step_count()) return usage_error("select-step: there are only " + std::to_string(s.document->step_count()) + " steps");
    s.select_stage(n.value());
    return Ok{};
  }
  if (verb == "select-column") {
    const Table* table = s.shown_table();
    std::optional<size_t> column = table ? table->find(rest) : std::nullopt;
    if (!column) return usage_error("select-column: no column " + rest);
    s.selected_column = column;
    return Ok{};
  }
  if (verb == "panel") {
    if (rest == "Column") {
      s.side = SidePanel::column;
    } else if (rest == "Findings") {
      s.side = SidePanel::findings;
    } else if (rest == "Similar values") {
      s.side = SidePanel::similar;
    } else {
      return usage_error("panel: Column, Findings or Similar values");
    }
    s.side_forced = true;
    return Ok{};
  }
  if (verb == "toggle-step" || verb == "delete-step") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    if (n.value() == 0 || n.value() > s.document->step_count()) return usage_error(verb + ": no step " + arg[0]);
    const size_t step = n.value() - 1;
    const wb::EditOutcome outcome = verb == "toggle-step"
                                        ? s.document->set_enabled(step, !s.document->recipe().steps[step].enabled)
                                        : s.document->delete_step(step);
    s.after_edit(outcome, std::nullopt);
    if (!outcome.applied) return usage_error(s.message);
    return Ok{};
  }
  if (verb == "move-step") {
    Result<size_t> from = index_arg(0);
    Result<size_t> to = index_arg(1);
    if (!from || !to || from.value() == 0 || to.value() == 0) return usage_error("move-step FROM TO (numbered from 1)");
    const wb::EditOutcome outcome = s.document->move_step(from.value() - 1, to.value() - 1);
    s.after_edit(outcome, to.value());
    if (!outcome.applied) return usage_error(s.message);
    return Ok{};
  }
  if (verb == "undo") {
    if (!s.document->can_undo()) return usage_error("undo: nothing to undo");
    s.undo();
    return Ok{};
  }
  if (verb == "redo") {
    if (!s.document->can_redo()) return usage_error("redo: nothing to redo");
    s.redo();
    return Ok{};
  }
  if (verb == "filter") {
    const Table* table = s.shown_table();
    if (!table || arg.size() < 2) return usage_error("filter COLUMN contains|equals|null|empty|not-null|edge-space [TEXT]");
    std::optional<size_t> column = table->find(arg[0]);
    if (!column) return usage_error("filter: no column " + arg[0]);
    ViewFilter filter{arg[0], wb::FilterKind::contains, {}};
    const std::string& kind = arg[1];
    if (kind == "contains") filter.kind = wb::FilterKind::contains;
    else if (kind == "equals") filter.kind = wb::FilterKind::equals;
    else if (kind == "null") filter.kind = wb::FilterKind::is_null;
    else if (kind == "empty") filter.kind = wb::FilterKind::is_empty;
    else if (kind == "not-null") filter.kind = wb::FilterKind::not_null;
    else if (kind == "edge-space") filter.kind = wb::FilterKind::edge_space;
    else return usage_error("filter: unknown test " + kind);
    const size_t text_at = rest.find(kind) + kind.size();
    if (text_at < rest.size()) filter.text = rest.substr(rest.find_first_not_of(' ', text_at));
    s.filters.push_back(filter);
    s.view_dirty = true;
    return Ok{};
  }
  if (verb == "sort") {
    const Table* table = s.shown_table();
    if (!table || arg.empty()) return usage_error("sort COLUMN [desc]");
    std::optional<size_t> column = table->find(arg[0]);
    if (!column) return usage_error("sort: no column " + arg[0]);
    s.sort = ViewSort{arg[0], arg.size() > 1 && arg[1] == "desc"};
    s.view_dirty = true;
    return Ok{};
  }
  if (verb == "show-all-rows") {
    s.filters.clear();
    s.sort.reset();
    s.view_dirty = true;
    return Ok{};
  }
  if (verb == "scroll") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    s.grid.scroll_to_row(n.value());
    return Ok{};
  }
  if (verb == "measure-scroll") {
    Result<size_t> frames = index_arg(0);
    Result<size_t> rows = index_arg(1);
    if (!frames || !rows) return usage_error("measure-scroll FRAMES ROWS_PER_FRAME");
    s.measure_frames_left = frames.value();
    s.scroll_per_frame = static_cast<long>(rows.value());
    return Ok{};
  }
  if (verb == "open-recipe") return s.open_recipe(rest);
  if (verb == "export-recipe") return s.export_to(ExportKind::recipe, Dialect::postgres, rest);
  if (verb == "export-csv") return s.export_to(ExportKind::cleaned_csv, Dialect::postgres, rest);
  if (verb == "export-tsv") return s.export_to(ExportKind::cleaned_tsv, Dialect::postgres, rest);
  if (verb == "export-report") return s.export_to(ExportKind::report, Dialect::postgres, rest);
  if (verb == "export-sql") {
    if (arg.size() != 2) return usage_error("export-sql DIALECT PATH");
    std::optional<Dialect> dialect = dialect_word(arg[0]);
    if (!dialect) return usage_error("export-sql: unknown dialect " + arg[0]);
    return s.export_to(ExportKind::sql, *dialect, arg[1]);
  }
  if (verb == "expect-steps") {
    Result<size_t> n = index_arg(0);
    if (!n) return n.take_error();
    if (s.document->step_count() != n.value())
      return usage_error("expected " + std::to_string(n.value()) + " steps, the recipe has " + std::to_string(s.document->step_count()));
    return Ok{};
  }
  return usage_error("unknown action: " + verb);
}

}  // namespace tamis::ui
