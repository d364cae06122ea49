#include "steps/row_filter.hpp"

#include <algorithm>

#include "expr/expr.hpp"
#include "sql/sql_step.hpp"

namespace tamis {

namespace {

size_t count_kept(const std::vector<uint8_t>& keep, size_t first, size_t rows) {
  size_t kept = 0;
  for (size_t i = 0; i < rows; ++i) kept += keep[first + i] != 0;
  return kept;
}

size_t kept_text_bytes(const ColumnChunk& chunk, const uint8_t* keep) {
  if (!chunk.is_plain()) return chunk.text_bytes();
  size_t bytes = 0;
  for (size_t i = 0; i < chunk.rows; ++i)
    if (keep[i]) bytes += chunk.offsets[i + 1] - chunk.offsets[i];
  return bytes;
}

std::shared_ptr<const ColumnChunk> select_text_chunk(const ColumnChunk& chunk, const uint8_t* keep, size_t kept) {
  TextChunkBuilder builder;
  builder.reserve(kept, kept_text_bytes(chunk, keep));
  // Runs of kept rows are copied with one append each.
  for (size_t i = 0; i < chunk.rows;) {
    if (!keep[i]) {
      ++i;
      continue;
    }
    size_t j = i;
    while (j < chunk.rows && keep[j]) ++j;
    builder.append_rows(chunk, i, j);
    i = j;
  }
  return builder.finish();
}

// The kept rows' validity bits; empty when every kept row has a value.
std::vector<uint64_t> kept_validity(const ColumnChunk& chunk, const uint8_t* keep, size_t kept) {
  if (!chunk.has_nulls()) return {};
  std::vector<uint64_t> validity((kept + 63) / 64, 0);
  size_t at = 0;
  bool any_null = false;
  for (size_t i = 0; i < chunk.rows; ++i) {
    if (!keep[i]) continue;
    const bool present = !chunk.is_null(i);
    any_null |= !present;
    validity[at >> 6] |= static_cast<uint64_t>(present) << (at & 63);
    ++at;
  }
  if (!any_null) return {};
  return validity;
}

std::shared_ptr<const ColumnChunk> select_typed_chunk(const ColumnChunk& chunk, const uint8_t* keep, size_t kept) {
  auto out = std::make_shared<ColumnChunk>();
  out->rows = kept;
  out->numbers.reserve(kept);
  for (size_t i = 0; i < chunk.rows; ++i)
    if (keep[i]) out->numbers.push_back(chunk.numbers[i]);
  out->validity = kept_validity(chunk, keep, kept);
  return out;
}

// A dictionary keeps its values (a few, each once) and the kept rows' codes,
// so what reads the column next still counts codes.
std::shared_ptr<const ColumnChunk> select_dictionary_chunk(const ColumnChunk& chunk, const uint8_t* keep, size_t kept) {
  auto out = std::make_shared<ColumnChunk>();
  out->layout = TextLayout::dictionary;
  out->rows = kept;
  out->bytes = chunk.bytes;
  out->offsets = chunk.offsets;
  auto codes = std::make_shared<std::vector<uint16_t>>();
  codes->reserve(kept);
  for (size_t i = 0; i < chunk.rows; ++i)
    if (keep[i]) codes->push_back(chunk.code(i));
  out->codes = std::move(codes);
  out->validity = kept_validity(chunk, keep, kept);
  return out;
}

ColumnPtr select_column(const Column& column, const std::vector<uint8_t>& keep) {
  auto out = std::make_shared<Column>(column.type(), column.scale());
  for (size_t k = 0; k < column.chunk_count(); ++k) {
    const ColumnChunk& chunk = column.chunk(k);
    const size_t first = column.chunk_start(k);
    const size_t kept = count_kept(keep, first, chunk.rows);
    if (kept == chunk.rows) out->append_chunk(column.chunk_ptr(k));
    else if (kept > 0)
      out->append_chunk(column.type() != Type::text                  ? select_typed_chunk(chunk, keep.data() + first, kept)
                        : chunk.layout == TextLayout::dictionary ? select_dictionary_chunk(chunk, keep.data() + first, kept)
                                                                 : select_text_chunk(chunk, keep.data() + first, kept));
  }
  return out;
}

class RowFilter final : public Step {
 public:
  RowFilter(RowFilterKind kind, Expression where) : kind_(kind), where_(std::move(where)) {
    reason_ = "where " + where_.text() + (kind_ == RowFilterKind::keep ? " was not true" : " was true");
  }

  std::string_view op() const override { return kind_ == RowFilterKind::keep ? "keep_rows" : "drop_rows"; }

  std::string describe() const override {
    return kind_ == RowFilterKind::keep ? "Keep only the rows where " + where_.text() + " is true."
                                        : "Remove the rows where " + where_.text() + " is true.";
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    std::vector<uint8_t> keep;
    if (Status s = where_.evaluate_condition(batch, keep); !s) return s.take_error();
    if (kind_ == RowFilterKind::drop)
      for (uint8_t& k : keep) k ^= 1;
    const size_t rows = batch.row_count();
    change.rows_in += rows;
    const Column& lines = batch.source_lines();
    size_t kept = 0;
    for (size_t k = 0; k < lines.chunk_count(); ++k) {
      const ColumnChunk& chunk = lines.chunk(k);
      const size_t first = lines.chunk_start(k);
      for (size_t i = 0; i < chunk.rows; ++i) {
        if (keep[first + i]) ++kept;
        else change.note_removed(static_cast<uint64_t>(chunk.numbers[i]), reason_);
      }
    }
    change.rows_out += kept;
    if (kept == rows) return batch;
    return select_rows(batch, keep);
  }

  // The expression's own support, where its operators are written in the
  // dialect (expr/sql_render.cpp); drop_rows keeps the rows whose condition
  // is not TRUE (FALSE or NULL), hence the COALESCE.
  SqlSupport sql_support(Dialect dialect) const override {
    size_t columns = 0;
    for (const size_t c : where_.columns()) columns = std::max(columns, c + 1);
    if (!where_.to_sql(dialect, std::vector<std::string>(columns, "c"))) return SqlSupport::unsupported;
    return where_.sql_support(dialect);
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    std::vector<std::string> columns;
    for (size_t c = 0; c < sql.input.size(); ++c) columns.push_back(sql.column(c));
    auto condition = where_.to_sql(sql.dialect, columns);
    if (!condition) return condition.take_error();
    SqlStepText out;
    out.select = sql.select_replacing({}) + "\nWHERE " +
                 (kind_ == RowFilterKind::keep ? *condition : std::string("NOT COALESCE(") + *condition + ", FALSE)");
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["where"] = where_.text();
    return p;
  }

 private:
  RowFilterKind kind_;
  Expression where_;
  std::string reason_;
};

}  // namespace

Table select_rows(const Table& table, const std::vector<uint8_t>& keep) {
  std::vector<ColumnPtr> columns;
  for (size_t c = 0; c < table.column_count(); ++c) columns.push_back(select_column(table.column(c), keep));
  return Table::make(table.names(), std::move(columns), select_column(table.source_lines(), keep)).value();
}

Result<std::unique_ptr<Step>> parse_row_filter(StepParams& params, RowFilterKind kind) {
  auto where = params.text("where");
  if (!where) return where.take_error();
  auto expression = Expression::parse(*where, params.input(), Expression::Use::condition);
  if (!expression) return params.error("where", expression.error().message);
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new RowFilter(kind, std::move(*expression)));
}

}  // namespace tamis
