// Test driver for tests/reference/similar_jellyfish.py: reads pairs of UTF-8
// strings, one pair per line as "a<TAB>b", and prints for each the metrics
// of core/engine/similar as
// "levenshtein<TAB>osa<TAB>jaro<TAB>jaro_winkler<TAB>qgram<TAB>soundex(a)<TAB>soundex(b)".
// Doubles are printed with 17 significant digits so they round-trip.
#include <cstdio>
#include <iostream>
#include <string>

#include "similar/phonetic.hpp"
#include "similar/string_metrics.hpp"
#include "utf8.hpp"

int main() {
  std::ios::sync_with_stdio(false);
  std::string line;
  while (std::getline(std::cin, line)) {
    const size_t tab = line.find('\t');
    if (tab == std::string::npos || tamis::utf8::first_invalid(line) != std::string::npos) {
      std::cerr << "similar_metrics: expected valid UTF-8 \"a<TAB>b\", got: " << line << '\n';
      return 2;
    }
    const std::string a = line.substr(0, tab), b = line.substr(tab + 1);
    const std::u32string pa = tamis::code_points(a), pb = tamis::code_points(b);
    std::printf("%zu\t%zu\t%.17g\t%.17g\t%.17g\t%s\t%s\n", tamis::levenshtein_distance(pa, pb),
                tamis::osa_distance(pa, pb), tamis::jaro_similarity(pa, pb), tamis::jaro_winkler_similarity(pa, pb),
                tamis::qgram_similarity(pa, pb), tamis::american_soundex(a).c_str(),
                tamis::american_soundex(b).c_str());
  }
  return 0;
}
