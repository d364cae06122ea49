// normalize_unicode: Unicode normalization (UAX #15) by ICU's Normalizer2.
// NFC composes canonically equivalent sequences ("e" + U+0301 becomes "é");
// NFKC also folds compatibility variants ("ﬁ" becomes "fi", full-width "Ａ"
// becomes "A"). strip_accents: true decomposes (NFD, or NFKD for NFKC),
// drops every nonspacing mark (general category Mn) and composes again to
// the chosen form, so "Ångström" becomes "Angstrom". Letters that carry
// their stroke or slash in the letter itself (ø, ł, đ) have no decomposition
// and stay; Mn also holds vowel signs and other marks of many scripts
// (Hebrew points, Devanagari vowel signs), which are dropped too.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_normalize_unicode(StepParams& params);

}  // namespace tamis
