// to_null: the one step that turns values into NULL (design §4: NULL is not
// the empty string anywhere else). A value equal to one of `values` (as a
// whole, code point by code point, case-sensitive: "N/A" does not match
// "n/a") becomes NULL; blank: true also turns the empty value and values made
// only of Unicode White_Space (PropList.txt) into NULL.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_to_null(StepParams& params);

}  // namespace tamis
