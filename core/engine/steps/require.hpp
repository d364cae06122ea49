// require {rule, columns, on_fail: stop|reject|warn, + the rule's parameters}
//
// A production guard: checks every row (or the row count) and, when the
// check fails,
//   stop    ends the run with an error of kind rule_failed (exit code 1)
//           naming the rule and the failing source lines (the first 20 and
//           the count). The rows are checked to the end first, so the count
//           is complete; no output is written.
//   reject  sends each failing row to the rejects file with the reason;
//   warn    keeps the rows and reports the failures as one warning.
// on_fail defaults to stop.
//
// Rules (a row fails when one of the listed columns fails):
//   not_null   columns: the value is NULL.
//   unique     columns: the row's values repeat those of an earlier row
//              (the earlier row passes). As in an SQL UNIQUE constraint, a
//              row with a NULL in any of the columns never conflicts. Keys
//              are kept as deduplicate keeps them (row_key.hpp).
//   in_set     columns, values [texts]: the value's canonical text (design
//              §3) is not one of the values, compared exactly.
//   pattern    columns, pattern: the value's canonical text does not match
//              the ICU regular expression as a whole, run under ICU's time
//              and stack limits (a value that exceeds them is an error).
//   range      columns, min and/or max (inclusive): numbers for integer and
//              decimal columns (compared exactly), ISO 8601 dates
//              ("2024-03-09") for date columns.
//   row_count  min and/or max: the number of rows reaching the step; no
//              columns, and on_fail stop or warn only.
// As in an SQL CHECK constraint, NULL passes in_set, pattern and range;
// require not_null to forbid it.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_require(StepParams& params);

}  // namespace tamis
