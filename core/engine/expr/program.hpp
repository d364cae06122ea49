// The parsed, type-checked form of an expression (internal to the engine):
// a flat list of nodes in which every child comes before its parent, so the
// evaluator can keep one scratch vector per node and reuse it block after
// block.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <vector>

#include "expr/like.hpp"
#include "steps/step.hpp"

namespace tamis::expr {

// null_type is the type of a bare NULL until its context settles it (NULL + 1
// is an integer NULL); no node keeps it after parsing.
enum class VType : uint8_t { null_type, text, integer, decimal, date, boolean };

constexpr bool is_numeric(VType t) { return t == VType::integer || t == VType::decimal; }

enum class Op : uint8_t {
  literal,      // number / text; null_literal for NULL
  column,       // number = column index in the batch
  rescale,      // args[0] (integer or decimal) at this node's scale
  negate,
  add,
  subtract,
  multiply,
  divide,
  concat,
  equal,
  not_equal,
  less,
  less_equal,
  greater,
  greater_equal,
  logical_and,
  logical_or,
  logical_not,
  is_null,      // negated: IS NOT NULL (IS [NOT] UNKNOWN is the same test)
  is_true,      // negated: IS NOT TRUE
  is_false,     // negated: IS NOT FALSE
  between,      // args: value, low, high; negated: NOT BETWEEN
  in_list,      // args: value, items...; negated: NOT IN
  like,         // args: value, pattern[, escape]; negated: NOT LIKE
  case_when,    // args: [operand if simple], (when, then)..., [else]
  cast,         // to this node's type; param = DECIMAL precision
  coalesce,
  nullif,
  upper,
  lower,
  char_length,
  substring,    // args: value, start[, length]
  trim,         // args: value[, characters]; param = TrimSide
  abs,
  round,        // args: value; param = digits
};

enum class TrimSide : uint8_t { both, leading, trailing };

struct Node {
  Op op = Op::literal;
  VType type = VType::null_type;
  int scale = 0;
  bool negated = false;
  bool null_literal = false;
  bool simple_case = false;  // CASE operand WHEN value ...
  bool has_else = false;
  int param = 0;
  uint32_t begin = 0, end = 0;  // bytes of the expression text this node was read from
  std::vector<uint32_t> args;
  int64_t number = 0;
  std::string text;
  std::shared_ptr<const LikePattern> pattern;  // LIKE with a literal pattern, compiled once
};

struct Program {
  std::string text;
  Schema schema;
  std::vector<Node> nodes;
  uint32_t root = 0;
  std::vector<size_t> columns;  // input columns the expression reads

  const Node& node(uint32_t i) const { return nodes[i]; }
  // "at character N (snippet): " for messages about node i.
  std::string where(uint32_t i) const;
};

}  // namespace tamis::expr
