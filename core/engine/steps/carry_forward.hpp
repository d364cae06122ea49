// carry_forward {column, group_by: [...]}
//
// A NULL in `column` takes the last non-NULL value before it in source
// order, within the rows with the same group_by values (NULL group values
// form a group of their own, as in SQL's PARTITION BY); without group_by
// (or with an empty list) the whole table is one group. A NULL before any
// value of its group stays NULL. The step streams: it remembers one value
// per group across batches.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_carry_forward(StepParams& params);

}  // namespace tamis
