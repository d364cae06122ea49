#include "similar/similar_values.hpp"

#include <unicode/bytestream.h>
#include <unicode/normalizer2.h>
#include <unicode/uchar.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <unordered_map>

#include "csv_writer.hpp"
#include "dates.hpp"
#include "similar/phonetic.hpp"
#include "similar/string_metrics.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

struct MethodName {
  SimilarMethod method;
  std::string_view name;
};

constexpr MethodName kMethodNames[] = {
    {SimilarMethod::token_key, "token_key"},     {SimilarMethod::qgram, "qgram"},
    {SimilarMethod::levenshtein, "levenshtein"}, {SimilarMethod::damerau_osa, "osa"},
    {SimilarMethod::jaro_winkler, "jaro_winkler"}, {SimilarMethod::soundex, "soundex"},
};

constexpr size_t kCharacterBuckets = 32;

// Compares thresholds and similarities computed in floating point, so that
// 1 - 3/20 still counts as reaching 0.85.
constexpr double kSlack = 1e-9;

const icu::Normalizer2* compatibility_decomposition() {
  static const icu::Normalizer2* const decomposition = [] {
    UErrorCode status = U_ZERO_ERROR;
    const icu::Normalizer2* nfkd = icu::Normalizer2::getNFKDInstance(status);
    if (U_SUCCESS(status)) return nfkd;
    // A browser build without the nfkc.nrm data still has canonical
    // decomposition, which ICU compiles in; it strips accents the same way.
    status = U_ZERO_ERROR;
    const icu::Normalizer2* nfd = icu::Normalizer2::getNFDInstance(status);
    return U_SUCCESS(status) ? nfd : nullptr;
  }();
  return decomposition;
}

size_t letters_and_digits(std::string_view value) {
  size_t n = 0;
  for (size_t i = 0; i < value.size();) {
    const char32_t c = utf8::next(value, i);
    if (c < 0x80) {
      n += (c >= '0' && c <= '9') || (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z');
    } else {
      n += (U_GET_GC_MASK(static_cast<UChar32>(c)) & (U_GC_L_MASK | U_GC_N_MASK)) != 0;
    }
  }
  return n;
}

std::vector<std::string> key_tokens(std::string_view value) {
  const std::string stripped = fold_and_strip_accents(value);
  const std::string_view s = stripped;
  std::vector<std::string> tokens;
  std::string current;
  for (size_t i = 0; i < s.size();) {
    const size_t start = i;
    const char32_t c = utf8::next(s, i);
    if (utf8::is_white_space(c)) {
      if (!current.empty()) tokens.push_back(std::move(current));
      current.clear();
    } else if (!utf8::is_punctuation(c)) {
      current.append(s.substr(start, i - start));
    }
  }
  if (!current.empty()) tokens.push_back(std::move(current));
  std::sort(tokens.begin(), tokens.end());
  tokens.erase(std::unique(tokens.begin(), tokens.end()), tokens.end());
  return tokens;
}

std::string join_tokens(const std::vector<std::string>& tokens) {
  std::string out;
  for (const std::string& t : tokens) {
    if (!out.empty()) out += ' ';
    out += t;
  }
  return out;
}

}  // namespace

std::string_view similar_method_name(SimilarMethod method) {
  for (const MethodName& m : kMethodNames)
    if (m.method == method) return m.name;
  return "unknown";
}

std::optional<SimilarMethod> parse_similar_method(std::string_view name) {
  for (const MethodName& m : kMethodNames)
    if (m.name == name) return m.method;
  return std::nullopt;
}

const std::vector<SimilarMethod>& all_similar_methods() {
  static const std::vector<SimilarMethod> methods = [] {
    std::vector<SimilarMethod> out;
    for (const MethodName& m : kMethodNames) out.push_back(m.method);
    return out;
  }();
  return methods;
}

bool is_key_method(SimilarMethod method) {
  return method == SimilarMethod::token_key || method == SimilarMethod::soundex;
}

