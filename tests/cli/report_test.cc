// `alphatrail report`: the three pages on the demo ledger, checked as text and in a real
// browser (headless Chromium, installed by the test set-up), with a screenshot of each saved
// under the build folder (test-artifacts/report-*.png) for people to look at.
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <regex>

#include "support/browser.h"
#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace alphatrail::testing {
namespace {

class ReportTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    scratch_ = new ScratchDir();
    ledger_ = (scratch_->path() / "demo.db").string();
    const auto r = run_alphatrail({"--ledger", ledger_, "demo"});
    ASSERT_EQ(r.exit_code, 0) << r.err;
    demo_out_ = r.out;
  }
  static void TearDownTestSuite() {
    delete scratch_;
    scratch_ = nullptr;
  }

  // Writes a report and returns the file's path.
  static std::filesystem::path write_report(const std::vector<std::string>& subject,
                                            const std::string& file) {
    const auto path = scratch_->path() / file;
    std::vector<std::string> args{"--ledger", ledger_, "report"};
    args.insert(args.end(), subject.begin(), subject.end());
    args.insert(args.end(), {"-o", path.string()});
    const auto r = run_alphatrail(args);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    EXPECT_TRUE(contains(r.out, "report written to " + path.string())) << r.out;
    return path;
  }

  static nlohmann::json show(int run) {
    const auto r =
        run_alphatrail({"--ledger", ledger_, "show", std::to_string(run), "--format", "json"});
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return nlohmann::json::parse(r.out);
  }

  static std::filesystem::path artifact(const std::string& name) {
    const std::filesystem::path dir =
        std::filesystem::path(ALPHATRAIL_BUILD_DIR) / "test-artifacts";
    std::filesystem::create_directories(dir);
    return dir / name;
  }

  // Loads the page in Chromium: no error, nothing fetched, every chart laid out with a size
  // and as many marks as it declares. Saves the screenshot. Returns the charts.
  static std::vector<ChartProbe> check_in_browser(const std::filesystem::path& page,
                                                  const std::string& screenshot) {
    if (!browser_available()) return {};
    const PageProbe probe = probe_page(page);
    EXPECT_TRUE(probe.loaded);
    EXPECT_TRUE(probe.errors.empty()) << (probe.errors.empty() ? "" : probe.errors.front());
    EXPECT_EQ(probe.external_requests, 0);
    for (const auto& c : probe.charts) {
      EXPECT_GT(c.width, 300) << c.kind;
      EXPECT_GT(c.height, 100) << c.kind;
      EXPECT_EQ(c.marks, c.declared_marks) << c.kind;
    }
    const auto png = artifact(screenshot);
    save_screenshot(page, png, 1200, 2400);
    EXPECT_EQ(png_size(png), std::make_pair(1200, 2400));
    return probe.charts;
  }

  static std::vector<std::string> kinds(const std::vector<ChartProbe>& charts) {
    std::vector<std::string> out;
    for (const auto& c : charts) out.push_back(c.kind);
    return out;
  }

  static int count(const std::string& text, const std::string& part) {
    int n = 0;
    for (auto at = text.find(part); at != std::string::npos; at = text.find(part, at + 1)) ++n;
    return n;
  }

  static inline ScratchDir* scratch_ = nullptr;
  static inline std::string ledger_;
  static inline std::string demo_out_;
};

// A self-contained page: no script, nothing referenced outside the file.
void expect_self_contained(const std::string& html) {
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);
  EXPECT_FALSE(contains(html, "<script"));
  EXPECT_FALSE(std::regex_search(html, std::regex(R"((src|href)\s*=)")));
  EXPECT_FALSE(contains(html, "url("));
  EXPECT_FALSE(contains(html, "@import"));
}

TEST_F(ReportTest, RunReportHasEveryPartAndEveryChart) {
  // Run 7 re-ran run 1 (trend-12m) after the demo restated a month of the index.
  const auto run = show(7);
  ASSERT_EQ(run["revises_run_id"], 1);
  const auto page = write_report({"7"}, "run-7.html");
  const std::string html = read_file(page);
  expect_self_contained(html);
  EXPECT_TRUE(contains(html, run["inputs_hash"].get<std::string>()));
  for (const auto& in : run["inputs"]) {
    EXPECT_TRUE(contains(html, in["content_hash"].get<std::string>()));
    EXPECT_TRUE(contains(html, in["note"].get<std::string>()));
  }
  for (const char* part : {"trend-12m", "alder-vale-composite", "alder-vale-bills:1M",
                           "Newey-West, 5 lags", "What changed since run 1", "Coefficients",
                           "not investment advice", "Survivorship bias", "size-spread"})
    EXPECT_TRUE(contains(html, part)) << part;
  // The reading's sentences (the cautions go to their own box).
  EXPECT_TRUE(contains(html, run["reading"][0].get<std::string>()));
  // Benchmark v1 -> v2 is the change the revision shows.
  EXPECT_TRUE(
      std::regex_search(html, std::regex(R"(alder-vale-composite</td><td>v1</td><td>v2</td>)")));

  const int periods = run["sample"]["observations"];
  EXPECT_EQ(count(html, "class=\"mark dot\""), periods);  // one dot per period
  const auto charts = check_in_browser(page, "report-run.png");
  if (charts.empty()) GTEST_SKIP() << "Chromium is not installed (the test set-up installs it)";
  EXPECT_EQ(kinds(charts), (std::vector<std::string>{"scatter", "band", "band", "lines", "drawdown",
                                                     "histogram"}));
  EXPECT_EQ(charts[0].marks, periods);
  EXPECT_EQ(charts[1].marks, 1);  // rolling alpha: one line
  EXPECT_EQ(charts[3].marks, 3);  // strategy, benchmark, risk-free
  EXPECT_GE(charts[5].marks, 8);  // residual bins
}

