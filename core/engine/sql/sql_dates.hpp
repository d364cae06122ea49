// Reading text as a date in SQL with the engine's date scanner's grammar
// (dates.hpp), shared by parse_date and cast to date.
#pragma once

#include <string>
#include <vector>

#include "steps/step.hpp"

namespace tamis::sql {

// Whether date_of can read the strptime pattern: %Y %y %m %d %% and literal
// characters, each %m and %d ending at a literal or the end of the pattern.
bool reads_date_format(const std::string& pattern);

// The date the text x holds in the first of `patterns` that reads it (all
// accepted by reads_date_format), NULL when none does: a DATE, or its ISO
// 8601 text in SQLite, which has no DATE type.
std::string date_of(Dialect dialect, const std::string& x, const std::vector<std::string>& patterns);

}  // namespace tamis::sql
