// The `tamis` commands. Each registers its options on the CLI11 app and runs
// after parsing; every run returns the process exit code (design §5).
#pragma once

#include <CLI/CLI.hpp>

#include <string>

#include "csv_reader.hpp"

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
  ReadingOptions reading;
};
CLI::App* add_profile_command(CLI::App& app, ProfileArgs& args);
int run_profile(const ProfileArgs& args);

// Prints "tamis: <error>" on stderr and returns the error's exit code.
int report_error(const Error& error);

}  // namespace tamis::cli
