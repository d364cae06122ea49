// Internal to the workbench: one step applied to a whole table in slices
// (row_batches.hpp). The columns a step leaves alone come out as the very
// same chunks, so a stage costs only the columns its step changed.
#pragma once

#include <memory>
#include <optional>
#include <vector>

#include "change.hpp"
#include "error.hpp"
#include "row_batches.hpp"
#include "steps/step.hpp"
#include "table.hpp"

namespace tamis::workbench {

// The table with every typed column as its canonical text (design §3; dates
// in ISO 8601), chunk by chunk. Some finding detectors read every column as
// text, so a stage after parse_date or parse_number is searched through
// this view.
Table as_text(const Table& table);

// One step of the recipe (at `position`) over a whole table in slices of
// about `budget` cells; its change record is changes().front().
std::unique_ptr<BatchedRun> run_step(std::shared_ptr<const Step> step, size_t position, Table input,
                                     size_t budget);

// The whole table in one call.
Result<Table> apply_step(std::shared_ptr<const Step> step, size_t position, const Table& input,
                         ChangeRecord& change);

}  // namespace tamis::workbench
