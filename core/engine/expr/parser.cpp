// Recursive-descent parser for the grammar in expr.hpp. Nodes are typed as
// they are built, so a type error points at the operator or operand that
// causes it. The first error stops the parse; later checks see kFailed.
#include <algorithm>
#include <array>
#include <limits>
#include <optional>

#include "dates.hpp"
#include "expr/expr.hpp"
#include "expr/lexer.hpp"
#include "expr/numeric.hpp"
#include "expr/program.hpp"
#include "utf8.hpp"

namespace tamis::expr {

namespace {

constexpr uint32_t kFailed = std::numeric_limits<uint32_t>::max();

constexpr std::array<std::string_view, 24> kReserved = {
    "AND", "AS",  "BETWEEN", "BOTH", "CASE", "CAST",    "ELSE", "END",  "ESCAPE", "FALSE",   "FOR",     "FROM",
    "IN",  "IS",  "LEADING", "LIKE", "NOT",  "NULL",    "OR",   "THEN", "TRAILING", "TRUE", "UNKNOWN", "WHEN"};

// 'value' (built by appending: GCC 12's -Wrestrict misfires on "'" + s + "'").
std::string quoted(std::string_view value) {
  std::string out;
  out.reserve(value.size() + 2);
  out += '\'';
  out += value;
  out += '\'';
  return out;
}

bool is_reserved(std::string_view word) {
  return std::any_of(kReserved.begin(), kReserved.end(), [&](std::string_view r) { return utf8::equals_ascii_ignoring_case(word, r); });
}

std::string type_words(VType type, int scale) {
  switch (type) {
    case VType::null_type: return "NULL";
    case VType::text: return "text";
    case VType::integer: return "integer";
    case VType::decimal: return "decimal (scale " + std::to_string(scale) + ")";
    case VType::date: return "date";
    case VType::boolean: return "boolean";
  }
  return "?";
}

VType vtype_of(Type type) {
  switch (type) {
    case Type::text: return VType::text;
    case Type::integer: return VType::integer;
    case Type::decimal: return VType::decimal;
    case Type::date: return VType::date;
    case Type::boolean: return VType::boolean;
  }
  return VType::text;
}

bool is_case_result(const Node& n, size_t k) {
  const size_t first = n.simple_case ? 1 : 0;
  if (k < first) return false;
  if (n.has_else && k == n.args.size() - 1) return true;
  return (k - first) % 2 == 1;
}

// Gives a bare NULL (and the NULL results of CASE, COALESCE, NULLIF) a type.
void settle_node(Program& p, uint32_t id, VType type, int scale) {
  Node& n = p.nodes[id];
  if (n.type != VType::null_type) return;
  n.type = type;
  n.scale = type == VType::decimal ? scale : 0;
  if (n.op != Op::case_when && n.op != Op::coalesce && n.op != Op::nullif) return;
  const std::vector<uint32_t> args = n.args;
  const Node copy = n;
  for (size_t k = 0; k < args.size(); ++k)
    if (copy.op != Op::case_when || is_case_result(copy, k)) settle_node(p, args[k], type, scale);
}

class Parser {
 public:
  Parser(Program& program, std::vector<Token> tokens) : p_(program), tokens_(std::move(tokens)) {}

  Result<uint32_t> parse_all() {
    const uint32_t root = parse_or();
    if (root != kFailed && !at_end()) {
      if (is_comparison(peek()) && is_comparison_node(p_.nodes[root]))
        fail_at(peek(), "comparisons cannot be chained; write a < b AND b < c");
      else
        expected("an operator or the end of the expression");
    }
    if (error_) return std::move(*error_);
    return root;
  }

 private:
  // ---- tokens ----
  const Token& peek(size_t ahead = 0) const { return tokens_[std::min(at_ + ahead, tokens_.size() - 1)]; }
  const Token& take() { return tokens_[std::min(at_++, tokens_.size() - 1)]; }
  bool at_end() const { return peek().kind == TokenKind::end; }
  bool is_word(const Token& t, std::string_view upper) const {
    return t.kind == TokenKind::word && utf8::equals_ascii_ignoring_case(t.value, upper);
  }
  bool at_word(std::string_view upper, size_t ahead = 0) const { return is_word(peek(ahead), upper); }
  bool at_symbol(std::string_view s, size_t ahead = 0) const {
    return peek(ahead).kind == TokenKind::symbol && peek(ahead).value == s;
  }
  static bool is_comparison(const Token& t) {
    static constexpr std::string_view kOps[] = {"=", "<>", "!=", "<", "<=", ">", ">="};
    return t.kind == TokenKind::symbol && std::find(std::begin(kOps), std::end(kOps), t.value) != std::end(kOps);
  }
  static bool is_comparison_node(const Node& n) { return n.op >= Op::equal && n.op <= Op::greater_equal; }

