// cast {column, to, scale, on_error}: SQL CAST of one column.
//
// to is text, integer, decimal (then scale, 0..18, is required) or boolean
// or date. The conversions are exactly those of CAST in SQL expressions
// (expr/expr.hpp, the one place they are written down):
//   text -> integer  [spaces][sign]digits[spaces] (U+0020 spaces, which ISO
//                    SQL's CAST strips);
//   text -> decimal  any SQL numeric literal (1.5, -.5, 2E3) with spaces
//                    around, rounded half away from zero to the scale;
//   text -> date     YYYY-MM-DD (ISO 8601 calendar date; month and day may
//                    have one digit, as SQL's date literal allows), a real
//                    calendar date, spaces around allowed;
//   text -> boolean  TRUE or FALSE in any case, spaces around; UNKNOWN is NULL;
//   integer <-> decimal  rounded half away from zero to the target scale;
//   anything -> text the canonical text form (design §3).
// date <-> number, boolean <-> number and date <-> boolean are refused when
// the recipe is read. Unlike CAST in an expression, which stops the run, a
// value that cannot be converted (or overflows 64 bits) follows on_error
// (typed_support.hpp); keep is only for text columns.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_cast(StepParams& params);

}  // namespace tamis
