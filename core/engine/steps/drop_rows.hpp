// drop_rows: removes the rows where the SQL condition `where` is TRUE (a
// FALSE or NULL condition keeps the row). Every removed row is recorded with
// its source line.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_drop_rows(StepParams& params);

}  // namespace tamis