  std::string shown(const Token& t) const {
    if (t.kind == TokenKind::end) return "the end of the expression";
    return quoted(std::string_view(p_.text).substr(t.begin, t.end - t.begin));
  }

  // ---- errors ----
  uint32_t fail_at_offset(size_t offset, const std::string& message) {
    if (!error_) error_ = usage_error(at_character(p_.text, offset) + message);
    return kFailed;
  }
  uint32_t fail_at(const Token& t, const std::string& message) { return fail_at_offset(t.begin, message); }
  uint32_t fail_node(uint32_t id, const std::string& message) { return fail_at_offset(p_.nodes[id].begin, message); }
  uint32_t expected(const std::string& what) { return fail_at(peek(), "expected " + what + ", found " + shown(peek())); }
  bool expect_word(std::string_view upper) {
    if (at_word(upper)) {
      take();
      return true;
    }
    expected(std::string(upper));
    return false;
  }
  bool expect_symbol(std::string_view s) {
    if (at_symbol(s)) {
      take();
      return true;
    }
    expected(quoted(s));
    return false;
  }

  // ---- nodes ----
  Node& node(uint32_t id) { return p_.nodes[id]; }
  // Deeply nested input must be an error, not a stack overflow in the
  // parser or in the recursive passes over the tree (the expression fuzzer
  // found both): the grammar's recursion and the tree's depth are capped.
  static constexpr size_t kMaxDepth = 100;
  uint32_t too_deep(uint32_t begin) {
    return fail_at_offset(begin, "the expression nests too deeply (more than " + std::to_string(kMaxDepth) +
                                     " levels); split it into several steps");
  }
  struct Nesting {
    explicit Nesting(size_t& depth) : depth_(++depth) {}
    ~Nesting() { --depth_; }
    size_t& depth_;
  };

  uint32_t add(Node n) {
    size_t depth = 1;
    for (const uint32_t a : n.args) depth = std::max<size_t>(depth, tree_depth_[a] + 1);
    if (depth > kMaxDepth) return too_deep(n.begin);
    p_.nodes.push_back(std::move(n));
    tree_depth_.push_back(depth);
    return static_cast<uint32_t>(p_.nodes.size() - 1);
  }
  Node make(Op op, uint32_t begin, std::vector<uint32_t> args = {}) {
    Node n;
    n.op = op;
    n.begin = begin;
    n.end = begin;
    for (uint32_t a : args) n.end = std::max(n.end, p_.nodes[a].end);
    n.args = std::move(args);
    return n;
  }
  uint32_t finish_at(uint32_t id, const Token& last) {
    node(id).end = std::max(node(id).end, last.end);
    return id;
  }
  std::string what(uint32_t id) { return type_words(node(id).type, node(id).scale); }

  void settle(uint32_t id, VType type, int scale) { settle_node(p_, id, type, scale); }

  // A numeric operand brought to (type, scale); the conversion only grows.
  uint32_t widen(uint32_t id, VType type, int scale) {
    settle(id, type, scale);
    if (node(id).type == type && node(id).scale == scale) return id;
    Node n = make(Op::rescale, node(id).begin, {id});
    n.type = type;
    n.scale = scale;
    return add(std::move(n));
  }

  bool require(uint32_t id, VType type, const std::string& context) {
    settle(id, type, 0);
    if (node(id).type == type) return true;
    fail_node(id, context + " needs " + type_words(type, 0) + ", found " + what(id));
    return false;
  }
  bool require_numeric(uint32_t id, const std::string& context) {
    settle(id, VType::integer, 0);
    if (is_numeric(node(id).type)) return true;
    fail_node(id, context + " needs a number, found " + what(id) +
                      (node(id).type == VType::text ? " (CAST it to INTEGER or DECIMAL(p,s))" : ""));
    return false;
  }

  // Makes two operands comparable; false (with the error set) when not.
  bool comparable(uint32_t left, uint32_t right, const Token& op) {
    if (node(left).type == VType::null_type && node(right).type == VType::null_type) {
      settle(left, VType::text, 0);
      settle(right, VType::text, 0);
    }
    settle(left, node(right).type, node(right).scale);
    settle(right, node(left).type, node(left).scale);
    const VType a = node(left).type, b = node(right).type;
    if (a == b || (is_numeric(a) && is_numeric(b))) return true;
    if (a == VType::date && read_as_date(right)) return true;
    if (b == VType::date && read_as_date(left)) return true;
    if (!error_)
      fail_at(op, "cannot compare " + what(left) + " with " + what(right) +
                      "; CAST one side to the type of the other");
    return false;
  }
  // A text literal next to a date reads as a DATE literal.
  bool read_as_date(uint32_t id) {
    Node& n = node(id);
    if (n.op != Op::literal || n.type != VType::text) return false;
    const auto days = iso_date_format().parse(n.text);
    if (!days) {
      fail_node(id, "'" + n.text + "' is not a date (expected 'YYYY-MM-DD')");
      return false;
    }
    n.type = VType::date;
    n.number = *days;
    n.text.clear();
    return true;
  }
  static const DateFormat& iso_date_format() {
    static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
    return iso;
  }

