#include "steps/drop_rows.hpp"

#include "steps/row_filter.hpp"

namespace tamis {

Result<std::unique_ptr<Step>> parse_drop_rows(StepParams& params) {
  return parse_row_filter(params, RowFilterKind::drop);
}

}  // namespace tamis
