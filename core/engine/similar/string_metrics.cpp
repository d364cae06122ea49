#include "similar/string_metrics.hpp"

#include <algorithm>

#include "utf8.hpp"

namespace tamis {

std::u32string code_points(std::string_view utf8) {
  std::u32string out;
  out.reserve(utf8.size());
  for (size_t i = 0; i < utf8.size();) out.push_back(utf8::next(utf8, i));
  return out;
}

namespace {

// The banded dynamic programme shared by Levenshtein and OSA. Cells outside
// the band, and any value above the bound, are held at bound + 1 ("too far"),
// which keeps every minimum below correct for values up to the bound.
template <bool kTranspositions>
size_t banded_distance(std::u32string_view a, std::u32string_view b, size_t bound, std::vector<size_t>& scratch) {
  const size_t la = a.size(), lb = b.size();
  if ((la > lb ? la - lb : lb - la) > bound) return bound + 1;
  const size_t too_far = bound + 1;
  if (scratch.size() < 3 * (lb + 1)) scratch.resize(3 * (lb + 1));
  size_t* before = scratch.data();
  size_t* previous = before + (lb + 1);
  size_t* current = previous + (lb + 1);
  for (size_t j = 0; j <= lb; ++j) previous[j] = std::min(j, too_far);
  for (size_t i = 1; i <= la; ++i) {
    const size_t lo = i > bound ? i - bound : 1;
    const size_t hi = std::min(lb, i + bound);
    current[0] = std::min(i, too_far);
    if (lo > 1) current[lo - 1] = too_far;
    size_t row_min = lo == 1 ? current[0] : too_far;
    for (size_t j = lo; j <= hi; ++j) {
      size_t v = previous[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
      v = std::min(v, previous[j] + 1);
      v = std::min(v, current[j - 1] + 1);
      if constexpr (kTranspositions) {
        if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1]) v = std::min(v, before[j - 2] + 1);
      }
      current[j] = std::min(v, too_far);
      row_min = std::min(row_min, current[j]);
    }
    if (hi < lb) current[hi + 1] = too_far;
    // No later row can be smaller than this one's minimum (for OSA the row
    // before also bounds it, and it was at most this minimum plus one).
    if (row_min > bound) return too_far;
    if constexpr (kTranspositions) std::swap(before, previous);
    std::swap(previous, current);
  }
  return std::min(previous[lb], too_far);
}

}  // namespace

size_t levenshtein_distance(std::u32string_view a, std::u32string_view b) {
  return levenshtein_distance_within(a, b, std::max(a.size(), b.size()));
}

size_t osa_distance(std::u32string_view a, std::u32string_view b) {
  return osa_distance_within(a, b, std::max(a.size(), b.size()));
}

size_t levenshtein_distance_within(std::u32string_view a, std::u32string_view b, size_t bound) {
  std::vector<size_t> scratch;
  return levenshtein_distance_within(a, b, bound, scratch);
}

size_t osa_distance_within(std::u32string_view a, std::u32string_view b, size_t bound) {
  std::vector<size_t> scratch;
  return osa_distance_within(a, b, bound, scratch);
}

size_t levenshtein_distance_within(std::u32string_view a, std::u32string_view b, size_t bound,
                                   std::vector<size_t>& scratch) {
  return banded_distance<false>(a, b, std::min(bound, std::max(a.size(), b.size())), scratch);
}

size_t osa_distance_within(std::u32string_view a, std::u32string_view b, size_t bound, std::vector<size_t>& scratch) {
  return banded_distance<true>(a, b, std::min(bound, std::max(a.size(), b.size())), scratch);
}

double distance_similarity(size_t distance, size_t length_a, size_t length_b) {
  const size_t longest = std::max(length_a, length_b);
  if (longest == 0) return 1.0;
  return 1.0 - static_cast<double>(distance) / static_cast<double>(longest);
}

