// Similar values (design §7, "Similar values" panel): groups the distinct
// values of a text column into sets that probably mean the same thing, picks
// a canonical spelling per set and turns the sets into a map_values step.
//
// Methods (each cited where it is implemented):
//   token_key     values whose normalized token key is equal (token_key()).
//   soundex       values whose tokens have the same American Soundex codes.
//   qgram         Dice coefficient over padded character trigrams.
//   levenshtein   1 - Levenshtein distance / longer length, in code points.
//   osa           the same with the optimal-string-alignment distance.
//   jaro_winkler  Jaro-Winkler similarity (prefix scale 0.1, prefix up to 4).
// Key methods group by hashing and ignore the threshold. The similarity
// methods compare the values' comparison forms (comparison_form()), so case,
// accents and spacing alone never keep two spellings apart, and they keep a
// pair when its similarity is at least the threshold.
//
// Blocking (why 100,000 distinct values take seconds, not hours): values with
// the same comparison form are merged first (a hash grouping). The distinct
// forms are then joined by prefix filtering (S. Chaudhuri, V. Ganti,
// R. Kaushik, "A primitive operator for similarity joins in data cleaning",
// ICDE 2006; C. Xiao, W. Wang, X. Lin, "Ed-Join: an efficient algorithm for
// similarity joins with edit distance constraints", VLDB 2008): every form's
// padded trigrams are ordered from the rarest to the most common over all
// forms, and only forms that share one of the first few (the "prefix") are
// compared. The prefix length follows from the threshold, so for these
// methods the blocking itself loses no pair:
//   levenshtein  one edit changes at most 3 trigrams (q-gram lemma, Ukkonen
//                1992), so forms within distance d share at least
//                max(|A|,|B|) + 2 - 3d trigrams; exact for thresholds > 2/3.
//   osa          a transposition changes at most 4 trigrams; exact for
//                thresholds > 3/4.
//   qgram        Dice >= t needs an overlap >= t|A|/(2-t); exact for t > 0.
// Below those thresholds the lemma guarantees no shared trigram, and only
// pairs that share at least one trigram are compared (what it can miss: e.g.
// "ab" and "ba" at threshold 0.5). jaro_winkler has no such lemma: its
// candidates are the pairs whose trigram Dice coefficient is at least 0.5
// (kJaroWinklerBlockDice), so it can miss pairs with a high Jaro-Winkler score
// and few shared trigrams, such as heavy transpositions of short values.
// Every block (forms sharing one prefix trigram) holds at most
// kMaxBlockSize forms; forms beyond that are not indexed under that trigram
// and can miss pairs that only that trigram would have found (counted in
// SimilarStats::block_overflows). Before a similarity is computed, a length
// filter discards pairs whose lengths alone rule the threshold out; for the
// edit distances and Jaro-Winkler a character filter discards pairs that
// cannot have enough characters in common (an upper bound from per-form
// counts of characters in 32 hash buckets): for an edit distance, each
// unshared character costs an edit; for Jaro, m is at most the shared
// characters. No filter loses a pair.
// Edit distances are computed in a band of width 2 * bound + 1.
//
// Grouping: pairs at or above the threshold are clustered by the CENTER
// method (T. H. Haveliwala, A. Gionis, P. Indyk, "Scalable techniques for
// clustering the web", WebDB 2000; compared in O. Hassanzadeh et al.,
// "Framework for evaluating clustering algorithms in duplicate detection",
// VLDB 2009): forms are visited from the most rows to the fewest; an
// unassigned form becomes a centre and takes every unassigned form similar to
// it. Unlike single linkage this never chains "A~B~C" into one set when A
// and C are far apart.
#pragma once

#include <nlohmann/json.hpp>

#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "profile.hpp"
#include "table.hpp"

