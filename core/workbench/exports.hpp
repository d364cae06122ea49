// What the workbench exports, as bytes the shells write to a file or offer
// as a download: the cleaned table (exactly what `tamis run` writes for the
// same recipe and file), the recipe, its SQL script, and the run report.
#pragma once

#include <optional>
#include <string>

#include "document.hpp"
#include "sql/sql_export.hpp"

namespace tamis::workbench {

// CSV or TSV (default: the recipe's output.format), with the recipe's NULL
// marker and date format. Fails while a step does not fit the file, and,
// as `tamis run` does, when more rows are rejected than input.max_rejects
// allows (RejectCap).
Result<std::string> export_cleaned(Document& document, std::optional<std::string> format = std::nullopt);
std::string export_recipe(const Document& document);
Result<std::string> export_sql_script(const Document& document, Dialect dialect, bool allow_approximate = false);
// The JSON run report of the document's recipe over its file (run_report.hpp).
Result<std::string> export_run_report(Document& document, const std::string& output_name = "cleaned.csv");

}  // namespace tamis::workbench
