#include "data_view.hpp"

#include <algorithm>
#include <numeric>

#include "csv_writer.hpp"
#include "utf8.hpp"

namespace tamis::workbench {

namespace {

// The chunk holding `row` and the row's index inside it.
std::pair<const ColumnChunk*, size_t> locate(const Column& column, size_t row) {
  size_t lo = 0, hi = column.chunk_count();
  while (hi - lo > 1) {
    const size_t mid = (lo + hi) / 2;
    if (column.chunk_start(mid) <= row) lo = mid;
    else hi = mid;
  }
  return {&column.chunk(lo), row - column.chunk_start(lo)};
}

void append_mark(char32_t c, std::string& out) {
  switch (c) {
    case U' ': out += "\u00B7"; return;
    case U'\t': out += "\u21E5"; return;
    case U'\n':
    case U'\r': out += "\u21B5"; return;
    default: out += "\u2423"; return;
  }
}

// Calls f(row, chunk, index) for every row of the column, walking chunks.
template <class F>
void for_each_cell(const Column& column, F&& f) {
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    const size_t start = column.chunk_start(k);
    for (size_t i = 0; i < chunk.rows; ++i) f(start + i, chunk, i);
  }
}

}  // namespace

CellText cell_text(const Table& table, size_t row, size_t column, const DateFormat& date_format) {
  CellText cell;
  const Column& col = table.column(column);
  const auto [chunk, index] = locate(col, row);
  if (chunk->is_null(index)) {
    cell.is_null = true;
    return cell;
  }
  append_canonical(col, *chunk, index, date_format, cell.value);
  const std::string_view v = cell.value;
  // Edge white space: [0, lead) and [trail, size).
  size_t lead = 0;
  while (lead < v.size()) {
    size_t next = lead;
    if (!utf8::is_white_space(utf8::next(v, next))) break;
    lead = next;
  }
  size_t trail = v.size();
  while (trail > lead) {
    size_t before = trail;
    if (!utf8::is_white_space(utf8::previous(v, before))) break;
    trail = before;
  }
  size_t i = 0;
  while (i < v.size()) {
    const size_t at = i;
    const char32_t c = utf8::next(v, i);
    const bool edge = at < lead || at >= trail;
    if (edge) {
      // CR LF is one line break, one mark.
      if (!(c == U'\r' && i < v.size() && v[i] == '\n')) append_mark(c, cell.shown);
      if (at < lead) cell.leading_marks = cell.shown.size();
      continue;
    }
    if (c == U'\t' || c == U'\n' || c == U'\r') {
      if (!(c == U'\r' && i < v.size() && v[i] == '\n')) append_mark(c, cell.shown);
      continue;
    }
    cell.shown.append(v.substr(at, i - at));
  }
  if (trail < v.size()) {
    const size_t without = cell.shown.size();
    std::string tail;
    size_t j = trail;
    while (j < v.size()) {
      const char32_t c = utf8::next(v, j);
      if (!(c == U'\r' && j < v.size() && v[j] == '\n')) append_mark(c, tail);
    }
    cell.trailing_marks = std::min(tail.size(), without);
  }
  return cell;
}

struct RowViewJob::State {
  State(Table table, std::vector<RowFilter> filters, std::vector<SortKey> keys, DateFormat date_format)
      : table(std::move(table)), filters(std::move(filters)), keys(std::move(keys)), date_format(std::move(date_format)),
        keep(this->table.row_count(), 1) {}
  Table table;
  std::vector<RowFilter> filters;
  std::vector<SortKey> keys;
  DateFormat date_format;

  // Per-key sort values gathered once, so the comparisons index plain vectors.
  struct KeyValues {
    bool descending;
    bool text;
    std::vector<std::string_view> texts;
    std::vector<int64_t> numbers;
    std::vector<char> nulls;
  };
  std::vector<KeyValues> values;
  std::vector<char> keep;
  std::vector<size_t> view, buffer;
  size_t next_filter = 0, next_key = 0;
  size_t next_run = 0;   // runs of kRun rows sorted so far
  size_t width = 0;      // merge pass: sorted runs have this length
  size_t next_pair = 0;  // start of the next pair of runs to merge in this pass
  bool listed = false, done = false;
  static constexpr size_t kRun = 4096;

