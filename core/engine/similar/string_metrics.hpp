// String metrics on Unicode code points (never bytes), used by similar-value
// grouping and tested against published worked examples and Debian's
// python3-levenshtein / python3-jellyfish.
//
// Conventions, fixed here once:
// - Distances count edits of single code points.
// - A distance d becomes a similarity 1 - d / max(|a|, |b|); two empty
//   strings are identical (similarity 1).
// - Jaro of two empty strings is 1, of one empty string and a non-empty one 0.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace tamis {

// Decodes valid UTF-8 into code points.
std::u32string code_points(std::string_view utf8);

// Levenshtein distance (V. I. Levenshtein, "Binary codes capable of
// correcting deletions, insertions, and reversals", Soviet Physics Doklady
// 10(8), 1966): fewest insertions, deletions and substitutions.
size_t levenshtein_distance(std::u32string_view a, std::u32string_view b);

// Restricted Damerau-Levenshtein distance, "optimal string alignment"
// (F. J. Damerau, "A technique for computer detection and correction of
// spelling errors", CACM 7(3), 1964, adds transposition of two adjacent
// characters; the restricted form edits no substring twice, so it is not a
// metric: OSA("CA", "ABC") = 3 where the unrestricted distance is 2).
size_t osa_distance(std::u32string_view a, std::u32string_view b);

// The same distances when only values up to `bound` matter: returns the
// distance if it is <= bound, else bound + 1. Computes a diagonal band of
// width 2 * bound + 1 and stops as soon as a whole row exceeds the bound
// (E. Ukkonen, "Algorithms for approximate string matching", Information and
// Control 64, 1985), so a check costs O(bound * length), not O(length^2).
// `scratch` holds the rows between calls, so a loop over millions of pairs
// allocates nothing.
size_t levenshtein_distance_within(std::u32string_view a, std::u32string_view b, size_t bound);
size_t osa_distance_within(std::u32string_view a, std::u32string_view b, size_t bound);
size_t levenshtein_distance_within(std::u32string_view a, std::u32string_view b, size_t bound,
                                   std::vector<size_t>& scratch);
size_t osa_distance_within(std::u32string_view a, std::u32string_view b, size_t bound, std::vector<size_t>& scratch);

// 1 - distance / max(|a|, |b|); 1 when both lengths are 0.
double distance_similarity(size_t distance, size_t length_a, size_t length_b);

// Jaro similarity (M. A. Jaro, "Advances in record-linkage methodology as
// applied to matching the 1985 census of Tampa, Florida", JASA 84(406), 1989):
// characters match when equal and at most floor(max(|a|,|b|) / 2) - 1
// positions apart; t is half the matched characters out of order, rounded
// down as in Winkler's reference code strcmp95 (U.S. Census Bureau, 1994;
// Debian's python3-jellyfish does the same);
// jaro = (m/|a| + m/|b| + (m - t)/m) / 3.
double jaro_similarity(std::u32string_view a, std::u32string_view b);

// Jaro-Winkler similarity (W. E. Winkler, "String comparator metrics and
// enhanced decision rules in the Fellegi-Sunter model of record linkage",
// Proc. Section on Survey Research Methods, ASA, 1990): jaro + l * 0.1 *
// (1 - jaro) with l the common prefix length, at most 4. As in Winkler's
// strcmp95 code, the prefix bonus applies only when jaro > 0.7.
double jaro_winkler_similarity(std::u32string_view a, std::u32string_view b);
double jaro_winkler_similarity(std::u32string_view a, std::u32string_view b, std::vector<char>& scratch);
inline constexpr double kJaroWinklerPrefixScale = 0.1;
inline constexpr size_t kJaroWinklerMaxPrefix = 4;
inline constexpr double kJaroWinklerBoostThreshold = 0.7;

// Padded character trigrams (q = 3) of a string, as a multiset: the string
// is padded with q - 1 start and q - 1 end markers that are not code points,
// so |grams| = |a| + 2 and every character is in exactly three grams
// (E. Ukkonen, "Approximate string-matching with q-grams and maximal
// matches", Theoretical Computer Science 92, 1992). Sorted.
inline constexpr size_t kQgramLength = 3;
std::vector<uint64_t> padded_trigrams(std::u32string_view a);

// Dice coefficient (L. R. Dice, "Measures of the amount of ecologic
// association between species", Ecology 26(3), 1945) over the multisets of
// padded trigrams: 2 |A ∩ B| / (|A| + |B|). Inputs are sorted gram lists.
double dice_similarity(const std::vector<uint64_t>& grams_a, const std::vector<uint64_t>& grams_b);
double qgram_similarity(std::u32string_view a, std::u32string_view b);

}  // namespace tamis
