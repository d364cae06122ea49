#include "profile.hpp"

#include <algorithm>
#include <cmath>
#include <cstring>
#include <unordered_map>

#define XXH_INLINE_ALL
#include <xxhash.h>

#include <unicode/uchar.h>

#include "csv_writer.hpp"
#include "dates.hpp"
#include "scalars.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

constexpr double kQuantilePoints[] = {0.05, 0.25, 0.5, 0.75, 0.95};
// A column takes a type when at least this share of its non-blank values fit
// it (our own threshold: one stray value in ten keeps the type visible).
constexpr double kTypeShare = 0.9;
// Deriving one distinct value's facts (shape, number, date, boolean) costs
// about as much as counting this many cells; a slice's budget is in cells,
// so a column of distinct values would otherwise make one slice take
// seconds (our own estimate, measured on the 1,000,000-row bench file).
constexpr size_t kDerivationCost = 32;

// Open-addressing count of distinct values; keys point into the table's
// arenas, which outlive the profiler.
class ValueCounter {
 public:
  struct Slot {
    uint64_t hash = 0;  // 0 = empty
    const char* data = nullptr;
    // 24-byte slots: a value lives in one chunk (at most 4 GiB of text), and a
    // table that fits in memory is far below 2^32 rows (its source-line column
    // alone would take 32 GiB).
    uint32_t size = 0;
    uint32_t count = 0;
    std::string_view value() const { return {data, size}; }
  };

  ValueCounter() : slots_(1024) {}

  void add(std::string_view v, uint32_t count = 1) {
    uint64_t h = XXH3_64bits(v.data(), v.size());
    h += h == 0;
    for (size_t i = h & (slots_.size() - 1);; i = (i + 1) & (slots_.size() - 1)) {
      Slot& s = slots_[i];
      if (s.hash == 0) {
        s = {h, v.data(), static_cast<uint32_t>(v.size()), count};
        if (++used_ * 2 > slots_.size()) grow();
        return;
      }
      if (s.hash == h && s.size == v.size() && std::memcmp(s.data, v.data(), v.size()) == 0) {
        s.count += count;
        return;
      }
    }
  }

  // The distinct values, compacted in place (the counter is used up).
  std::vector<Slot> take_entries() {
    size_t n = 0;
    for (const Slot& s : slots_)
      if (s.hash) slots_[n++] = s;
    slots_.resize(n);
    slots_.shrink_to_fit();
    used_ = 0;
    return std::move(slots_);
  }

 private:
  void grow() {
    std::vector<Slot> old(slots_.size() * 2);
    old.swap(slots_);
    for (const Slot& s : old) {
      if (!s.hash) continue;
      size_t i = s.hash & (slots_.size() - 1);
      while (slots_[i].hash) i = (i + 1) & (slots_.size() - 1);
      slots_[i] = s;
    }
  }
  std::vector<Slot> slots_;
  size_t used_ = 0;
};

int fraction_digits(std::string_view number) {
  const size_t dot = number.find('.');
  if (dot == std::string_view::npos) return 0;
  size_t end = dot + 1;
  while (end < number.size() && number[end] >= '0' && number[end] <= '9') ++end;
  return static_cast<int>(end - dot - 1);
}

std::optional<int32_t> parse_any_date(std::string_view v) {
  if (v.size() < 6 || v.size() > 32) return std::nullopt;
  for (const auto& f : common_date_formats())
    if (auto d = f.parse(v)) return d;
  return std::nullopt;
}

std::vector<ValueCount> most_frequent(std::vector<ValueCount> all, size_t limit) {
  auto by_count = [](const ValueCount& a, const ValueCount& b) {
    return a.count != b.count ? a.count > b.count : a.value < b.value;
  };
  if (all.size() > limit) {
    std::partial_sort(all.begin(), all.begin() + static_cast<std::ptrdiff_t>(limit), all.end(), by_count);
    all.resize(limit);
  } else {
    std::sort(all.begin(), all.end(), by_count);
  }
  return all;
}

std::string format_number(double v, int scale) {
  if (v == 0) v = 0;  // no negative zero in canonical forms
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", scale, v);
  return buf;
}

// A number in plain notation kept as digits, so min and max stay exact at
// any length (an 18-digit identifier is not rounded through a double).
struct PlainNumber {
  bool negative = false;
  std::string whole;     // without leading zeros; empty means 0
  std::string fraction;  // without trailing zeros