  bool less(size_t a, size_t b) const {
    for (const KeyValues& kv : values) {
      if (kv.nulls[a] != kv.nulls[b]) return kv.nulls[b] != 0;  // NULL last in either direction
      if (kv.nulls[a]) continue;
      int order = 0;
      if (kv.text) order = kv.texts[a].compare(kv.texts[b]);  // UTF-8 byte order is code point order
      else order = kv.numbers[a] < kv.numbers[b] ? -1 : (kv.numbers[a] > kv.numbers[b] ? 1 : 0);
      if (order != 0) return kv.descending ? order > 0 : order < 0;
    }
    return false;
  }

  void apply_filter(const RowFilter& filter) {
    if (filter.column >= table.column_count()) return;
    const Column& column = table.column(filter.column);
    std::string canonical;
    for_each_cell(column, [&](size_t row, const ColumnChunk& chunk, size_t i) {
      if (!keep[row]) return;
      const bool null = chunk.is_null(i);
      bool pass = false;
      switch (filter.kind) {
        case FilterKind::is_null: pass = null; break;
        case FilterKind::not_null: pass = !null; break;
        default: {
          if (null) break;
          std::string_view value;
          if (column.type() == Type::text) {
            value = chunk.text(i);
          } else {
            canonical.clear();
            append_canonical(column, chunk, i, date_format, canonical);
            value = canonical;
          }
          if (filter.kind == FilterKind::contains) pass = value.find(filter.text) != std::string_view::npos;
          else if (filter.kind == FilterKind::equals) pass = value == filter.text;
          else if (filter.kind == FilterKind::is_empty) pass = value.empty();
          else pass = utf8::starts_with_white_space(value) || utf8::ends_with_white_space(value);
        }
      }
      keep[row] = pass;
    });
  }

  void gather_key(const SortKey& key) {
    if (key.column >= table.column_count()) return;
    const Column& column = table.column(key.column);
    const size_t rows = table.row_count();
    KeyValues kv{key.descending, column.type() == Type::text, {}, {}, std::vector<char>(rows, 0)};
    if (kv.text) kv.texts.resize(rows);
    else kv.numbers.resize(rows);
    for_each_cell(column, [&](size_t row, const ColumnChunk& chunk, size_t i) {
      if (chunk.is_null(i)) {
        kv.nulls[row] = 1;
        return;
      }
      if (kv.text) kv.texts[row] = chunk.text(i);
      else kv.numbers[row] = chunk.numbers[i];
    });
    values.push_back(std::move(kv));
  }

  // One unit of work; returns the rows it touched.
  size_t advance() {
    const size_t rows = table.row_count();
    if (next_filter < filters.size()) {
      apply_filter(filters[next_filter++]);
      return rows;
    }
    if (!listed) {
      view.reserve(rows);
      for (size_t r = 0; r < rows; ++r)
        if (keep[r]) view.push_back(r);
      keep = {};
      listed = true;
      return rows;
    }
    if (next_key < keys.size()) {
      gather_key(keys[next_key++]);
      return rows;
    }
    auto by_key = [this](size_t a, size_t b) { return less(a, b); };
    const size_t n = view.size();
    if (values.empty() || n < 2) {
      done = true;
      return 1;
    }
    // Bottom-up merge sort: stable, and every unit of work is bounded.
    if (next_run * kRun < n) {
      const size_t lo = next_run++ * kRun;
      std::stable_sort(view.begin() + static_cast<std::ptrdiff_t>(lo),
                       view.begin() + static_cast<std::ptrdiff_t>(std::min(n, lo + kRun)), by_key);
      return kRun;
    }
    if (width == 0) {
      width = kRun;
      buffer.resize(n);
    }
    if (width >= n) {
      buffer = {};
      done = true;
      return 1;
    }
    const size_t lo = next_pair;
    const size_t mid = std::min(n, lo + width), hi = std::min(n, lo + 2 * width);
    const auto at = [](std::vector<size_t>& v, size_t i) { return v.begin() + static_cast<std::ptrdiff_t>(i); };
    std::merge(at(view, lo), at(view, mid), at(view, mid), at(view, hi), at(buffer, lo), by_key);
    next_pair = hi;
    if (next_pair >= n) {
      view.swap(buffer);
      width *= 2;
      next_pair = 0;
    }
    return hi - lo;
  }
};

