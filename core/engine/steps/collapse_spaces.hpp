// collapse_spaces: inside a text value, every run of Unicode White_Space
// (PropList.txt: tab, line breaks, no-break space, ideographic space, ...)
// that lies between two other characters becomes one U+0020 SPACE. Runs at
// the start and at the end of a value are left as they are: removing those
// is trim's job, so trim and collapse_spaces together, in either order, give
// trimmed, single-spaced text. A value that is only white space is one run
// at the start and is left alone too (to_null with blank: true handles it).
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_collapse_spaces(StepParams& params);

}  // namespace tamis
