#include "steps/split_column.hpp"

#include "sql/sql_step.hpp"
#include "steps/text_step_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

class SplitColumn final : public Step {
 public:
  SplitColumn(size_t column, std::string separator, std::vector<std::string> into, Schema input)
      : column_(column), separator_(std::move(separator)), into_(std::move(into)), input_(std::move(input)) {}

  std::string_view op() const override { return "split_column"; }

  std::string describe() const override {
    std::string names;
    for (size_t i = 0; i < into_.size(); ++i) names += (i ? (i + 1 == into_.size() ? " and " : ", ") : "") + into_[i];
    return "Split " + input_[column_].name + " at \"" + separator_ + "\" into the new columns " + names +
           " (the last one takes the rest; missing parts are NULL).";
  }

  Schema output_schema(const Schema& input) const override {
    Schema out(input.begin(), input.begin() + static_cast<std::ptrdiff_t>(column_) + 1);
    for (const std::string& name : into_) out.push_back({name, Type::text, 0});
    out.insert(out.end(), input.begin() + static_cast<std::ptrdiff_t>(column_) + 1, input.end());
    return out;
  }

  Result<Table> apply(const Table& batch, StepState*, ChangeRecord& change) const override {
    const Column& source = batch.column(column_);
    const size_t parts = into_.size();
    std::vector<std::shared_ptr<Column>> made;
    for (size_t p = 0; p < parts; ++p) made.push_back(std::make_shared<Column>(Type::text));
    for (size_t k = 0; k < source.chunk_count(); ++k) {
      const ColumnChunk& chunk = source.chunk(k);
      std::vector<TextChunkBuilder> builders(parts);
      for (auto& b : builders) b.reserve(chunk.rows, chunk.text_bytes() / parts);
      for (size_t i = 0; i < chunk.rows; ++i) {
        if (chunk.is_null(i)) {
          for (auto& b : builders) b.append_null();
          continue;
        }
        const std::string_view value = chunk.text(i);
        size_t start = 0;
        for (size_t p = 0; p < parts; ++p) {
          if (start == std::string_view::npos) {
            builders[p].append_null();
            continue;
          }
          const size_t at = p + 1 < parts ? value.find(separator_, start) : std::string_view::npos;
          const std::string_view part = value.substr(start, at == std::string_view::npos ? value.npos : at - start);
          builders[p].append(part);
          change.note_change(into_[p], value, part);
          start = at == std::string_view::npos ? at : at + separator_.size();
        }
      }
      for (size_t p = 0; p < parts; ++p) made[p]->append_chunk(builders[p].finish());
    }
    std::vector<std::string> names;
    std::vector<ColumnPtr> columns;
    for (size_t c = 0; c < batch.column_count(); ++c) {
      names.push_back(batch.name(c));
      columns.push_back(batch.column_ptr(c));
      if (c != column_) continue;
      names.insert(names.end(), into_.begin(), into_.end());
      columns.insert(columns.end(), made.begin(), made.end());
    }
    auto out = Table::make(std::move(names), std::move(columns), batch.source_lines_ptr());
    if (!out) return out.take_error();
    change.rows_in += batch.row_count();
    change.rows_out += batch.row_count();
    return out;
  }

  // Each part is a SUBSTR of the rest after the separators before it,
  // found by position (strpos, LOCATE, instr: code points, exact bytes under
  // the script's binary comparison); the rest after a missing separator is
  // NULL, and so are the parts after it.
  SqlSupport sql_support(Dialect) const override { return SqlSupport::exact; }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const Dialect d = sql.dialect;
    const std::string separator = sql.text(separator_);
    const std::string separator_length = std::to_string(utf8::code_point_count(separator_));
    std::string rest = sql.column(column_);
    std::vector<std::string> parts;
    for (size_t p = 0; p < into_.size(); ++p) {
      if (p + 1 == into_.size()) {
        parts.push_back(rest);
        break;
      }
      const std::string at = sql::position(d, separator, rest);
      parts.push_back(std::string("CASE WHEN ") + at + " > 0 THEN " + sql::substring(d, rest, "1", at + " - 1") +
                      " ELSE " + rest + " END");
      rest = std::string("CASE WHEN ") + at + " > 0 THEN " + sql::substring(d, rest, at + " + " + separator_length) + " END";
    }
    std::string select = "SELECT";
    for (size_t c = 0; c < input_.size(); ++c) {
      select += c ? ",\n       " : " ";
      select += sql.column(c);
      if (c != column_) continue;
      for (size_t p = 0; p < into_.size(); ++p) select += ",\n       " + parts[p] + " AS " + sql.name(into_[p]);
    }
    SqlStepText out;
    out.select = select + ",\n       " + sql.line() + "\nFROM " + sql.from;
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    p["separator"] = separator_;
    p["into"] = into_;
    return p;
  }

 private:
  size_t column_;
  std::string separator_;
  std::vector<std::string> into_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_split_column(StepParams& params) {
  auto column = text_column(params, "column");
  if (!column) return column.take_error();
  auto separator = utf8_text(params, "separator", false);
  if (!separator) return separator.take_error();
  auto into = params.text_list("into");
  if (!into) return into.take_error();
  if (into->size() < 2) return params.error("into", "must name at least two new columns");
  for (size_t i = 0; i < into->size(); ++i) {
    const std::string& name = (*into)[i];
    if (name.empty()) return params.error("into", "a column name must not be empty");
    if (utf8::first_invalid(name) != std::string_view::npos) return params.error("into", "names must be valid UTF-8");
    for (const ColumnSchema& existing : params.input())
      if (existing.name == name) return params.error("into", "'" + name + "' is already a column");
    for (size_t j = 0; j < i; ++j)
      if ((*into)[j] == name) return params.error("into", "names '" + name + "' twice");
  }
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new SplitColumn(*column, std::move(*separator), std::move(*into), params.input()));
}

}  // namespace tamis
