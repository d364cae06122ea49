// derive_column: appends a new column `name` holding the SQL expression
// `expr` (expr/expr.hpp) computed for every row. The name must not exist
// yet; the column's type is the expression's (a bare NULL gives text).
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_derive_column(StepParams& params);

}  // namespace tamis
