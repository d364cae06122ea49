// What the typed steps (parse_date, parse_number, cast) and the row steps
// (fill_from_group, carry_forward, deduplicate, require) share: walking the
// rows of several columns in step, building typed chunks, canonical text of
// typed values, the on_error policy, and the tally behind their warnings.
//
// on_error, the same for every converting step:
//   null    a value that cannot be converted becomes NULL (a typed column);
//   reject  its row goes to the rejects file (a typed column);
//   keep    the column stays text: converted values are rewritten in the
//           target type's canonical text form (design §3: 2024-03-09, 12.50,
//           true), the others are left exactly as they were.
// NULL stays NULL and is never an error. The default is null.
#pragma once

#include <cstdint>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "change.hpp"
#include "steps/row_filter.hpp"
#include "steps/step_params.hpp"
#include "table.hpp"

namespace tamis {

enum class OnError : uint8_t { null, keep, reject };

Result<OnError> read_on_error(StepParams& params);
std::string_view on_error_name(OnError on_error);

// The canonical text form (design §3) of one typed value; dates in ISO 8601.
void append_canonical_value(Type type, int scale, int64_t value, std::string& out);

// A value for a message: quoted, and cut after 40 code points.
std::string quoted_value(std::string_view value);

// Reads one column row after row across its chunks.
class ColumnCursor {
 public:
  explicit ColumnCursor(const Column& column) : column_(&column) { settle(); }
  bool is_null() const { return chunk_->is_null(i_); }
  std::string_view text() const { return chunk_->text(i_); }
  int64_t number() const { return chunk_->numbers[i_]; }
  void next() {
    if (++i_ >= rows_) settle();
  }

 private:
  void settle() {
    while (k_ < column_->chunk_count() && i_ >= column_->chunk(k_).rows) {
      i_ = 0;
      ++k_;
    }
    chunk_ = k_ < column_->chunk_count() ? &column_->chunk(k_) : nullptr;
    rows_ = chunk_ ? chunk_->rows : 0;
  }
  const Column* column_;
  const ColumnChunk* chunk_ = nullptr;
  size_t k_ = 0;
  size_t i_ = 0;
  size_t rows_ = 0;
};

// Appends rows to one chunk of an integer, decimal, date or boolean column.
class TypedChunkBuilder {
 public:
  TypedChunkBuilder() : chunk_(std::make_shared<ColumnChunk>()) {}
  void reserve(size_t rows) { chunk_->numbers.reserve(rows); }
  void append(int64_t value) { chunk_->numbers.push_back(value); }
  void append_null();
  std::shared_ptr<const ColumnChunk> finish();

 private:
  std::shared_ptr<ColumnChunk> chunk_;
};

// Counts kept for a step's warnings (values that could not be converted,
// ambiguous dates). A step that needs a first pass has its apply() run again
// while later steps observe, with a scratch change record, so the tally
// belongs to the change record it was taken with and restarts when handed
// another one; finish() reports it only for the record it is given.
struct ConversionTally {
  void restart_unless(const ChangeRecord& change);
  bool belongs_to(const ChangeRecord& change) const { return record_ == &change; }
  void note_failure(uint64_t line, std::string_view value);
  void note_ambiguous(uint64_t line, std::string_view value);

  uint64_t failed = 0;
  uint64_t first_failed_line = 0;
  std::string first_failed_value;
  uint64_t ambiguous = 0;
  uint64_t first_ambiguous_line = 0;
  std::string first_ambiguous_value;

 private:
  const ChangeRecord* record_ = nullptr;
};

// The warning for values that could not be converted ("" when none):
// "<column>: N values could not be <how>; they became NULL (the first on
// line L: 'v')", how being e.g. "read as numbers with decimal mark ','".
std::string failure_warning(const ConversionTally& tally, const std::string& column, std::string_view how,
                            OnError on_error);

// What a converter made of one value.
enum class Converted : uint8_t {
  value,   // the result is in `out`
  null,    // the value stands for NULL (SQL: CAST('unknown' AS BOOLEAN))
  failed,  // not convertible: on_error decides
};

// Converts the text column c of a batch value by value under on_error.
// convert(std::string_view value, uint64_t line, int64_t& out) -> Converted.
// `failure` completes the reject reason "<column>: 'v' <failure>".
template <class Convert>
Result<Table> convert_text_column(const Table& batch, size_t c, Type to, int scale, OnError on_error,
                                  const std::string& failure, ConversionTally& tally, ChangeRecord& change,
                                  Convert&& convert) {
  tally.restart_unless(change);
  const Column& column = batch.column(c);
  const std::string& name = batch.name(c);
  const bool stays_text = on_error == OnError::keep;
  auto out = std::make_shared<Column>(stays_text ? Type::text : to, stays_text ? 0 : scale);
  ColumnCursor lines(batch.source_lines());
  std::vector<uint8_t> keep;  // filled only once a row is rejected
  size_t rejected = 0;
  size_t row = 0;
  std::string canonical;
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    TextChunkBuilder text;
    TypedChunkBuilder typed;
    if (stays_text) text.reserve(chunk.rows, chunk.text_bytes());
    else typed.reserve(chunk.rows);
    for (size_t i = 0; i < chunk.rows; ++i, ++row, lines.next()) {
      if (chunk.is_null(i)) {
        if (stays_text) text.append_null();
        else typed.append_null();
        continue;
      }
      const std::string_view value = chunk.text(i);
      const auto line = static_cast<uint64_t>(lines.number());
      int64_t converted = 0;
      const Converted result = convert(value, line, converted);
      if (result == Converted::value) {
        canonical.clear();
        append_canonical_value(to, scale, converted, canonical);
        if (canonical != value) change.note_change(name, value, canonical);
        if (stays_text) text.append(canonical);
        else typed.append(converted);
        continue;
      }
      if (result == Converted::null) {
        if (stays_text) text.append_null();
        else typed.append_null();
        change.note_change(name, value, "NULL");
        continue;
      }
      tally.note_failure(line, value);
      switch (on_error) {
        case OnError::keep: text.append(value); break;
        case OnError::null:
          typed.append_null();
          change.note_change(name, value, "NULL");
          break;
        case OnError::reject:
          typed.append_null();
          if (keep.empty()) keep.assign(batch.row_count(), 1);
          keep[row] = 0;
          ++rejected;
          change.note_rejected(line, name + ": " + quoted_value(value) + " " + failure);
          break;
      }
    }
    out->append_chunk(stays_text ? text.finish() : typed.finish());
  }
  change.rows_in += batch.row_count();
  change.rows_out += batch.row_count() - rejected;
  Table converted = batch.with_column(c, std::move(out));
  if (rejected == 0) return converted;
  return select_rows(converted, keep);
}

}  // namespace tamis