std::string fold_and_strip_accents(std::string_view value) {
  std::string folded = fold_case(value);
  if (is_ascii(folded)) return folded;
  const icu::Normalizer2* decomposition = compatibility_decomposition();
  if (!decomposition) return folded;
  std::string decomposed;
  UErrorCode status = U_ZERO_ERROR;
  icu::StringByteSink<std::string> sink(&decomposed, static_cast<int32_t>(folded.size() * 2));
  decomposition->normalizeUTF8(0, icu::StringPiece(folded.data(), static_cast<int32_t>(folded.size())), sink,
                               nullptr, status);
  // Cells are valid UTF-8, so ICU fails here only for want of memory.
  if (U_FAILURE(status)) throw std::bad_alloc();
  std::string out;
  out.reserve(decomposed.size());
  const std::string_view d = decomposed;
  for (size_t i = 0; i < d.size();) {
    const size_t start = i;
    const char32_t c = utf8::next(d, i);
    if (u_charType(static_cast<UChar32>(c)) != U_NON_SPACING_MARK) out.append(d.substr(start, i - start));
  }
  return out;
}

std::string token_key(std::string_view value) { return join_tokens(key_tokens(value)); }

std::string comparison_form(std::string_view value) {
  const std::string stripped = fold_and_strip_accents(value);
  const std::string_view s = stripped;
  std::string out;
  out.reserve(s.size());
  bool space_pending = false;
  for (size_t i = 0; i < s.size();) {
    const size_t start = i;
    const char32_t c = utf8::next(s, i);
    if (utf8::is_white_space(c)) {
      space_pending = !out.empty();
      continue;
    }
    if (space_pending) out += ' ';
    space_pending = false;
    out.append(s.substr(start, i - start));
  }
  return out;
}

std::string soundex_key(std::string_view value) {
  std::vector<std::string> tokens = key_tokens(value);
  for (std::string& t : tokens) {
    std::string code = american_soundex(t);
    if (!code.empty()) t = std::move(code);
  }
  std::sort(tokens.begin(), tokens.end());
  tokens.erase(std::unique(tokens.begin(), tokens.end()), tokens.end());
  return join_tokens(tokens);
}

double form_similarity(SimilarMethod method, std::u32string_view a, std::u32string_view b) {
  switch (method) {
    case SimilarMethod::levenshtein: return distance_similarity(levenshtein_distance(a, b), a.size(), b.size());
    case SimilarMethod::damerau_osa: return distance_similarity(osa_distance(a, b), a.size(), b.size());
    case SimilarMethod::jaro_winkler: return jaro_winkler_similarity(a, b);
    case SimilarMethod::qgram: return qgram_similarity(a, b);
    case SimilarMethod::token_key:
    case SimilarMethod::soundex: return 1.0;
  }
  return 1.0;
}

bool preferred_canonical(const ValueCount& a, const ValueCount& b) {
  if (a.count != b.count) return a.count > b.count;
  const size_t fuller_a = letters_and_digits(a.value), fuller_b = letters_and_digits(b.value);
  if (fuller_a != fuller_b) return fuller_a > fuller_b;
  const size_t length_a = utf8::code_point_count(a.value), length_b = utf8::code_point_count(b.value);
  if (length_a != length_b) return length_a < length_b;
  // UTF-8 byte order is code point order.
  return a.value < b.value;
}

std::vector<ValueCount> distinct_values(const Table& table, size_t column) {
  const Column& col = table.column(column);
  std::unordered_map<std::string, uint64_t> counts;
  const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  std::string text;
  for (size_t k = 0; k < col.chunk_count(); ++k) {
    const ColumnChunk& chunk = col.chunk(k);
    for (size_t i = 0; i < chunk.rows; ++i) {
      if (chunk.is_null(i)) continue;
      if (col.type() == Type::text) {
        ++counts[std::string(chunk.text(i))];
      } else {
        text.clear();
        append_canonical(col, chunk, i, iso, text);
        ++counts[text];
      }
    }
  }
  std::vector<ValueCount> out;
  out.reserve(counts.size());
  for (auto& [value, count] : counts) out.push_back({value, count});
  std::sort(out.begin(), out.end(), [](const ValueCount& a, const ValueCount& b) {
    return a.count != b.count ? a.count > b.count : a.value < b.value;
  });
  return out;
}

