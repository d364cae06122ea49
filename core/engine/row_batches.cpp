#include "row_batches.hpp"

namespace tamis {

namespace {

std::shared_ptr<const ColumnChunk> chunk_part(const Column& column, const ColumnChunk& chunk, size_t from,
                                              size_t to) {
  if (column.type() == Type::text) {
    TextChunkBuilder builder;
    builder.append_rows(chunk, from, to);
    return builder.finish();
  }
  auto part = std::make_shared<ColumnChunk>();
  part->rows = to - from;
  part->numbers.assign(chunk.numbers.begin() + static_cast<std::ptrdiff_t>(from),
                       chunk.numbers.begin() + static_cast<std::ptrdiff_t>(to));
  if (chunk.has_nulls()) {
    part->validity.assign((part->rows + 63) / 64, 0);
    for (size_t i = from; i < to; ++i)
      if (!chunk.is_null(i)) part->validity[(i - from) >> 6] |= uint64_t{1} << ((i - from) & 63);
  }
  return part;
}

ColumnPtr column_slice(const Column& column, size_t begin, size_t end) {
  auto out = std::make_shared<Column>(column.type(), column.scale());
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const size_t start = column.chunk_start(k);
    const size_t stop = start + column.chunk(k).rows;
    if (stop <= begin || start >= end) continue;
    if (start >= begin && stop <= end) {
      out->append_chunk(column.chunk_ptr(k));
      continue;
    }
    out->append_chunk(chunk_part(column, column.chunk(k), std::max(begin, start) - start, std::min(end, stop) - start));
  }
  return out;
}

}  // namespace

Table slice_rows(const Table& table, size_t begin, size_t end) {
  end = std::min(end, table.row_count());
  begin = std::min(begin, end);
  if (begin == 0 && end == table.row_count()) return table;
  std::vector<ColumnPtr> columns;
  for (size_t c = 0; c < table.column_count(); ++c) columns.push_back(column_slice(table.column(c), begin, end));
  // Same names, equal lengths by construction: make() cannot fail here.
  return Table::make(table.names(), std::move(columns), column_slice(table.source_lines(), begin, end)).value();
}

std::vector<std::pair<size_t, size_t>> batch_ranges(const Table& table, size_t target_rows) {
  const size_t rows = table.row_count();
  target_rows = std::max<size_t>(target_rows, 1);
  std::vector<size_t> cuts;
  auto add_cuts = [&](const Column& column) {
    for (size_t k = 1; k < column.chunk_count(); ++k) cuts.push_back(column.chunk_start(k));
  };
  for (size_t c = 0; c < table.column_count(); ++c) add_cuts(table.column(c));
  add_cuts(table.source_lines());
  cuts.push_back(rows);
  std::sort(cuts.begin(), cuts.end());
  cuts.erase(std::unique(cuts.begin(), cuts.end()), cuts.end());
  std::vector<std::pair<size_t, size_t>> out;
  size_t begin = 0;
  size_t last_cut = 0;
  for (size_t cut : cuts) {
    if (cut == 0) continue;
    if (cut - begin > target_rows && last_cut > begin) {
      out.emplace_back(begin, last_cut);
      begin = last_cut;
    }
    // One chunk far larger than a slice: cut inside it (its pieces are copied).
    while (cut - begin > 2 * target_rows) {
      out.emplace_back(begin, begin + target_rows);
      begin += target_rows;
    }
    last_cut = cut;
  }
  if (rows > begin || out.empty()) out.emplace_back(begin, rows);
  return out;
}

BatchedRun::BatchedRun(CompiledRecipe recipe, Table input, size_t batch_cells)
    : recipe_(std::move(recipe)), run_(recipe_), input_(std::move(input)) {
  const size_t columns = std::max<size_t>(1, input_.column_count());
  batches_ = batch_ranges(input_, std::max<size_t>(1, batch_cells / columns));
}

bool BatchedRun::fail(Error error) {
  error_ = std::move(error);
  changes_ = run_.changes();
  done_ = true;
  return true;
}

bool BatchedRun::run_batch(const Table& batch) {
  const size_t last = recipe_.steps.size() - 1;
  Table before_last = batch;
  for (size_t j = 0; j < last; ++j) {
    auto next = run_.apply_step(j, before_last);
    if (!next) return fail(next.take_error());
    before_last = std::move(*next);
  }
  auto after = run_.apply_step(last, before_last);
  if (!after) return fail(after.take_error());
  if (observer_) observer_(before_last, *after, run_.changes()[last]);
  if (keep_output_)
    if (Status s = output_.append(*after); !s) return fail(s.take_error());
  return false;
}

bool BatchedRun::advance(WorkBudget& budget) {
  if (done_) return true;
  if (recipe_.steps.empty()) {
    output_ = input_;
    done_ = true;
    return true;
  }
  const size_t per_row = std::max<size_t>(1, input_.column_count());
  while (!budget.exhausted()) {
    if (next_ == batches_.size()) {
      if (pass_ + 1 < run_.passes()) {
        run_.end_pass(pass_++);
        next_ = 0;
        continue;
      }
      if (Status s = run_.finish(); !s) return fail(s.take_error());
      changes_ = run_.changes();
      done_ = true;
      return true;
    }
    const auto [begin, end] = batches_[next_++];
    const Table batch = slice_rows(input_, begin, end);
    if (pass_ + 1 < run_.passes()) {
      if (Status s = run_.observe(pass_, batch); !s) return fail(s.take_error());
    } else if (run_batch(batch)) {
      return true;
    }
    budget.spend((end - begin) * per_row);
  }
  return false;
}

double BatchedRun::progress() const {
  if (done_) return 1.0;
  const double batches = static_cast<double>(std::max<size_t>(1, batches_.size()));
  return (static_cast<double>(pass_) + static_cast<double>(next_) / batches) / static_cast<double>(run_.passes());
}

}  // namespace tamis