  // One type for the results of CASE or the arguments of COALESCE.
  bool unify(std::vector<uint32_t*> ids, const std::string& context) {
    VType type = VType::null_type;
    int scale = 0;
    uint32_t first = kFailed;
    for (uint32_t* id : ids) {
      const Node& n = node(*id);
      if (n.type == VType::null_type) continue;
      if (type == VType::null_type) {
        type = n.type, scale = n.scale, first = *id;
      } else if (type == n.type) {
        scale = std::max(scale, n.scale);
      } else if (is_numeric(type) && is_numeric(n.type)) {
        type = VType::decimal, scale = std::max(scale, n.scale);
      } else {
        fail_node(*id, context + " must all have one type: this is " + what(*id) + ", an earlier one is " +
                           what(first));
        return false;
      }
    }
    if (type == VType::null_type) return true;
    for (uint32_t* id : ids) *id = is_numeric(type) ? widen(*id, type, scale) : (settle(*id, type, scale), *id);
    return true;
  }

  // ---- grammar ----
  uint32_t parse_or() {
    if (nesting_ >= kMaxDepth) return too_deep(peek().begin);
    const Nesting level(nesting_);
    uint32_t left = parse_and();
    while (left != kFailed && at_word("OR")) {
      take();
      const uint32_t right = parse_and();
      if (right == kFailed) return kFailed;
      left = logical(Op::logical_or, left, right, "OR");
    }
    return left;
  }

  uint32_t parse_and() {
    uint32_t left = parse_not();
    while (left != kFailed && at_word("AND")) {
      take();
      const uint32_t right = parse_not();
      if (right == kFailed) return kFailed;
      left = logical(Op::logical_and, left, right, "AND");
    }
    return left;
  }

  uint32_t logical(Op op, uint32_t left, uint32_t right, const std::string& name) {
    if (!require(left, VType::boolean, name) || !require(right, VType::boolean, name)) return kFailed;
    Node n = make(op, node(left).begin, {left, right});
    n.type = VType::boolean;
    return add(std::move(n));
  }

  uint32_t parse_not() {
    if (!at_word("NOT")) return parse_is();
    if (nesting_ >= kMaxDepth) return too_deep(peek().begin);
    const Nesting level(nesting_);
    const Token op = take();
    const uint32_t operand = parse_not();
    if (operand == kFailed || !require(operand, VType::boolean, "NOT")) return kFailed;
    Node n = make(Op::logical_not, op.begin, {operand});
    n.type = VType::boolean;
    return add(std::move(n));
  }

  uint32_t parse_is() {
    uint32_t operand = parse_predicate();
    while (operand != kFailed && at_word("IS")) {
      take();
      const bool negated = at_word("NOT");
      if (negated) take();
      const Token& test = peek();
      Op op;
      if (is_word(test, "NULL") || is_word(test, "UNKNOWN")) op = Op::is_null;
      else if (is_word(test, "TRUE")) op = Op::is_true;
      else if (is_word(test, "FALSE")) op = Op::is_false;
      else return expected("NULL, TRUE, FALSE or UNKNOWN");
      if (op != Op::is_null || is_word(test, "UNKNOWN")) {
        if (!require(operand, VType::boolean, "IS " + test.value)) return kFailed;
      } else {
        settle(operand, VType::text, 0);
      }
      Node n = make(op, node(operand).begin, {operand});
      n.negated = negated;
      n.type = VType::boolean;
      operand = finish_at(add(std::move(n)), take());
    }
    return operand;
  }

  uint32_t parse_predicate() {
    const uint32_t left = parse_concat();
    if (left == kFailed) return kFailed;
    if (is_comparison(peek())) {
      const Token op = take();
      const uint32_t right = parse_concat();
      if (right == kFailed || !comparable(left, right, op)) return kFailed;
      static const std::pair<std::string_view, Op> kOps[] = {
          {"=", Op::equal}, {"<>", Op::not_equal}, {"!=", Op::not_equal}, {"<", Op::less},
          {"<=", Op::less_equal}, {">", Op::greater}, {">=", Op::greater_equal}};
      Op kind = Op::equal;
      for (const auto& [symbol, o] : kOps)
        if (symbol == op.value) kind = o;
      Node n = make(kind, node(left).begin, {left, right});
      n.type = VType::boolean;
      return add(std::move(n));
    }
    const bool negated = at_word("NOT") && (at_word("BETWEEN", 1) || at_word("IN", 1) || at_word("LIKE", 1));
    if (negated) take();
    if (at_word("BETWEEN")) return parse_between(left, negated);
    if (at_word("IN")) return parse_in(left, negated);
    if (at_word("LIKE")) return parse_like(left, negated);
    return left;
  }

