// The run report as a page people read: the same facts as the JSON run
// report (run_report.hpp), drawn from it, so the two never disagree. One
// self-contained HTML document (inline CSS and SVG, no script, no external
// resource). `tamis run ... --report-html OUT.html` writes it.
#pragma once

#include <nlohmann/json.hpp>

#include <string>
#include <vector>

#include "change.hpp"
#include "recipe.hpp"
#include "run_report.hpp"

namespace tamis {

std::string run_report_html(const Recipe& recipe, const CompiledRecipe& compiled,
                            const std::vector<ChangeRecord>& changes, const RunFacts& facts);

// The page for a JSON run report as run_report_json() writes it.
std::string run_report_html(const nlohmann::ordered_json& report);

}  // namespace tamis
