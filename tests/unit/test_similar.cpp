// Similar values: the string metrics against published worked examples, the
// keys and the grouping rules of core/engine/similar/similar_values.hpp, the
// map_values step they produce, and the demo file against the defects its
// generator says it injected. The sources are named beside each check.
#include <doctest/doctest.h>

#include <nlohmann/json.hpp>

#include <filesystem>
#include <fstream>
#include <map>
#include <optional>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "recipe.hpp"
#include "similar/phonetic.hpp"
#include "similar/similar_values.hpp"
#include "similar/string_metrics.hpp"
#include "unit_support.hpp"

namespace tamis {
namespace {

size_t lev(std::string_view a, std::string_view b) { return levenshtein_distance(code_points(a), code_points(b)); }
size_t osa(std::string_view a, std::string_view b) { return osa_distance(code_points(a), code_points(b)); }
double jaro(std::string_view a, std::string_view b) { return jaro_similarity(code_points(a), code_points(b)); }
double jw(std::string_view a, std::string_view b) { return jaro_winkler_similarity(code_points(a), code_points(b)); }
double dice(std::string_view a, std::string_view b) { return qgram_similarity(code_points(a), code_points(b)); }

std::vector<ValueCount> counts(std::initializer_list<std::pair<const char*, uint64_t>> list) {
  std::vector<ValueCount> out;
  for (const auto& p : list) out.push_back({p.first, p.second});
  return out;
}

SimilarOptions options(SimilarMethod method, double threshold = 0.85) {
  SimilarOptions o;
  o.method = method;
  o.threshold = threshold;
  return o;
}

// The members of each group as "value" strings, canonical first.
std::vector<std::vector<std::string>> member_values(const std::vector<SimilarGroup>& groups) {
  std::vector<std::vector<std::string>> out;
  for (const SimilarGroup& g : groups) {
    out.emplace_back();
    for (const SimilarMember& m : g.members) out.back().push_back(m.value);
  }
  return out;
}

std::string file_text(const std::filesystem::path& path) {
  std::ifstream in(path, std::ios::binary);
  REQUIRE_MESSAGE(in.good(), path.string());
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

// One text column "v"; std::nullopt is NULL.
Table one_column(const std::vector<std::optional<std::string>>& cells) {
  auto column = std::make_shared<Column>(Type::text);
  TextChunkBuilder builder;
  for (const auto& c : cells)
    if (c) builder.append(*c);
    else builder.append_null();
  column->append_chunk(builder.finish());
  auto lines = std::make_shared<Column>(Type::integer);
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->rows = cells.size();
  for (size_t r = 0; r < cells.size(); ++r) chunk->numbers.push_back(static_cast<int64_t>(r + 2));
  lines->append_chunk(chunk);
  auto table = Table::make({"v"}, {column}, lines);
  REQUIRE(table.ok());
  return std::move(table).value();
}

TEST_CASE("unit_similar: Levenshtein distance, worked examples") {
  // Levenshtein 1966; the kitten/sitting example of every textbook and of
  // Wikipedia "Levenshtein distance" (from memory): k->s, e->i, insert g.
  CHECK(lev("kitten", "sitting") == 3);
  CHECK(lev("sitting", "kitten") == 3);
  // Wikipedia "Levenshtein distance" (from memory): flaw -> lawn = 2.
  CHECK(lev("flaw", "lawn") == 2);
  CHECK(lev("", "abc") == 3);
  CHECK(lev("", "") == 0);
  // Code points, not bytes: ß is two bytes in UTF-8 but one edit away from s.
  CHECK(lev("Straße", "Strase") == 1);
  CHECK(lev("Ελένη", "Ελενη") == 1);
  // The banded version returns bound + 1 as soon as the distance exceeds the bound.
  CHECK(levenshtein_distance_within(code_points("kitten"), code_points("sitting"), 3) == 3);
  CHECK(levenshtein_distance_within(code_points("kitten"), code_points("sitting"), 2) == 3);
  CHECK(levenshtein_distance_within(code_points("kitten"), code_points("sitting"), 1) == 2);
  CHECK(levenshtein_distance_within(code_points("abcdef"), code_points("a"), 2) == 3);
  CHECK(distance_similarity(3, 6, 7) == doctest::Approx(1.0 - 3.0 / 7.0));
  CHECK(distance_similarity(0, 0, 0) == 1.0);
}

TEST_CASE("unit_similar: optimal string alignment distance, worked examples") {
  // Wikipedia "Damerau-Levenshtein distance" (from memory): OSA(CA, ABC) = 3
  // because the restricted form cannot edit the transposed pair again, while
  // the unrestricted Damerau-Levenshtein distance is 2 (CA -> AC -> ABC).
  CHECK(osa("CA", "ABC") == 3);
  CHECK(lev("CA", "ABC") == 3);
  // Damerau 1964: one transposition of adjacent letters is one error.
  CHECK(osa("ab", "ba") == 1);
  CHECK(lev("ab", "ba") == 2);
  CHECK(osa("Brindle Heights", "Brindle Hieghts") == 1);
  CHECK(osa("kitten", "sitting") == 3);
  CHECK(osa("ća", "ać") == 1);
  CHECK(osa_distance_within(code_points("abcdef"), code_points("badcfe"), 3) == 3);
  CHECK(osa_distance_within(code_points("abcdef"), code_points("badcfe"), 2) == 3);
}

TEST_CASE("unit_similar: Jaro and Jaro-Winkler, Winkler's published examples") {
  // W. E. Winkler 1990, table of comparator values (also Wikipedia
  // "Jaro-Winkler distance"): Jaro 0.944 / 0.822 / 0.767 and Jaro-Winkler
  // 0.961 / 0.840 / 0.813 to three decimals.
  CHECK(jaro("MARTHA", "MARHTA") == doctest::Approx(0.944).epsilon(0.001));
  CHECK(jw("MARTHA", "MARHTA") == doctest::Approx(0.961).epsilon(0.001));
  CHECK(jaro("DWAYNE", "DUANE") == doctest::Approx(0.822).epsilon(0.001));
  CHECK(jw("DWAYNE", "DUANE") == doctest::Approx(0.840).epsilon(0.001));
  CHECK(jaro("DIXON", "DICKSONX") == doctest::Approx(0.767).epsilon(0.001));
  CHECK(jw("DIXON", "DICKSONX") == doctest::Approx(0.813).epsilon(0.001));
  // Exact values of the formula: MARTHA/MARHTA has m = 6, t = 1, prefix 3.
  CHECK(jaro("MARTHA", "MARHTA") == doctest::Approx((1.0 + 1.0 + 5.0 / 6.0) / 3.0));
  // Worked by hand: 7 matches, 3 of them out of order; strcmp95 (and
  // python3-jellyfish) halve that count rounding down, so t = 1, not 1.5.
  CHECK(jaro("ψιωθλίβτ", "ψιωίθλίυτ") == doctest::Approx((7.0 / 8 + 7.0 / 9 + 6.0 / 7) / 3));
  // Winkler's strcmp95 applies the prefix bonus only above Jaro 0.7
  // (Debian python3-jellyfish does the same; python3-levenshtein does not).
  CHECK(jaro("abxxx", "abyyy") == doctest::Approx(0.6));
  CHECK(jw("abxxx", "abyyy") == doctest::Approx(0.6));
  CHECK(jw("", "") == 1.0);
  CHECK(jw("a", "") == 0.0);
  CHECK(jw("abc", "xyz") == 0.0);
  // Prefix at most 4: equal first 6 letters count as 4.
  const double j = jaro("abcdefgh", "abcdefxy");
  CHECK(jw("abcdefgh", "abcdefxy") == doctest::Approx(j + 0.4 * (1 - j)));
}

TEST_CASE("unit_similar: American Soundex, handbook examples") {
  // US National Archives, "The Soundex Indexing System" and Knuth, TAOCP
  // vol. 3, §6.4: Robert and Rupert R163, Ashcraft A261 (s and c separated by
  // h count once), Tymczak T522, Pfister P236 (P and f share the code 1).
  CHECK(american_soundex("Robert") == "R163");
  CHECK(american_soundex("Rupert") == "R163");
  CHECK(american_soundex("Ashcraft") == "A261");
  CHECK(american_soundex("Tymczak") == "T522");
  CHECK(american_soundex("Pfister") == "P236");
  // Same NARA page (from memory): Gutierrez G362, Jackson J250, Lee L000 (padding).
  CHECK(american_soundex("Gutierrez") == "G362");
  CHECK(american_soundex("Jackson") == "J250");
  CHECK(american_soundex("Lee") == "L000");
  // A vowel between equal codes makes the code count again (H555), h or w does not.
  CHECK(american_soundex("Honeyman") == "H555");
  CHECK(american_soundex("ROBERT") == american_soundex("robert"));
  CHECK(american_soundex("O'Hara") == "O600");
  CHECK(american_soundex("").empty());
  CHECK(american_soundex("Νίκος").empty());
}

TEST_CASE("unit_similar: Dice coefficient over padded trigrams") {
  // Worked by hand from the definition (Dice 1945, Ukkonen 1992 padding):
  // night = {##n #ni nig igh ght ht# t##}, nacht = {##n #na nac ach cht ht# t##},
  // 3 shared of 7 + 7 -> 6/14.
  CHECK(dice("night", "nacht") == doctest::Approx(6.0 / 14.0));
  CHECK(dice("abc", "abc") == 1.0);
  CHECK(dice("", "") == 1.0);
  CHECK(dice("a", "b") == 0.0);
  // Multisets: "aaaa" has ##a #aa aaa aaa aa# a## (aaa twice); "aaa" has aaa once.
  CHECK(dice("aaaa", "aaa") == doctest::Approx(2.0 * 5.0 / 11.0));
  CHECK(padded_trigrams(code_points("é")).size() == 3);
}

TEST_CASE("unit_similar: normalized keys") {
  // The token key of the brief: fold, strip accents, drop punctuation, sort, dedupe.
  CHECK(token_key("  Oak, SESSILE ") == "oak sessile");
  CHECK(token_key("sessile oak") == "oak sessile");
  CHECK(token_key("Oak oak OAK") == "oak");
  CHECK(token_key("Rivière Quay") == "quay riviere");
  CHECK(token_key("Rivie\xCC\x80re Quay") == "quay riviere");  // NFD: e + U+0300
  CHECK(token_key("Lime, small-leaved") == "lime smallleaved");
  CHECK(token_key("Brindle\xC2\xA0Heights.") == "brindle heights");  // U+00A0 is White_Space
  CHECK(token_key("STRASSE") == token_key("Straße"));  // full case folding, CaseFolding.txt ß -> ss
  CHECK(token_key("ﬁeld") == "field");                // NFKD: U+FB01 -> f i
  CHECK(token_key("Ελένη Ρήγα") == "ελενη ρηγα");
  CHECK(token_key(" -- ").empty());
  CHECK(comparison_form("  Rivière   Quay. ") == "riviere quay.");
  CHECK(comparison_form("\tGorse\nHill") == "gorse hill");
  CHECK(soundex_key("Old Tannery") == "O430 T560");
  CHECK(soundex_key("Old Tanery") == "O430 T560");
  CHECK(soundex_key("Lock 7 Bank") == "7 B520 L200");
  // A token without ASCII letters stands for itself, case-folded: final ς
  // folds to σ (CaseFolding.txt, 03C2; C; 03C3).
  CHECK(soundex_key("Νίκος") == "νικοσ");
}

TEST_CASE("unit_similar: method names") {
  for (const SimilarMethod m : all_similar_methods()) CHECK(parse_similar_method(similar_method_name(m)) == m);
  CHECK(parse_similar_method("osa") == SimilarMethod::damerau_osa);
  CHECK_FALSE(parse_similar_method("OSA").has_value());
  CHECK_FALSE(parse_similar_method("").has_value());
  CHECK(is_key_method(SimilarMethod::soundex));
  CHECK_FALSE(is_key_method(SimilarMethod::jaro_winkler));
}

TEST_CASE("unit_similar: canonical value is the most frequent, ties to the longest common form") {
  // Most frequent wins whatever its length.
  CHECK(preferred_canonical({"St Albans", 5}, {"Saint Albans", 4}));
  // Tie: the one with more letters and digits (the fuller spelling).
  CHECK(preferred_canonical({"Saint Albans", 4}, {"St Albans", 4}));
  // Tie on letters and digits: fewer code points in all, so stray spaces and dots lose.
  CHECK(preferred_canonical({"Northwick", 4}, {"Northwick.", 4}));
  CHECK(preferred_canonical({"Northwick", 4}, {"Northwick ", 4}));
  // Marks are not letters: NFC é (1 code point) beats NFD e + U+0301 (2).
  CHECK(preferred_canonical({"Rivière", 2}, {"Rivie\xCC\x80re", 2}));
  // Then code point order.
  CHECK(preferred_canonical({"Oak", 3}, {"oak", 3}));
  CHECK_FALSE(preferred_canonical({"oak", 3}, {"Oak", 3}));

  const auto groups = group_similar_values(counts({{"oak", 3}, {"Oak", 3}, {"OAK", 1}}), options(SimilarMethod::token_key));
  REQUIRE(groups.size() == 1);
  CHECK(groups[0].canonical == "Oak");
  CHECK(member_values(groups)[0] == std::vector<std::string>{"Oak", "oak", "OAK"});
  CHECK(groups[0].rows == 4);
}

TEST_CASE("unit_similar: token_key groups, rows affected, order, NULLs and empty input") {
  const Table table = one_column({"Saltpan", "saltpan", std::nullopt, "Saltpan", " Saltpan.", "Fenmoor", "fenmoor",
                                  "Fenmoor", "Fenmoor", "FENMOOR", "", "-", "-", "Ginkgo", std::nullopt});
  const std::vector<ValueCount> distinct = distinct_values(table, 0);
  // NULL is not a value; the empty string is.
  uint64_t total = 0;
  for (const ValueCount& v : distinct) total += v.count;
  CHECK(total == 13);
  CHECK(distinct.front().value == "Fenmoor");
  CHECK(distinct.front().count == 3);

  SimilarValueGrouper grouper(distinct, options(SimilarMethod::token_key));
  while (!grouper.step(1)) CHECK(grouper.progress() < 1.0);
  CHECK(grouper.progress() == 1.0);
  const auto& groups = grouper.result();
  REQUIRE(groups.size() == 2);
  // Ordered by rows affected: Fenmoor's variants cover 2 rows, Saltpan's 2 too -> by canonical.
  CHECK(groups[0].canonical == "Fenmoor");
  CHECK(groups[0].rows == 2);
  CHECK(member_values(groups)[0] == std::vector<std::string>{"Fenmoor", "FENMOOR", "fenmoor"});
  CHECK(groups[1].canonical == "Saltpan");
  CHECK(member_values(groups)[1] == std::vector<std::string>{"Saltpan", " Saltpan.", "saltpan"});
  for (const SimilarMember& m : groups[0].members) CHECK(m.score == 1.0);
  // "" and "-" have empty keys: they are blanks and sentinels, not spellings.
  CHECK(grouper.stats().ungrouped == 2);
  // A group of one (Ginkgo) is not reported.
  CHECK(group_similar_values({}, options(SimilarMethod::levenshtein)).empty());
  CHECK(group_similar_values(counts({{"Ginkgo", 5}}), options(SimilarMethod::levenshtein)).empty());
}

TEST_CASE("unit_similar: similarity methods, threshold and scores") {
  const auto values = counts({{"Canal Basin", 146}, {"Canal Basen", 2}, {"CANAL BASIN", 1}, {"Fenmoor", 114},
                              {"Fenmore", 3}, {"Northwick", 145}, {"Northwik", 1}, {"Saltpan", 150}});
  const auto lev_groups = group_similar_values(values, options(SimilarMethod::levenshtein, 0.85));
  REQUIRE(lev_groups.size() == 2);
  CHECK(lev_groups[0].canonical == "Canal Basin");
  CHECK(member_values(lev_groups)[0] == std::vector<std::string>{"Canal Basin", "Canal Basen", "CANAL BASIN"});
  // Score = 1 - distance / longer length on the comparison forms: one edit in 11.
  CHECK(lev_groups[0].members[1].score == doctest::Approx(1.0 - 1.0 / 11.0));
  CHECK(lev_groups[0].members[2].score == 1.0);
  CHECK(lev_groups[1].canonical == "Northwick");
  CHECK(lev_groups[1].members[1].score == doctest::Approx(1.0 - 1.0 / 9.0));
  // fenmoor/fenmore: two edits in 7 (0.714) is below 0.85 and 0.72, above 0.7.
  CHECK(group_similar_values(values, options(SimilarMethod::levenshtein, 0.72)).size() == 2);
  CHECK(group_similar_values(values, options(SimilarMethod::levenshtein, 0.7)).size() == 3);
  // The threshold is inclusive: 1 - 1/9 = 0.888... reaches exactly that value.
  const auto exact = group_similar_values(counts({{"Northwick", 2}, {"Northwik", 1}}),
                                          options(SimilarMethod::levenshtein, 1.0 - 1.0 / 9.0));
  CHECK(exact.size() == 1);
  CHECK(group_similar_values(counts({{"Northwick", 2}, {"Northwik", 1}}), options(SimilarMethod::levenshtein, 0.9))
            .empty());
  // Jaro-Winkler is kinder to a changed ending: fenmoor/fenmore ~ 0.94.
  const auto jw_groups = group_similar_values(values, options(SimilarMethod::jaro_winkler, 0.9));
  std::set<std::string> canonicals;
  for (const SimilarGroup& g : jw_groups) canonicals.insert(g.canonical);
  CHECK(canonicals == std::set<std::string>{"Canal Basin", "Fenmoor", "Northwick"});
  for (const SimilarGroup& g : jw_groups)
    for (const SimilarMember& m : g.members) {
      CHECK(m.score >= 0.9);
      CHECK(m.score <= 1.0);
    }
  // OSA counts the transposition once.
  const auto osa_groups = group_similar_values(counts({{"Brindle Heights", 126}, {"Brindle Hieghts", 1}}),
                                               options(SimilarMethod::damerau_osa, 0.93));
  REQUIRE(osa_groups.size() == 1);
  CHECK(osa_groups[0].members[1].score == doctest::Approx(1.0 - 1.0 / 15.0));
  CHECK(group_similar_values(counts({{"Brindle Heights", 126}, {"Brindle Hieghts", 1}}),
                             options(SimilarMethod::levenshtein, 0.93))
            .empty());
  // qgram: Dice over trigrams of the comparison forms.
  const auto q = group_similar_values(counts({{"Crab apple", 95}, {"Crab  Apple", 2}, {"Crabapple", 4}}),
                                      options(SimilarMethod::qgram, 0.6));
  REQUIRE(q.size() == 1);
  CHECK(q[0].members.size() == 3);
  CHECK(q[0].members[1].value == "Crabapple");
  CHECK(q[0].members[1].score == doctest::Approx(dice("crab apple", "crabapple")));
  // Threshold 1 keeps only identical comparison forms.
  CHECK(group_similar_values(values, options(SimilarMethod::qgram, 1.0)).size() == 1);
}

TEST_CASE("unit_similar: centre clustering does not chain") {
  // abcd ~ abce ~ abfe (one edit each, 0.75), but abcd and abfe are two edits apart.
  const auto values = counts({{"abcd", 10}, {"abce", 5}, {"abfe", 4}});
  const auto groups = group_similar_values(values, options(SimilarMethod::levenshtein, 0.75));
  REQUIRE(groups.size() == 1);
  CHECK(member_values(groups)[0] == std::vector<std::string>{"abcd", "abce"});
}

TEST_CASE("unit_similar: non-ASCII values are compared by code point") {
  const auto values = counts({{"Пётр Лебедев", 30}, {"Петр Лебедев", 2}, {"Пётр Лебедевъ", 1}, {"Ελένη Ρήγα", 15},
                              {"Ελενη Ρηγα", 1}, {"Łukasz Nowak", 19}, {"Lukasz Nowak", 1}});
  // NFKD keeps Ł (no decomposition) but splits ё into е + U+0308.
  const auto keys = group_similar_values(values, options(SimilarMethod::token_key));
  REQUIRE(keys.size() == 2);
  CHECK(member_values(keys)[0] == std::vector<std::string>{"Пётр Лебедев", "Петр Лебедев"});
  CHECK(member_values(keys)[1] == std::vector<std::string>{"Ελένη Ρήγα", "Ελενη Ρηγα"});
  const auto edits = group_similar_values(values, options(SimilarMethod::levenshtein, 0.9));
  REQUIRE(edits.size() == 3);
  CHECK(member_values(edits)[0] == std::vector<std::string>{"Пётр Лебедев", "Петр Лебедев", "Пётр Лебедевъ"});
  // One added code point (ъ is two bytes) in 13.
  CHECK(edits[0].members[2].score == doctest::Approx(1.0 - 1.0 / 13.0));
}

TEST_CASE("unit_similar: soundex groups values that sound alike") {
  const auto groups = group_similar_values(
      counts({{"Robert Ashcraft", 5}, {"Rupert Ashcroft", 1}, {"Tymczak", 3}, {"Tymczack", 1}, {"Pfister", 2}}),
      options(SimilarMethod::soundex));
  REQUIRE(groups.size() == 2);
  CHECK(member_values(groups)[0] == std::vector<std::string>{"Robert Ashcraft", "Rupert Ashcroft"});
  CHECK(member_values(groups)[1] == std::vector<std::string>{"Tymczak", "Tymczack"});
}

TEST_CASE("unit_similar: blocking finds the same pairs as comparing every pair") {
  // Generated values with one or two edits; the prefix filter must lose no
  // pair above the thresholds where the q-gram lemma holds (header comment).
  std::vector<ValueCount> values;
  uint32_t seed = 12345;
  const auto next = [&] {
    seed = seed * 1103515245u + 12345u;
    return (seed >> 16) & 0x7fff;
  };
  const std::string letters = "abcdeéfghij ";
  for (int i = 0; i < 300; ++i) {
    std::string v;
    const size_t length = 3 + next() % 12;
    std::u32string points;
    for (size_t k = 0; k < length; ++k) {
      const size_t pick = next() % 12;
      points.push_back(pick == 5 ? U'é' : static_cast<char32_t>(letters[pick < 5 ? pick : pick + 1]));
    }
    for (const char32_t c : points) {
      if (c < 0x80) v += static_cast<char>(c);
      else v += "é";
    }
    values.push_back({v, 1 + next() % 50});
  }
  std::sort(values.begin(), values.end(), [](const ValueCount& a, const ValueCount& b) { return a.value < b.value; });
  values.erase(std::unique(values.begin(), values.end(),
                           [](const ValueCount& a, const ValueCount& b) { return a.value == b.value; }),
               values.end());
  for (const SimilarMethod method : {SimilarMethod::levenshtein, SimilarMethod::damerau_osa, SimilarMethod::qgram}) {
    for (const double t : {0.8, 0.9}) {
      SimilarValueGrouper grouper(values, options(method, t));
      while (!grouper.step(64)) {
      }
      // Brute force: every pair of distinct comparison forms.
      std::set<std::string> forms;
      for (const ValueCount& v : values) forms.insert(comparison_form(v.value));
      std::vector<std::u32string> points;
      for (const std::string& f : forms) points.push_back(code_points(f));
      uint64_t pairs = 0;
      for (size_t a = 0; a < points.size(); ++a)
        for (size_t b = a + 1; b < points.size(); ++b)
          if (form_similarity(method, points[a], points[b]) + 1e-9 >= t) ++pairs;
      INFO(similar_method_name(method), " at ", t);
      CHECK(grouper.stats().similar_pairs == pairs);
      CHECK(grouper.stats().compared_pairs <= grouper.stats().candidate_pairs);
    }
  }
}

TEST_CASE("unit_similar: the map_values step loads with the recipe loader and merges the variants") {
  const Table table = one_column({"Gorse Hill", "gorse hill", "Gorse Hil", "Gorse Hill", std::nullopt,
                                  "Rivière Quay", "Riviere Quay", "Rivière Quay", "Saltpan"});
  const auto groups = group_similar_values(distinct_values(table, 0), options(SimilarMethod::levenshtein, 0.85));
  REQUIRE(groups.size() == 2);
  const nlohmann::ordered_json step = map_values_step("v", groups);
  CHECK(step["op"] == "map_values");
  CHECK(step["column"] == "v");
  CHECK(step["map"].size() == 3);
  CHECK(step["map"]["gorse hill"] == "Gorse Hill");
  CHECK(step["map"]["Gorse Hil"] == "Gorse Hill");
  CHECK(step["map"]["Riviere Quay"] == "Rivière Quay");

  nlohmann::ordered_json doc;
  doc["tamis_recipe"] = 1;
  doc["steps"] = nlohmann::ordered_json::array({step});
  auto recipe = parse_recipe(doc.dump(), "similar.json");
  REQUIRE_MESSAGE(recipe.ok(), (recipe.ok() ? std::string() : recipe.error().to_string()));
  REQUIRE(recipe->steps.size() == 1);
  auto compiled = compile_recipe(*recipe, schema_of(table));
  REQUIRE_MESSAGE(compiled.ok(), (compiled.ok() ? std::string() : compiled.error().to_string()));
  auto out = apply_recipe(*compiled, table);
  REQUIRE(out.ok());
  CHECK(test::rows_of(*out) == test::Rows{{"Gorse Hill"}, {"Gorse Hill"}, {"Gorse Hill"}, {"Gorse Hill"}, {"<NULL>"},
                                          {"Rivière Quay"}, {"Rivière Quay"}, {"Rivière Quay"}, {"Saltpan"}});
  // The step saves and loads again unchanged.
  auto again = parse_recipe(recipe_to_json(*recipe), "saved.json");
  REQUIRE(again.ok());
  CHECK(again->steps[0].definition == recipe->steps[0].definition);
  // No groups: an empty map, which map_values rejects (a step that does nothing).
  const nlohmann::ordered_json empty = map_values_step("v", {});
  CHECK(empty["map"].empty());
  doc["steps"] = nlohmann::ordered_json::array({empty});
  auto empty_recipe = parse_recipe(doc.dump(), "empty.json");
  CHECK_FALSE((empty_recipe.ok() && compile_recipe(*empty_recipe, schema_of(table)).ok()));
}

// The demo generator's manifest is our own ground truth (it records every
// variant spelling it injected and the value it stands for).
TEST_CASE("unit_similar: the demo file's injected variant spellings are found") {
  const std::filesystem::path demo = std::filesystem::path(TAMIS_SOURCE_DIR) / "assets/demo";
  const auto manifest = nlohmann::json::parse(file_text(demo / "tree_survey.defects.json"));
  CsvOptions csv;
  csv.delimiter = ',';
  csv.header = HeaderMode::yes;
  const Table table = test::read_ok(file_text(demo / "tree_survey.csv"), csv);
  std::map<uint64_t, size_t> row_of_line;
  for (size_t r = 0; r < table.row_count(); ++r) row_of_line[table.source_line(r)] = r;

  const std::set<std::string> spelling_kinds = {"case_variant", "accent_variant", "unicode_decomposed",
                                                "trailing_dot", "doubled_inner_space", "typo"};
  struct Expectation {
    std::string column, kind, value, meant;
  };
  std::vector<Expectation> expectations;
  for (const auto& d : manifest["defects"]) {
    if (!d["column"].is_string() || !spelling_kinds.count(d["kind"].get<std::string>())) continue;
    const std::string column = d["column"];
    const size_t c = *table.find(column);
    for (const auto& e : d["expected"]) {
      const size_t row = row_of_line.at(e[0].get<uint64_t>());
      expectations.push_back({column, d["kind"], std::string(table.column(c).text(row)), e[1]});
    }
  }
  REQUIRE(expectations.size() > 300);

  // Where each value ends up: the canonical value of its group, or itself.
  const auto merged_into = [&](SimilarMethod method, double threshold) {
    std::map<std::string, std::map<std::string, std::string>> target;  // column -> value -> canonical
    for (const std::string column : {"site", "district", "species", "status", "contractor", "crew"}) {
      const auto groups = group_similar_values(distinct_values(table, *table.find(column)), options(method, threshold));
      for (const SimilarGroup& g : groups)
        for (const SimilarMember& m : g.members) target[column][m.value] = g.canonical;
    }
    return target;
  };
  // token_key: case, accents, NFD, dots and doubled spaces, but not typos
  // and not "×" written as "x" (a symbol, not a mark).
  {
    auto target = merged_into(SimilarMethod::token_key, 0);
    for (const Expectation& e : expectations) {
      if (e.kind == "typo" || (e.kind == "accent_variant" && e.meant.find("×") != std::string::npos)) continue;
      INFO(e.kind, " in ", e.column, ": ", e.value);
      CHECK(target[e.column][e.value] == e.meant);
    }
  }
  // Jaro-Winkler at 0.85 finds every variant, typos included, and merges no
  // two values of the generator's vocabulary.
  {
    auto target = merged_into(SimilarMethod::jaro_winkler, 0.85);
    size_t found = 0;
    for (const Expectation& e : expectations) {
      INFO(e.kind, " in ", e.column, ": ", e.value);
      CHECK(target[e.column][e.value] == e.meant);
      found += target[e.column][e.value] == e.meant;
    }
    MESSAGE("jaro_winkler 0.85 recovers ", found, " of ", expectations.size(), " injected variants");
    for (const auto& [column, words] : manifest["vocabulary"].items())
      for (const auto& word : words) {
        const auto it = target[column].find(word.get<std::string>());
        if (it != target[column].end()) CHECK(it->second == word.get<std::string>());
      }
  }
}

}  // namespace
}  // namespace tamis
