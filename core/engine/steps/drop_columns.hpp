// drop_columns {columns: [...]}: removes the listed columns. Dropping every
// column is an error (a table without columns cannot be written).
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_drop_columns(StepParams& params);

}  // namespace tamis