namespace {

struct Form {
  std::string text;  // the key, or the comparison form
  std::u32string points;
  uint64_t rows = 0;
  std::vector<uint32_t> values;
  std::vector<uint64_t> grams;   // sorted padded trigrams (qgram method only)
  std::vector<uint64_t> tokens;  // grams made unique per occurrence; then the indexed prefix
};

enum class Phase : uint8_t { forms, grams, prefixes, join, cluster, done };

}  // namespace

struct SimilarValueGrouper::State {
  std::vector<ValueCount> values;
  SimilarOptions options;
  Phase phase = Phase::forms;
  size_t cursor = 0;
  std::unordered_map<std::string, uint32_t> form_of_text;
  std::vector<Form> forms;
  std::unordered_map<uint64_t, uint32_t> token_frequency;
  std::unordered_map<uint64_t, std::vector<uint32_t>> blocks;
  std::vector<std::vector<std::pair<uint32_t, double>>> neighbours;
  std::vector<uint32_t> probed_by;  // form i + 1 that last met this form as a candidate
  // Per form, kept apart from Form so that the filters before a similarity
  // touch compact arrays: length in code points, and how many of its
  // characters fall in each of 32 hash buckets (counts capped at 255).
  std::vector<uint32_t> length_of;
  std::vector<std::array<uint8_t, kCharacterBuckets>> characters_of;

  // An upper bound of the characters two forms have in common (as
  // multisets): characters in different buckets are different, so per bucket
  // at most the smaller count can be shared.
  size_t common_characters_bound(uint32_t i, uint32_t j) const {
    const auto& a = characters_of[i];
    const auto& b = characters_of[j];
    size_t common = 0;
    for (size_t k = 0; k < kCharacterBuckets; ++k) common += std::min(a[k], b[k]);
    // A capped count hides characters: treat the bucket as unbounded.
    for (size_t k = 0; k < kCharacterBuckets; ++k)
      if (a[k] == 255 || b[k] == 255) return std::min(length_of[i], length_of[j]);
    return common;
  }
  std::vector<SimilarGroup> result;
  SimilarStats stats;
  std::vector<size_t> distance_rows;  // scratch for the edit distances
  std::vector<char> jaro_flags;       // scratch for Jaro's matched characters

  std::string form_text(std::string_view value) const {
    switch (options.method) {
      case SimilarMethod::token_key: return token_key(value);
      case SimilarMethod::soundex: return soundex_key(value);
      default: return comparison_form(value);
    }
  }

  // How many of a form's rarest trigrams must be indexed so that any pair
  // reaching the threshold shares at least one of them (prefix filtering:
  // an overlap of at least o means the first |G| - o + 1 tokens of both
  // sides intersect). `length` is in code points, |G| = length + 2.
  size_t prefix_length(size_t length) const {
    const double t = options.threshold;
    const double grams = static_cast<double>(length + 2);
    double overlap = 0;
    switch (options.method) {
      case SimilarMethod::levenshtein:
      case SimilarMethod::damerau_osa: {
        // Trigrams one edit can change: 3, or 4 for a transposition. With
        // t > 1 - 1/changed the overlap bound grows with the partner's
        // length, so the shortest admissible partner (this form's own
        // length) gives the smallest bound.
        const double changed = options.method == SimilarMethod::levenshtein ? 3 : 4;
        if (changed * (1 - t) >= 1) return length + 2;
        overlap = grams - changed * (1 - t) * static_cast<double>(length);
        break;
      }
      case SimilarMethod::qgram: overlap = t * grams / (2 - t); break;
      case SimilarMethod::jaro_winkler:
        overlap = kJaroWinklerBlockDice * grams / (2 - kJaroWinklerBlockDice);
        break;
      default: return length + 2;
    }
    const double needed = std::ceil(overlap - kSlack);
    if (needed < 1) return length + 2;
    return std::min(length + 2, length + 2 - static_cast<size_t>(needed) + 1);
  }

