#include <iostream>

#include "batch_pipeline.hpp"
#include "commands.hpp"
#include "csv_writer.hpp"
#include "progress.hpp"
#include "run_rejects.hpp"
#include "run_support.hpp"

namespace tamis::cli {

CLI::App* add_convert_command(CLI::App& app, ConvertArgs& args) {
  CLI::App* cmd = app.add_subcommand(
      "convert",
      "Read a CSV/TSV file in any supported encoding and dialect and write it as clean UTF-8 RFC 4180.\n"
      "Strict by default: a record with the wrong number of fields stops the run (exit 3) and the\n"
      "message lists the lines. With --lenient such records go to a rejects file instead.\n"
      "Example: tamis convert export.csv -o clean.csv --lenient --rejects bad_rows.csv");
  cmd->add_option("input", args.input, "Input file ('-' for standard input)")->required();
  cmd->add_option("-o,--output", args.output, "Output file ('-' for standard output)")->required();
  cmd->add_option("--to", args.to, "Output format: csv or tsv")
      ->check(CLI::IsMember({"csv", "tsv"}))
      ->capture_default_str();
  cmd->add_option("--line-ending", args.line_ending, "Output line ending: lf or crlf")
      ->check(CLI::IsMember({"lf", "crlf"}))
      ->capture_default_str();
  cmd->add_option("--null-marker", args.null_marker, "Text written for NULL cells (default: empty)");
  cmd->add_flag("--lenient", args.lenient, "Set malformed records aside in the rejects file instead of stopping");
  cmd->add_option("--rejects", args.rejects,
                  "Rejects file for --lenient (CSV: line,reason,record); default OUTPUT.rejects.csv");
  args.reading.add_to(*cmd);
  return cmd;
}

int run_convert(const ConvertArgs& args) {
  auto options = args.reading.to_csv_options();
  if (!options) return report_error(options.error());
  options->lenient = args.lenient;
  if (same_file(args.input, args.output))
    return report_error(usage_error("the output would overwrite the input; tamis never modifies its input"));
  std::string rejects_path = args.rejects;
  if (args.lenient && rejects_path.empty()) {
    if (args.output == "-") return report_error(usage_error("--lenient with output to stdout needs --rejects FILE"));
    rejects_path = args.output + ".rejects.csv";
  }
  if (!args.lenient && !rejects_path.empty())
    return report_error(usage_error("--rejects is used with --lenient (strict mode stops at malformed records)"));

  RejectsFile rejects;
  if (args.lenient)
    if (Status s = rejects.open(rejects_path); !s) return report_error(s.error());
  auto source = open_file_source(args.input);
  if (!source) return report_error(source.error());
  const std::string display = args.input == "-" ? "<stdin>" : args.input;
  auto reader = CsvReader::open(std::move(*source), display, *options,
                                [&](const RejectedRecord& r) { return rejects.add(r.line, r.reason, r.text); });
  if (!reader) return report_error(reader.error());
  CsvReader& in = **reader;

  auto sink = open_file_sink(args.output);
  if (!sink) return report_error(sink.error());
  CsvWriteOptions write_options;
  write_options.delimiter = args.to == "tsv" ? '\t' : ',';
  write_options.line_ending = args.line_ending == "crlf" ? "\r\n" : "\n";
  write_options.null_marker = args.null_marker;
  auto writer = CsvWriter::make(**sink, write_options);
  if (!writer) return report_error(writer.error());
  std::vector<std::string_view> header(in.column_names().begin(), in.column_names().end());
  if (Status s = writer->write_row(header); !s) return report_error(s.error());

  Progress progress("converting", in.total_bytes());
  BatchPipeline batches(in, 2);
  for (;;) {
    auto batch = batches.next();
    if (!batch) return report_error(batch.error());
    if (!batch->has_value()) break;
    if (Status s = writer->write_table(**batch); !s) return report_error(s.error());
    progress.update(in.bytes_read());
  }
  progress.finish();
  if (Status s = rejects.commit(); !s) return report_error(s.error());
  if (Status s = writer->finish(); !s) return report_error(s.error());

  const ReadReport& report = in.report();
  std::cerr << "tamis convert: " << report.rows << " rows written";
  if (args.lenient) std::cerr << ", " << report.rejected << " set aside in " << rejects_path;
  std::cerr << " (read as " << encoding_name(report.encoding) << ")\n";
  for (const std::string& w : report.warnings()) std::cerr << "warning: " << w << '\n';
  return 0;
}

}  // namespace tamis::cli
