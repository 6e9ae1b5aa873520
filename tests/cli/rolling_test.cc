// Command-level tests of rolling estimates, end to end through the real binary on the
// fixtures/evaluate files (120 months, 2010-01 .. 2019-12): `evaluate --rolling` records the
// windows with the run, `show` prints a short section (table), one row per window (csv) or
// the "rolling" object (json), the run_windows view returns the same rows through `query`,
// and bad windows are refused before anything is recorded.
#include <SQLiteCpp/Database.h>
#include <gtest/gtest.h>

#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::ingest_evaluate_fixtures;
using alphatrail::testing::lines_of;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::ScratchDir;
using nlohmann::json;

const std::string kWindowHeader =
    "run_id,window_end,window_first,observations,lags,alpha,alpha_std_error,alpha_ci_low,"
    "alpha_ci_high,alpha_annualized,alpha_annualized_ci_low,alpha_annualized_ci_high,beta,"
    "beta_std_error,beta_ci_low,beta_ci_high";

// A ledger with the evaluate fixtures ingested once and copied per test: strategies
// trend-fast, trend-slow, carry, tiny; benchmark "market" (levels); rate curve "bills";
// factors "ff" (see ingest_evaluate_fixtures).
class RollingTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    base_ = new ScratchDir();
    const std::string ledger = (*base_ / "base.db").string();
    ASSERT_EQ(ingest_evaluate_fixtures(ledger), "");
  }
  static void TearDownTestSuite() {
    delete base_;
    base_ = nullptr;
  }

  void SetUp() override {
    ASSERT_NE(base_, nullptr);
    for (const char* suffix : {"", "-wal"}) {
      const fs::path from = *base_ / (std::string("base.db") + suffix);
      if (fs::exists(from)) fs::copy_file(from, dir_ / (std::string("ledger.db") + suffix));
    }
  }

  CommandResult cli(const std::vector<std::string>& args) const {
    std::vector<std::string> all{"--ledger", (dir_ / "ledger.db").string()};
    all.insert(all.end(), args.begin(), args.end());
    return run_alphatrail(all);
  }

  // Evaluates trend-fast against market and bills with the extra arguments; returns the run.
  json evaluate(const std::vector<std::string>& extra) const {
    std::vector<std::string> args{"evaluate", "trend-fast", "--benchmark", "market",
                                  "--rate",   "bills",      "--format",    "json"};
    args.insert(args.end(), extra.begin(), extra.end());
    const CommandResult r = cli(args);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    if (r.exit_code != 0) return json::object();
    const json runs = json::parse(r.out);
    EXPECT_EQ(runs.size(), 1u);
    return runs.empty() ? json::object() : runs[0];
  }

  long long count(const std::string& sql) const {
    SQLite::Database db((dir_ / "ledger.db").string(), SQLite::OPEN_READONLY);
    return db.execAndGet(sql).getInt64();
  }

  ScratchDir dir_;
  static ScratchDir* base_;
};

ScratchDir* RollingTest::base_ = nullptr;

// --rolling 12 on 120 months: 120 - 12 + 1 = 109 windows, the first 2010-01 .. 2010-12, the
// last ending 2019-12, each with floor(4 (12/100)^(2/9)) = floor(2.50) = 2 Newey-West lags.
TEST_F(RollingTest, WindowsAreRecordedWithTheRun) {
  const json run = evaluate({"--rolling", "12"});
  EXPECT_EQ(run["parameters"]["rolling_window"], 12);
  const json& rolling = run["rolling"];
  ASSERT_TRUE(rolling.is_object()) << run.dump();
  EXPECT_EQ(rolling["window"], 12);
  EXPECT_EQ(rolling["errors"], "newey-west");
  EXPECT_EQ(rolling["lag_rule"], "auto");
  EXPECT_EQ(rolling["confidence"], 0.95);
  EXPECT_EQ(rolling["annualize"], "compound");
  const json& windows = rolling["windows"];
  ASSERT_EQ(windows.size(), 109u);
  EXPECT_EQ(windows[0]["first"], "2010-01");
  EXPECT_EQ(windows[0]["end"], "2010-12");
  EXPECT_EQ(windows[108]["first"], "2019-01");
  EXPECT_EQ(windows[108]["end"], "2019-12");
  for (const auto& w : windows) {
    EXPECT_EQ(w["observations"], 12);
    EXPECT_EQ(w["lags"], 2);
    for (const char* key :
         {"alpha", "alpha_std_error", "alpha_ci_low", "alpha_ci_high", "alpha_annualized",
          "alpha_annualized_ci_low", "alpha_annualized_ci_high", "beta", "beta_std_error",
          "beta_ci_low", "beta_ci_high"})
      EXPECT_TRUE(w[key].is_number()) << key << " in " << w.dump();
  }
  // show --format json prints the same run, "rolling" among its top-level keys.
  const CommandResult shown = cli({"show", "1", "--format", "json"});
  ASSERT_EQ(shown.exit_code, 0) << shown.err;
  EXPECT_EQ(json::parse(shown.out), run);
}

