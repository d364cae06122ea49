// Column-at-a-time evaluation. A batch is cut into blocks of at most
// kBlockRows rows that never cross a chunk boundary of any column read, so
// every column of a block is a plain slice of one chunk. Each node computes
// its whole block in one loop into its own reusable vectors; the only
// dispatch is one switch per node per block.
//
// Validity is one byte per row (1 = present; a null pointer means no NULLs).
// Rows that a CASE, COALESCE, AND or OR does not need are "inactive": they
// are still computed where that is cheap, but never raise errors.
#include <algorithm>
#include <cstring>
#include <optional>

#include "dates.hpp"
#include "expr/expr.hpp"
#include "expr/like.hpp"
#include "expr/numeric.hpp"
#include "expr/program.hpp"
#include "expr/text_functions.hpp"
#include "scalars.hpp"
#include "utf8.hpp"

namespace tamis::expr {

namespace {

constexpr size_t kBlockRows = 4096;

struct Vec {
  const uint8_t* valid = nullptr;
  const int64_t* num = nullptr;
  const std::string_view* text = nullptr;
  std::vector<uint8_t> valid_buf;
  std::vector<int64_t> num_buf;
  std::vector<std::string_view> text_buf;
  std::string arena;                 // bytes of computed texts
  std::vector<size_t> arena_ends;    // end of each row's text in arena
  std::vector<uint8_t> mask_buf;     // active rows handed to the children
  std::vector<uint8_t> mask_buf2;
};

inline uint8_t on(const uint8_t* mask, size_t i) { return mask ? mask[i] : 1; }

const DateFormat& iso_format() {
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  return iso;
}

std::u32string code_points(std::string_view s) {
  std::u32string out;
  for (size_t i = 0; i < s.size();) out.push_back(utf8::next(s, i));
  return out;
}

template <class Cmp>
void compare_loop(Op op, size_t n, int64_t* out, Cmp three_way) {
  switch (op) {
    case Op::equal: for (size_t i = 0; i < n; ++i) out[i] = three_way(i) == 0; break;
    case Op::not_equal: for (size_t i = 0; i < n; ++i) out[i] = three_way(i) != 0; break;
    case Op::less: for (size_t i = 0; i < n; ++i) out[i] = three_way(i) < 0; break;
    case Op::less_equal: for (size_t i = 0; i < n; ++i) out[i] = three_way(i) <= 0; break;
    case Op::greater: for (size_t i = 0; i < n; ++i) out[i] = three_way(i) > 0; break;
    case Op::greater_equal: for (size_t i = 0; i < n; ++i) out[i] = three_way(i) >= 0; break;
    default: break;
  }
}

class Evaluator {
 public:
  Evaluator(const Program& program, const Table& batch)
      : p_(program), batch_(batch), vecs_(program.nodes.size()), slices_(batch.column_count()) {}

  // sink(first_row, rows, result, ends_line_chunk): blocks in order.
  template <class Sink>
  Status run(Sink&& sink) {
    struct Cursor {
      const Column* column;
      size_t slot;  // column index, or SIZE_MAX for the source lines
      size_t chunk = 0, offset = 0;
    };
    std::vector<Cursor> cursors;
    for (size_t c : p_.columns) cursors.push_back({&batch_.column(c), c});
    cursors.push_back({&batch_.source_lines(), SIZE_MAX});
    const size_t total = batch_.row_count();
    for (size_t row = 0; row < total;) {
      size_t n = std::min(kBlockRows, total - row);
      for (Cursor& c : cursors) {
        while (c.offset >= c.column->chunk(c.chunk).rows) ++c.chunk, c.offset = 0;
        n = std::min(n, c.column->chunk(c.chunk).rows - c.offset);
      }
      for (const Cursor& c : cursors) {
        const Slice slice{&c.column->chunk(c.chunk), c.offset};
        if (c.slot == SIZE_MAX) lines_ = slice;
        else slices_[c.slot] = slice;
      }
      n_ = n;
      if (Status s = eval(p_.root, nullptr, true); !s) return s;
      const Cursor& line_cursor = cursors.back();
      sink(row, n, vecs_[p_.root], line_cursor.offset + n == line_cursor.column->chunk(line_cursor.chunk).rows);
      for (Cursor& c : cursors) c.offset += n;
      row += n;
    }
    return Ok{};
  }

 private:
  struct Slice {
    const ColumnChunk* chunk = nullptr;
    size_t offset = 0;
  };

  // ---- helpers ----
  uint64_t line_of(size_t i) const { return static_cast<uint64_t>(lines_.chunk->numbers[lines_.offset + i]); }

  Error row_error(uint32_t id, size_t i, const std::string& message) const {
    const uint64_t line = line_of(i);
    return input_error("", line, p_.where(id) + message + " in the row from line " + std::to_string(line));
  }