TEST_F(ReportTest, StrategyReportShowsEveryRunAndMarksRevisions) {
  const auto page = write_report({"--strategy", "trend-12m"}, "strategy.html");
  const std::string html = read_file(page);
  expect_self_contained(html);
  EXPECT_TRUE(contains(html, "2 runs, 1 of them revisions"));
  EXPECT_EQ(count(html, "data-revision=\"true\""), 1);
  EXPECT_EQ(count(html, "data-revision=\"false\""), 1);
  const auto charts = check_in_browser(page, "report-strategy.png");
  if (charts.empty()) GTEST_SKIP() << "Chromium is not installed (the test set-up installs it)";
  ASSERT_EQ(kinds(charts), std::vector<std::string>{"intervals"});
  EXPECT_EQ(charts[0].marks, 2);
}

TEST_F(ReportTest, StudyReportRanksEveryTrialAndDrawsTheHurdle) {
  const auto page = write_report({"--study", "trend-lookbacks"}, "study.html");
  const std::string html = read_file(page);
  expect_self_contained(html);
  // Three variants, each run before and after the restatement: six trials.
  EXPECT_TRUE(contains(html, "trend-lookbacks: 6 trials side by side"));
  EXPECT_TRUE(contains(html, "(6 trials)"));
  EXPECT_TRUE(contains(html, "data-value=\"3\""));  // the t = 3 line
  // Ranked from the highest t down: the table's first row is the largest t statistic.
  double best = -1e9;
  for (int id : {1, 2, 3, 7, 8, 9}) {
    const auto r = show(id);
    ASSERT_EQ(r["study"], "trend-lookbacks");
    best = std::max(best, r["coefficients"][0]["t_stat"].get<double>());
  }
  std::smatch first;
  ASSERT_TRUE(std::regex_search(html, first, std::regex(R"(<tr><td class="num">1</td>.*?</tr>)")));
  EXPECT_TRUE(contains(first.str(), fmt::format("<td class=\"num\">{:.2f}</td>", best)))
      << first.str();
  const auto charts = check_in_browser(page, "report-study.png");
  if (charts.empty()) GTEST_SKIP() << "Chromium is not installed (the test set-up installs it)";
  ASSERT_EQ(kinds(charts), std::vector<std::string>{"ranked-bars"});
  EXPECT_EQ(charts[0].marks, 6);
}

