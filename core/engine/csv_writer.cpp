#include "csv_writer.hpp"

#include <algorithm>
#include <cstdlib>
#include <cstring>
#include <utility>

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
  buffer_.resize(kFlushBytes + (64 << 10));
}

Status CsvWriter::flush() {
  if (used_ == 0) return Ok{};
  const size_t n = std::exchange(used_, 0);
  return sink_->write(std::string_view(buffer_.data(), n));
}

void CsvWriter::grow(size_t n) { buffer_.resize(std::max(buffer_.size() * 2, used_ + n)); }

// Copies the field while looking for a byte that needs quotes, and starts
// again quoted when it finds one (rare: most fields are copied once).
void CsvWriter::append_field(std::string_view value, bool only_field) {
  const size_t n = value.size();
  make_room(2 * n + 2);
  char* out = buffer_.data() + used_;
  bool quote = only_field && n == 0;
  for (size_t i = 0; i < n && !quote; ++i) {
    const char c = value[i];
    quote = needs_quotes_[static_cast<unsigned char>(c)] != 0;
    out[i] = c;
  }
  if (!quote) {
    used_ += n;
    return;
  }
  size_t at = 0;
  out[at++] = options_.quote;
  for (const char c : value) {
    if (c == options_.quote) out[at++] = c;
    out[at++] = c;
  }
  out[at++] = options_.quote;
  used_ += at;
}

std::string_view CsvWriter::date_text(int32_t days) {
  constexpr size_t kCachedDates = 4096;  // a power of two
  if (dates_.empty()) dates_.resize(kCachedDates);
  CachedDate& slot = dates_[static_cast<uint32_t>(days) & (kCachedDates - 1)];
  if (slot.length > 0 && slot.days == days) return std::string_view(slot.text, slot.length);
  cell_.clear();
  date_format_.format(days, cell_);
  if (!cell_.empty() && cell_.size() <= sizeof slot.text) {
    slot.days = days;
    slot.length = static_cast<uint8_t>(cell_.size());
    std::memcpy(slot.text, cell_.data(), cell_.size());
  }
  return cell_;
}

void CsvWriter::append_cell(const Column& column, const ColumnChunk& chunk, size_t row, bool only_field) {
  if (chunk.is_null(row)) return append_field(options_.null_marker, only_field);
  switch (column.type()) {
    case Type::text: return append_field(chunk.text(row), only_field);
    case Type::date: return append_field(date_text(static_cast<int32_t>(chunk.numbers[row])), only_field);
    default:
      cell_.clear();
      append_canonical(column, chunk, row, date_format_, cell_);
      return append_field(cell_, only_field);
  }
}

Status CsvWriter::end_row() {
  const std::string& ending = options_.line_ending;
  make_room(ending.size());
  std::memcpy(buffer_.data() + used_, ending.data(), ending.size());
  used_ += ending.size();
  return used_ >= kFlushBytes ? flush() : Status(Ok{});
}

Status CsvWriter::write_row(std::span<const std::string_view> fields) {
  for (size_t i = 0; i < fields.size(); ++i) {
    if (i) append_byte(options_.delimiter);
    append_field(fields[i], fields.size() == 1);
  }
  return end_row();
}

Status CsvWriter::write_table(const Table& table) {
  const size_t columns = table.column_count();
  if (columns == 0) return Ok{};
  const bool only_field = columns == 1;
  // Walk chunk by chunk; columns of one table may be chunked differently.
  struct Cursor {
    const Column* column;
    size_t k = 0;
    size_t start = 0;  // table row of the chunk's first row
    size_t end = 0;    // table row after the chunk's last row
  };
  std::vector<Cursor> cursors;
  for (size_t c = 0; c < columns; ++c) {
    const Column& col = table.column(c);
    cursors.push_back({&col, 0, 0, col.chunk_count() ? col.chunk(0).rows : 0});
  }
  for (size_t row = 0; row < table.row_count(); ++row) {
    for (size_t c = 0; c < columns; ++c) {
      Cursor& at = cursors[c];
      while (row >= at.end) {
        at.start = at.end;
        at.end += at.column->chunk(++at.k).rows;
      }
      if (c) append_byte(options_.delimiter);
      append_cell(*at.column, at.column->chunk(at.k), row - at.start, only_field);
    }
    if (Status s = end_row(); !s) return s;
  }
  return Ok{};
}

Status CsvWriter::finish() {
  if (Status s = flush(); !s) return s;
  return sink_->commit();
}

}  // namespace tamis
