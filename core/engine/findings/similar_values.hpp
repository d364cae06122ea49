// Variant spellings of the same category, found with the similar-values
// engine (core/engine/similar): typos, accents, spacing, punctuation.
#pragma once

#include "findings/finding_support.hpp"

namespace tamis {

Task<> detect_similar_values(DetectorContext& ctx);

}  // namespace tamis
