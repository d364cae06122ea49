// fill_from_group {column, keys: [...]}
//
// Fills a NULL in `column` from the other rows with the same values in the
// key columns (NULL keys form a group of their own, as in SQL's GROUP BY),
// but only when those rows hold exactly one distinct non-NULL value. A group
// with two or more distinct values is a conflict: its NULLs stay NULL, and
// the change record lists it (the key values and up to three of the distinct
// values) instead of guessing. Only groups that have a NULL to fill are
// reported. Values are compared exactly (code point by code point; typed
// values by value).
//
// Every row can fill every other row, earlier or later, so the step needs a
// first pass over the input; it keeps one value per group (up to three for a
// conflicting group), not the rows.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_fill_from_group(StepParams& params);

}  // namespace tamis
