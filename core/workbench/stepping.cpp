#include "stepping.hpp"

#include <algorithm>

#include "csv_writer.hpp"
#include "dates.hpp"

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

namespace {

CompiledRecipe one_step_recipe(std::shared_ptr<const Step> step, size_t position) {
  CompiledRecipe recipe;
  recipe.steps.push_back({static_cast<int>(position), std::move(step), {}});
  return recipe;
}

}  // namespace

std::unique_ptr<BatchedRun> run_step(std::shared_ptr<const Step> step, size_t position, Table input,
                                     size_t budget) {
  // Not below a few hundred rows: a batch has a fixed cost of its own.
  const size_t columns = std::max<size_t>(1, input.column_count());
  return std::make_unique<BatchedRun>(one_step_recipe(std::move(step), position), std::move(input),
                                      std::max(budget, 256 * columns));
}

Result<Table> apply_step(std::shared_ptr<const Step> step, size_t position, const Table& input,
                         ChangeRecord& change) {
  std::vector<ChangeRecord> changes;
  auto out = apply_recipe(one_step_recipe(std::move(step), position), input, &changes);
  if (out) change = std::move(changes.front());
  return out;
}

}  // namespace tamis::workbench
