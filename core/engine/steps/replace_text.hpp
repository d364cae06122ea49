// replace_text: replaces text inside values.
//   match: literal  every occurrence of `find` (left to right, not
//                   overlapping) becomes `replace` (default "": deleted);
//   match: entire   a value equal to `find` as a whole becomes `replace`
//                   (`find` may be "" to fill empty values; NULL stays NULL);
//   match: regex    `find` is an ICU regular expression, every match is
//                   replaced; in `replace`, $0..$n and ${name} insert groups
//                   and a backslash makes the next character literal (\$)
//                   (ICU's replacement syntax). A backslash before a letter
//                   with no meaning in `find` is an error, not a literal.
// Comparison is code point by code point and case-sensitive; use the
// pattern flag (?i) for case-insensitive regex matching. Recipes are
// untrusted input, so every regex match runs under ICU's time limit and
// backtracking-stack limit: a value that exceeds either stops the step with
// an error naming the column and source line, instead of hanging the run.
#pragma once

#include "steps/step_params.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_replace_text(StepParams& params);

// ICU's units of the match time limit (RegexMatcher::setTimeLimit) allowed
// per value, and the backtracking stack per value in bytes.
inline constexpr int32_t kRegexTimeLimit = 1000;
inline constexpr int32_t kRegexStackLimit = 8 << 20;

}  // namespace tamis