  // Cheap filters that need no distance: the lengths, and the characters the
  // two forms can have in common (common_characters_bound). Every character
  // of one form that is not matched in the other costs at least one edit
  // (insertions, deletions and substitutions each fix one; a transposition
  // changes no character count), so an edit distance is at least
  // max(|a|, |b|) - common; and Jaro's matched characters m are at most common.
  bool may_reach_threshold(uint32_t i, uint32_t j) const {
    const double t = options.threshold;
    const size_t la = length_of[i], lb = length_of[j];
    const size_t shorter = std::min(la, lb), longer = std::max(la, lb);
    switch (options.method) {
      case SimilarMethod::levenshtein:
      case SimilarMethod::damerau_osa: {
        const auto bound = static_cast<size_t>(std::floor((1 - t) * static_cast<double>(longer) + kSlack));
        if (longer - shorter > bound) return false;
        return longer - common_characters_bound(i, j) <= bound;
      }
      case SimilarMethod::qgram:
        // Dice >= t needs |B| >= t / (2 - t) |A| for the smaller gram set B.
        return static_cast<double>(shorter + 2) + kSlack >= t / (2 - t) * static_cast<double>(longer + 2);
      case SimilarMethod::jaro_winkler: {
        // Jaro <= (m/|a| + m/|b| + 1) / 3 with m <= common, and Jaro-Winkler,
        // which grows with Jaro, is at most that bound plus the largest
        // prefix bonus. (Forms are never empty: values without one are not
        // grouped.)
        const auto matches = static_cast<double>(common_characters_bound(i, j));
        const double jaro = (matches / static_cast<double>(la) + matches / static_cast<double>(lb) + 1) / 3;
        const double best = jaro > kJaroWinklerBoostThreshold
                                ? jaro + static_cast<double>(kJaroWinklerMaxPrefix) * kJaroWinklerPrefixScale * (1 - jaro)
                                : jaro;
        return best + kSlack >= t;
      }
      default: return false;
    }
  }

  // The similarity of a pair that passed may_reach_threshold (0 when an edit
  // distance exceeds the threshold's bound).
  double verify(const Form& a, const Form& b) {
    const size_t la = a.points.size(), lb = b.points.size();
    switch (options.method) {
      case SimilarMethod::levenshtein:
      case SimilarMethod::damerau_osa: {
        const size_t longer = std::max(la, lb);
        const auto bound =
            static_cast<size_t>(std::floor((1 - options.threshold) * static_cast<double>(longer) + kSlack));
        const size_t d = options.method == SimilarMethod::levenshtein
                             ? levenshtein_distance_within(a.points, b.points, bound, distance_rows)
                             : osa_distance_within(a.points, b.points, bound, distance_rows);
        return d > bound ? 0 : distance_similarity(d, la, lb);
      }
      case SimilarMethod::qgram: return dice_similarity(a.grams, b.grams);
      case SimilarMethod::jaro_winkler: return jaro_winkler_similarity(a.points, b.points, jaro_flags);
      default: return 0;
    }
  }

  size_t run_forms(size_t budget) {
    size_t work = 0;
    for (; cursor < values.size() && work < budget; ++cursor, ++work) {
      std::string text = form_text(values[cursor].value);
      if (text.empty()) {
        ++stats.ungrouped;
        continue;
      }
      auto [it, added] = form_of_text.try_emplace(std::move(text), static_cast<uint32_t>(forms.size()));
      if (added) forms.push_back(Form{it->first, {}, 0, {}, {}, {}});
      Form& form = forms[it->second];
      form.rows += values[cursor].count;
      form.values.push_back(static_cast<uint32_t>(cursor));
    }
    if (cursor == values.size()) {
      form_of_text.clear();
      stats.forms = forms.size();
      next(is_key_method(options.method) ? Phase::cluster : Phase::grams);
    }
    return work;
  }

  size_t run_grams(size_t budget) {
    size_t work = 0;
    for (; cursor < forms.size() && work < budget; ++cursor, ++work) {
      Form& form = forms[cursor];
      form.points = code_points(form.text);
      length_of.push_back(static_cast<uint32_t>(form.points.size()));
      std::array<uint8_t, kCharacterBuckets> characters{};
      for (const char32_t c : form.points) {
        uint8_t& n = characters[(static_cast<uint32_t>(c) * 0x9E3779B1u) >> 27];
        if (n < 255) ++n;
      }
      characters_of.push_back(characters);
      std::vector<uint64_t> grams = padded_trigrams(form.points);
      // A multiset becomes a set by numbering repeated grams (occurrence k
      // of a gram is its own token), as prefix filtering needs.
      form.tokens.resize(grams.size());
      for (size_t i = 0, k = 0; i < grams.size(); ++i) {
        k = i > 0 && grams[i] == grams[i - 1] ? k + 1 : 0;
        form.tokens[i] = grams[i] ^ (k * 0x9E3779B97F4A7C15ULL);
        ++token_frequency[form.tokens[i]];
      }
      if (options.method == SimilarMethod::qgram) form.grams = std::move(grams);
    }
    if (cursor == forms.size()) next(Phase::prefixes);
    return work;
  }