TEST_F(ReportTest, RunWithoutStoredRollingGetsWindowsComputedForThePage) {
  // A run recorded by hand without --rolling: the page computes the default window itself
  // and says so.
  const auto r =
      run_alphatrail({"--ledger", ledger_, "evaluate", "carry-g10", "--benchmark",
                      "alder-vale-composite", "--rate", "alder-vale-bills", "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto runs = nlohmann::json::parse(r.out);
  const int id = runs[0]["run_id"];
  ASSERT_TRUE(runs[0]["rolling"].is_null());
  const std::string html = read_file(write_report({std::to_string(id)}, "no-rolling.html"));
  EXPECT_TRUE(contains(html, "computed for this page with the default window"));
  EXPECT_TRUE(contains(html, "Windows of 36 months"));
  EXPECT_EQ(count(html, "data-chart=\"band\""), 2);
  EXPECT_FALSE(contains(html, "size-spread"));  // single-index model
}

// The same three pages from files ingested by hand (fixtures/evaluate: 120 months, HC3 errors,
// a two-year window), a study of three strategies, and re-runs after a benchmark revision.
TEST_F(ReportTest, AllThreeKindsWorkOnIngestedFiles) {
  const std::string ledger = (scratch_->path() / "ingested.db").string();
  ASSERT_EQ(ingest_evaluate_fixtures(ledger), "");
  const std::string revised = evaluate_fixture("benchmark_revised.csv");
  const std::vector<std::vector<std::string>> steps{
      {"evaluate", "carry", "trend-*", "--benchmark", "market", "--rate", "bills", "--factor", "ff",
       "--study", "fixture-study", "--errors", "hc3", "--rolling", "24"},
      {"ingest", "benchmark", revised, "--levels", "--name", "market"},
      {"rerun", "--all-stale"}};
  for (const auto& step : steps) {
    std::vector<std::string> args{"--ledger", ledger};
    args.insert(args.end(), step.begin(), step.end());
    const auto r = run_alphatrail(args);
    ASSERT_EQ(r.exit_code, 0) << step[0] << ": " << r.err;
  }
  const auto report = [&](const std::vector<std::string>& subject, const std::string& file) {
    const auto path = scratch_->path() / file;
    std::vector<std::string> args{"--ledger", ledger, "report"};
    args.insert(args.end(), subject.begin(), subject.end());
    args.insert(args.end(), {"-o", path.string()});
    const auto r = run_alphatrail(args);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return path;
  };
  // Runs 1-3 are carry, trend-fast, trend-slow (names in order); 4-6 their re-runs.
  const auto run_page = report({"5"}, "ingested-run.html");
  const std::string html = read_file(run_page);
  expect_self_contained(html);
  EXPECT_EQ(count(html, "class=\"mark dot\""), 120);
  EXPECT_TRUE(contains(html, "White HC3"));
  EXPECT_TRUE(contains(html, "Windows of 24 months"));
  EXPECT_TRUE(contains(html, "What changed since run 2"));
  const auto strategy_page = report({"--strategy", "trend-fast"}, "ingested-strategy.html");
  EXPECT_EQ(count(read_file(strategy_page), "data-revision=\"true\""), 1);
  const auto study_page = report({"--study", "fixture-study"}, "ingested-study.html");
  EXPECT_TRUE(contains(read_file(study_page), "(6 trials)"));

  if (!browser_available())
    GTEST_SKIP() << "Chromium is not installed (the test set-up installs it)";
  EXPECT_EQ(
      kinds(check_in_browser(run_page, "report-ingested-run.png")),
      (std::vector<std::string>{"scatter", "band", "band", "lines", "drawdown", "histogram"}));
  const auto strategy_charts = check_in_browser(strategy_page, "report-ingested-strategy.png");
  ASSERT_EQ(strategy_charts.size(), 1u);
  EXPECT_EQ(strategy_charts[0].marks, 2);
  const auto study_charts = check_in_browser(study_page, "report-ingested-study.png");
  ASSERT_EQ(study_charts.size(), 1u);
  EXPECT_EQ(study_charts[0].marks, 6);
}

TEST_F(ReportTest, RefusesBadSubjectsAndWritesNothing) {
  const auto out = scratch_->path() / "never.html";
  const auto none = run_alphatrail({"--ledger", ledger_, "report", "-o", out.string()});
  EXPECT_EQ(none.exit_code, 2);
  EXPECT_TRUE(contains(none.err, "name one subject"));
  const auto two = run_alphatrail(
      {"--ledger", ledger_, "report", "7", "--study", "trend-lookbacks", "-o", out.string()});
  EXPECT_EQ(two.exit_code, 2);
  const auto missing = run_alphatrail({"--ledger", ledger_, "report", "999", "-o", out.string()});
  EXPECT_EQ(missing.exit_code, 5);
  EXPECT_TRUE(contains(missing.err, "no run 999"));
  const auto study = run_alphatrail(
      {"--ledger", ledger_, "report", "--study", "no-such-study", "-o", out.string()});
  EXPECT_EQ(study.exit_code, 5);
  EXPECT_TRUE(contains(study.err, "no-such-study"));
  const auto strategy = run_alphatrail(
      {"--ledger", ledger_, "report", "--strategy", "no-such-strategy", "-o", out.string()});
  EXPECT_EQ(strategy.exit_code, 5);
  EXPECT_FALSE(std::filesystem::exists(out));
  const auto unwritable = scratch_->path() / "no-such-folder" / "r.html";
  const auto bad = run_alphatrail({"--ledger", ledger_, "report", "7", "-o", unwritable.string()});
  EXPECT_EQ(bad.exit_code, 3);
  EXPECT_TRUE(contains(bad.err, unwritable.string()));
  EXPECT_TRUE(contains(bad.err, "-o"));
}

TEST_F(ReportTest, DemoWritesTheReportOfItsMainRun) {
  std::smatch m;
  ASSERT_TRUE(std::regex_search(demo_out_, m, std::regex(R"(report written to (\S+\.html))")))
      << demo_out_;
  const std::string html = read_file(m[1].str());
  expect_self_contained(html);
  EXPECT_TRUE(contains(html, "Run 7: trend-12m against alder-vale-composite"));
}

}  // namespace
}  // namespace alphatrail::testing
