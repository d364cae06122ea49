#include "steps/cast.hpp"

#include "dates.hpp"
#include "expr/numeric.hpp"
#include "scalars.hpp"
#include "sql/sql_dates.hpp"
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

  // To text: an integer's text is canonical in every dialect. From text,
  // where regular expressions check the shapes CAST reads (read_scaled: ASCII
  // spaces around, a sign, digits; a decimal also a fraction): integer and
  // decimal through sql::scaled_number (decimal is approximate, as exponent
  // notation such as 1.5E3 is not read there); boolean by the words TRUE,
  // FALSE and UNKNOWN in any ASCII case, in the dialects with a BOOLEAN type.
  // A date is read as parse_date reads %Y-%m-%d, after trimming ASCII spaces,
  // in every dialect. Not yet: decimal to text.
  SqlSupport sql_support(Dialect dialect) const override {
    const Type from = input_[column_].type;
    if (to_ == Type::text) return from == Type::text || from == Type::integer ? SqlSupport::exact : SqlSupport::unsupported;
    if (from != Type::text) return SqlSupport::unsupported;
    if (to_ == Type::date) return SqlSupport::exact;
    if (dialect == Dialect::sqlite) return SqlSupport::unsupported;
    switch (to_) {
      case Type::integer: return SqlSupport::exact;
      case Type::decimal: return SqlSupport::approximate;
      case Type::boolean: return dialect == Dialect::mysql ? SqlSupport::unsupported : SqlSupport::exact;
      default: return SqlSupport::unsupported;
    }
  }

  Result<SqlStepText> to_sql(const SqlContext& sql) const override {
    const Dialect d = sql.dialect;
    const std::string x = sql.column(column_);
    SqlStepText out;
    if (to_ == Type::text) {
      if (input_[column_].type == Type::text) return out;
      out.select = sql.select_replacing({{column_, sql::as_text(d, x)}});
      return out;
    }
    const std::string trimmed = sql::trim_characters(d, x, U" ", "both");
    if (to_ == Type::boolean) return boolean_sql(sql, trimmed);
    if (to_ == Type::date)
      return conversion_sql(sql, column_, sql::date_of(d, trimmed, {"%Y-%m-%d"}),
                            [&](const std::string& v) { return d == Dialect::sqlite ? v : sql::as_text(d, v); },
                            on_error_, op());
    const std::string shape = to_ == Type::integer ? std::string("[+-]?[0-9]+")
                                                   : std::string("[+-]?(?:[0-9]+(?:\\.[0-9]*)?|\\.[0-9]+)");
    const std::string converted = std::string("CASE WHEN ") + sql::regex_matches(d, trimmed, sql::regex_whole(d, shape)) +
                                  "\n         THEN " + sql::scaled_number(d, trimmed, scale_, false) + " END";
    auto result = conversion_sql(sql, column_, converted, [&](const std::string& v) { return sql::as_text(d, v); },
                                 on_error_, op());
    if (result && to_ == Type::decimal)
      result->approximation = "exponent notation (1.5E3) is read as not a number";
    return result;
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

  // UNKNOWN is NULL, not a failure: on_error keep writes NULL for it and
  // reject keeps its row.
  Result<SqlStepText> boolean_sql(const SqlContext& sql, const std::string& trimmed) const {
    const Dialect d = sql.dialect;
    auto word = [&](std::string_view w) {
      std::string pattern;
      for (const char c : w) {
        pattern += '[';
        pattern += c;
        pattern += static_cast<char>(c - 'A' + 'a');
        pattern += ']';
      }
      return sql::regex_matches(d, trimmed, sql::regex_whole(d, pattern));
    };
    const std::string x = sql.column(column_);
    const std::string is_true = word("TRUE"), is_false = word("FALSE"), is_unknown = word("UNKNOWN");
    SqlStepText out;
    switch (on_error_) {
      case OnError::keep:
        out.select = sql.select_replacing({{column_, std::string("CASE WHEN ") + is_true + " THEN 'true' WHEN " + is_false +
                                                         " THEN 'false' WHEN " + is_unknown + " THEN NULL ELSE " + x + " END"}});
        return out;
      case OnError::reject:
        if (sql.rejects_allowed)
          return usage_error("on_error reject with rejected rows allowed (input.max_rejects) needs a rejects file, "
                             "which a SQL script cannot write");
        out.statements = stop_unless_zero(
            sql, "rejects",
            std::string("SELECT COUNT(*) FROM ") + sql.from + " WHERE " + x + " IS NOT NULL AND NOT (" + is_true + " OR " +
                is_false + " OR " + is_unknown + ")",
            std::string("step ") + std::to_string(sql.step_number) + " (cast) rejected rows, and input.max_rejects allows none");
        break;
      case OnError::null: break;
    }
    out.select = sql.select_replacing(
        {{column_, std::string("CASE WHEN ") + is_true + " THEN TRUE WHEN " + is_false + " THEN FALSE END"}});
    return out;
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