  uint32_t parse_between(uint32_t value, bool negated) {
    const Token op = take();
    const uint32_t low = parse_concat();
    if (low == kFailed || !expect_word("AND")) return kFailed;
    const uint32_t high = parse_concat();
    if (high == kFailed || !comparable(value, low, op) || !comparable(value, high, op)) return kFailed;
    Node n = make(Op::between, node(value).begin, {value, low, high});
    n.negated = negated;
    n.type = VType::boolean;
    return add(std::move(n));
  }

  uint32_t parse_in(uint32_t value, bool negated) {
    const Token op = take();
    if (!expect_symbol("(")) return kFailed;
    std::vector<uint32_t> args{value};
    do {
      const uint32_t item = parse_or();
      if (item == kFailed) return kFailed;
      args.push_back(item);
    } while (at_symbol(",") && (take(), true));
    if (!expect_symbol(")")) return kFailed;
    for (size_t k = 1; k < args.size(); ++k)
      if (!comparable(value, args[k], op)) return kFailed;
    Node n = make(Op::in_list, node(value).begin, args);
    n.negated = negated;
    n.type = VType::boolean;
    return finish_at(add(std::move(n)), tokens_[at_ - 1]);
  }

  uint32_t parse_like(uint32_t value, bool negated) {
    take();
    const uint32_t pattern = parse_concat();
    if (pattern == kFailed) return kFailed;
    std::vector<uint32_t> args{value, pattern};
    if (at_word("ESCAPE")) {
      take();
      const uint32_t escape = parse_concat();
      if (escape == kFailed) return kFailed;
      args.push_back(escape);
    }
    if (!require(value, VType::text, "LIKE") || !require(pattern, VType::text, "a LIKE pattern")) return kFailed;
    if (args.size() == 3 && !require(args[2], VType::text, "ESCAPE")) return kFailed;
    Node n = make(Op::like, node(value).begin, args);
    n.negated = negated;
    n.type = VType::boolean;
    // A literal pattern (and escape) is checked and compiled once, here.
    const Node& p = node(pattern);
    const bool literal_escape = args.size() == 2 || node(args[2]).op == Op::literal;
    if (p.op == Op::literal && !p.null_literal && literal_escape) {
      std::optional<char32_t> escape;
      if (args.size() == 3) {
        const Node& e = node(args[2]);
        if (!e.null_literal) {
          if (utf8::code_point_count(e.text) != 1)
            return fail_node(args[2], "ESCAPE needs exactly one character, found '" + e.text + "'");
          size_t i = 0;
          escape = utf8::next(e.text, i);
        }
      }
      if (args.size() == 2 || !node(args[2]).null_literal) {
        std::string problem;
        auto compiled = LikePattern::compile(p.text, escape, problem);
        if (!compiled) return fail_node(pattern, "invalid LIKE pattern: " + problem);
        n.pattern = std::make_shared<const LikePattern>(std::move(*compiled));
      }
    }
    return add(std::move(n));
  }

  uint32_t parse_concat() {
    uint32_t left = parse_additive();
    while (left != kFailed && at_symbol("||")) {
      take();
      const uint32_t right = parse_additive();
      if (right == kFailed) return kFailed;
      if (!require(left, VType::text, "|| (joining texts)") || !require(right, VType::text, "|| (joining texts)"))
        return kFailed;
      Node n = make(Op::concat, node(left).begin, {left, right});
      n.type = VType::text;
      left = add(std::move(n));
    }
    return left;
  }

  uint32_t parse_additive() {
    uint32_t left = parse_multiplicative();
    while (left != kFailed && (at_symbol("+") || at_symbol("-"))) {
      const Token op = take();
      const uint32_t right = parse_multiplicative();
      if (right == kFailed) return kFailed;
      left = arithmetic(op.value == "+" ? Op::add : Op::subtract, left, right, op);
    }
    return left;
  }

  uint32_t parse_multiplicative() {
    uint32_t left = parse_unary();
    while (left != kFailed && (at_symbol("*") || at_symbol("/"))) {
      const Token op = take();
      const uint32_t right = parse_unary();
      if (right == kFailed) return kFailed;
      left = arithmetic(op.value == "*" ? Op::multiply : Op::divide, left, right, op);
    }
    return left;
  }

  uint32_t arithmetic(Op op, uint32_t left, uint32_t right, const Token& symbol) {
    const std::string context = "'" + symbol.value + "'";
    if (node(left).type == VType::null_type) settle(left, node(right).type, node(right).scale);
    if (node(right).type == VType::null_type) settle(right, node(left).type, node(left).scale);
    if (!require_numeric(left, context) || !require_numeric(right, context)) return kFailed;
    const VType a = node(left).type, b = node(right).type;
    const int sa = node(left).scale, sb = node(right).scale;
    Node n = make(op, node(left).begin);
    if (op == Op::add || op == Op::subtract) {
      n.type = a == VType::integer && b == VType::integer ? VType::integer : VType::decimal;
      n.scale = std::max(sa, sb);
      left = widen(left, n.type, n.scale);
      right = widen(right, n.type, n.scale);
    } else if (op == Op::multiply) {
      n.type = a == VType::integer && b == VType::integer ? VType::integer : VType::decimal;
      n.scale = std::min(sa + sb, kMaxScale);
    } else {
      n.type = VType::decimal;
      n.scale = std::max({6, sa, sb});
    }
    n.args = {left, right};
    n.end = node(right).end;
    return add(std::move(n));
  }