// A window is the run's regression on that window's own periods: the window 2013-01 ..
// 2015-12 equals `evaluate --from 2013-01 --to 2015-12` (36 months, auto lags 3 both ways),
// bit for bit as JSON prints them.
TEST_F(RollingTest, AWindowEqualsTheRunOverItsOwnPeriods) {
  const json rolled = evaluate({"--rolling", "36"});
  const json alone = evaluate({"--from", "2013-01", "--to", "2015-12"});
  ASSERT_EQ(alone["sample"]["observations"], 36);
  const json* window = nullptr;
  for (const auto& w : rolled["rolling"]["windows"])
    if (w["end"] == "2015-12") window = &w;
  ASSERT_NE(window, nullptr);
  EXPECT_EQ((*window)["first"], "2013-01");
  EXPECT_EQ((*window)["lags"], alone["statistics"]["lags"]);
  const json& a = alone["coefficients"][0];
  const json& b = alone["coefficients"][1];
  EXPECT_EQ((*window)["alpha"], a["estimate"]);
  EXPECT_EQ((*window)["alpha_std_error"], a["std_error"]);
  EXPECT_EQ((*window)["alpha_ci_low"], a["ci_low"]);
  EXPECT_EQ((*window)["alpha_ci_high"], a["ci_high"]);
  EXPECT_EQ((*window)["alpha_annualized"], alone["statistics"]["alpha_annualized"]);
  EXPECT_EQ((*window)["beta"], b["estimate"]);
  EXPECT_EQ((*window)["beta_std_error"], b["std_error"]);
  EXPECT_EQ((*window)["beta_ci_low"], b["ci_low"]);
  EXPECT_EQ((*window)["beta_ci_high"], b["ci_high"]);
}

// show --format csv: the header and one row per window end; the run_windows view returns
// the very same rows through `alphatrail query`.
TEST_F(RollingTest, CsvHasOneRowPerWindowAndTheViewTheSameRows) {
  evaluate({"--rolling", "12"});
  const CommandResult csv = cli({"show", "1", "--format", "csv"});
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  const auto lines = lines_of(csv.out);
  ASSERT_EQ(lines.size(), 1u + 109u) << csv.out;
  EXPECT_EQ(lines[0], kWindowHeader);
  EXPECT_EQ(lines[1].rfind("1,2010-12,2010-01,12,2,", 0), 0u) << lines[1];
  EXPECT_EQ(lines[109].rfind("1,2019-12,2019-01,12,2,", 0), 0u) << lines[109];

  const CommandResult view =
      cli({"query", "SELECT * FROM run_windows WHERE run_id = 1", "--format", "csv"});
  ASSERT_EQ(view.exit_code, 0) << view.err;
  EXPECT_EQ(view.out, csv.out);
  EXPECT_EQ(count("SELECT count(*) FROM run_windows"), 109);
}

// The table prints a short section, not the windows, and says how to get them.
TEST_F(RollingTest, TableShowsAShortSection) {
  evaluate({"--rolling", "12"});
  const CommandResult shown = cli({"show", "1"});
  ASSERT_EQ(shown.exit_code, 0) << shown.err;
  EXPECT_TRUE(contains(shown.out,
                       "rolling estimates      109 windows of 12 months, ending "
                       "2010-12 to 2019-12"))
      << shown.out;
  EXPECT_TRUE(contains(shown.out, "2 lags in each window")) << shown.out;
  EXPECT_TRUE(contains(shown.out, "`alphatrail show 1 --format csv`")) << shown.out;
  EXPECT_LT(lines_of(shown.out).size(), 60u) << "the windows are not printed one by one";
}

// --rolling auto is three years: 36 months (85 windows), or 12 quarters at --frequency
// quarterly (40 quarters, 29 windows); the parameters record the number, so a re-run and a
// reproduction use the same window.
TEST_F(RollingTest, AutoIsThreeYearsOfTheEvaluationFrequency) {
  const json monthly = evaluate({"--rolling", "auto"});
  EXPECT_EQ(monthly["parameters"]["rolling_window"], 36);
  EXPECT_EQ(monthly["rolling"]["window"], 36);
  EXPECT_EQ(monthly["rolling"]["windows"].size(), 120u - 36u + 1u);
  const json quarterly = evaluate({"--rolling", "auto", "--frequency", "quarterly"});
  EXPECT_EQ(quarterly["parameters"]["rolling_window"], 12);
  EXPECT_EQ(quarterly["rolling"]["windows"].size(), 40u - 12u + 1u);
  EXPECT_EQ(quarterly["rolling"]["windows"][0]["end"], "2012-Q4");
  const CommandResult reproduced = cli({"reproduce", "1"});
  EXPECT_EQ(reproduced.exit_code, 0) << reproduced.out << reproduced.err;
  EXPECT_TRUE(contains(reproduced.out, "reproduced:")) << reproduced.out;
}

