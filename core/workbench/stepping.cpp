#include "stepping.hpp"

#include <algorithm>

#include "csv_writer.hpp"
#include "dates.hpp"
#include "job.hpp"

namespace tamis::workbench {

Table as_text(const Table& table) {
  static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
  Table out = table;
  std::string cell;
  for (size_t c = 0; c < table.column_count(); ++c) {
    const Column& column = table.column(c);
    if (column.type() == Type::text) continue;
    auto text = std::make_shared<Column>(Type::text);
    for (size_t k = 0; k < column.chunk_count(); ++k) {
      const ColumnChunk& chunk = column.chunk(k);
      TextChunkBuilder builder;
      builder.reserve(chunk.rows, chunk.rows * 8);
      for (size_t i = 0; i < chunk.rows; ++i) {
        if (chunk.is_null(i)) {
          builder.append_null();
          continue;
        }
        cell.clear();
        append_canonical(column, chunk, i, iso, cell);
        builder.append(cell);
      }
      text->append_chunk(builder.finish());
    }
    out = out.with_column(c, std::move(text));
  }
  return out;
}

std::unique_ptr<BatchedRun> run_step(std::shared_ptr<const Step> step, size_t position, Table input,
                                     size_t budget) {
  CompiledRecipe recipe;
  recipe.steps.push_back({static_cast<int>(position), std::move(step), {}});
  // Not below a few hundred rows: a batch has a fixed cost of its own.
  const size_t columns = std::max<size_t>(1, input.column_count());
  return std::make_unique<BatchedRun>(std::move(recipe), std::move(input), std::max(budget, 256 * columns));
}

Result<Table> apply_step(std::shared_ptr<const Step> step, size_t position, const Table& input,
                         ChangeRecord& change) {
  const auto run = run_step(std::move(step), position, input, kSliceCells);
  for (WorkBudget budget; !run->advance(budget); budget = WorkBudget{}) {
  }
  if (run->error()) return *run->error();
  change = std::move(run->changes().front());
  return run->take_output();
}

}  // namespace tamis::workbench
