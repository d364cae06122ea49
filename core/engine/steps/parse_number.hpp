// parse_number {column, decimal_mark, group_mark, strip, percent, scale, on_error}
//
// Reads a text column written the way people write numbers:
//   1. with percent: true, one '%' anywhere in the value marks a percentage
//      (the value is divided by 100, exactly); two are an error;
//   2. every character listed in strip (e.g. "$€ ") is removed, wherever it is;
//   3. what is left must be [+|-] integer-part [decimal_mark digits] or
//      [+|-] decimal_mark digits, where the integer part is plain digits or,
//      when group_mark is set, 1-3 digits followed by groups of exactly three
//      digits each led by the group mark (1,234,567; 12,34 is not a number).
//   No exponent, no white space (list " " in strip, or make it the group
//   mark), no accounting parentheses. decimal_mark is "." (default) or ",";
//   group_mark is absent or one of "," "." " " "'" and differs from it.
//
// Result type. The type of a column must not depend on one value of next
// month's file in a way nobody sees, and it must be the same whether the
// file streams in batches or is read whole, so:
//   scale given (0..18)  an integer column (0) or a decimal column of that
//                        scale; more fraction digits are rounded half away
//                        from zero (as SQL CAST to DECIMAL(p,s));
//   scale absent         a decimal column whose scale is the largest number
//                        of fraction digits among the values (percent adds
//                        two), at most 18; this needs a first pass over the
//                        input. (The recipe's compiled schema says decimal;
//                        the scale is known once the data has been seen.)
// A value that does not fit a 64-bit scaled integer is not convertible.
// on_error as in typed_support.hpp (keep: the column stays text, numbers
// rewritten in canonical form such as -1234.50).
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_parse_number(StepParams& params);

}  // namespace tamis
