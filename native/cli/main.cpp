// tamis: the batch side of the cleaning workbench.
#include <algorithm>
#include <iostream>
#include <memory>
#include <sstream>
#ifdef __GLIBC__
#include <malloc.h>
#endif

#include "commands.hpp"

namespace {

// `tamis --help` lists each command with the first clause of its
// description (up to '.', ':', ';' or a parenthesis, at most about one
// line); `tamis COMMAND --help` shows the whole of it.
class OverviewFormatter : public CLI::Formatter {
 public:
  std::string make_subcommand(const CLI::App* sub) const override {
    constexpr size_t kLine = 100;
    std::string summary = sub->get_description();
    for (char& c : summary)
      if (c == '\n') c = ' ';
    const size_t stop = std::min(summary.find_first_of(".:;"), summary.find(" ("));
    if (stop != std::string::npos) summary.resize(stop);
    if (summary.size() > kLine) {
      const size_t comma = summary.rfind(", ", kLine);
      summary.resize(comma == std::string::npos ? kLine : comma);
    }
    std::stringstream out;
    CLI::detail::format_help(out, sub->get_display_name(true), summary, get_column_width());
    return out.str();
  }
};

}  // namespace

int main(int argc, char** argv) {
  using namespace tamis::cli;
#ifdef __GLIBC__
  // Streaming commands free and allocate batches of the same size over and
  // over; keeping that memory in the process instead of handing it back to
  // the kernel after every batch saves a page fault per 4 KiB of data.
  mallopt(M_MMAP_THRESHOLD, 64 << 20);
  mallopt(M_TRIM_THRESHOLD, 256 << 20);
#endif
  CLI::App app{
      "tamis: see what is wrong with a CSV/TSV extract, clean it, and replay the cleaning unattended.\n"
      "Inputs are never modified. Exit codes: 0 ok, 1 a required rule failed, 2 usage error,\n"
      "3 the input is malformed or does not match, 4 I/O error.",
      "tamis"};
  app.require_subcommand(1);
  app.set_version_flag("--version", "tamis 0.1.0");
  ConvertArgs convert_args;
  ProfileArgs profile_args;
  CLI::App* convert = add_convert_command(app, convert_args);
  CLI::App* profile = add_profile_command(app, profile_args);
  RunArgs run_args;
  CheckArgs check_args;
  ExplainArgs explain_args;
  CLI::App* run = add_run_command(app, run_args);
  CLI::App* check = add_check_command(app, check_args);
  CLI::App* explain = add_explain_command(app, explain_args);
  SuggestArgs suggest_args;
  CLI::App* suggest = add_suggest_command(app, suggest_args);
  SimilarArgs similar_args;
  CLI::App* similar = add_similar_command(app, similar_args);
  SqlArgs sql_args;
  CLI::App* sql = add_sql_command(app, sql_args);
  app.formatter(std::make_shared<OverviewFormatter>());
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    return app.exit(e) == 0 ? 0 : 2;
  }
  if (convert->parsed()) return run_convert(convert_args);
  if (profile->parsed()) return run_profile(profile_args);
  if (run->parsed()) return run_run(run_args);
  if (check->parsed()) return run_check(check_args);
  if (explain->parsed()) return run_explain(explain_args);
  if (suggest->parsed()) return run_suggest(suggest_args);
  if (similar->parsed()) return run_similar(similar_args);
  if (sql->parsed()) return run_sql(sql_args);
  return 2;
}