  static std::optional<PlainNumber> parse(std::string_view t) {
    if (t.find_first_of("eE") != std::string_view::npos) return std::nullopt;
    PlainNumber n;
    if (!t.empty() && (t[0] == '+' || t[0] == '-')) n.negative = t[0] == '-', t.remove_prefix(1);
    const size_t dot = std::min(t.find('.'), t.size());
    n.whole = std::string(t.substr(0, dot));
    n.whole.erase(0, std::min(n.whole.find_first_not_of('0'), n.whole.size()));
    if (dot < t.size()) n.fraction = std::string(t.substr(dot + 1));
    while (!n.fraction.empty() && n.fraction.back() == '0') n.fraction.pop_back();
    if (n.whole.empty() && n.fraction.empty()) n.negative = false;
    return n;
  }

  friend bool operator<(const PlainNumber& a, const PlainNumber& b) {
    if (a.negative != b.negative) return a.negative;
    const auto magnitude_less = [](const PlainNumber& x, const PlainNumber& y) {
      if (x.whole.size() != y.whole.size()) return x.whole.size() < y.whole.size();
      if (x.whole != y.whole) return x.whole < y.whole;
      return x.fraction < y.fraction;  // no trailing zeros, so text order is numeric order
    };
    return a.negative ? magnitude_less(b, a) : magnitude_less(a, b);
  }

  std::string text(int scale) const {
    std::string out = negative ? "-" : "";
    out += whole.empty() ? "0" : whole;
    if (scale > 0) out += "." + fraction + std::string(static_cast<size_t>(scale) - fraction.size(), '0');
    return out;
  }
};

// Exact running minimum and maximum of plain-notation numbers; gives up
// (and the caller falls back to doubles) when a value uses an exponent.
struct PlainRange {
  std::optional<PlainNumber> min, max;
  bool exact = true;
  void add(std::string_view t) {
    const auto n = PlainNumber::parse(t);
    if (!n) {
      exact = false;
      return;
    }
    if (!min || *n < *min) min = n;
    if (!max || *max < *n) max = n;
  }
};

}  // namespace

std::string value_shape(std::string_view value) {
  std::string shape;
  char last_letter = 0;
  size_t i = 0;
  while (i < value.size() && shape.size() < 40) {
    const char32_t c = utf8::next(value, i);
    char symbol;
    if (c < 0x80) {
      if (c >= 'A' && c <= 'Z') symbol = 'A';
      else if (c >= 'a' && c <= 'z') symbol = 'a';
      else if (c >= '0' && c <= '9') symbol = '9';
      else if (utf8::is_white_space(c)) symbol = ' ';
      else symbol = static_cast<char>(c);
    } else if (u_isUAlphabetic(static_cast<UChar32>(c))) {
      symbol = u_isUUppercase(static_cast<UChar32>(c)) ? 'A' : 'a';
    } else if (u_isdigit(static_cast<UChar32>(c))) {
      symbol = '9';
    } else if (utf8::is_white_space(c)) {
      symbol = ' ';
    } else {
      utf8::append(shape, c);
      last_letter = 0;
      continue;
    }
    if (symbol == 'A' || symbol == 'a') {
      if (symbol == last_letter) continue;
      last_letter = symbol;
    } else {
      last_letter = 0;
    }
    shape += symbol;
  }
  return shape;
}

struct TableProfiler::ColumnState {
  ValueCounter counter;
  size_t next_chunk = 0;
  std::vector<ValueCounter::Slot> entries;  // filled when counting is done
  size_t next_entry = 0;
  std::vector<std::pair<double, uint64_t>> numbers;
  PlainRange integer_range, number_range;
  int scale = 0;
  std::optional<int32_t> date_min, date_max;
  std::optional<std::string_view> text_min, text_max;
  std::unordered_map<std::string, uint64_t> shapes;
  // A typed column is profiled through its canonical text (design §3: dates
  // in ISO 8601, decimals at the column's scale); the counter's keys point
  // into these chunks, so they live as long as the column's state.
  std::vector<std::shared_ptr<const ColumnChunk>> canonical;
};

namespace {

std::shared_ptr<const ColumnChunk> canonical_text(const Column& column, const ColumnChunk& chunk) {
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  TextChunkBuilder builder;
  builder.reserve(chunk.rows, chunk.rows * 8);
  std::string cell;
  for (size_t i = 0; i < chunk.rows; ++i) {
    if (chunk.is_null(i)) {
      builder.append_null();
      continue;
    }
    cell.clear();
    append_canonical(column, chunk, i, iso, cell);
    builder.append(cell);
  }
  return builder.finish();
}

}  // namespace