  // The first row flagged in bad that is present and active, if any.
  std::optional<size_t> first_flagged(const std::vector<uint8_t>& bad, const uint8_t* valid,
                                      const uint8_t* active) const {
    uint8_t any = 0;
    for (size_t i = 0; i < n_; ++i) any |= bad[i] & on(valid, i) & on(active, i);
    if (!any) return std::nullopt;
    for (size_t i = 0; i < n_; ++i)
      if (bad[i] & on(valid, i) & on(active, i)) return i;
    return std::nullopt;
  }

  const uint8_t* both_valid(const uint8_t* a, const uint8_t* b, std::vector<uint8_t>& buf) const {
    if (!a) return b;
    if (!b) return a;
    buf.resize(n_);
    for (size_t i = 0; i < n_; ++i) buf[i] = a[i] & b[i];
    return buf.data();
  }

  int64_t* numbers(Vec& v) const {
    v.num_buf.resize(n_);
    v.num = v.num_buf.data();
    return v.num_buf.data();
  }
  std::string_view* texts(Vec& v) const {
    v.text_buf.resize(n_);
    v.text = v.text_buf.data();
    return v.text_buf.data();
  }
  uint8_t* own_validity(Vec& v) const {
    v.valid_buf.resize(n_);
    v.valid = v.valid_buf.data();
    return v.valid_buf.data();
  }
  // Computed texts go to the arena first and become views once it is complete.
  void begin_texts(Vec& v) const {
    v.arena.clear();
    v.arena_ends.resize(n_);
  }
  void end_text(Vec& v, size_t i) const { v.arena_ends[i] = v.arena.size(); }
  void finish_texts(Vec& v) const {
    std::string_view* out = texts(v);
    size_t start = 0;
    for (size_t i = 0; i < n_; ++i) {
      out[i] = std::string_view(v.arena.data() + start, v.arena_ends[i] - start);
      start = v.arena_ends[i];
    }
  }
  // active & extra, into buf (extra must be 0/1 bytes).
  const uint8_t* narrowed(const uint8_t* active, const uint8_t* extra, std::vector<uint8_t>& buf) const {
    buf.resize(n_);
    for (size_t i = 0; i < n_; ++i) buf[i] = on(active, i) & extra[i];
    return buf.data();
  }
  bool any(const uint8_t* mask) const {
    uint8_t a = 0;
    for (size_t i = 0; i < n_; ++i) a |= mask[i];
    return a != 0;
  }

  const Vec& child(uint32_t id, size_t k) const { return vecs_[p_.nodes[id].args[k]]; }
  Status eval_child(uint32_t id, size_t k, const uint8_t* active, bool values = true) {
    return eval(p_.nodes[id].args[k], active, values);
  }
  // Every argument of a node whose arguments are all needed (LIKE, SUBSTRING, TRIM).
  Status eval_children(uint32_t id, const uint8_t* active) {
    for (size_t k = 0; k < p_.nodes[id].args.size(); ++k)
      if (Status s = eval_child(id, k, active); !s) return s;
    return Ok{};
  }

  // ---- the dispatch ----
  Status eval(uint32_t id, const uint8_t* active, bool values) {
    const Node& node = p_.nodes[id];
    Vec& out = vecs_[id];
    out.valid = nullptr;
    switch (node.op) {
      case Op::literal: return literal(node, out);
      case Op::column: return column(node, out, values);
      case Op::rescale: return rescale_op(id, out, active);
      case Op::negate:
      case Op::abs: return negate_or_abs(id, out, active);
      case Op::add:
      case Op::subtract:
      case Op::multiply:
      case Op::divide: return arithmetic(id, out, active);
      case Op::concat: return concat(id, out, active);
      case Op::equal:
      case Op::not_equal:
      case Op::less:
      case Op::less_equal:
      case Op::greater:
      case Op::greater_equal: return comparison(id, out, active);
      case Op::logical_and:
      case Op::logical_or: return and_or(id, out, active);
      case Op::logical_not: return logical_not(id, out, active);
      case Op::is_null:
      case Op::is_true:
      case Op::is_false: return is_test(id, out, active);
      case Op::between: return between(id, out, active);
      case Op::in_list: return in_list(id, out, active);
      case Op::like: return like(id, out, active);
      case Op::case_when: return case_when(id, out, active);
      case Op::cast: return cast(id, out, active);
      case Op::coalesce: return coalesce(id, out, active);
      case Op::nullif: return nullif(id, out, active);
      case Op::upper:
      case Op::lower: return change_case(id, out, active);
      case Op::char_length: return char_length(id, out, active);
      case Op::substring: return substring_op(id, out, active);
      case Op::trim: return trim(id, out, active);
      case Op::round: return round(id, out, active);
    }
    return Ok{};
  }

  Status literal(const Node& node, Vec& out) {
    if (node.null_literal) {
      std::fill_n(own_validity(out), n_, uint8_t{0});
      std::fill_n(numbers(out), n_, 0);
      std::fill_n(texts(out), n_, std::string_view());
    } else if (node.type == VType::text) {
      std::fill_n(texts(out), n_, std::string_view(node.text));
    } else {
      std::fill_n(numbers(out), n_, node.number);
    }
    return Ok{};
  }

