// trim: SQL TRIM. Removes characters from one or both ends of text values:
// by default every Unicode White_Space character (PropList.txt), or exactly
// the characters listed in `chars`.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_trim(StepParams& params);

}  // namespace tamis
