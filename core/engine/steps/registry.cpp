#include "steps/registry.hpp"

#include "steps/trim.hpp"

namespace tamis {

namespace {
constexpr StepKind kStepKinds[] = {
    {"trim", parse_trim, "remove white space (or given characters) at the ends of text values"},
};
}  // namespace

std::span<const StepKind> step_kinds() { return kStepKinds; }

std::string_view dialect_name(Dialect dialect) {
  constexpr std::string_view names[] = {"postgres", "mysql", "sqlite", "duckdb", "spark"};
  return names[static_cast<size_t>(dialect)];
}

Result<std::unique_ptr<Step>> parse_step(const nlohmann::json& object, int index, const Schema& input) {
  auto fail = [&](std::string message) {
    Error e = usage_error(std::move(message));
    e.step = index;
    return e;
  };
  if (!object.is_object()) return fail("expected an object with an \"op\" key, found " + object.dump());
  const auto op = object.find("op");
  if (op == object.end() || !op->is_string()) return fail("\"op\" is required and must be text");
  for (const StepKind& kind : kStepKinds)
    if (kind.op == op->get<std::string>()) {
      StepParams params(object, index, kind.op, input);
      if (const auto* note = params.raw("note"); note && !note->is_string())
        return params.error("note", "expected text");
      if (const auto* enabled = params.raw("enabled"); enabled && !enabled->is_boolean())
        return params.error("enabled", "expected true or false");
      return kind.parse(params);
    }
  std::string known;
  for (const StepKind& kind : kStepKinds) known += (known.empty() ? "" : ", ") + std::string(kind.op);
  return fail("unknown op '" + op->get<std::string>() + "' (known: " + known + ")");
}

}  // namespace tamis
