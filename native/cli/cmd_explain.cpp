#include <iostream>

#include "commands.hpp"
#include "input_check.hpp"
#include "recipe.hpp"
#include "steps/registry.hpp"

namespace tamis::cli {

CLI::App* add_explain_command(CLI::App& app, ExplainArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "explain",
      "Print what a recipe does, one numbered plain sentence per step, with its note; disabled\n"
      "steps are listed as skipped. The numbers are the step numbers used in every message.\n"
      "The sentences name columns and types, so they need the columns: from IN's header when a\n"
      "file is given, else from the recipe's input.columns; without either, each step is shown\n"
      "as written, with what its op is for.\n"
      "Example: tamis explain survey.recipe.json");
  cmd->add_option("recipe", args.recipe, "Recipe file (JSON, tamis_recipe 1)")->required();
  cmd->add_option("input", args.input, "A file with the columns the recipe reads (only its header is read)");
  return cmd;
}

namespace {

std::string_view summary_of(std::string_view op) {
  for (const StepKind& kind : step_kinds())
    if (kind.op == op) return kind.summary;
  return "unknown op";
}

void print_note(const std::string& note) {
  if (!note.empty()) std::cout << "    note: " << note << '\n';
}

void print_skipped(size_t i, const RecipeStep& step) {
  std::cout << i + 1 << ". skipped (enabled: false): " << step.op << " - " << summary_of(step.op) << '\n';
  print_note(step.note);
}

}  // namespace

int run_explain(const ExplainArgs& args) {
  auto recipe = load_recipe_file(args.recipe);
  if (!recipe) return report_error(recipe.error());
  std::optional<Schema> schema;
  if (!args.input.empty()) {
    auto options = reading_options(recipe->input);
    if (!options) return report_error(options.error());
    options->lenient = true;
    auto source = open_file_source(args.input);
    if (!source) return report_error(source.error());
    const std::string display = args.input == "-" ? "<stdin>" : args.input;
    auto reader = CsvReader::open(std::move(*source), display, *options);
    if (!reader) return report_error(reader.error());
    auto check = InputCheck::make(recipe->input, (*reader)->column_names(), display);
    if (!check) return report_error(check.error());
    schema = check->schema();
  } else if (!recipe->input.columns.empty()) {
    schema.emplace();
    for (const InputColumn& c : recipe->input.columns) schema->push_back({c.name, Type::text, 0});
  }

  if (!recipe->title.empty()) std::cout << recipe->title << '\n';
  if (!schema) {
    std::cout << "(the columns are unknown: the recipe lists no input.columns and no file was given, so each step "
                 "is shown as written)\n";
    for (size_t i = 0; i < recipe->steps.size(); ++i) {
      const RecipeStep& step = recipe->steps[i];
      if (!step.enabled) {
        print_skipped(i, step);
        continue;
      }
      nlohmann::json parameters = step.definition;
      for (const char* key : {"op", "note", "enabled"}) parameters.erase(key);
      std::cout << i + 1 << ". " << step.op << " - " << summary_of(step.op) << ": " << parameters.dump() << '\n';
      print_note(step.note);
    }
    return 0;
  }
  auto compiled = compile_recipe(*recipe, *schema);
  if (!compiled) {
    Error e = compiled.take_error();
    e.file = args.recipe;
    return report_error(e);
  }
  size_t next = 0;
  for (size_t i = 0; i < recipe->steps.size(); ++i) {
    if (next < compiled->steps.size() && compiled->steps[next].index == static_cast<int>(i)) {
      std::cout << i + 1 << ". " << compiled->steps[next].step->describe() << '\n';
      print_note(compiled->steps[next].note);
      ++next;
    } else {
      print_skipped(i, recipe->steps[i]);
    }
  }
  return 0;
}

}  // namespace tamis::cli
