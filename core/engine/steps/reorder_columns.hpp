// reorder_columns {columns: [...]}: the listed columns come first, in the
// order listed; every other column follows in its present order. Listing
// every column gives the complete new order.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_reorder_columns(StepParams& params);

}  // namespace tamis
