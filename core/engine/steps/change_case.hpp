// change_case: ICU's full Unicode case mapping (UnicodeData.txt plus
// SpecialCasing.txt: "straße" upper is "STRASSE", a final Σ lowers to ς).
// Without `locale` the mapping is the locale-independent one; `locale` (a
// BCP 47 tag such as "tr") switches on that language's rules, e.g. Turkish
// dotted and dotless i. Title case finds words by the Unicode default word
// boundaries (UAX #29, ICU's root rules, whatever the locale, so every build
// segments alike), maps the first letter of each word to title case and the
// rest to lower case.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_change_case(StepParams& params);

}  // namespace tamis