RowViewJob::RowViewJob(Table table, std::vector<RowFilter> filters, std::vector<SortKey> keys,
                       DateFormat date_format)
    : state_(std::make_unique<State>(std::move(table), std::move(filters), std::move(keys), std::move(date_format))) {}

RowViewJob::~RowViewJob() = default;

bool RowViewJob::step(size_t budget) {
  State& s = *state_;
  if (cancelled()) return true;
  // A unit touches about one cell per row: the budget counts cells.
  size_t spent = 0;
  while (!s.done && spent < budget) spent += s.advance();
  return s.done;
}

double RowViewJob::progress() const {
  const State& s = *state_;
  if (s.done) return 1.0;
  const size_t n = std::max<size_t>(s.view.size(), 1);
  double passes = 1.0;
  for (size_t w = State::kRun; w < n; w *= 2) passes += 1.0;
  const double prepare = static_cast<double>(s.next_filter + s.listed + s.next_key);
  const double prepare_total = static_cast<double>(s.filters.size() + 1 + s.keys.size());
  double sorted = 0.0;
  if (s.width != 0) {
    double done_passes = 1.0;
    for (size_t w = State::kRun; w < s.width; w *= 2) done_passes += 1.0;
    sorted = (done_passes + static_cast<double>(s.next_pair) / static_cast<double>(n)) / passes;
  } else if (s.listed && s.next_key == s.keys.size()) {
    sorted = std::min(1.0, static_cast<double>(s.next_run * State::kRun) / static_cast<double>(n)) / passes;
  }
  return 0.3 * prepare / prepare_total + 0.7 * sorted;
}

std::string RowViewJob::label() const { return state_->keys.empty() ? "Filtering rows" : "Sorting rows"; }

std::vector<size_t> RowViewJob::take_result() { return std::move(state_->view); }

std::vector<size_t> make_row_view(const Table& table, std::span<const RowFilter> filters,
                                  std::span<const SortKey> keys, const DateFormat& date_format) {
  RowViewJob job(table, std::vector<RowFilter>(filters.begin(), filters.end()),
                 std::vector<SortKey>(keys.begin(), keys.end()), date_format);
  run_to_end(job);
  return job.take_result();
}

std::optional<size_t> row_of_line(const Table& table, uint64_t line) {
  size_t lo = 0, hi = table.row_count();
  while (lo < hi) {
    const size_t mid = lo + (hi - lo) / 2;
    if (table.source_line(mid) < line) lo = mid + 1;
    else hi = mid;
  }
  if (lo < table.row_count() && table.source_line(lo) == line) return lo;
  return std::nullopt;
}

StepDiff::StepDiff(Table before, Table after) : before_(std::move(before)), after_(std::move(after)) {
  for (size_t c = 0; c < after_.column_count(); ++c) {
    const auto found = before_.find(after_.name(c));
    before_column_.push_back(found ? static_cast<std::ptrdiff_t>(*found) : -1);
  }
  before_lines_.reserve(before_.row_count());
  for_each_cell(before_.source_lines(), [&](size_t, const ColumnChunk& chunk, size_t i) {
    before_lines_.push_back(static_cast<uint64_t>(chunk.numbers[i]));
  });
}

bool StepDiff::column_is_new(size_t column) const { return before_column_[column] < 0; }

bool StepDiff::cell_changed(size_t row, size_t column) const {
  if (before_column_[column] < 0) return true;
  const size_t bc = static_cast<size_t>(before_column_[column]);
  if (before_.column_ptr(bc) == after_.column_ptr(column) && before_.row_count() == after_.row_count()) return false;
  const uint64_t line = after_.source_line(row);
  const auto it = std::lower_bound(before_lines_.begin(), before_lines_.end(), line);
  if (it == before_lines_.end() || *it != line) return true;
  const size_t br = static_cast<size_t>(it - before_lines_.begin());
  const Column& a = after_.column(column);
  const Column& b = before_.column(bc);
  const auto [ac, ai] = locate(a, row);
  const auto [bch, bi] = locate(b, br);
  if (ac == bch && ai == bi) return false;
  const bool a_null = ac->is_null(ai), b_null = bch->is_null(bi);
  if (a_null || b_null) return a_null != b_null;
  if (a.type() != b.type() || a.scale() != b.scale()) return true;
  if (a.type() == Type::text) return ac->text(ai) != bch->text(bi);
  return ac->numbers[ai] != bch->numbers[bi];
}

}  // namespace tamis::workbench