  uint32_t parse_unary() {
    if (!at_symbol("-") && !at_symbol("+")) return parse_primary();
    if (nesting_ >= kMaxDepth) return too_deep(peek().begin);
    const Nesting level(nesting_);
    const Token op = take();
    const uint32_t operand = parse_unary();
    if (operand == kFailed || !require_numeric(operand, "unary '" + op.value + "'")) return kFailed;
    if (op.value == "+") {
      node(operand).begin = op.begin;
      return operand;
    }
    Node& o = node(operand);
    if (o.op == Op::literal && !o.null_literal && o.number != std::numeric_limits<int64_t>::min()) {
      o.number = -o.number;
      o.begin = op.begin;
      return operand;
    }
    Node n = make(Op::negate, op.begin, {operand});
    n.type = o.type;
    n.scale = o.scale;
    return add(std::move(n));
  }

  uint32_t literal(const Token& t, VType type) {
    Node n = make(Op::literal, t.begin);
    n.end = t.end;
    n.type = type;
    return add(std::move(n));
  }

  uint32_t parse_primary() {
    const Token& t = peek();
    switch (t.kind) {
      case TokenKind::end: return expected("a value");
      case TokenKind::integer:
      case TokenKind::decimal: return parse_number(take());
      case TokenKind::text: {
        const uint32_t id = literal(take(), VType::text);
        node(id).text = t.value;
        return id;
      }
      case TokenKind::quoted_name: return column(take());
      case TokenKind::symbol:
        if (t.value != "(") return expected("a value");
        {
          const Token open = take();
          const uint32_t inner = parse_or();
          if (inner == kFailed || !expect_symbol(")")) return kFailed;
          node(inner).begin = std::min(node(inner).begin, open.begin);
          return finish_at(inner, tokens_[at_ - 1]);
        }
      case TokenKind::word: break;
    }
    if (at_word("NULL")) {
      const uint32_t id = literal(take(), VType::null_type);
      node(id).null_literal = true;
      return id;
    }
    if (at_word("TRUE") || at_word("FALSE")) {
      const uint32_t id = literal(peek(), VType::boolean);
      node(id).number = at_word("TRUE") ? 1 : 0;
      take();
      return id;
    }
    if (at_word("CASE")) return parse_case();
    if (at_word("CAST")) return parse_cast();
    if (at_word("DATE") && peek(1).kind == TokenKind::text) {
      const Token date = take();
      const Token& value = take();
      const auto days = iso_date_format().parse(value.value);
      if (!days) return fail_at(value, "'" + value.value + "' is not a real date in the form 'YYYY-MM-DD'");
      const uint32_t id = literal(date, VType::date);
      node(id).number = *days;
      node(id).end = value.end;
      return id;
    }
    if (at_symbol("(", 1) && !is_reserved(t.value)) return parse_function();
    if (is_reserved(t.value)) {
      const bool is_column = std::any_of(p_.schema.begin(), p_.schema.end(),
                                         [&](const ColumnSchema& c) { return c.name == t.value; });
      return expected("a value" + (is_column ? " (write \"" + t.value + "\" for the column of that name)"
                                             : std::string()));
    }
    return column(take());
  }

  uint32_t parse_number(const Token& t) {
    const size_t point = t.value.find('.');
    const int scale = point == std::string::npos ? 0 : static_cast<int>(t.value.size() - point - 1);
    if (scale > kMaxScale)
      return fail_at(t, "a decimal literal can have at most " + std::to_string(kMaxScale) + " digits after the point");
    int64_t value = 0;
    if (read_scaled(t.value, scale, value) != NumberRead::ok)
      return fail_at(t, "the number " + t.value + " is out of range (64-bit " +
                            std::string(scale ? "scaled decimal" : "integer") + ")");
    const uint32_t id = literal(t, scale || point != std::string::npos ? VType::decimal : VType::integer);
    node(id).number = value;
    node(id).scale = scale;
    return id;
  }

