#include "steps/cast.hpp"

#include "dates.hpp"
#include "expr/numeric.hpp"
#include "scalars.hpp"
#include "sql/sql_step.hpp"
#include "steps/typed_support.hpp"
#include "utf8.hpp"

namespace tamis {

namespace {

bool is_number(Type t) { return t == Type::integer || t == Type::decimal; }

bool castable(Type from, Type to) {
  return from == Type::text || to == Type::text || from == to || (is_number(from) && is_number(to));
}

std::string type_text(Type type, int scale) {
  return type == Type::decimal ? "decimal(" + std::to_string(scale) + ")" : std::string(type_name(type));
}

struct CastState final : StepState {
  ConversionTally tally;
};

class Cast final : public Step {
 public:
  Cast(size_t column, Type to, int scale, OnError on_error, Schema input)
      : column_(column), to_(to), scale_(scale), on_error_(on_error), input_(std::move(input)) {}

  std::string_view op() const override { return "cast"; }

  std::string describe() const override {
    const std::string& name = input_[column_].name;
    const std::string target = to_ == Type::decimal ? "decimal with " + std::to_string(scale_) + " decimals"
                                                    : std::string(type_name(to_));
    if (to_ == Type::text) return "Convert " + name + " to text in its plain written form.";
    switch (on_error_) {
      case OnError::null:
        return "Convert " + name + " to " + target + " as SQL CAST does; values that cannot be converted become NULL.";
      case OnError::reject:
        return "Convert " + name + " to " + target + " as SQL CAST does; reject the rows whose value cannot be converted.";
      case OnError::keep:
        return "Rewrite the values of " + name + " that convert to " + target +
               " as SQL CAST does in their plain form, and leave the others as they are.";
    }
    return "";
  }

  Schema output_schema(const Schema& input) const override {
    Schema out = input;
    if (on_error_ != OnError::keep) out[column_] = {input[column_].name, to_, to_ == Type::decimal ? scale_ : 0};
    return out;
  }

  std::unique_ptr<StepState> start() const override { return std::make_unique<CastState>(); }

  Result<Table> apply(const Table& batch, StepState* state, ChangeRecord& change) const override {
    const Column& column = batch.column(column_);
    if (to_ == Type::text || (column.type() == to_ && column.scale() == scale_)) {
      change.rows_in += batch.row_count();
      change.rows_out += batch.row_count();
      return column.type() == to_ ? batch : batch.with_column(column_, canonical_text(column));
    }
    ConversionTally& tally = static_cast<CastState*>(state)->tally;
    if (column.type() == Type::text) return from_text(batch, tally, change);
    // Between numbers: through the canonical text, which read_scaled rounds
    // half away from zero to the target scale.
    const Table as_text = batch.with_column(column_, canonical_text(column));
    return convert_text_column(as_text, column_, to_, scale_, on_error_, "does not fit " + type_text(to_, scale_),
                               tally, change, [&](std::string_view value, uint64_t, int64_t& out) {
                                 return expr::read_scaled(value, scale_, out) == expr::NumberRead::ok
                                            ? Converted::value
                                            : Converted::failed;
                               });
  }

  Status finish(StepState* state, ChangeRecord& change) const override {
    const ConversionTally& tally = static_cast<CastState*>(state)->tally;
    if (!tally.belongs_to(change)) return Ok{};
    if (const std::string w = failure_warning(tally, input_[column_].name, "cast to " + type_text(to_, scale_),
                                              on_error_);
        !w.empty())
      change.warnings.push_back(w);
    return Ok{};
  }

  // Only text and integers to text are exported yet (an integer's text is
  // canonical in every dialect); converting text under these exact rules
  // needs shape tests no SQL has been checked against a database for. (No
  // SQL script writes a rejects file.)
  SqlSupport sql_support(Dialect) const override {
    const Type from = input_[column_].type;
    return to_ == Type::text && (from == Type::text || from == Type::integer) ? SqlSupport::exact
                                                                              : SqlSupport::unsupported;
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    SqlStepText out;
    if (input_[column_].type == Type::text) return out;
    const char* text_type = sql.dialect == Dialect::mysql    ? "CHAR"
                            : sql.dialect == Dialect::spark  ? "STRING"
                            : sql.dialect == Dialect::duckdb ? "VARCHAR"
                                                             : "TEXT";
    out.select = sql.select_replacing({{column_, std::string("CAST(") + sql.column(column_) + std::string(" AS ") + text_type + ")"}});
    return out;
  }

