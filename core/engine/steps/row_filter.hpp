// What keep_rows and drop_rows share: one SQL condition (expr/expr.hpp)
// evaluated per batch, every removed row recorded with its source line and
// the reason, and the kept rows in their order. A chunk that loses no row is
// shared with the input, not copied.
#pragma once

#include <cstdint>
#include <vector>

#include "steps/step_params.hpp"

namespace tamis {

enum class RowFilterKind : uint8_t {
  keep,  // keep_rows: keep the rows where the condition is TRUE
  drop,  // drop_rows: remove the rows where the condition is TRUE
};

Result<std::unique_ptr<Step>> parse_row_filter(StepParams& params, RowFilterKind kind);

// The rows r of table with keep[r] != 0, in order, source lines included.
Table select_rows(const Table& table, const std::vector<uint8_t>& keep);

}  // namespace tamis
