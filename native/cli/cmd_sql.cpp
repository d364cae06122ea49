#include <iostream>

#include "commands.hpp"
#include "recipe.hpp"
#include "run_support.hpp"
#include "sql/sql_export.hpp"

namespace tamis::cli {

CLI::App* add_sql_command(CLI::App& app, SqlArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "sql",
      "Write a recipe as one commented SQL script for a database. The script copies the raw table\n"
      "(--source, never modified) into a staging table, makes one table per enabled step (each after\n"
      "a comment with the step number, its plain sentence and its note), and ends with the cleaned\n"
      "table (--target). The raw table holds the recipe's input.columns as text plus tamis_line, the\n"
      "record's position in the file, which orders the rows (deduplicate's first/last, carry_forward)\n"
      "and stays in the cleaned table: ORDER BY tamis_line gives the file order. --load-script CSV\n"
      "adds the dialect's statements that load CSV into the raw table with that column (COPY,\n"
      "LOAD DATA LOCAL INFILE, read_csv, the sqlite3 shell's .import; none for Spark).\n"
      "The cleaned table equals `tamis run` cell for cell. A step the dialect cannot express exactly\n"
      "stops the export (exit 2) with a message naming the step, its op and the dialect; with\n"
      "--allow-approximate it is written in its nearest form under a WARNING comment.\n"
      "Example: tamis sql survey.recipe.json --dialect postgres --load-script survey.csv -o clean.sql");
  cmd->add_option("recipe", args.recipe, "Recipe file (JSON, tamis_recipe 1) with input.columns")->required();
  cmd->add_option("--dialect", args.dialect, "postgres, mysql (MySQL 8 / MariaDB), sqlite, duckdb or spark")
      ->required()
      ->check(CLI::IsMember({"postgres", "mysql", "sqlite", "duckdb", "spark"}));
  cmd->add_option("--source", args.source, "The raw table (only read)")->capture_default_str();
  cmd->add_option("--target", args.target, "The cleaned table the script makes (replaced if it exists)")
      ->capture_default_str();
  cmd->add_option("-o,--output", args.output, "Script file ('-' for standard output, the default)")
      ->capture_default_str();
  cmd->add_flag("--allow-approximate", args.allow_approximate,
                "Write steps the dialect can only approximate, each under a WARNING comment");
  cmd->add_option("--load-script", args.load_csv,
                  "Also write the statements that load this CSV file (as the database server or shell sees "
                  "its path) into the raw table");
  return cmd;
}

int run_sql(const SqlArgs& args) {
  auto recipe = load_recipe_file(args.recipe);
  if (!recipe) return report_error(recipe.error());
  SqlExportOptions options;
  options.dialect = *parse_dialect(args.dialect);
  options.source = args.source;
  options.target = args.target;
  options.allow_approximate = args.allow_approximate;
  if (!args.load_csv.empty()) options.load_csv = args.load_csv;
  if (args.source == args.target) return report_error(usage_error("--source and --target must differ"));
  auto script = export_sql(*recipe, options);
  if (!script) {
    Error e = script.take_error();
    e.file = args.recipe;
    return report_error(e);
  }
  if (args.output != "-" && same_file(args.recipe, args.output))
    return report_error(usage_error("'" + args.output + "' is the recipe; tamis never overwrites what it reads"));
  auto sink = open_file_sink(args.output);
  if (!sink) return report_error(sink.error());
  if (Status s = (*sink)->write(*script); !s) return report_error(s.error());
  if (Status s = (*sink)->commit(); !s) return report_error(s.error());
  return 0;
}

}  // namespace tamis::cli
