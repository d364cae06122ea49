#include "commands.hpp"

#include <iostream>

#include "progress.hpp"

namespace tamis::cli {

void ReadingOptions::add_to(CLI::App& command) {
  command.add_option("--encoding", encoding,
                     "Input encoding: auto, utf-8, utf-16le, utf-16be, windows-1252, iso-8859-1. "
                     "auto: a byte order mark, else UTF-8 when the bytes are valid UTF-8, else windows-1252")
      ->capture_default_str();
  command.add_option("--delimiter", delimiter, "Field delimiter: auto, ',', ';', tab, '|' or any single character")
      ->capture_default_str();
  command.add_option("--quote", quote, "Quote character")->capture_default_str();
  command.add_option("--header", header, "Is the first row a header: auto, yes, no")
      ->check(CLI::IsMember({"auto", "yes", "no"}))
      ->capture_default_str();
  command.add_option("--skip-rows", skip_rows, "Physical lines to skip before the header (preamble)")
      ->check(CLI::Validator(
          [](const std::string& value) -> std::string {
            const bool digits = !value.empty() && value.find_first_not_of("0123456789") == std::string::npos;
            return digits ? "" : "expected a whole number of lines (0 or more), got '" + value + "'";
          },
          "LINES"))
      ->capture_default_str();
}

Result<CsvOptions> ReadingOptions::to_csv_options() const {
  CsvOptions o;
  if (encoding != "auto") {
    o.encoding = encoding_from_name(encoding);
    if (!o.encoding)
      return usage_error("unknown encoding '" + encoding +
                         "'; expected auto, utf-8, utf-16le, utf-16be, windows-1252 or iso-8859-1");
  }
  if (delimiter == "tab" || delimiter == "\\t" || delimiter == "\t") o.delimiter = '\t';
  else if (delimiter.size() == 1) o.delimiter = delimiter[0];
  else if (delimiter != "auto")
    return usage_error("--delimiter takes one character, 'tab' or 'auto' (got '" + delimiter + "')");
  if (quote.size() != 1) return usage_error("--quote takes exactly one character (got '" + quote + "')");
  o.quote = quote[0];
  o.header = header == "yes" ? HeaderMode::yes : header == "no" ? HeaderMode::no : HeaderMode::detect;
  o.skip_rows = skip_rows;
  return o;
}

int report_error(const Error& error) {
  std::cerr << "tamis: " << error.to_string() << '\n';
  return exit_code(error.kind);
}

Result<Table> read_whole_file(const std::string& input, const CsvOptions& options, ReadReport& report,
                              std::string& display) {
  auto source = open_file_source(input);
  if (!source) return source.take_error();
  display = input == "-" ? "<stdin>" : input;
  Progress progress("reading", (*source)->size());
  return read_csv(std::move(*source), display, options, &report, {},
                  [&](uint64_t done, std::optional<uint64_t>) { progress.update(done); });
}

TableProfile profile_with_progress(const Table& table) {
  TableProfiler profiler(table);
  Progress progress("profiling", 1000);
  while (!profiler.step(1 << 18)) progress.update(static_cast<uint64_t>(profiler.progress() * 1000));
  return profiler.result();
}

}  // namespace tamis::cli
