// Phonetic keys: values that sound alike get the same key.
#pragma once

#include <string>
#include <string_view>

namespace tamis {

// American Soundex, as the US National Archives and Records Administration
// describes it ("The Soundex Indexing System", 2007; also D. E. Knuth, The
// Art of Computer Programming vol. 3, §6.4): the first letter, then digits
// for the consonants that follow (b f p v 1; c g j k q s x z 2; d t 3; l 4;
// m n 5; r 6), padded with 0 or cut to four characters. Letters with the same
// digit side by side count once, also when the first letter is one of them,
// and also when only h or w stands between them; a vowel (a e i o u y)
// between them makes the digit count again.
// Only the ASCII letters of `word` count, in either case; everything else is
// skipped. Returns "" when `word` has no ASCII letter.
std::string american_soundex(std::string_view word);

}  // namespace tamis
