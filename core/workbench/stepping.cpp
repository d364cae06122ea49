#include "stepping.hpp"

#include <algorithm>

#include "csv_writer.hpp"
#include "dates.hpp"
#include "job.hpp"

namespace tamis::workbench {

namespace {

std::shared_ptr<const ColumnChunk> chunk_part(const Column& column, const ColumnChunk& chunk, size_t from,
                                              size_t to) {
  if (column.type() == Type::text) {
    TextChunkBuilder builder;
    builder.reserve(to - from, chunk.offsets[to] - chunk.offsets[from]);
    for (size_t i = from; i < to; ++i) {
      if (chunk.is_null(i)) builder.append_null();
      else builder.append(chunk.text(i));
    }
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

StepRunner::StepRunner(const Step& step, Table input)
    : step_(step), input_(std::move(input)), state_(step.start()) {
  observing_ = step_.needs_first_pass();
}

bool StepRunner::advance(size_t budget) {
  if (done_) return true;
  if (batches_.empty()) {
    // Fixed on the first slice so both passes see the same batches.
    target_rows_ = std::max<size_t>(256, budget / std::max<size_t>(1, input_.column_count()));
    batches_ = batch_ranges(input_, target_rows_);
  }
  size_t spent = 0;
  const size_t per_row = std::max<size_t>(1, input_.column_count());
  while (spent < budget) {
    if (next_ == batches_.size()) {
      if (observing_) {
        observing_ = false;
        next_ = 0;
        continue;
      }
      if (Status s = step_.finish(state_.get(), change_); !s) error_ = s.take_error();
      done_ = true;
      return true;
    }
    const auto [begin, end] = batches_[next_++];
    const Table batch = slice_rows(input_, begin, end);
    if (observing_) {
      if (Status s = step_.observe(batch, state_.get()); !s) {
        error_ = s.take_error();
        done_ = true;
        return true;
      }
    } else {
      auto out = step_.apply(batch, state_.get(), change_);
      if (!out) {
        error_ = out.take_error();
        done_ = true;
        return true;
      }
      if (Status s = output_.append(*out); !s) {
        error_ = s.take_error();
        done_ = true;
        return true;
      }
    }
    spent += (end - begin) * per_row;
  }
  return false;
}

double StepRunner::progress() const {
  if (done_) return 1.0;
  if (batches_.empty()) return 0.0;
  const double passes = step_.needs_first_pass() ? 2.0 : 1.0;
  const double done = static_cast<double>(next_) + (observing_ || passes == 1.0 ? 0.0 : batches_.size());
  return done / (passes * static_cast<double>(batches_.size()));
}

Result<Table> apply_step(const Step& step, const Table& input, ChangeRecord& change) {
  StepRunner runner(step, input);
  while (!runner.advance(kSliceBudget)) {
  }
  if (runner.error()) return *runner.error();
  change = runner.take_change();
  return runner.take_output();
}

}  // namespace tamis::workbench