  uint32_t column(const Token& t) {
    for (size_t c = 0; c < p_.schema.size(); ++c) {
      if (p_.schema[c].name != t.value) continue;
      Node n = make(Op::column, t.begin);
      n.end = t.end;
      n.number = static_cast<int64_t>(c);
      n.type = vtype_of(p_.schema[c].type);
      n.scale = p_.schema[c].type == Type::decimal ? p_.schema[c].scale : 0;
      if (std::find(p_.columns.begin(), p_.columns.end(), c) == p_.columns.end()) p_.columns.push_back(c);
      return add(std::move(n));
    }
    std::string message = "unknown column '" + t.value + "'";
    for (const ColumnSchema& c : p_.schema) {
      const bool same_ignoring_case =
          c.name.size() == t.value.size() &&
          std::equal(c.name.begin(), c.name.end(), t.value.begin(), [](char a, char b) {
            auto up = [](char x) { return (x >= 'a' && x <= 'z') ? static_cast<char>(x - 'a' + 'A') : x; };
            return up(a) == up(b);
          });
      if (same_ignoring_case) return fail_at(t, message + "; did you mean '" + c.name + "'? Names are case-sensitive");
    }
    constexpr size_t kListed = 30;
    message += p_.schema.empty() ? " (the table has no columns)" : " (the columns are: ";
    for (size_t c = 0; c < p_.schema.size() && c < kListed; ++c) message += (c ? ", " : "") + p_.schema[c].name;
    if (p_.schema.size() > kListed) message += " and " + std::to_string(p_.schema.size() - kListed) + " more";
    if (!p_.schema.empty()) message += ")";
    return fail_at(t, message);
  }

  uint32_t parse_case() {
    const Token start = take();
    Node n = make(Op::case_when, start.begin);
    std::vector<uint32_t> args;
    uint32_t operand = kFailed;
    if (at_word("END") || at_word("ELSE") || at_word("THEN")) return expected("WHEN");
    if (!at_word("WHEN")) {
      operand = parse_or();
      if (operand == kFailed) return kFailed;
      n.simple_case = true;
      args.push_back(operand);
    }
    if (!at_word("WHEN")) return expected("WHEN");
    while (at_word("WHEN")) {
      const Token when = take();
      const uint32_t condition = parse_or();
      if (condition == kFailed) return kFailed;
      if (n.simple_case ? !comparable(operand, condition, when) : !require(condition, VType::boolean, "WHEN"))
        return kFailed;
      if (!expect_word("THEN")) return kFailed;
      const uint32_t result = parse_or();
      if (result == kFailed) return kFailed;
      args.push_back(condition);
      args.push_back(result);
    }
    if (at_word("ELSE")) {
      take();
      const uint32_t otherwise = parse_or();
      if (otherwise == kFailed) return kFailed;
      args.push_back(otherwise);
      n.has_else = true;
    }
    if (!expect_word("END")) return kFailed;
    std::vector<uint32_t*> results;
    const size_t first = n.simple_case ? 1 : 0;
    for (size_t k = first + 1; k < args.size(); k += 2) results.push_back(&args[k]);
    if (n.has_else) results.push_back(&args.back());
    if (!unify(results, "the results of CASE")) return kFailed;
    n.type = node(*results.front()).type;
    n.scale = node(*results.front()).scale;
    n.args = std::move(args);
    n.end = tokens_[at_ - 1].end;
    return add(std::move(n));
  }

  uint32_t parse_cast() {
    const Token start = take();
    if (!expect_symbol("(")) return kFailed;
    const uint32_t value = parse_or();
    if (value == kFailed || !expect_word("AS")) return kFailed;
    Node n = make(Op::cast, start.begin, {value});
    const Token& type_token = peek();
    if (type_token.kind != TokenKind::word) return expected("a type name");
    const std::string& name = type_token.value;
    if (utf8::equals_ascii_ignoring_case(name, "TEXT") || utf8::equals_ascii_ignoring_case(name, "VARCHAR")) {
      n.type = VType::text;
      take();
      if (at_symbol("("))
        return fail_at(peek(), "a length is not supported here: " + name + " values have no length limit");
    } else if (utf8::equals_ascii_ignoring_case(name, "INTEGER") || utf8::equals_ascii_ignoring_case(name, "INT") || utf8::equals_ascii_ignoring_case(name, "BIGINT")) {
      n.type = VType::integer;
      take();
    } else if (utf8::equals_ascii_ignoring_case(name, "DECIMAL") || utf8::equals_ascii_ignoring_case(name, "NUMERIC")) {
      take();
      if (!at_symbol("("))
        return fail_at(peek(), "expected (precision, scale) after " + name + ", found " + shown(peek()) +
                                   ": the scale must be known, e.g. " + name + "(12,2)");
      take();
      const auto precision = small_integer("a precision", 1, kMaxPrecision);
      if (!precision) return kFailed;
      int scale = 0;
      if (at_symbol(",")) {
        take();
        const auto s = small_integer("a scale", 0, *precision);
        if (!s) return kFailed;
        scale = *s;
      }
      if (!expect_symbol(")")) return kFailed;
      n.type = VType::decimal;
      n.scale = scale;
      n.param = *precision;
    } else if (utf8::equals_ascii_ignoring_case(name, "DATE")) {
      n.type = VType::date;
      take();
    } else if (utf8::equals_ascii_ignoring_case(name, "BOOLEAN")) {
      n.type = VType::boolean;
      take();
    } else {
      return expected("a type (TEXT, VARCHAR, INTEGER, BIGINT, DECIMAL(p,s), NUMERIC(p,s), DATE or BOOLEAN)");
    }
    if (!expect_symbol(")")) return kFailed;
    n.end = tokens_[at_ - 1].end;
    settle(value, n.type, n.scale);
    const VType from = node(value).type, to = n.type;
    const bool allowed = from == to || from == VType::text || to == VType::text ||
                         (is_numeric(from) && is_numeric(to));
    if (!allowed)
      return fail_node(value, "cannot CAST " + what(value) + " to " + type_words(to, n.scale));
    return add(std::move(n));
  }

