// The exit codes have one owner (cli/exit_codes.h): the README's table states exactly its
// rows, `--help` ends with its summary, and every kind of failure maps to a code in it.
#include "cli/exit_codes.h"

#include <gtest/gtest.h>

#include <regex>
#include <set>
#include <string>
#include <vector>

#include "support/test_support.h"

namespace {

using alphatrail::Failure;
using alphatrail::cli::exit_code;
using alphatrail::cli::exit_code_footer;
using alphatrail::cli::exit_code_table;
using alphatrail::testing::contains;
using alphatrail::testing::lines_of;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::source_path;

TEST(ExitCodes, TheReadmeTableIsTheTable) {
  const auto lines = lines_of(read_file(source_path("README.md")));
  std::vector<std::pair<int, std::string>> readme;
  bool in_section = false;
  const std::regex row(R"(^\| (\d+) \| (.*) \|$)");
  for (const auto& line : lines) {
    if (line.rfind("### ", 0) == 0 || line.rfind("## ", 0) == 0)
      in_section = line == "### Exit codes";
    std::smatch m;
    if (in_section && std::regex_match(line, m, row)) readme.emplace_back(std::stoi(m[1]), m[2]);
  }
  const auto& table = exit_code_table();
  ASSERT_EQ(readme.size(), table.size());
  for (std::size_t i = 0; i < table.size(); ++i) {
    EXPECT_EQ(readme[i].first, table[i].code);
    EXPECT_EQ(readme[i].second, table[i].meaning) << "exit code " << table[i].code;
  }
}

TEST(ExitCodes, EveryFailureHasACodeOfTheTable) {
  std::set<int> codes;
  for (const auto& r : exit_code_table()) codes.insert(r.code);
  for (const Failure f : {Failure::internal, Failure::invalid_argument, Failure::bad_input,
                          Failure::unusable_ledger, Failure::busy, Failure::not_found,
                          Failure::cannot_estimate, Failure::mismatch, Failure::corruption}) {
    EXPECT_TRUE(codes.count(exit_code(f)) == 1) << static_cast<int>(f);
    EXPECT_NE(exit_code(f), 0);
  }
  EXPECT_EQ(exit_code(Failure::not_found), 5);
  EXPECT_EQ(exit_code(Failure::busy), exit_code(Failure::unusable_ledger));
}

TEST(ExitCodes, HelpEndsWithTheSummary) {
  const auto r = run_alphatrail({"--help"});
  EXPECT_EQ(r.exit_code, 0);
  EXPECT_TRUE(contains(r.out, exit_code_footer())) << r.out;
  EXPECT_TRUE(contains(exit_code_footer(), "0 success; 1 internal error; 2 bad command line"))
      << exit_code_footer();
  EXPECT_TRUE(contains(exit_code_footer(), " 8 stored data cannot be read as what it should be."))
      << exit_code_footer();
}

}  // namespace
