// The `tamis` commands. Each registers its options on the CLI11 app and runs
// after parsing; every run returns the process exit code (design §5).
#pragma once

#include <CLI/CLI.hpp>

#include <string>

#include "csv_reader.hpp"
#include "findings/findings.hpp"
#include "profile.hpp"

namespace tamis::cli {

// Options shared by every command that reads a CSV/TSV file.
struct ReadingOptions {
  std::string encoding = "auto";
  std::string delimiter = "auto";
  std::string quote = "\"";
  std::string header = "auto";
  size_t skip_rows = 0;

  void add_to(CLI::App& command);
  Result<CsvOptions> to_csv_options() const;
};

// Reads a whole CSV/TSV file ('-' = standard input) into one table, with a
// progress bar on a terminal; `display` gets the name used in messages.
Result<Table> read_whole_file(const std::string& input, const CsvOptions& options, ReadReport& report,
                              std::string& display);
// Profiles a table in slices, with a progress bar on a terminal.
TableProfile profile_with_progress(const Table& table);

struct ConvertArgs {
  std::string input;
  std::string output;
  std::string to = "csv";
  std::string line_ending = "lf";
  std::string null_marker;
  std::string rejects;
  bool lenient = false;
  ReadingOptions reading;
};
CLI::App* add_convert_command(CLI::App& app, ConvertArgs& args);
int run_convert(const ConvertArgs& args);

struct ProfileArgs {
  std::string input;
  bool json = false;
  bool strict = false;
  bool findings = false;
  std::string html;
  ReadingOptions reading;
};
CLI::App* add_profile_command(CLI::App& app, ProfileArgs& args);
int run_profile(const ProfileArgs& args);

struct RunArgs {
  std::string recipe;
  std::string input;
  std::string output = "-";
  std::string report;
  std::string report_html;
  std::string rejects;
  std::string metadata;
  std::string max_rejects;
  size_t batch_rows = 0;
};
CLI::App* add_run_command(CLI::App& app, RunArgs& args);
int run_run(const RunArgs& args);

struct CheckArgs {
  std::string recipe;
  std::string input;
  std::string max_rejects;
};
CLI::App* add_check_command(CLI::App& app, CheckArgs& args);
int run_check(const CheckArgs& args);

struct ExplainArgs {
  std::string recipe;
  std::string input;
};
CLI::App* add_explain_command(CLI::App& app, ExplainArgs& args);
int run_explain(const ExplainArgs& args);

struct SimilarArgs {
  std::string input;
  std::string column;
  std::string method = "token_key";
  double threshold = 0.85;
  bool json = false;
  std::string output;
  ReadingOptions reading;
};
CLI::App* add_similar_command(CLI::App& app, SimilarArgs& args);
int run_similar(const SimilarArgs& args);

struct SqlArgs {
  std::string recipe;
  std::string dialect;
  std::string source = "tamis_raw";
  std::string target = "tamis_clean";
  std::string output = "-";
  std::string load_csv;
  bool allow_approximate = false;
};
CLI::App* add_sql_command(CLI::App& app, SqlArgs& args);
int run_sql(const SqlArgs& args);

struct SuggestArgs {
  std::string input;
  std::string output;
  std::string title;
  std::vector<std::string> sentinels;
  bool strict = false;
  ReadingOptions reading;
};
CLI::App* add_suggest_command(CLI::App& app, SuggestArgs& args);
int run_suggest(const SuggestArgs& args);

// Findings for profile --findings and suggest (cmd_suggest.cpp): scanned with
// a progress bar, printed for people or as JSON.
std::vector<Finding> scan_findings(const Table& table, const TableProfile& profile, const FindingOptions& options);
void print_findings(std::ostream& out, const std::vector<Finding>& findings);
nlohmann::ordered_json findings_json(const std::vector<Finding>& findings);

// Prints "tamis: <error>" on stderr and returns the error's exit code.
int report_error(const Error& error);

}  // namespace tamis::cli