namespace {

double jaro_with(std::u32string_view a, std::u32string_view b, std::vector<char>& scratch) {
  const size_t la = a.size(), lb = b.size();
  if (la == 0 && lb == 0) return 1.0;
  if (la == 0 || lb == 0) return 0.0;
  const size_t half = std::max(la, lb) / 2;
  const size_t window = half > 0 ? half - 1 : 0;
  scratch.assign(la + lb, 0);
  char* matched_a = scratch.data();
  char* matched_b = matched_a + la;
  size_t matches = 0;
  for (size_t i = 0; i < la; ++i) {
    const size_t lo = i > window ? i - window : 0;
    const size_t hi = std::min(lb, i + window + 1);
    for (size_t j = lo; j < hi; ++j) {
      if (matched_b[j] || a[i] != b[j]) continue;
      matched_a[i] = matched_b[j] = 1;
      ++matches;
      break;
    }
  }
  if (matches == 0) return 0.0;
  size_t out_of_order = 0;
  for (size_t i = 0, j = 0; i < la; ++i) {
    if (!matched_a[i]) continue;
    while (!matched_b[j]) ++j;
    if (a[i] != b[j]) ++out_of_order;
    ++j;
  }
  const double m = static_cast<double>(matches);
  const double t = static_cast<double>(out_of_order / 2);
  return (m / static_cast<double>(la) + m / static_cast<double>(lb) + (m - t) / m) / 3.0;
}

}  // namespace

double jaro_similarity(std::u32string_view a, std::u32string_view b) {
  std::vector<char> scratch;
  return jaro_with(a, b, scratch);
}

double jaro_winkler_similarity(std::u32string_view a, std::u32string_view b) {
  std::vector<char> scratch;
  return jaro_winkler_similarity(a, b, scratch);
}

double jaro_winkler_similarity(std::u32string_view a, std::u32string_view b, std::vector<char>& scratch) {
  const double jaro = jaro_with(a, b, scratch);
  if (jaro <= kJaroWinklerBoostThreshold) return jaro;
  size_t prefix = 0;
  const size_t limit = std::min({a.size(), b.size(), kJaroWinklerMaxPrefix});
  while (prefix < limit && a[prefix] == b[prefix]) ++prefix;
  return jaro + static_cast<double>(prefix) * kJaroWinklerPrefixScale * (1.0 - jaro);
}

std::vector<uint64_t> padded_trigrams(std::u32string_view a) {
  // 0x110000 is one past the last code point, so it never occurs in text;
  // a gram packs three 21-bit symbols into 63 bits.
  constexpr uint64_t kPad = 0x110000;
  std::vector<uint64_t> grams;
  grams.reserve(a.size() + 2);
  uint64_t window = (kPad << 21) | kPad;
  for (const char32_t c : a) {
    window = ((window << 21) | c) & ((uint64_t{1} << 63) - 1);
    grams.push_back(window);
  }
  for (int k = 0; k < 2; ++k) {
    window = ((window << 21) | kPad) & ((uint64_t{1} << 63) - 1);
    grams.push_back(window);
  }
  std::sort(grams.begin(), grams.end());
  return grams;
}

double dice_similarity(const std::vector<uint64_t>& grams_a, const std::vector<uint64_t>& grams_b) {
  const size_t total = grams_a.size() + grams_b.size();
  if (total == 0) return 1.0;
  size_t common = 0;
  for (size_t i = 0, j = 0; i < grams_a.size() && j < grams_b.size();) {
    if (grams_a[i] < grams_b[j]) ++i;
    else if (grams_b[j] < grams_a[i]) ++j;
    else ++common, ++i, ++j;
  }
  return 2.0 * static_cast<double>(common) / static_cast<double>(total);
}

double qgram_similarity(std::u32string_view a, std::u32string_view b) {
  return dice_similarity(padded_trigrams(a), padded_trigrams(b));
}

}  // namespace tamis