  size_t run_prefixes(size_t budget) {
    size_t work = 0;
    for (; cursor < forms.size() && work < budget; ++cursor, ++work) {
      Form& form = forms[cursor];
      // One global order, rarest first (ties by token), for every form.
      std::vector<std::pair<uint32_t, uint64_t>> ranked;
      ranked.reserve(form.tokens.size());
      for (const uint64_t token : form.tokens) ranked.emplace_back(token_frequency[token], token);
      std::sort(ranked.begin(), ranked.end());
      ranked.resize(std::min(ranked.size(), prefix_length(form.points.size())));
      form.tokens.clear();
      for (const auto& r : ranked) form.tokens.push_back(r.second);
      form.tokens.shrink_to_fit();
    }
    if (cursor == forms.size()) {
      token_frequency.clear();
      neighbours.assign(forms.size(), {});
      probed_by.assign(forms.size(), 0);
      next(Phase::join);
    }
    return work;
  }

  size_t run_join(size_t budget) {
    size_t work = 0;
    const double t = options.threshold;
    for (; cursor < forms.size() && work < budget; ++cursor) {
      const auto i = static_cast<uint32_t>(cursor);
      ++work;
      for (const uint64_t token : forms[i].tokens) {
        const auto block = blocks.find(token);
        if (block == blocks.end()) continue;
        for (const uint32_t j : block->second) {
          if (probed_by[j] == i + 1) continue;
          probed_by[j] = i + 1;
          ++stats.candidate_pairs;
          ++work;
          if (!may_reach_threshold(i, j)) continue;
          ++stats.compared_pairs;
          const double similarity = verify(forms[i], forms[j]);
          if (similarity + kSlack < t) continue;
          ++stats.similar_pairs;
          neighbours[i].emplace_back(j, similarity);
          neighbours[j].emplace_back(i, similarity);
        }
      }
      for (const uint64_t token : forms[i].tokens) {
        std::vector<uint32_t>& block = blocks[token];
        if (block.size() < kMaxBlockSize) block.push_back(i);
        else ++stats.block_overflows;
      }
    }
    if (cursor == forms.size()) {
      blocks.clear();
      next(Phase::cluster);
    }
    return work;
  }

  void cluster() {
    std::vector<uint32_t> order(forms.size());
    for (size_t f = 0; f < forms.size(); ++f) order[f] = static_cast<uint32_t>(f);
    std::sort(order.begin(), order.end(), [&](uint32_t a, uint32_t b) {
      return forms[a].rows != forms[b].rows ? forms[a].rows > forms[b].rows : forms[a].text < forms[b].text;
    });
    constexpr uint32_t kUnassigned = UINT32_MAX;
    std::vector<uint32_t> centre_of(forms.size(), kUnassigned);
    for (const uint32_t f : order) {
      if (centre_of[f] != kUnassigned) continue;
      centre_of[f] = f;
      std::vector<uint32_t> members{f};
      if (!neighbours.empty())
        for (const auto& [g, similarity] : neighbours[f])
          if (centre_of[g] == kUnassigned) {
            centre_of[g] = f;
            members.push_back(g);
          }
      add_group(members);
    }
    std::sort(result.begin(), result.end(), [](const SimilarGroup& a, const SimilarGroup& b) {
      return a.rows != b.rows ? a.rows > b.rows : a.canonical < b.canonical;
    });
    neighbours.clear();
  }

