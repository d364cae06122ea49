// The one table of step kinds. Adding a step: write steps/<op>.hpp/.cpp
// with a parse function, add one line to the table in registry.cpp.
#pragma once

#include <nlohmann/json.hpp>

#include <memory>
#include <span>
#include <string_view>

#include "steps/step.hpp"
#include "steps/step_params.hpp"

namespace tamis {

using StepParser = Result<std::unique_ptr<Step>> (*)(StepParams& params);

struct StepKind {
  std::string_view op;
  StepParser parse;
  std::string_view summary;  // what the step is for, one line (used by --help and the workbench)
};

std::span<const StepKind> step_kinds();

// Parses one recipe step (op and its parameters) against the columns it will see.
Result<std::unique_ptr<Step>> parse_step(const nlohmann::json& object, int index, const Schema& input);

}  // namespace tamis
