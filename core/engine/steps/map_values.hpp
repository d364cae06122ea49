// map_values: merges variant spellings. A value equal to one of the map's
// keys (as a whole, code point by code point) becomes that key's text.
// ignore_case: true compares by Unicode full case folding (ICU,
// CaseFolding.txt statuses C and F, locale-independent) on both sides, so
// "STRASSE" matches the key "Straße"; two keys that fold alike must then map
// to the same text. The targets are text: NULL is not a spelling, and turning
// values into NULL is to_null's job.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_map_values(StepParams& params);

}  // namespace tamis
