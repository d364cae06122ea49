// keep_rows: keeps only the rows where the SQL condition `where` is TRUE
// (a FALSE or NULL condition removes the row, as SQL's WHERE does). Every
// removed row is recorded with its source line.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_keep_rows(StepParams& params);

}  // namespace tamis
