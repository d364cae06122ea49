#include "csv_writer.hpp"

#include <cstdlib>

#include "scalars.hpp"

namespace tamis {

namespace {
constexpr size_t kFlushBytes = 1 << 20;

}  // namespace

void append_canonical(const Column& column, const ColumnChunk& chunk, size_t row,
                      const DateFormat& date_format, std::string& out) {
  switch (column.type()) {
    case Type::text: out += chunk.text(row); return;
    case Type::integer: out += std::to_string(chunk.numbers[row]); return;
    case Type::decimal: append_scaled_decimal(chunk.numbers[row], column.scale(), out); return;
    case Type::date: date_format.format(static_cast<int32_t>(chunk.numbers[row]), out); return;
    case Type::boolean: out += chunk.numbers[row] ? "true" : "false"; return;
  }
}

Result<CsvWriter> CsvWriter::make(ByteSink& sink, CsvWriteOptions options) {
  if (options.delimiter == options.quote) return usage_error("the delimiter and the quote character must differ");
  auto date_format = DateFormat::compile(options.date_format);
  if (!date_format) return date_format.take_error();
  return CsvWriter(sink, std::move(options), std::move(*date_format));
}

CsvWriter::CsvWriter(ByteSink& sink, CsvWriteOptions options, DateFormat date_format)
    : sink_(&sink), options_(std::move(options)), date_format_(std::move(date_format)) {
  for (const char c : {options_.delimiter, options_.quote, '\r', '\n'})
    needs_quotes_[static_cast<unsigned char>(c)] = 1;
  buffer_.reserve(kFlushBytes + (64 << 10));
}

void CsvWriter::append_field(std::string_view value, bool only_field) {
  bool quote = only_field && value.empty();
  for (const char c : value)
    if (needs_quotes_[static_cast<unsigned char>(c)]) {
      quote = true;
      break;
    }
  if (!quote) {
    buffer_ += value;
    return;
  }
  buffer_ += options_.quote;
  for (const char c : value) {
    if (c == options_.quote) buffer_ += c;
    buffer_ += c;
  }
  buffer_ += options_.quote;
}

void CsvWriter::append_cell(const Column& column, const ColumnChunk& chunk, size_t row, bool only_field) {
  if (chunk.is_null(row)) {
    append_field(options_.null_marker, only_field);
  } else if (column.type() == Type::text) {
    append_field(chunk.text(row), only_field);
  } else {
    cell_.clear();
    append_canonical(column, chunk, row, date_format_, cell_);
    append_field(cell_, only_field);
  }
}

Status CsvWriter::flush_if_full() {
  if (buffer_.size() < kFlushBytes) return Ok{};
  Status s = sink_->write(buffer_);
  buffer_.clear();
  return s;
}

Status CsvWriter::write_row(std::span<const std::string_view> fields) {
  for (size_t i = 0; i < fields.size(); ++i) {
    if (i) buffer_ += options_.delimiter;
    append_field(fields[i], fields.size() == 1);
  }
  buffer_ += options_.line_ending;
  return flush_if_full();
}

Status CsvWriter::write_table(const Table& table) {
  const size_t columns = table.column_count();
  if (columns == 0) return Ok{};
  const bool only_field = columns == 1;
  // Walk chunk by chunk; columns of one table may be chunked differently.
  std::vector<size_t> chunk_index(columns, 0);
  for (size_t row = 0; row < table.row_count(); ++row) {
    for (size_t c = 0; c < columns; ++c) {
      const Column& col = table.column(c);
      size_t& k = chunk_index[c];
      while (row >= col.chunk_start(k) + col.chunk(k).rows) ++k;
      if (c) buffer_ += options_.delimiter;
      append_cell(col, col.chunk(k), row - col.chunk_start(k), only_field);
    }
    buffer_ += options_.line_ending;
    if (Status s = flush_if_full(); !s) return s;
  }
  return Ok{};
}

Status CsvWriter::finish() {
  if (!buffer_.empty()) {
    if (Status s = sink_->write(buffer_); !s) return s;
    buffer_.clear();
  }
  return sink_->commit();
}

}  // namespace tamis