  Status column(const Node& node, Vec& out, bool values) {
    const Slice& s = slices_[static_cast<size_t>(node.number)];
    const ColumnChunk& chunk = *s.chunk;
    if (!chunk.is_plain()) return indirect_column(chunk, s.offset, out, values);
    if (chunk.has_nulls()) {
      uint8_t* valid = own_validity(out);
      const uint64_t* bits = chunk.validity.data();
      for (size_t i = 0; i < n_; ++i) {
        const size_t r = s.offset + i;
        valid[i] = static_cast<uint8_t>((bits[r >> 6] >> (r & 63)) & 1);
      }
    }
    if (!values) return Ok{};
    if (node.type == VType::text) {
      std::string_view* text = texts(out);
      const uint32_t* offsets = chunk.offsets.data() + s.offset;
      const char* bytes = chunk.bytes.data();
      for (size_t i = 0; i < n_; ++i) text[i] = std::string_view(bytes + offsets[i], offsets[i + 1] - offsets[i]);
    } else {
      out.num = chunk.numbers.data() + s.offset;
    }
    return Ok{};
  }

  // A delta or dictionary chunk (table.hpp) has no per-row text to point
  // into; it is read row by row. Only text chunks have these layouts.
  Status indirect_column(const ColumnChunk& chunk, size_t offset, Vec& out, bool values) {
    if (chunk.has_nulls()) {
      uint8_t* valid = own_validity(out);
      for (size_t i = 0; i < n_; ++i) valid[i] = !chunk.is_null(offset + i);
    }
    if (!values) return Ok{};
    std::string_view* text = texts(out);
    for (size_t i = 0; i < n_; ++i) text[i] = chunk.text(offset + i);
    return Ok{};
  }

  Status rescale_op(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    const Node& from = p_.nodes[node.args[0]];
    const int64_t factor = pow10(node.scale - from.scale);
    int64_t* r = numbers(out);
    bad_.assign(n_, 0);
    for (size_t i = 0; i < n_; ++i) bad_[i] = __builtin_mul_overflow(a.num[i], factor, &r[i]);
    out.valid = a.valid;
    if (auto i = first_flagged(bad_, out.valid, active))
      return row_error(id, *i, "the value is out of range at scale " + std::to_string(node.scale));
    return Ok{};
  }

  Status negate_or_abs(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    int64_t* r = numbers(out);
    bad_.assign(n_, 0);
    const bool negate = node.op == Op::negate;
    for (size_t i = 0; i < n_; ++i) {
      const int64_t x = a.num[i];
      bad_[i] = x == INT64_MIN;
      r[i] = (negate || x < 0) && x != INT64_MIN ? -x : x;
    }
    out.valid = a.valid;
    if (auto i = first_flagged(bad_, out.valid, active)) return row_error(id, *i, "the result is out of range");
    return Ok{};
  }

  Status arithmetic(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    if (Status s = eval_child(id, 1, active); !s) return s;
    const Vec& a = child(id, 0);
    const Vec& b = child(id, 1);
    out.valid = both_valid(a.valid, b.valid, out.valid_buf);
    int64_t* r = numbers(out);
    bad_.assign(n_, 0);
    const int sa = p_.nodes[node.args[0]].scale, sb = p_.nodes[node.args[1]].scale;
    switch (node.op) {
      case Op::add:
        for (size_t i = 0; i < n_; ++i) bad_[i] = __builtin_add_overflow(a.num[i], b.num[i], &r[i]);
        break;
      case Op::subtract:
        for (size_t i = 0; i < n_; ++i) bad_[i] = __builtin_sub_overflow(a.num[i], b.num[i], &r[i]);
        break;
      case Op::multiply:
        if (sa + sb == node.scale) {
          for (size_t i = 0; i < n_; ++i) bad_[i] = __builtin_mul_overflow(a.num[i], b.num[i], &r[i]);
        } else {
          const Wide unit = pow10_wide(sa + sb - node.scale);
          for (size_t i = 0; i < n_; ++i) {
            const auto v = narrow(divide_rounded(Wide{a.num[i]} * b.num[i], unit));
            bad_[i] = !v;
            r[i] = v.value_or(0);
          }
        }
        break;
      case Op::divide: {
        // a/10^sa / (b/10^sb) at scale s = a * 10^(s + sb - sa) / b.
        const int shift = node.scale + sb - sa;
        const Wide factor = pow10_wide(shift);
        std::vector<uint8_t>& zero = out.mask_buf;
        zero.assign(n_, 0);
        for (size_t i = 0; i < n_; ++i) {
          if (b.num[i] == 0) {
            zero[i] = 1;
            r[i] = 0;
            continue;
          }
          Wide scaled;
          std::optional<int64_t> v;
          if (!__builtin_mul_overflow(Wide{a.num[i]}, factor, &scaled)) v = narrow(divide_rounded(scaled, b.num[i]));
          bad_[i] = !v;
          r[i] = v.value_or(0);
        }
        if (auto i = first_flagged(zero, out.valid, active)) return row_error(id, *i, "division by zero");
        break;
      }
      default: break;
    }
    if (auto i = first_flagged(bad_, out.valid, active))
      return row_error(id, *i, node.type == VType::integer ? "the result is out of range for a 64-bit integer"
                                                           : "the result is out of range for a decimal of scale " +
                                                                 std::to_string(node.scale));
    return Ok{};
  }

