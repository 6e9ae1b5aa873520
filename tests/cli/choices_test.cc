// Command-level tests of the options that take one of a fixed set of names (--format,
// --errors, --frequency, ...): --help lists the names as they are typed, a name given in any
// case is taken for --format as before, and anything else, numbers included, is a bad command
// line (exit 2) before any ledger is opened.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "support/test_support.h"

namespace {

using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::ScratchDir;

TEST(Choices, FormatRefusesTheNumberOfAChoice) {
  const ScratchDir dir;
  const std::string ledger = (dir / "ledger.db").string();
  for (const std::vector<std::string>& args :
       {std::vector<std::string>{"runs", "--format", "1"},
        {"runs", "--format", "0"},
        {"show", "1", "--format", "2"},
        {"evaluate", "s", "--benchmark", "b", "--rate", "r", "--format", "1"}}) {
    std::vector<std::string> full{"--ledger", ledger};
    full.insert(full.end(), args.begin(), args.end());
    const CommandResult r = run_alphatrail(full);
    EXPECT_EQ(r.exit_code, 2) << args.front() << ": " << r.out << r.err;
    EXPECT_TRUE(contains(r.err, "--format: " + args.back() + " not in {table,json,csv}")) << r.err;
  }
}

TEST(Choices, SettingsRefuseTheNumberOfAChoice) {
  for (const std::vector<std::string>& option : {std::vector<std::string>{"--errors", "5"},
                                                 {"--errors", "hc4"},
                                                 {"--frequency", "2"},
                                                 {"--rate-basis", "1"},
                                                 {"--rate-timing", "0"},
                                                 {"--annualize", "1"},
                                                 {"--small-sample", "1"}}) {
    std::vector<std::string> args{"evaluate", "s", "--benchmark", "b", "--rate", "r"};
    args.insert(args.end(), option.begin(), option.end());
    const CommandResult r = run_alphatrail(args);
    EXPECT_EQ(r.exit_code, 2) << option.front() << ": " << r.err;
    EXPECT_TRUE(contains(r.err, option.front() + ": " + option.back() + " not in {")) << r.err;
  }
}

TEST(Choices, FormatTakesANameInAnyCase) {
  const ScratchDir dir;
  const std::string ledger = (dir / "ledger.db").string();
  ASSERT_EQ(run_alphatrail({"--ledger", ledger, "init"}).exit_code, 0);
  const CommandResult r = run_alphatrail({"--ledger", ledger, "runs", "--format", "JSON"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(nlohmann::json::parse(r.out), nlohmann::json::array());
}

TEST(Choices, HelpListsThePlainNamesOfEachChoice) {
  const CommandResult r = run_alphatrail({"evaluate", "--help"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  for (const char* shown :
       {"--errors {classic,hc0,hc1,hc2,hc3,newey-west}=newey-west",
        "classic, hc0, hc1, hc2, hc3 or newey-west", "--frequency {daily,weekly,monthly,quarterly}",
        "--small-sample {on,off}=off", "--rate-basis {compound,simple,act360}=compound",
        "--rate-timing {start,end}=start", "--annualize {compound,arithmetic}=compound",
        "--format {table,json,csv}=table", "--lags TEXT=auto", "--rolling TEXT=off"})
    EXPECT_TRUE(contains(r.out, shown)) << shown << "\n" << r.out;
  EXPECT_FALSE(contains(r.out, "ENUM")) << r.out;
  EXPECT_FALSE(contains(r.out, "->")) << r.out;
  for (const char* command : {"runs", "show", "rerun", "series", "query", "compare"}) {
    const CommandResult help = run_alphatrail({command, "--help"});
    EXPECT_TRUE(contains(help.out, "--format {table,json,csv}=table")) << command << help.out;
  }
}

}  // namespace