  nlohmann::ordered_json parameters() const override {
    nlohmann::ordered_json p;
    p["column"] = input_[column_].name;
    p["to"] = type_name(to_);
    if (to_ == Type::decimal) p["scale"] = scale_;
    p["on_error"] = on_error_name(on_error_);
    return p;
  }

 private:
  Result<Table> from_text(const Table& batch, ConversionTally& tally, ChangeRecord& change) const {
    static const DateFormat iso = DateFormat::compile("%Y-%m-%d").value();
    const std::string failure = to_ == Type::integer ? "is not an integer"
                                : to_ == Type::decimal ? "is not a number"
                                : to_ == Type::date    ? "is not a date in the form YYYY-MM-DD"
                                                       : "is not TRUE, FALSE or UNKNOWN";
    return convert_text_column(batch, column_, to_, scale_, on_error_, failure, tally, change,
                               [&](std::string_view value, uint64_t, int64_t& out) {
                                 switch (to_) {
                                   case Type::integer:
                                   case Type::decimal:
                                     return expr::read_scaled(value, scale_, out, to_ == Type::decimal) ==
                                                    expr::NumberRead::ok
                                                ? Converted::value
                                                : Converted::failed;
                                   case Type::date:
                                     if (const auto days = iso.parse(trim_ascii_spaces(value))) {
                                       out = *days;
                                       return Converted::value;
                                     }
                                     return Converted::failed;
                                   case Type::boolean: {
                                     const std::string_view word = trim_ascii_spaces(value);
                                     if (utf8::equals_ascii_ignoring_case(word, "unknown")) return Converted::null;
                                     out = utf8::equals_ascii_ignoring_case(word, "true") ? 1 : 0;
                                     return out || utf8::equals_ascii_ignoring_case(word, "false") ? Converted::value
                                                                                               : Converted::failed;
                                   }
                                   case Type::text: break;
                                 }
                                 return Converted::failed;
                               });
  }

  ColumnPtr canonical_text(const Column& column) const {
    auto out = std::make_shared<Column>(Type::text);
    std::string text;
    for (size_t k = 0; k < column.chunk_count(); ++k) {
      const ColumnChunk& chunk = column.chunk(k);
      TextChunkBuilder builder;
      builder.reserve(chunk.rows, chunk.rows * 8);
      for (size_t i = 0; i < chunk.rows; ++i) {
        if (chunk.is_null(i)) {
          builder.append_null();
          continue;
        }
        text.clear();
        append_canonical_value(column.type(), column.scale(), chunk.numbers[i], text);
        builder.append(text);
      }
      out->append_chunk(builder.finish());
    }
    return out;
  }

  size_t column_;
  Type to_;
  int scale_;
  OnError on_error_;
  Schema input_;
};

}  // namespace

Result<std::unique_ptr<Step>> parse_cast(StepParams& params) {
  auto column = params.column("column");
  if (!column) return column.take_error();
  const ColumnSchema& from = params.input()[*column];
  auto to_name = params.choice("to", {"text", "integer", "decimal", "date", "boolean"}, std::nullopt);
  if (!to_name) return to_name.take_error();
  const Type to = *type_from_name(*to_name);
  if (!castable(from.type, to))
    return params.error("to", "'" + from.name + "' is " + std::string(type_name(from.type)) + ", which cannot be cast to " +
                                  *to_name + " (only text, and integer with decimal, convert to other types)");
  int scale = 0;
  if (to == Type::decimal) {
    if (!params.raw("scale")) return params.error("scale", "is required when to is decimal (0 to 18 decimals)");
    auto s = params.integer_or("scale", 0);
    if (!s) return s.take_error();
    if (*s < 0 || *s > expr::kMaxScale)
      return params.error("scale", "expected a whole number from 0 to " + std::to_string(expr::kMaxScale));
    scale = static_cast<int>(*s);
  } else if (params.raw("scale")) {
    return params.error("scale", "applies only when to is decimal");
  }
  auto on_error = read_on_error(params);
  if (!on_error) return on_error.take_error();
  if (*on_error == OnError::keep && (from.type != Type::text || to == Type::text))
    return params.error("on_error", "keep leaves unconvertible values as text, so it needs a text column cast to "
                                    "another type");
  if (Status s = params.finish(); !s) return s.take_error();
  return std::unique_ptr<Step>(new Cast(*column, to, scale, *on_error, params.input()));
}

}  // namespace tamis