  Status concat(uint32_t id, Vec& out, const uint8_t* active) {
    if (Status s = eval_child(id, 0, active); !s) return s;
    if (Status s = eval_child(id, 1, active); !s) return s;
    const Vec& a = child(id, 0);
    const Vec& b = child(id, 1);
    out.valid = both_valid(a.valid, b.valid, out.valid_buf);
    begin_texts(out);
    for (size_t i = 0; i < n_; ++i) {
      if (on(out.valid, i) && on(active, i)) {
        out.arena += a.text[i];
        out.arena += b.text[i];
      }
      end_text(out, i);
    }
    finish_texts(out);
    return Ok{};
  }

  // out[i] = (a op b) on values; validity is the caller's business.
  void compare_values(Op op, uint32_t left, const Vec& a, uint32_t right, const Vec& b, int64_t* out) const {
    const Node& l = p_.nodes[left];
    const Node& r = p_.nodes[right];
    if (l.type == VType::text) {
      compare_loop(op, n_, out, [&](size_t i) { return a.text[i].compare(b.text[i]); });
    } else if (l.scale == r.scale || !is_numeric(l.type)) {
      compare_loop(op, n_, out, [&](size_t i) { return (a.num[i] > b.num[i]) - (a.num[i] < b.num[i]); });
    } else {
      const int scale = std::max(l.scale, r.scale);
      const Wide fa = pow10_wide(scale - l.scale), fb = pow10_wide(scale - r.scale);
      compare_loop(op, n_, out, [&](size_t i) {
        const Wide x = a.num[i] * fa, y = b.num[i] * fb;
        return (x > y) - (x < y);
      });
    }
  }

  Status comparison(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    if (Status s = eval_child(id, 1, active); !s) return s;
    const Vec& a = child(id, 0);
    const Vec& b = child(id, 1);
    out.valid = both_valid(a.valid, b.valid, out.valid_buf);
    compare_values(node.op, node.args[0], a, node.args[1], b, numbers(out));
    return Ok{};
  }

  // Three-valued AND / OR of two boolean vectors into out.
  void combine(bool is_and, const uint8_t* av, const int64_t* a, const uint8_t* bv, const int64_t* b, Vec& out) const {
    int64_t* r = numbers(out);
    if (!av && !bv) {
      for (size_t i = 0; i < n_; ++i) r[i] = is_and ? (a[i] & b[i]) : (a[i] | b[i]);
      out.valid = nullptr;
      return;
    }
    uint8_t* valid = own_validity(out);
    for (size_t i = 0; i < n_; ++i) {
      const int64_t va = on(av, i), vb = on(bv, i);
      const int64_t x = a[i] & va, y = b[i] & vb;  // 1 only when known true
      if (is_and) {
        const int64_t known_false = (va & (1 - a[i])) | (vb & (1 - b[i]));
        valid[i] = static_cast<uint8_t>((va & vb) | known_false);
        r[i] = x & y;
      } else {
        const int64_t known_true = x | y;
        valid[i] = static_cast<uint8_t>((va & vb) | known_true);
        r[i] = known_true;
      }
    }
  }

  Status and_or(uint32_t id, Vec& out, const uint8_t* active) {
    const bool is_and = p_.nodes[id].op == Op::logical_and;
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    // The right side matters only where the left does not decide alone.
    std::vector<uint8_t>& needed = out.mask_buf;
    needed.resize(n_);
    for (size_t i = 0; i < n_; ++i) {
      const uint8_t decided = on(a.valid, i) & static_cast<uint8_t>(is_and ? a.num[i] == 0 : a.num[i] != 0);
      needed[i] = on(active, i) & (1 - decided);
    }
    if (Status s = eval_child(id, 1, needed.data()); !s) return s;
    const Vec& b = child(id, 1);
    combine(is_and, a.valid, a.num, b.valid, b.num, out);
    return Ok{};
  }

  Status logical_not(uint32_t id, Vec& out, const uint8_t* active) {
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    int64_t* r = numbers(out);
    for (size_t i = 0; i < n_; ++i) r[i] = 1 - a.num[i];
    out.valid = a.valid;
    return Ok{};
  }