  std::optional<int> small_integer(const std::string& what_it_is, int low, int high) {
    const Token& t = peek();
    if (t.kind != TokenKind::integer) {
      expected(what_it_is);
      return std::nullopt;
    }
    take();
    const int value = t.value.size() > 3 ? 1000 : std::stoi(t.value);
    if (value < low || value > high) {
      fail_at(t, what_it_is + " from " + std::to_string(low) + " to " + std::to_string(high) + " is needed, found " +
                     t.value);
      return std::nullopt;
    }
    return value;
  }

  // Arguments separated by commas up to the closing parenthesis.
  bool arguments(std::vector<uint32_t>& args) {
    if (at_symbol(")")) return true;
    do {
      const uint32_t a = parse_or();
      if (a == kFailed) return false;
      args.push_back(a);
    } while (at_symbol(",") && (take(), true));
    return true;
  }

  uint32_t parse_function() {
    const Token name = take();
    take();  // (
    std::string upper = name.value;
    for (char& c : upper)
      if (c >= 'a' && c <= 'z') c = static_cast<char>(c - 'a' + 'A');
    if (upper == "TRIM") return parse_trim(name);
    if (upper == "SUBSTRING") return parse_substring(name);
    static const std::pair<std::string_view, Op> kFunctions[] = {
        {"COALESCE", Op::coalesce}, {"NULLIF", Op::nullif},           {"UPPER", Op::upper},
        {"LOWER", Op::lower},       {"CHAR_LENGTH", Op::char_length}, {"CHARACTER_LENGTH", Op::char_length},
        {"ABS", Op::abs},           {"ROUND", Op::round}};
    std::optional<Op> op;
    for (const auto& [n, o] : kFunctions)
      if (n == upper) op = o;
    if (!op)
      return fail_at(name, "unknown function '" + name.value +
                               "' (the functions are ABS, CAST, CHAR_LENGTH, COALESCE, LOWER, NULLIF, ROUND, "
                               "SUBSTRING, TRIM, UPPER)");
    std::vector<uint32_t> args;
    if (!arguments(args) || !expect_symbol(")")) return kFailed;
    const Token& close = tokens_[at_ - 1];
    auto count = [&](size_t low, size_t high, const std::string& words) {
      if (args.size() >= low && args.size() <= high) return true;
      fail_at(name, upper + " takes " + words + ", found " + std::to_string(args.size()));
      return false;
    };
    Node n = make(*op, name.begin);
    n.end = close.end;
    switch (*op) {
      case Op::coalesce: {
        if (!count(1, SIZE_MAX, "at least one argument")) return kFailed;
        std::vector<uint32_t*> all;
        for (uint32_t& a : args) all.push_back(&a);
        if (!unify(all, "the arguments of COALESCE")) return kFailed;
        n.type = node(args[0]).type;
        n.scale = node(args[0]).scale;
        break;
      }
      case Op::nullif:
        if (!count(2, 2, "two arguments") || !comparable(args[0], args[1], name)) return kFailed;
        n.type = node(args[0]).type;
        n.scale = node(args[0]).scale;
        break;
      case Op::upper:
      case Op::lower:
        if (!count(1, 1, "one argument") || !require(args[0], VType::text, upper)) return kFailed;
        n.type = VType::text;
        break;
      case Op::char_length:
        if (!count(1, 1, "one argument") || !require(args[0], VType::text, upper)) return kFailed;
        n.type = VType::integer;
        break;
      case Op::abs:
        if (!count(1, 1, "one argument") || !require_numeric(args[0], upper)) return kFailed;
        n.type = node(args[0]).type;
        n.scale = node(args[0]).scale;
        break;
      case Op::round: {
        if (!count(1, 2, "one or two arguments") || !require_numeric(args[0], upper)) return kFailed;
        int digits = 0;
        if (args.size() == 2) {
          const Node& d = node(args[1]);
          if (d.op != Op::literal || d.type != VType::integer || d.number < -kMaxScale || d.number > kMaxScale)
            return fail_node(args[1], "ROUND's digits must be an integer literal from -18 to 18");
          digits = static_cast<int>(d.number);
          args.pop_back();
        }
        n.param = digits;
        n.type = node(args[0]).type;
        n.scale = std::max(0, std::min(digits, node(args[0]).scale));
        break;
      }
      default: break;
    }
    n.args = std::move(args);
    return add(std::move(n));
  }