namespace tamis {

enum class SimilarMethod : uint8_t { token_key, qgram, levenshtein, damerau_osa, jaro_winkler, soundex };

// token_key, qgram, levenshtein, osa, jaro_winkler, soundex.
std::string_view similar_method_name(SimilarMethod method);
std::optional<SimilarMethod> parse_similar_method(std::string_view name);
const std::vector<SimilarMethod>& all_similar_methods();
// Whether the method groups by equal keys (and so ignores the threshold).
bool is_key_method(SimilarMethod method);

struct SimilarOptions {
  SimilarMethod method = SimilarMethod::token_key;
  double threshold = 0.85;  // similarity in [0, 1]; ignored by key methods
};

struct SimilarMember {
  std::string value;
  uint64_t count = 0;
  double score = 1.0;  // similarity of the comparison forms to the canonical value's (1 for key methods)
};

struct SimilarGroup {
  std::string canonical;
  uint64_t rows = 0;  // rows that a map_values step would change: the counts of the non-canonical members
  std::vector<SimilarMember> members;  // canonical first, then by count desc, value asc
};

struct SimilarStats {
  uint64_t values = 0;           // distinct values given
  uint64_t ungrouped = 0;        // values with an empty key or form (only white space or punctuation)
  uint64_t forms = 0;            // distinct keys or comparison forms
  uint64_t candidate_pairs = 0;  // pairs found by blocking
  uint64_t compared_pairs = 0;   // pairs left after the length and character filters, whose similarity was computed
  uint64_t similar_pairs = 0;    // pairs at or above the threshold
  uint64_t block_overflows = 0;  // forms not indexed under a prefix trigram because its block was full
};

inline constexpr size_t kMaxBlockSize = 1000;
inline constexpr double kJaroWinklerBlockDice = 0.5;

// Full case folding (ICU, CaseFolding.txt C + F), then NFKD with the
// nonspacing marks (general category Mn) removed.
std::string fold_and_strip_accents(std::string_view value);
// The normalized token key: fold_and_strip_accents, punctuation (general
// category P) removed, split on Unicode white space, tokens sorted (code
// point order) and deduplicated, joined with one space.
// "  Oak, SESSILE " and "sessile oak" both give "oak sessile".
std::string token_key(std::string_view value);
// What the similarity methods compare: fold_and_strip_accents, runs of white
// space made one space, none at either end. Punctuation and word order stay.
std::string comparison_form(std::string_view value);
// The soundex method's key: the American Soundex code of each token of
// token_key() (a token without an ASCII letter stands for itself), sorted,
// deduplicated, joined with one space. "Old Tannery" -> "O430 T560".
std::string soundex_key(std::string_view value);

// The similarity `method` gives two comparison forms (1 for key methods).
double form_similarity(SimilarMethod method, std::u32string_view a, std::u32string_view b);

// The canonical value of a set: the most frequent; among equally frequent
// values the longest common form, which here means the value with the most
// letters and digits (Unicode general categories L and N), i.e. the fullest
// spelling, with white space, punctuation and marks not counted; then the one
// with fewer code points in all (no stray spaces or dots); then the first in
// code point order. True when `a` is preferred over `b`.
bool preferred_canonical(const ValueCount& a, const ValueCount& b);

// Counts the distinct non-NULL values of one column (text cells as they are;
// typed cells in their canonical text), most frequent first, then by value.
std::vector<ValueCount> distinct_values(const Table& table, size_t column);

// Resumable grouping for the workbench (the browser has no threads): each
// step() does about `budget` units of work (a value, a form, a compared pair).
class SimilarValueGrouper {
 public:
  SimilarValueGrouper(std::vector<ValueCount> values, SimilarOptions options);
  ~SimilarValueGrouper();
  SimilarValueGrouper(SimilarValueGrouper&&) noexcept;
  SimilarValueGrouper& operator=(SimilarValueGrouper&&) noexcept;
  // Returns true when finished.
  bool step(size_t budget);
  double progress() const;
  // Groups with 2+ members, most rows affected first (then canonical value).
  const std::vector<SimilarGroup>& result() const;
  const SimilarStats& stats() const;

 private:
  struct State;
  std::unique_ptr<State> state_;
};

std::vector<SimilarGroup> group_similar_values(std::span<const ValueCount> values, const SimilarOptions& options);

// {"op":"map_values","column":C,"map":{variant: canonical, ...}} for every
// non-canonical member of the groups (the members the analyst kept).
nlohmann::ordered_json map_values_step(std::string_view column, std::span<const SimilarGroup> groups);

}  // namespace tamis