  Status is_test(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active, node.op != Op::is_null); !s) return s;
    const Vec& a = child(id, 0);
    int64_t* r = numbers(out);
    const int64_t flip = node.negated ? 1 : 0;
    if (node.op == Op::is_null) {
      for (size_t i = 0; i < n_; ++i) r[i] = (1 - on(a.valid, i)) ^ flip;
    } else {
      const int64_t wanted = node.op == Op::is_true ? 1 : 0;
      for (size_t i = 0; i < n_; ++i) r[i] = (on(a.valid, i) & static_cast<int64_t>(a.num[i] == wanted)) ^ flip;
    }
    return Ok{};
  }

  Status between(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    for (size_t k = 0; k < 3; ++k)
      if (Status s = eval_child(id, k, active); !s) return s;
    const Vec& v = child(id, 0);
    const Vec& low = child(id, 1);
    const Vec& high = child(id, 2);
    std::vector<int64_t> above(n_), below(n_);
    std::vector<uint8_t> above_valid, below_valid;
    compare_values(Op::greater_equal, node.args[0], v, node.args[1], low, above.data());
    compare_values(Op::less_equal, node.args[0], v, node.args[2], high, below.data());
    const uint8_t* av = both_valid(v.valid, low.valid, above_valid);
    const uint8_t* bv = both_valid(v.valid, high.valid, below_valid);
    combine(true, av, above.data(), bv, below.data(), out);
    if (node.negated) negate_in_place(out);
    return Ok{};
  }

  void negate_in_place(Vec& out) const {
    for (size_t i = 0; i < n_; ++i) out.num_buf[i] = 1 - out.num_buf[i];
  }

  Status in_list(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    std::vector<int64_t> found(n_, 0), equal(n_);
    std::vector<uint8_t> found_valid(n_, 1), equal_valid_buf;
    for (size_t k = 1; k < node.args.size(); ++k) {
      if (Status s = eval_child(id, k, active); !s) return s;
      const Vec& v = child(id, 0);
      const Vec& item = child(id, k);
      compare_values(Op::equal, node.args[0], v, node.args[k], item, equal.data());
      const uint8_t* ev = both_valid(v.valid, item.valid, equal_valid_buf);
      combine(false, found_valid.data(), found.data(), ev, equal.data(), out);
      std::copy_n(out.num, n_, found.begin());
      for (size_t i = 0; i < n_; ++i) found_valid[i] = on(out.valid, i);
    }
    int64_t* r = numbers(out);
    uint8_t* valid = own_validity(out);
    for (size_t i = 0; i < n_; ++i) {
      r[i] = node.negated ? 1 - found[i] : found[i];
      valid[i] = found_valid[i];
    }
    return Ok{};
  }

