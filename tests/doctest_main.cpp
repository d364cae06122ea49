// The one main() of every doctest suite (see tamis_add_doctest_suite).
#define DOCTEST_CONFIG_IMPLEMENT
#include <doctest/doctest.h>

#include <cstdio>

namespace {

bool test_run_finished = false;
unsigned selected_test_cases = 0;

// Records how many test cases passed the filters, so that a run selecting
// none (say, a filter that no longer matches a renamed test case) fails
// instead of passing with nothing tested.
struct SelectionListener : doctest::IReporter {
  explicit SelectionListener(const doctest::ContextOptions&) {}
  void report_query(const doctest::QueryData&) override {}
  void test_run_start() override {}
  void test_run_end(const doctest::TestRunStats& stats) override {
    test_run_finished = true;
    selected_test_cases = stats.numTestCasesPassingFilters;
  }
  void test_case_start(const doctest::TestCaseData&) override {}
  void test_case_reenter(const doctest::TestCaseData&) override {}
  void test_case_end(const doctest::CurrentTestCaseStats&) override {}
  void test_case_exception(const doctest::TestCaseException&) override {}
  void subcase_start(const doctest::SubcaseSignature&) override {}
  void subcase_end() override {}
  void log_assert(const doctest::AssertData&) override {}
  void log_message(const doctest::MessageData&) override {}
  void test_case_skipped(const doctest::TestCaseData&) override {}
};
REGISTER_LISTENER("tamis_selection", 1, SelectionListener);

}  // namespace

int main(int argc, char** argv) {
  doctest::Context context(argc, argv);
  const int result = context.run();
  if (test_run_finished && selected_test_cases == 0) {
    std::fprintf(stderr, "no test case matched the filters: nothing was tested\n");
    return 1;
  }
  return result;
}
