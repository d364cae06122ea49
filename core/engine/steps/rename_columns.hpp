// rename_columns {map: {"old": "new", ...}}: renames columns in place. Every
// old name must exist; a new name must not be empty and must not be the name
// of a column that keeps its name or another column's new name (swapping two
// names in one step is fine).
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_rename_columns(StepParams& params);

}  // namespace tamis