  Status like(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_children(id, active); !s) return s;
    const Vec& value = child(id, 0);
    const Vec& pattern = child(id, 1);
    const Vec* escape = node.args.size() == 3 ? &child(id, 2) : nullptr;
    const uint8_t* valid = both_valid(value.valid, pattern.valid, out.valid_buf);
    if (escape) valid = both_valid(valid, escape->valid, out.mask_buf2);
    int64_t* r = numbers(out);
    const LikePattern* compiled = node.pattern.get();
    std::optional<LikePattern> row_pattern;
    std::string last_pattern, last_escape, problem;
    bool have_last = false;
    for (size_t i = 0; i < n_; ++i) {
      r[i] = 0;
      if (!on(valid, i) || !on(active, i)) continue;
      if (!node.pattern) {
        const std::string_view p = pattern.text[i];
        const std::string_view e = escape ? escape->text[i] : std::string_view();
        if (!have_last || p != last_pattern || e != last_escape) {
          std::optional<char32_t> escape_char;
          if (escape) {
            if (utf8::code_point_count(e) != 1)
              return row_error(id, i, "ESCAPE needs exactly one character, found '" + std::string(e) + "'");
            size_t at = 0;
            escape_char = utf8::next(e, at);
          }
          row_pattern = LikePattern::compile(p, escape_char, problem);
          if (!row_pattern) return row_error(id, i, "invalid LIKE pattern '" + std::string(p) + "': " + problem);
          last_pattern = std::string(p);
          last_escape = std::string(e);
          have_last = true;
        }
        compiled = &*row_pattern;
      }
      r[i] = compiled->matches(value.text[i]) != node.negated;
    }
    out.valid = valid;
    return Ok{};
  }

  // Copies rows of src where take[i] into out (same type as this node).
  void copy_where(const Node& node, const Vec& src, const uint8_t* take, Vec& out) const {
    uint8_t* valid = out.valid_buf.data();
    if (node.type == VType::text) {
      for (size_t i = 0; i < n_; ++i)
        if (take[i]) out.text_buf[i] = src.text[i], valid[i] = on(src.valid, i);
    } else {
      for (size_t i = 0; i < n_; ++i)
        if (take[i]) out.num_buf[i] = src.num[i], valid[i] = on(src.valid, i);
    }
  }
  void start_result(const Node& node, Vec& out) const {
    std::fill_n(own_validity(out), n_, uint8_t{0});
    if (node.type == VType::text) std::fill_n(texts(out), n_, std::string_view());
    else std::fill_n(numbers(out), n_, 0);
  }

  Status case_when(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    start_result(node, out);
    std::vector<uint8_t>& open = out.mask_buf;  // active rows no WHEN has taken yet
    std::vector<uint8_t>& take = out.mask_buf2;
    open.resize(n_);
    take.resize(n_);
    for (size_t i = 0; i < n_; ++i) open[i] = on(active, i);
    size_t k = 0;
    std::vector<int64_t> equal;
    std::vector<uint8_t> equal_valid_buf;
    if (node.simple_case) {
      if (Status s = eval_child(id, 0, active); !s) return s;
      equal.resize(n_);
      k = 1;
    }
    const size_t pairs_end = node.has_else ? node.args.size() - 1 : node.args.size();
    for (; k < pairs_end; k += 2) {
      if (Status s = eval_child(id, k, open.data()); !s) return s;
      const Vec& when = child(id, k);
      if (node.simple_case) {
        const Vec& operand = child(id, 0);
        compare_values(Op::equal, node.args[0], operand, node.args[k], when, equal.data());
        const uint8_t* ev = both_valid(operand.valid, when.valid, equal_valid_buf);
        for (size_t i = 0; i < n_; ++i) take[i] = open[i] & on(ev, i) & static_cast<uint8_t>(equal[i] != 0);
      } else {
        for (size_t i = 0; i < n_; ++i) take[i] = open[i] & on(when.valid, i) & static_cast<uint8_t>(when.num[i] != 0);
      }
      if (!any(take.data())) continue;
      if (Status s = eval_child(id, k + 1, take.data()); !s) return s;
      copy_where(node, child(id, k + 1), take.data(), out);
      for (size_t i = 0; i < n_; ++i) open[i] &= static_cast<uint8_t>(1 - take[i]);
    }
    if (node.has_else && any(open.data())) {
      if (Status s = eval_child(id, node.args.size() - 1, open.data()); !s) return s;
      copy_where(node, child(id, node.args.size() - 1), open.data(), out);
    }
    return Ok{};
  }

  Status coalesce(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    start_result(node, out);
    std::vector<uint8_t>& open = out.mask_buf;  // rows still NULL
    std::vector<uint8_t>& take = out.mask_buf2;
    open.resize(n_);
    take.resize(n_);
    for (size_t i = 0; i < n_; ++i) open[i] = on(active, i);
    for (size_t k = 0; k < node.args.size() && any(open.data()); ++k) {
      if (Status s = eval_child(id, k, open.data()); !s) return s;
      const Vec& a = child(id, k);
      for (size_t i = 0; i < n_; ++i) take[i] = open[i] & on(a.valid, i);
      copy_where(node, a, take.data(), out);
      for (size_t i = 0; i < n_; ++i) open[i] &= static_cast<uint8_t>(1 - take[i]);
    }
    return Ok{};
  }

  Status nullif(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    if (Status s = eval_child(id, 1, active); !s) return s;
    const Vec& a = child(id, 0);
    const Vec& b = child(id, 1);
    std::vector<int64_t> equal(n_);
    compare_values(Op::equal, node.args[0], a, node.args[1], b, equal.data());
    uint8_t* valid = own_validity(out);
    for (size_t i = 0; i < n_; ++i) valid[i] = on(a.valid, i) & (1 - (on(b.valid, i) & static_cast<uint8_t>(equal[i])));
    out.num = a.num;
    out.text = a.text;
    return Ok{};
  }

  Status change_case(uint32_t id, Vec& out, const uint8_t* active) {
    const bool upper = p_.nodes[id].op == Op::upper;
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    out.valid = a.valid;
    begin_texts(out);
    for (size_t i = 0; i < n_; ++i) {
      if (on(a.valid, i) && on(active, i)) {
        const bool ok = upper ? append_upper(a.text[i], out.arena) : append_lower(a.text[i], out.arena);
        if (!ok) return row_error(id, i, "ICU could not map the case of this value");
      }
      end_text(out, i);
    }
    finish_texts(out);
    return Ok{};
  }

  Status char_length(uint32_t id, Vec& out, const uint8_t* active) {
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    int64_t* r = numbers(out);
    for (size_t i = 0; i < n_; ++i) r[i] = static_cast<int64_t>(utf8::code_point_count(a.text[i]));
    out.valid = a.valid;
    return Ok{};
  }

  Status substring_op(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_children(id, active); !s) return s;
    const Vec& value = child(id, 0);
    const Vec& start = child(id, 1);
    const Vec* length = node.args.size() == 3 ? &child(id, 2) : nullptr;
    const uint8_t* valid = both_valid(value.valid, start.valid, out.valid_buf);
    if (length) valid = both_valid(valid, length->valid, out.mask_buf);
    std::string_view* r = texts(out);
    for (size_t i = 0; i < n_; ++i) {
      r[i] = {};
      if (!on(valid, i) || !on(active, i)) continue;
      if (length && length->num[i] < 0)
        return row_error(id, i, "the length " + std::to_string(length->num[i]) + " is negative");
      r[i] = substring(value.text[i], start.num[i], length != nullptr, length ? length->num[i] : 0);
    }
    out.valid = valid;
    return Ok{};
  }

  Status trim(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_children(id, active); !s) return s;
    const Vec& value = child(id, 0);
    const Vec* characters = node.args.size() == 2 ? &child(id, 1) : nullptr;
    const auto side = static_cast<TrimSide>(node.param);
    const bool leading = side != TrimSide::trailing, trailing = side != TrimSide::leading;
    out.valid = characters ? both_valid(value.valid, characters->valid, out.valid_buf) : value.valid;
    std::string_view* r = texts(out);
    std::u32string set = U" ";
    std::string_view set_source = " ";
    for (size_t i = 0; i < n_; ++i) {
      r[i] = {};
      if (!on(out.valid, i) || !on(active, i)) continue;
      if (characters && characters->text[i] != set_source) {
        set_source = characters->text[i];
        set = code_points(set_source);
      }
      r[i] = trim_characters(value.text[i], set, leading, trailing);
    }
    return Ok{};
  }

  Status round(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    const int from = p_.nodes[node.args[0]].scale;
    const int digits = node.param;
    out.valid = a.valid;
    if (digits >= from) {
      out.num = a.num;
      return Ok{};
    }
    // Round to a unit of 10^(from - digits) at the input's scale, then
    // express the result at this node's scale.
    const Wide unit = pow10_wide(from - digits);
    const Wide back = digits < 0 ? pow10_wide(-digits) : Wide{1};
    int64_t* r = numbers(out);
    bad_.assign(n_, 0);
    for (size_t i = 0; i < n_; ++i) {
      const auto v = narrow(divide_rounded(a.num[i], unit) * back);
      bad_[i] = !v;
      r[i] = v.value_or(0);
    }
    if (auto i = first_flagged(bad_, out.valid, active)) return row_error(id, *i, "the result is out of range");
    return Ok{};
  }

  Status cast(uint32_t id, Vec& out, const uint8_t* active) {
    const Node& node = p_.nodes[id];
    if (Status s = eval_child(id, 0, active); !s) return s;
    const Vec& a = child(id, 0);
    const Node& from = p_.nodes[node.args[0]];
    out.valid = a.valid;
    const VType to = node.type;
    if (from.type == to && from.scale == node.scale && (to != VType::decimal || node.param == kMaxPrecision)) {
      out.num = a.num;
      out.text = a.text;
      return Ok{};
    }
    auto matters = [&](size_t i) { return on(a.valid, i) && on(active, i); };
    if (to == VType::text) {
      begin_texts(out);
      for (size_t i = 0; i < n_; ++i) {
        if (matters(i)) {
          switch (from.type) {
            case VType::text: out.arena += a.text[i]; break;
            case VType::integer:
            case VType::decimal: append_scaled_decimal(a.num[i], from.scale, out.arena); break;
            case VType::date: iso_format().format(static_cast<int32_t>(a.num[i]), out.arena); break;
            case VType::boolean: out.arena += a.num[i] ? "true" : "false"; break;
            case VType::null_type: break;
          }
        }
        end_text(out, i);
      }
      finish_texts(out);
      return Ok{};
    }
    int64_t* r = numbers(out);
    const std::string target = to == VType::decimal ? "DECIMAL(" + std::to_string(node.param) + "," +
                                                          std::to_string(node.scale) + ")"
                                                    : to == VType::integer ? "INTEGER"
                                                    : to == VType::date    ? "DATE"
                                                                           : "BOOLEAN";
    const Wide limit = to == VType::decimal ? pow10_wide(node.param) : Wide{0};
    auto fits = [&](int64_t v) { return to != VType::decimal || (v < limit && v > -limit); };
    if (from.type == VType::text) {
      uint8_t* valid = nullptr;
      for (size_t i = 0; i < n_; ++i) {
        r[i] = 0;
        if (!matters(i)) continue;
        const std::string_view s = a.text[i];
        auto bad = [&](const std::string& why) {
          return row_error(id, i, "cannot CAST '" + std::string(s) + "' to " + target + ": " + why);
        };
        switch (to) {
          case VType::integer:
          case VType::decimal: {
            const NumberRead read = read_scaled(s, node.scale, r[i], to == VType::decimal);
            if (read == NumberRead::malformed)
              return bad(to == VType::integer ? "not an integer" : "not a number");
            if (read == NumberRead::out_of_range || !fits(r[i])) return bad("out of range");
            break;
          }
          case VType::date: {
            const auto days = iso_format().parse(trim_ascii_spaces(s));
            if (!days) return bad("not a date in the form YYYY-MM-DD");
            r[i] = *days;
            break;
          }
          case VType::boolean: {
            const std::string_view word = trim_ascii_spaces(s);
            if (utf8::equals_ascii_ignoring_case(word, "TRUE")) r[i] = 1;
            else if (utf8::equals_ascii_ignoring_case(word, "FALSE")) r[i] = 0;
            else if (utf8::equals_ascii_ignoring_case(word, "UNKNOWN")) {
              if (!valid) {
                valid = own_validity(out);
                for (size_t j = 0; j < n_; ++j) valid[j] = on(a.valid, j);
              }
              valid[i] = 0;
            } else {
              return bad("expected TRUE, FALSE or UNKNOWN");
            }
            break;
          }
          default: break;
        }
      }
      return Ok{};
    }
    // Between numbers: rescale, rounding half away from zero.
    for (size_t i = 0; i < n_; ++i) {
      const auto v = rescale(a.num[i], from.scale, node.scale);
      r[i] = v.value_or(0);
      if (matters(i) && (!v || !fits(*v))) {
        std::string shown;
        append_scaled_decimal(a.num[i], from.scale, shown);
        return row_error(id, i, "cannot CAST " + shown + " to " + target + ": out of range");
      }
    }
    return Ok{};
  }

  const Program& p_;
  const Table& batch_;
  std::vector<Vec> vecs_;
  std::vector<Slice> slices_;
  Slice lines_;
  size_t n_ = 0;
  std::vector<uint8_t> bad_;
};

