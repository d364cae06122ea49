// deduplicate {columns: "*" or [...], keep: first|last, compare: exact|trimmed|casefold}
// (defaults: every column, first, exact)
//
// Removes every row whose compared values equal those of another row,
// keeping the first such row in source order (keep: first) or the last
// (keep: last); the rest are recorded as removed with the reason
// "duplicate of line N", N being the kept row's source line. As in SQL's
// ROW_NUMBER() OVER (PARTITION BY the columns ORDER BY source line) = 1,
// NULLs equal each other here. compare: trimmed ignores Unicode White_Space
// at both ends of text values; casefold compares after Unicode full case
// folding (row_key.hpp). The output keeps the rows' values as written.
//
// Memory: a hash and a stored key per kept row, the keys spilling to a
// temporary file beyond a budget (row_key.hpp); every hash match is
// confirmed against the stored key, so a collision never removes a distinct
// row. keep: last needs a first pass over the input to learn each key's last
// line.
#pragma once

#include "steps/row_key.hpp"
#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_deduplicate(StepParams& params);
// The same step with a given memory budget and hash function, so tests can
// force spilling and hash collisions.
Result<std::unique_ptr<Step>> parse_deduplicate_tuned(StepParams& params, RowIndexTuning tuning);

}  // namespace tamis
