// parse_date {column, formats: [...], on_error: null|keep|reject}
//
// Reads a text column as dates with the engine's one date scanner
// (dates.hpp: %Y exactly four digits, %y exactly two, %m/%d one or two, the
// whole value must match, real calendar dates only). The formats are tried
// in the order listed and the first that matches wins. The result is a date
// column; with on_error keep it stays text, matched values rewritten as ISO
// 8601 (YYYY-MM-DD) and the others left as they were (typed_support.hpp).
//
// Ambiguous day/month data: when the list holds both a month-before-day and a
// day-before-month format, a value that both read as different dates
// (03/04/2022) is counted and reported in a warning; it still takes the date
// of the first format that matched it.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_parse_date(StepParams& params);

}  // namespace tamis