std::shared_ptr<ColumnChunk> typed_chunk(size_t rows) {
  auto chunk = std::make_shared<ColumnChunk>();
  chunk->numbers.reserve(rows);
  return chunk;
}

}  // namespace

}  // namespace tamis::expr

namespace tamis {

const std::string& Expression::text() const { return program_->text; }

Type Expression::type() const {
  switch (program_->nodes[program_->root].type) {
    case expr::VType::integer: return Type::integer;
    case expr::VType::decimal: return Type::decimal;
    case expr::VType::date: return Type::date;
    case expr::VType::boolean: return Type::boolean;
    default: return Type::text;
  }
}

int Expression::scale() const { return program_->nodes[program_->root].scale; }

const std::vector<size_t>& Expression::columns() const { return program_->columns; }

Status Expression::evaluate_condition(const Table& batch, std::vector<uint8_t>& is_true) const {
  is_true.resize(batch.row_count());
  expr::Evaluator evaluator(*program_, batch);
  return evaluator.run([&](size_t first, size_t rows, const expr::Vec& result, bool) {
    uint8_t* out = is_true.data() + first;
    if (result.valid) {
      for (size_t i = 0; i < rows; ++i) out[i] = result.valid[i] & static_cast<uint8_t>(result.num[i] != 0);
    } else {
      for (size_t i = 0; i < rows; ++i) out[i] = static_cast<uint8_t>(result.num[i] != 0);
    }
  });
}

Result<ColumnPtr> Expression::evaluate(const Table& batch) const {
  const Type out_type = type();
  auto column = std::make_shared<Column>(out_type, out_type == Type::decimal ? scale() : 0);
  TextChunkBuilder text_builder;
  std::shared_ptr<ColumnChunk> typed;
  size_t nulls = 0;
  std::vector<uint8_t> present;  // validity of the chunk being built, one byte per row
  auto close_chunk = [&] {
    if (out_type == Type::text) {
      column->append_chunk(text_builder.finish());
      return;
    }
    typed->rows = typed->numbers.size();
    if (nulls > 0) {
      typed->validity.assign((typed->rows + 63) / 64, 0);
      for (size_t i = 0; i < typed->rows; ++i)
        typed->validity[i >> 6] |= static_cast<uint64_t>(present[i]) << (i & 63);
    }
    column->append_chunk(std::move(typed));
    typed = nullptr;
    nulls = 0;
    present.clear();
  };
  expr::Evaluator evaluator(*program_, batch);
  Status s = evaluator.run([&](size_t, size_t rows, const expr::Vec& result, bool ends_chunk) {
    if (out_type == Type::text) {
      for (size_t i = 0; i < rows; ++i) {
        if (result.valid && !result.valid[i]) text_builder.append_null();
        else text_builder.append(result.text[i]);
      }
    } else {
      if (!typed) typed = expr::typed_chunk(rows);
      typed->numbers.insert(typed->numbers.end(), result.num, result.num + rows);
      for (size_t i = 0; i < rows; ++i) {
        const uint8_t v = result.valid ? result.valid[i] : 1;
        present.push_back(v);
        nulls += 1 - v;
      }
    }
    if (ends_chunk) close_chunk();
  });
  if (!s) return s.take_error();
  return ColumnPtr(std::move(column));
}

}  // namespace tamis