// Fixed lags and other error kinds carry into every window.
TEST_F(RollingTest, WindowsUseTheRunsErrorsAndLags) {
  const json fixed = evaluate({"--rolling", "24", "--lags", "5", "--small-sample", "on"});
  EXPECT_EQ(fixed["rolling"]["lag_rule"], "fixed");
  for (const auto& w : fixed["rolling"]["windows"]) EXPECT_EQ(w["lags"], 5);
  const json classic =
      evaluate({"--rolling", "24", "--errors", "classic", "--annualize", "arithmetic"});
  EXPECT_EQ(classic["rolling"]["errors"], "classic");
  EXPECT_EQ(classic["rolling"]["annualize"], "arithmetic");
  const json& w = classic["rolling"]["windows"][0];
  EXPECT_EQ(w["lags"], 0);
  EXPECT_DOUBLE_EQ(w["alpha_annualized"].get<double>(), 12 * w["alpha"].get<double>());
  EXPECT_DOUBLE_EQ(w["alpha_annualized_ci_low"].get<double>(),
                   12 * w["alpha_ci_low"].get<double>());
}

// A sample shorter than the window: the run is recorded with an empty list of windows and a
// warning; csv prints the header alone.
TEST_F(RollingTest, SampleShorterThanTheWindowHasNoWindow) {
  const json run = evaluate({"--rolling", "auto", "--from", "2018-01"});
  ASSERT_EQ(run["sample"]["observations"], 24);
  ASSERT_TRUE(run["rolling"].is_object());
  EXPECT_TRUE(run["rolling"]["windows"].empty());
  EXPECT_TRUE(contains(run["warnings"].dump(), "fewer than the window of 36")) << run["warnings"];
  const CommandResult csv = cli({"show", "1", "--format", "csv"});
  EXPECT_EQ(csv.out, kWindowHeader + "\n");
  EXPECT_TRUE(contains(cli({"show", "1"}).out, "none: the sample is shorter than the window"));
}

// Without --rolling: "rolling" is null, the parameter is written out as null, the view has
// no row for the run, and show --format csv keeps its coefficient table.
TEST_F(RollingTest, RunWithoutRollingHasNull) {
  const json run = evaluate({});
  ASSERT_TRUE(run.contains("rolling"));
  EXPECT_TRUE(run["rolling"].is_null());
  ASSERT_TRUE(run["parameters"].contains("rolling_window"));
  EXPECT_TRUE(run["parameters"]["rolling_window"].is_null());
  EXPECT_EQ(count("SELECT count(*) FROM run_windows"), 0);
  const CommandResult csv = cli({"show", "1", "--format", "csv"});
  const auto lines = lines_of(csv.out);
  ASSERT_EQ(lines.size(), 3u) << csv.out;
  EXPECT_EQ(lines[0], "term,estimate,std_error,t_stat,p_value,ci_low,ci_high");
  EXPECT_EQ(lines[1].rfind("alpha,", 0), 0u);
  EXPECT_FALSE(contains(cli({"show", "1"}).out, "rolling estimates"));
  // --rolling off is the same run: same parameters, same inputs hash.
  EXPECT_EQ(evaluate({"--rolling", "off"})["inputs_hash"], run["inputs_hash"]);
}

// Bad windows are refused on the command line (exit 2) with the reason, and nothing is
// recorded: too short for the model (k + 2 = 4 single-index, 6 with two factors), not a
// number, zero, or no room for the fixed Newey-West lags.
TEST_F(RollingTest, BadWindowsAreRefusedAndNothingIsRecorded) {
  const auto refused = [&](const std::vector<std::string>& extra, const std::string& message) {
    std::vector<std::string> args{"evaluate", "trend-fast", "--benchmark",
                                  "market",   "--rate",     "bills"};
    args.insert(args.end(), extra.begin(), extra.end());
    const CommandResult r = cli(args);
    EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
    EXPECT_TRUE(contains(r.err, message)) << r.err;
  };
  refused({"--rolling", "1"},
          "--rolling 1: a window of 1 period is too short for 2 "
          "coefficients; use at least 4 periods");
  refused({"--rolling", "3"}, "use at least 4 periods");
  refused({"--rolling", "5", "--factor", "ff"}, "too short for 4 coefficients; use at least 6");
  refused({"--rolling", "abc"},
          "--rolling abc: write a whole number of periods per window, "
          "auto (three years of periods) or off");
  refused({"--rolling", "0"}, "--rolling 0: write a whole number");
  refused({"--rolling", "12x"}, "--rolling 12x: write a whole number");
  refused({"--rolling", "12", "--lags", "12"},
          "--rolling 12: a window of 12 periods cannot take 12 Newey-West lags");
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 0);
}

}  // namespace