TableProfiler::TableProfiler(Table table) : table_(std::move(table)) {
  result_.rows = table_.row_count();
}

TableProfiler::~TableProfiler() = default;

double TableProfiler::progress() const {
  const double total = static_cast<double>(table_.row_count()) * 2.0 * static_cast<double>(table_.column_count());
  return total == 0 ? 1.0 : std::min(1.0, static_cast<double>(work_done_) / total);
}

bool TableProfiler::step(size_t budget) {
  while (column_ < table_.column_count()) {
    const Column& column = table_.column(column_);
    if (!state_) {
      state_ = std::make_unique<ColumnState>();
      result_.columns.emplace_back();
      result_.columns.back().name = table_.name(column_);
      result_.columns.back().rows = column.size();
    }
    ColumnState& st = *state_;
    ColumnProfile& out = result_.columns.back();
    // Phase 1: count NULLs and distinct values, chunk by chunk.
    while (st.next_chunk < column.chunk_count()) {
      if (budget == 0) return false;
      const ColumnChunk* chunk_ptr = &column.chunk(st.next_chunk++);
      if (column.type() != Type::text) {
        st.canonical.push_back(canonical_text(column, *chunk_ptr));
        chunk_ptr = st.canonical.back().get();
      }
      const ColumnChunk& chunk = *chunk_ptr;
      if (chunk.layout == TextLayout::dictionary) {
        uint64_t non_null = 0;
        for (const DictionaryCount& c : count_dictionary_values(chunk)) {
          st.counter.add(chunk.own_text(c.code), c.count);
          non_null += c.count;
        }
        out.nulls += chunk.rows - non_null;
      } else {
        for (size_t i = 0; i < chunk.rows; ++i) {
          if (chunk.is_null(i)) ++out.nulls;
          else st.counter.add(chunk.text(i));
        }
      }
      work_done_ += chunk.rows;
      budget -= std::min(budget, chunk.rows);
      if (st.next_chunk == column.chunk_count()) {
        st.entries = st.counter.take_entries();
      }
    }
    // Phase 2: derive the facts of each distinct value, weighted by its count.
    const size_t per_entry_work = st.entries.empty() ? 0 : std::max<size_t>(1, column.size() / st.entries.size());
    while (st.next_entry < st.entries.size()) {
      if (budget == 0) return false;
      const auto& e = st.entries[st.next_entry++];
      const std::string_view v = e.value();
      const uint64_t n = e.count;
      const uint64_t length = utf8::code_point_count(v);
      if (st.next_entry == 1 || length < out.length_min) out.length_min = length;
      out.length_max = std::max(out.length_max, length);
      if (!st.text_min || v < *st.text_min) st.text_min = v;
      if (!st.text_max || v > *st.text_max) st.text_max = v;
      if (!v.empty() && (utf8::starts_with_white_space(v) || utf8::ends_with_white_space(v)))
        out.edge_whitespace += n;
      if (!v.empty()) {
        size_t last = v.size();
        if (utf8::is_punctuation(utf8::previous(v, last))) out.trailing_punctuation += n;
      }
      st.shapes[value_shape(v)] += n;
      const std::string_view t = utf8::trim_white_space(v);
      if (t.empty()) {
        out.blanks += n;
      } else {
        out.non_blank += n;
        const NumberShape shape = number_shape(t);
        if (shape == NumberShape::integer) {
          out.fit_integer += n;
          st.integer_range.add(t);
        }
        if (auto d = parse_double(t)) {
          out.fit_number += n;
          st.numbers.emplace_back(*d, n);
          st.number_range.add(t);
          st.scale = std::max(st.scale, fraction_digits(t));
        } else if (auto date = parse_any_date(t)) {
          out.fit_date += n;
          if (!st.date_min || *date < *st.date_min) st.date_min = date;
          if (!st.date_max || *date > *st.date_max) st.date_max = date;
        } else if (parse_boolean(t)) {
          out.fit_boolean += n;
        }
      }
      work_done_ += per_entry_work;
      budget -= std::min(budget, std::max(per_entry_work, kDerivationCost));
    }
    out.distinct = st.entries.size();
    {
      // Top values need the text only for the winners.
      std::vector<size_t> order(st.entries.size());
      for (size_t i = 0; i < order.size(); ++i) order[i] = i;
      auto by_count = [&](size_t a, size_t b) {
        const auto& x = st.entries[a];
        const auto& y = st.entries[b];
        return x.count != y.count ? x.count > y.count : x.value() < y.value();
      };
      const size_t top = std::min<size_t>(10, order.size());
      std::partial_sort(order.begin(), order.begin() + static_cast<std::ptrdiff_t>(top), order.end(), by_count);
      for (size_t i = 0; i < top; ++i)
        out.top_values.push_back({std::string(st.entries[order[i]].value()), st.entries[order[i]].count});
    }
    std::vector<ValueCount> shapes;
    for (auto& [shape, count] : st.shapes) shapes.push_back({shape, count});
    out.shapes = most_frequent(std::move(shapes), 5);
    // Type: the narrowest that fits enough non-blank values.
    const auto share = [&](uint64_t fit) {
      return out.non_blank == 0 ? 0.0 : static_cast<double>(fit) / static_cast<double>(out.non_blank);
    };
    if (out.non_blank > 0 && share(out.fit_boolean) >= kTypeShare) out.type = Type::boolean, out.type_share = share(out.fit_boolean);
    else if (out.non_blank > 0 && share(out.fit_integer) >= kTypeShare) out.type = Type::integer, out.type_share = share(out.fit_integer);
    else if (out.non_blank > 0 && share(out.fit_number) >= kTypeShare) out.type = Type::decimal, out.type_share = share(out.fit_number);
    else if (out.non_blank > 0 && share(out.fit_date) >= kTypeShare) out.type = Type::date, out.type_share = share(out.fit_date);
    else out.type = Type::text, out.type_share = out.non_blank == 0 ? 0.0 : 1.0;
    if ((out.type == Type::integer || out.type == Type::decimal) && !st.numbers.empty()) {
      std::sort(st.numbers.begin(), st.numbers.end());
      long double sum = 0, count = 0;
      for (const auto& [x, c] : st.numbers) sum += static_cast<long double>(x) * c, count += c;
      const long double mean = sum / count;
      long double squares = 0;
      for (const auto& [x, c] : st.numbers) squares += (x - mean) * (x - mean) * c;
      out.mean = static_cast<double>(mean);
      if (count > 1) out.std_dev = static_cast<double>(std::sqrt(squares / (count - 1)));
      const int scale = out.type == Type::integer ? 0 : st.scale;
      const PlainRange& range = out.type == Type::integer ? st.integer_range : st.number_range;
      if (range.exact && range.min) {
        out.min = range.min->text(scale);
        out.max = range.max->text(scale);
      } else {
        out.min = format_number(st.numbers.front().first, scale);
        out.max = format_number(st.numbers.back().first, scale);
      }
      // Type 7 quantiles (R's default, numpy's "linear"; Hyndman & Fan,
      // "Sample quantiles in statistical packages", 1996): with h = (n-1)p,
      // Q = x[floor h] + (h - floor h)(x[floor h + 1] - x[floor h]). The values
      // are distinct with counts, so x[k] is the value whose cumulative count
      // first exceeds k.
      std::vector<uint64_t> cumulative;
      cumulative.reserve(st.numbers.size());
      uint64_t running = 0;
      for (const auto& [x, c] : st.numbers) cumulative.push_back(running += c);
      auto order_statistic = [&](uint64_t k) {
        const auto it = std::upper_bound(cumulative.begin(), cumulative.end(), k);
        return st.numbers[static_cast<size_t>(it - cumulative.begin())].first;
      };
      for (const double p : kQuantilePoints) {
        const double h = static_cast<double>(running - 1) * p;
        const auto lo = static_cast<uint64_t>(std::floor(h));
        const double x_lo = order_statistic(lo);
        const double x_hi = order_statistic(std::min(lo + 1, running - 1));
        out.quantiles.push_back({p, x_lo + (h - static_cast<double>(lo)) * (x_hi - x_lo)});
      }
    } else if (out.type == Type::date && st.date_min) {
      out.min = iso_date(*st.date_min);
      out.max = iso_date(*st.date_max);
    } else if (st.text_min) {
      out.min = std::string(*st.text_min);
      out.max = std::string(*st.text_max);
    }
    state_.reset();
    ++column_;
    // The per-value estimate above is approximate; a finished column counts in full.
    work_done_ = static_cast<uint64_t>(column_) * 2 * table_.row_count();
  }
  return true;
}

TableProfile profile_table(const Table& table) {
  TableProfiler profiler(table);
  while (!profiler.step(1 << 20)) {
  }
  return profiler.result();
}

}  // namespace tamis
