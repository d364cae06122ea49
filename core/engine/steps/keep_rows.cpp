#include "steps/keep_rows.hpp"

#include "steps/row_filter.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_keep_rows(StepParams& params) {
  return parse_row_filter(params, RowFilterKind::keep);
}

}  // namespace tamis
