// The step form: every one of the 21 v1 steps can be added (or edited) from
// a form built from one table of parameter descriptions, previewed on the
// table it will see, and only then added to the recipe. SQL expression
// fields (keep_rows, drop_rows, derive_column) show the position of a parse
// error under the text.
#pragma once

#include <nlohmann/json.hpp>

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "document.hpp"

namespace tamis::ui {

enum class FieldKind {
  columns,          // several columns, ticked
  columns_or_all,   // several columns, all ticked = "*"
  column,           // one column
  choice,           // one of a few words
  text,             // text, always written
  optional_text,    // text, left out when empty
  text_lines,       // a list, one entry per line
  column_order,     // every column, one per line, in the wanted order
  boolean,
  optional_integer,
  optional_bound,   // a number, or text (a date), left out when empty
  value_map,        // old value => new value, one pair per line
  expression,       // an SQL expression
};

struct FieldSpec {
  std::string_view key;
  FieldKind kind;
  std::string_view label;
  std::string_view tooltip;
  std::vector<std::string_view> choices = {};  // choice: the first is the default
};

struct StepSpec {
  std::string_view op;
  std::string_view title;  // plain words for the Add step menu
  std::vector<FieldSpec> fields;
};

std::span<const StepSpec> step_specs();
const StepSpec* find_step_spec(std::string_view op);

class StepForm {
 public:
  // A new step of this kind, to become recipe step `position`; `prefill`
  // (a step definition) fills the fields, e.g. a finding's suggested fix.
  void open_new(const StepSpec& spec, size_t position, const Schema& columns, const nlohmann::json* prefill = nullptr);
  // Edits recipe step `step` (its current definition fills the fields).
  void open_edit(size_t step, const nlohmann::json& definition, const Schema& columns);
  bool visible() const { return visible_; }

  struct Submit {
    nlohmann::json definition;
    std::optional<size_t> edited_step;  // nullopt: add at position
    size_t position = 0;
    std::optional<workbench::Preview> preview;  // the preview shown, when it is still current
  };
  // Draws the form as a modal window; returns what to apply once.
  std::optional<Submit> draw(workbench::Document& document);

  // The step's JSON from the fields as they are.
  nlohmann::json definition() const;

  // "Count over every row": the definition and position to preview over the
  // whole table (the workbench runs it in slices), once per click.
  std::optional<std::pair<nlohmann::json, size_t>> take_full_count_request();
  // The complete preview, shown if the fields have not changed since.
  void set_full_preview(workbench::Preview preview);

 private:
  struct FieldValue {
    std::string text;
    std::vector<char> ticked;  // per column
    int choice = 0;
    bool flag = false;
  };
  void fill_from(const nlohmann::json& definition);
  bool draw_field(const FieldSpec& field, FieldValue& value);
  void refresh_preview(workbench::Document& document);
  void draw_preview();

  bool visible_ = false;
  bool just_opened_ = false;
  const StepSpec* spec_ = nullptr;
  std::optional<size_t> edited_step_;
  size_t position_ = 0;
  Schema columns_;
  std::vector<FieldValue> values_;
  std::string note_;
  bool preview_stale_ = true;
  std::optional<workbench::Preview> preview_;
  bool full_count_requested_ = false;
  bool counting_ = false;
};

// Where "at character N" points in an engine message, when it says so.
std::optional<size_t> error_character(std::string_view message);

}  // namespace tamis::ui
