// split_column: splits a text column at a literal separator into new text
// columns named by `into`. With n names the value is cut at the first n-1
// occurrences of the separator, left to right, and the last new column takes
// the rest, separators included ("a-b-c" into two: "a", "b-c"). When a value
// has fewer separators, the parts it lacks are NULL ("a" into two: "a",
// NULL; "" into two: "", NULL); a NULL value gives NULL in every part. The
// source column is kept, and the new columns come right after it, in order.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_split_column(StepParams& params);

}  // namespace tamis