  void add_group(const std::vector<uint32_t>& member_forms) {
    std::vector<std::pair<uint32_t, uint32_t>> members;  // (value, form)
    for (const uint32_t f : member_forms)
      for (const uint32_t v : forms[f].values) members.emplace_back(v, f);
    if (members.size() < 2) return;
    const auto canonical = *std::min_element(members.begin(), members.end(), [&](const auto& a, const auto& b) {
      return preferred_canonical(values[a.first], values[b.first]);
    });
    SimilarGroup group;
    group.canonical = values[canonical.first].value;
    for (const auto& [v, f] : members) {
      SimilarMember m{values[v].value, values[v].count, 1.0};
      if (f != canonical.second && !is_key_method(options.method))
        m.score = form_similarity(options.method, forms[f].points, forms[canonical.second].points);
      if (v != canonical.first) group.rows += m.count;
      group.members.push_back(std::move(m));
    }
    std::sort(group.members.begin(), group.members.end(), [&](const SimilarMember& a, const SimilarMember& b) {
      const bool a_first = a.value == group.canonical, b_first = b.value == group.canonical;
      if (a_first != b_first) return a_first;
      return a.count != b.count ? a.count > b.count : a.value < b.value;
    });
    result.push_back(std::move(group));
  }

  void next(Phase phase_after) {
    phase = phase_after;
    cursor = 0;
  }
};

SimilarValueGrouper::SimilarValueGrouper(std::vector<ValueCount> values, SimilarOptions options)
    : state_(std::make_unique<State>()) {
  state_->values = std::move(values);
  state_->options = options;
  state_->options.threshold = std::clamp(options.threshold, 0.0, 1.0);
  state_->stats.values = state_->values.size();
}

SimilarValueGrouper::~SimilarValueGrouper() = default;
SimilarValueGrouper::SimilarValueGrouper(SimilarValueGrouper&&) noexcept = default;
SimilarValueGrouper& SimilarValueGrouper::operator=(SimilarValueGrouper&&) noexcept = default;

bool SimilarValueGrouper::step(size_t budget) {
  State& s = *state_;
  budget = std::max<size_t>(budget, 1);
  size_t done = 0;
  while (s.phase != Phase::done && done < budget) {
    const size_t left = budget - done;
    switch (s.phase) {
      case Phase::forms: done += s.run_forms(left); break;
      case Phase::grams: done += s.run_grams(left); break;
      case Phase::prefixes: done += s.run_prefixes(left); break;
      case Phase::join: done += s.run_join(left); break;
      case Phase::cluster:
        s.cluster();
        done += s.forms.size();
        s.next(Phase::done);
        break;
      case Phase::done: break;
    }
  }
  return s.phase == Phase::done;
}

double SimilarValueGrouper::progress() const {
  const State& s = *state_;
  const auto share = [](size_t done, size_t total) {
    return total == 0 ? 1.0 : static_cast<double>(done) / static_cast<double>(total);
  };
  switch (s.phase) {
    case Phase::forms: return 0.2 * share(s.cursor, s.values.size());
    case Phase::grams: return 0.2 + 0.1 * share(s.cursor, s.forms.size());
    case Phase::prefixes: return 0.3 + 0.1 * share(s.cursor, s.forms.size());
    case Phase::join: return 0.4 + 0.55 * share(s.cursor, s.forms.size());
    case Phase::cluster: return 0.95;
    case Phase::done: return 1.0;
  }
  return 1.0;
}

const std::vector<SimilarGroup>& SimilarValueGrouper::result() const { return state_->result; }
const SimilarStats& SimilarValueGrouper::stats() const { return state_->stats; }

std::vector<SimilarGroup> group_similar_values(std::span<const ValueCount> values, const SimilarOptions& options) {
  SimilarValueGrouper grouper(std::vector<ValueCount>(values.begin(), values.end()), options);
  while (!grouper.step(1 << 20)) {
  }
  return grouper.result();
}

nlohmann::ordered_json map_values_step(std::string_view column, std::span<const SimilarGroup> groups) {
  nlohmann::ordered_json step;
  step["op"] = "map_values";
  step["column"] = std::string(column);
  step["map"] = nlohmann::ordered_json::object();
  for (const SimilarGroup& group : groups)
    for (const SimilarMember& member : group.members)
      if (member.value != group.canonical) step["map"][member.value] = group.canonical;
  return step;
}

}  // namespace tamis