  // TRIM([[BOTH|LEADING|TRAILING] [characters] FROM] value)
  uint32_t parse_trim(const Token& name) {
    Node n = make(Op::trim, name.begin);
    n.type = VType::text;
    TrimSide side = TrimSide::both;
    bool has_side = true;
    if (at_word("BOTH")) side = TrimSide::both;
    else if (at_word("LEADING")) side = TrimSide::leading;
    else if (at_word("TRAILING")) side = TrimSide::trailing;
    else has_side = false;
    if (has_side) take();
    n.param = static_cast<int>(side);
    uint32_t characters = kFailed;
    uint32_t value = kFailed;
    if (has_side && at_word("FROM")) {
      take();
      value = parse_or();
    } else {
      const uint32_t first = parse_or();
      if (first == kFailed) return kFailed;
      if (at_word("FROM")) {
        take();
        characters = first;
        value = parse_or();
      } else if (has_side) {
        return expected("FROM");
      } else {
        value = first;
      }
    }
    if (value == kFailed || !expect_symbol(")")) return kFailed;
    if (!require(value, VType::text, "TRIM")) return kFailed;
    n.args = {value};
    if (characters != kFailed) {
      if (!require(characters, VType::text, "TRIM's characters")) return kFailed;
      n.args.push_back(characters);
    }
    n.end = tokens_[at_ - 1].end;
    return add(std::move(n));
  }

  // SUBSTRING(value FROM start [FOR length]) or SUBSTRING(value, start [, length])
  uint32_t parse_substring(const Token& name) {
    Node n = make(Op::substring, name.begin);
    n.type = VType::text;
    const uint32_t value = parse_or();
    if (value == kFailed) return kFailed;
    std::vector<uint32_t> args{value};
    if (at_word("FROM")) {
      take();
      const uint32_t start = parse_or();
      if (start == kFailed) return kFailed;
      args.push_back(start);
      if (at_word("FOR")) {
        take();
        const uint32_t length = parse_or();
        if (length == kFailed) return kFailed;
        args.push_back(length);
      }
    } else if (at_symbol(",")) {
      take();
      if (!arguments(args)) return kFailed;
      // Found by the expression fuzzer: "SUBSTRING(site ,)" has no start.
      if (args.size() < 2) return expected("SUBSTRING's start");
      if (args.size() > 3) return fail_node(args[3], "SUBSTRING takes a value, a start and a length");
    } else {
      return expected("FROM or ','");
    }
    if (!expect_symbol(")")) return kFailed;
    if (!require(value, VType::text, "SUBSTRING")) return kFailed;
    if (!require(args[1], VType::integer, "SUBSTRING's start")) return kFailed;
    if (args.size() == 3 && !require(args[2], VType::integer, "SUBSTRING's length")) return kFailed;
    n.args = std::move(args);
    n.end = tokens_[at_ - 1].end;
    return add(std::move(n));
  }

  Program& p_;
  std::vector<Token> tokens_;
  size_t at_ = 0;
  std::optional<Error> error_;
  size_t nesting_ = 0;               // grammar levels now open
  std::vector<size_t> tree_depth_;  // per node, parallel to p_.nodes
};

}  // namespace

std::string Program::where(uint32_t i) const {
  const Node& n = nodes[i];
  std::string out = at_character(text, n.begin);  // "at character N: "
  out.resize(out.size() - 2);
  out += " (";
  out += std::string_view(text).substr(n.begin, n.end - n.begin);
  out += "): ";
  return out;
}

}  // namespace tamis::expr

namespace tamis {

Result<Expression> Expression::parse(std::string_view text, const Schema& columns, Use use) {
  auto program = std::make_shared<expr::Program>();
  program->text = std::string(text);
  program->schema = columns;
  auto tokens = expr::tokenize(program->text);
  if (!tokens) return tokens.take_error();
  if (tokens->size() == 1) return usage_error("at character 1: expected an expression, found nothing");
  expr::Parser parser(*program, std::move(*tokens));
  auto root = parser.parse_all();
  if (!root) return root.take_error();
  expr::settle_node(*program, *root, use == Use::condition ? expr::VType::boolean : expr::VType::text, 0);
  const expr::Node& top = program->nodes[*root];
  if (use == Use::condition) {
    if (top.type != expr::VType::boolean)
      return usage_error(expr::at_character(program->text, top.begin) + "expected a condition (true or false), found " +
                         expr::type_words(top.type, top.scale) + " expression");
  }
  program->root = *root;
  return Expression(std::move(program));
}

}  // namespace tamis
