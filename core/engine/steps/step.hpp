// A cleaning step: one entry of a recipe (design §4).
//
// Every step is one file pair in this folder plus one line in registry.cpp:
// it parses and validates its JSON parameters against the columns it will
// see, says what columns it produces, applies itself batch by batch (the
// same code serves a whole table, which is one batch, and `tamis run`, which
// streams), describes itself in one plain sentence, and declares per SQL
// dialect whether its export is exact, approximate or unsupported.
#pragma once

#include <nlohmann/json.hpp>

#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "change.hpp"
#include "error.hpp"
#include "table.hpp"

namespace tamis {

struct ColumnSchema {
  std::string name;
  Type type = Type::text;
  int scale = 0;
};
using Schema = std::vector<ColumnSchema>;

enum class Dialect : uint8_t { postgres, mysql, sqlite, duckdb, spark };
enum class SqlSupport : uint8_t { exact, approximate, unsupported };
std::string_view dialect_name(Dialect dialect);

// Per-run state of a step that remembers across batches (seen rows for
// deduplicate, last value for carry_forward, group values for
// fill_from_group). Steps without memory return nullptr from start().
struct StepState {
  virtual ~StepState() = default;
};

struct SqlContext;
struct SqlStepText;

class Step {
 public:
  virtual ~Step() = default;

  virtual std::string_view op() const = 0;
  // One plain sentence, e.g. "Remove spaces at both ends of site and district."
  virtual std::string describe() const = 0;
  // The columns after this step, given the columns before it.
  virtual Schema output_schema(const Schema& input) const { return input; }

  virtual std::unique_ptr<StepState> start() const { return nullptr; }
  // Steps that must see every row before changing any (fill_from_group)
  // return true and receive the whole input through observe() first.
  virtual bool needs_first_pass() const { return false; }
  virtual Status observe(const Table& /*batch*/, StepState* /*state*/) const { return Ok{}; }
  // Transforms one batch. Rows are never reordered.
  virtual Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const = 0;
  // After the last batch (row_count rules, conflicts found in the state).
  virtual Status finish(StepState* /*state*/, ChangeRecord& /*change*/) const { return Ok{}; }

  virtual SqlSupport sql_support(Dialect dialect) const = 0;
  // The step as SQL (core/engine/sql/sql_step.hpp), for the dialects where
  // sql_support() is not unsupported; the default refuses.
  virtual Result<SqlStepText> to_sql(const SqlContext& context) const;

  // The step's parameters as written in a recipe (without op, note, enabled).
  virtual nlohmann::ordered_json parameters() const = 0;
};

}  // namespace tamis
