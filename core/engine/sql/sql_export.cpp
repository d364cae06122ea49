#include "sql/sql_export.hpp"

#include "sql/sql_step.hpp"
#include "sql/sql_text.hpp"

namespace tamis {

namespace {

Error step_error(const CompiledStep& step, std::string message) {
  Error e = usage_error(std::move(message));
  e.step = step.index;
  return e;
}

// Text of any string inside the step's parameters that SQL cannot hold.
std::string parameter_problem(const nlohmann::ordered_json& value) {
  if (value.is_string()) return sql::literal_problem(value.get_ref<const std::string&>());
  if (value.is_structured())
    for (const auto& [key, item] : value.items()) {
      if (std::string p = sql::literal_problem(key); !p.empty()) return p;
      if (std::string p = parameter_problem(item); !p.empty()) return p;
    }
  return {};
}

// Every line of `text` as an SQL comment line.
std::string comment(std::string_view text) {
  std::string out = "-- ";
  for (const char ch : text) {
    if (ch == '\n') out += "\n-- ";
    else if (ch != '\r') out += ch;
  }
  return out + "\n";
}

std::string column_definitions(Dialect dialect, const Schema& columns, std::string_view text_type) {
  std::string out;
  for (const ColumnSchema& c : columns) out += std::string("  ") + sql::identifier(dialect, c.name) + std::string(" ") + std::string(text_type) + ",\n";
  return out;
}

std::string name_list(Dialect dialect, const Schema& columns) {
  std::string out;
  for (const ColumnSchema& c : columns) out += (out.empty() ? "" : ", ") + sql::identifier(dialect, c.name);
  return out;
}

Result<std::string> load_statements(const Recipe& recipe, const SqlExportOptions& options, const Schema& columns) {
  const Dialect d = options.dialect;
  const RecipeInput& in = recipe.input;
  if (in.skip_rows != 0) return usage_error("--load-script: input.skipRows other than 0 is not written as SQL");
  if (in.encoding && *in.encoding != "utf-8" && *in.encoding != "UTF-8")
    return usage_error(std::string("--load-script: the load statements read UTF-8; the recipe's input.encoding is ") + *in.encoding);
  const char delimiter = in.delimiter.value_or(in.format == "tsv" ? '\t' : ',');
  const bool header = in.header.value_or(true);
  const std::string file = sql::literal(d, *options.load_csv);
  const std::string raw = sql::identifier(d, options.source);
  const std::string line = sql::identifier(d, kSqlLineColumn);
  const std::string names = name_list(d, columns);
  const std::string delimiter_text = sql::literal(d, std::string(1, delimiter));
  const std::string quote_text = sql::literal(d, std::string(1, in.quote));
  std::string out = comment(std::string("Load ") + *options.load_csv + std::string(" into the raw table ") + options.source +
                            "; every value arrives as text, an empty field as empty text (not NULL), and " +
                            std::string(kSqlLineColumn) + " numbers the records in file order.");
  out += std::string("DROP TABLE IF EXISTS ") + raw + ";\n";
  switch (d) {
    case Dialect::postgres:
      out += std::string("CREATE TABLE ") + raw + std::string(" (\n") + column_definitions(d, columns, "text") + std::string("  ") + line +
             " bigint GENERATED ALWAYS AS IDENTITY\n);\n";
      out += std::string("COPY ") + raw + std::string(" (") + names + std::string(")\n  FROM ") + file + "\n  WITH (FORMAT csv, HEADER " +
             (header ? "true" : "false") + std::string(", DELIMITER ") + delimiter_text + std::string(", QUOTE ") + quote_text +
             std::string(", ENCODING 'UTF8', FORCE_NOT_NULL (") + names + "));\n";
      break;
    case Dialect::mysql:
      out += std::string("CREATE TABLE ") + raw + std::string(" (\n") + column_definitions(d, columns, "LONGTEXT") + std::string("  ") + line +
             " BIGINT AUTO_INCREMENT PRIMARY KEY\n) CHARACTER SET utf8mb4 COLLATE utf8mb4_bin;\n";
      out += std::string("LOAD DATA LOCAL INFILE ") + file + std::string(" INTO TABLE ") + raw +
             std::string("\n  CHARACTER SET utf8mb4\n  FIELDS TERMINATED BY ") + delimiter_text + " OPTIONALLY ENCLOSED BY " +
             quote_text + std::string(" ESCAPED BY ''\n  LINES TERMINATED BY '\\n'\n") + (header ? "  IGNORE 1 LINES\n" : "") +
             std::string("  (") + names + ");\n";
      break;
    case Dialect::duckdb: {
      std::string types;
      for (const ColumnSchema& c : columns)
        types += (types.empty() ? "" : ", ") + sql::literal(d, c.name) + ": 'VARCHAR'";
      out += std::string("CREATE TABLE ") + raw + std::string(" AS\nSELECT ") + names + std::string(", CAST(file_row AS BIGINT) AS ") + line +
             std::string("\nFROM (SELECT *, row_number() OVER () AS file_row\n      FROM read_csv(") + file +
             std::string(", header = ") + (header ? "true" : "false") + std::string(", delim = ") + delimiter_text + ", quote = " +
             quote_text + std::string(", escape = ") + quote_text + std::string(",\n                    columns = {") + types +
             std::string("}, force_not_null = [") + [&] {
               std::string list;
               for (const ColumnSchema& c : columns) list += (list.empty() ? "" : ", ") + sql::literal(d, c.name);
               return list;
             }() + "], parallel = false));\n";
      break;
    }
    case Dialect::sqlite: {
      const std::string file_table = sql::identifier(d, options.source + "_file");
      out += comment("The .import line is a command of the sqlite3 shell, not SQL: run this script with sqlite3.");
      out += std::string("DROP TABLE IF EXISTS ") + file_table + ";\n";
      out += std::string("CREATE TABLE ") + file_table + std::string(" (\n") + column_definitions(d, columns, "TEXT");
      out.erase(out.size() - 2);  // the last column needs no comma
      out += "\n);\n";
      out += std::string(".import --csv") + (header ? " --skip 1" : "") + std::string(" ") + *options.load_csv + " " +
             options.source + "_file\n";
      out += std::string("CREATE TABLE ") + raw + std::string(" AS SELECT ") + names + std::string(", rowid AS ") + line + std::string(" FROM ") + file_table + ";\n";
      out += std::string("DROP TABLE ") + file_table + ";\n";
      break;
    }
    case Dialect::spark:
      return usage_error("--load-script: Spark SQL has no statement that numbers a CSV file's records in file "
                         "order; load the raw table with a " + std::string(kSqlLineColumn) + " column yourself");
  }
  return out + "\n";
}

std::string preamble(Dialect d) {
  switch (d) {
    case Dialect::mysql:
      return comment("Text compares byte by byte (utf8mb4_bin, and CAST(... AS BINARY) where padding would "
                     "ignore trailing spaces); || would mean OR, so text is joined with CONCAT.") +
             "SET NAMES utf8mb4 COLLATE utf8mb4_bin;\n"
             "SET SESSION sql_mode = 'STRICT_ALL_TABLES,ERROR_FOR_DIVISION_BY_ZERO';\n\n";
    case Dialect::postgres:
      return comment("Literals are standard SQL strings (backslash is an ordinary character).") +
             "SET standard_conforming_strings = on;\n\n";
    default: return {};
  }
}

}  // namespace

std::optional<Dialect> parse_dialect(std::string_view name) {
  for (const Dialect d : {Dialect::postgres, Dialect::mysql, Dialect::sqlite, Dialect::duckdb, Dialect::spark})
    if (dialect_name(d) == name) return d;
  return std::nullopt;
}

Result<std::string> export_sql(const Recipe& recipe, const SqlExportOptions& options) {
  const Dialect d = options.dialect;
  const std::string dialect = std::string(dialect_name(d));
  if (recipe.input.columns.empty())
    return usage_error("the recipe's input.columns must list the raw table's columns; the SQL export reads no file");
  Schema input;
  for (const InputColumn& c : recipe.input.columns) {
    if (c.type != Type::text)
      return usage_error(std::string("input.columns declares '") + c.name + std::string("' as ") + std::string(type_name(c.type)) +
                         "; a SQL script cannot reject the rows that do not fit, so declare it text and convert it "
                         "with parse_number, parse_date or cast");
    if (c.name == kSqlLineColumn)
      return usage_error(std::string("the column name '") + c.name + "' is the one the SQL export uses for the row order");
    input.push_back({c.name, Type::text, 0});
  }
  for (const std::string* name : {&options.source, &options.target})
    if (name->empty()) return usage_error("--source and --target must not be empty");
  auto compiled = compile_recipe(recipe, input);
  if (!compiled) return compiled.take_error();

  std::string script = comment(recipe.title.empty() ? "tamis recipe" : recipe.title);
  script += comment(std::string("Written by `tamis sql --dialect ") + dialect + std::string("`. The raw table ") + options.source +
                    std::string(" is only read; the cleaned table is ") + options.target + ".\n" +
                    std::string("Row order: ORDER BY ") + std::string(kSqlLineColumn) +
                    " (the record's position in the file, carried through every step).");
  script += std::string("\n") + preamble(d);
  if (options.load_csv) {
    auto load = load_statements(recipe, options, input);
    if (!load) return load.take_error();
    script += *load;
  }

  auto table_name = [&](size_t k) { return options.target + std::string("_step_") + std::to_string(k); };
  std::vector<std::string> made;
  SqlContext context;
  context.dialect = d;
  context.input = input;
  context.table_prefix = options.target;
  context.rejects_allowed = recipe.input.max_rejects && *recipe.input.max_rejects != "0" &&
                            *recipe.input.max_rejects != "0%";
  const std::string stage = sql::identifier(d, table_name(0));
  script += comment("Staging copy of the raw table.");
  script += std::string("DROP TABLE IF EXISTS ") + stage + ";\n";
  context.from = sql::identifier(d, options.source);
  script += std::string("CREATE TABLE ") + stage + std::string(" AS\n") + context.select_replacing({}) + ";\n\n";
  made.push_back(stage);
  std::string current = stage;

  for (const CompiledStep& step : compiled->steps) {
    const Step& s = *step.step;
    const int number = step.index + 1;
    const std::string which = std::string("(") + std::string(s.op()) + ")";
    const SqlSupport support = s.sql_support(d);
    if (support == SqlSupport::unsupported)
      return step_error(step, which + std::string(" cannot be exported to ") + dialect + std::string(": no ") + dialect +
                                  " SQL gives the same results as tamis run for it");
    if (support == SqlSupport::approximate && !options.allow_approximate)
      return step_error(step, which + std::string(" can be exported to ") + dialect +
                                  " only approximately; pass --allow-approximate to accept that (the script then "
                                  "marks the step with a warning comment)");
    if (std::string p = parameter_problem(s.parameters()); !p.empty())
      return step_error(step, which + std::string(": a parameter ") + p);
    context.from = current;
    context.step_number = number;
    auto text = s.to_sql(context);
    if (!text) return step_error(step, which + std::string(" cannot be exported to ") + dialect + std::string(": ") + text.error().message);
    script += comment(std::string("Step ") + std::to_string(number) + std::string(" (") + std::string(s.op()) + std::string("): ") + s.describe());
    if (!step.note.empty()) script += comment(std::string("Note: ") + step.note);
    if (support == SqlSupport::approximate)
      script += comment(std::string("WARNING: approximate in ") + dialect + ", results can differ from tamis run" +
                        (text->approximation.empty() ? std::string(".") : std::string(": ") + text->approximation));
    for (const std::string& statement : text->statements) script += statement + ";\n";
    if (!text->select.empty()) {
      const std::string next = sql::identifier(d, table_name(static_cast<size_t>(number)));
      script += std::string("DROP TABLE IF EXISTS ") + next + ";\n";
      script += std::string("CREATE TABLE ") + next + std::string(" AS\n") + text->select + ";\n";
      made.push_back(next);
      current = next;
    }
    script += "\n";
    context.input = s.output_schema(context.input);
  }

  const std::string target = sql::identifier(d, options.target);
  context.from = current;
  script += comment("The cleaned table.");
  script += std::string("DROP TABLE IF EXISTS ") + target + ";\n";
  script += std::string("CREATE TABLE ") + target + std::string(" AS\n") + context.select_replacing({}) + ";\n";
  for (const std::string& table : made) script += std::string("DROP TABLE ") + table + ";\n";
  return script;
}

}  // namespace tamis
