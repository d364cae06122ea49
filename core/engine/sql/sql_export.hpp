// `tamis sql` (design §6): a recipe as one commented SQL script. The script
// copies the raw table into a staging table (the raw table is never
// modified), makes one table per enabled step, each after a comment with the
// step number, its plain sentence and its note, and ends with the cleaned
// table. Row order travels in the column tamis_line (the record's position
// in the file): the raw table must have it, and the load script makes it.
//
// A step whose SQL in this dialect could differ from `tamis run` stops the
// export with a message naming the step, its op and the dialect; with
// allow_approximate, an approximate step is written with a warning comment.
#pragma once

#include <optional>
#include <string>

#include "recipe.hpp"

namespace tamis {

struct SqlExportOptions {
  Dialect dialect = Dialect::postgres;
  std::string source = "tamis_raw";
  std::string target = "tamis_clean";
  bool allow_approximate = false;
  // Also write the statements that load this CSV file into the raw table.
  std::optional<std::string> load_csv;
};

Result<std::string> export_sql(const Recipe& recipe, const SqlExportOptions& options);

// "postgres" -> Dialect::postgres, ...
std::optional<Dialect> parse_dialect(std::string_view name);

}  // namespace tamis
