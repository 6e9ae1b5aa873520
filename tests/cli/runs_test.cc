// Command-level tests of `alphatrail runs` and `alphatrail show` through the real binary: the
// list and its filters, the JSON keys checked against the run objects of `show`, show's CSV
// and its error for an unknown run, and stale marking after an input is revised.
#include <SQLiteCpp/Database.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::evaluate_fixture;
using alphatrail::testing::lines_of;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_at;
using alphatrail::testing::ScratchDir;
using nlohmann::json;

std::vector<std::string> split_csv_line(const std::string& line) {
  std::vector<std::string> out;
  std::string field;
  std::istringstream in(line);
  while (std::getline(in, field, ',')) out.push_back(field);
  if (!line.empty() && line.back() == ',') out.push_back("");
  return out;
}

// One ledger for the suite (runs and show only read it), from fixtures/evaluate:
//   run 1  trend-fast                    no study
//   run 2  trend-fast   (from 'trend-*')  study grid
//   run 3  trend-slow   (from 'trend-*')  study grid
//   run 4  carry with the factor set ff   study grid
class RunsTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = new ScratchDir();
    const std::vector<std::vector<std::string>> commands{
        {"ingest", "strategy", evaluate_fixture("strategies.csv")},
        {"ingest", "benchmark", evaluate_fixture("benchmark.csv"), "--levels", "--name", "market"},
        {"ingest", "rate", evaluate_fixture("bills.csv"), "--name", "bills"},
        {"ingest", "factor", evaluate_fixture("factors.csv"), "--name", "ff"},
        {"evaluate", "trend-fast", "--benchmark", "market", "--rate", "bills"},
        {"evaluate", "trend-*", "--benchmark", "market", "--rate", "bills", "--study", "grid"},
        {"evaluate", "carry", "--factor", "ff", "--benchmark", "market", "--rate", "bills",
         "--study", "grid"}};
    for (const auto& c : commands) {
      const CommandResult r = run_at(ledger(), c);
      ASSERT_EQ(r.exit_code, 0) << c[0] << " " << c[1] << ": " << r.err;
    }
  }
  static void TearDownTestSuite() {
    delete dir_;
    dir_ = nullptr;
  }

  static std::string ledger() { return (*dir_ / "ledger.db").string(); }

  static json json_of(const std::vector<std::string>& args) {
    const CommandResult r = run_at(ledger(), args);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return r.exit_code == 0 ? json::parse(r.out) : json();
  }

  static json runs_json(std::vector<std::string> args = {}) {
    args.insert(args.begin(), "runs");
    args.insert(args.end(), {"--format", "json"});
    return json_of(args);
  }

  static json show_json(int run_id) {
    return json_of({"show", std::to_string(run_id), "--format", "json"});
  }

  static std::vector<int> ids_of(const json& runs) {
    std::vector<int> ids;
    for (const auto& r : runs) ids.push_back(r["run_id"].get<int>());
    return ids;
  }

  static ScratchDir* dir_;
};

ScratchDir* RunsTest::dir_ = nullptr;

// The table lists every run with its headline figures, each equal to the run's own record.
TEST_F(RunsTest, ListsRunsWithHeadlineFigures) {
  const CommandResult r = run_at(ledger(), {"runs"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto lines = lines_of(r.out);
  const char* strategies[] = {"trend-fast", "trend-fast", "trend-slow", "carry"};
  for (int id = 1; id <= 4; ++id) {
    const json run = show_json(id);
    const std::string alpha_year =
        fmt::format("{:+.2f}%", 100 * run["statistics"]["alpha_annualized"].get<double>());
    const std::string beta =
        fmt::format("{:.3f}", run["coefficients"][1]["estimate"].get<double>());
    const std::string t = fmt::format("{:.2f}", run["coefficients"][0]["t_stat"].get<double>());
    const std::string hash = run["inputs_hash"].get<std::string>().substr(0, 12);
    bool found = false;
    for (const auto& line : lines) {
      std::istringstream in(line);
      std::string first;
      in >> first;
      if (first != std::to_string(id)) continue;
      found = true;
      EXPECT_TRUE(contains(line, strategies[id - 1])) << line;
      EXPECT_TRUE(contains(line, alpha_year)) << alpha_year << " not in " << line;
      EXPECT_TRUE(contains(line, beta)) << beta << " not in " << line;
      EXPECT_TRUE(contains(line, t)) << t << " not in " << line;
      EXPECT_TRUE(contains(line, "newey-west (4)")) << line;
      EXPECT_TRUE(contains(line, hash)) << line;
      EXPECT_TRUE(contains(line, " 120 ")) << line;
      EXPECT_EQ(contains(line, "grid"), id > 1) << line;
      EXPECT_FALSE(contains(line, "stale")) << line;
    }
    EXPECT_TRUE(found) << "no line for run " << id << " in\n" << r.out;
  }
}

TEST_F(RunsTest, FiltersByStrategyAndStudy) {
  EXPECT_EQ(ids_of(runs_json()), (std::vector<int>{1, 2, 3, 4}));
  EXPECT_EQ(ids_of(runs_json({"--strategy", "trend-fast"})), (std::vector<int>{1, 2}));
  EXPECT_EQ(ids_of(runs_json({"--strategy", "carry"})), (std::vector<int>{4}));
  EXPECT_EQ(ids_of(runs_json({"--study", "grid"})), (std::vector<int>{2, 3, 4}));
  EXPECT_EQ(ids_of(runs_json({"--study", "grid", "--strategy", "trend-fast"})),
            (std::vector<int>{2}));
  EXPECT_EQ(ids_of(runs_json({"--study", "no-such-study"})), (std::vector<int>{}));
  for (const auto& r : runs_json({"--study", "grid"})) EXPECT_EQ(r["study"], "grid");
  EXPECT_TRUE(runs_json({"--strategy", "trend-fast"})[0]["study"].is_null());
  // The CSV form filters the same way: a header and one row per run.
  const CommandResult csv = run_at(ledger(), {"runs", "--study", "grid", "--format", "csv"});
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  const auto lines = lines_of(csv.out);
  ASSERT_EQ(lines.size(), 4u) << csv.out;
  EXPECT_EQ(lines[1].rfind("2,", 0), 0u) << lines[1];
  EXPECT_EQ(lines[3].rfind("4,", 0), 0u) << lines[3];
}

// runs --format json: the required keys, with values equal to the run objects of show.
TEST_F(RunsTest, JsonKeysEqualShowsRunObjects) {
  const json runs = runs_json();
  ASSERT_EQ(runs.size(), 4u);
  for (const auto& r : runs) {
    for (const char* key : {"run_id", "created_at", "strategy", "inputs_hash", "alpha", "alpha_t",
                            "beta", "alpha_p", "alpha_annualized", "r_squared", "observations",
                            "frequency", "errors", "lags", "stale", "study", "benchmark"})
      EXPECT_TRUE(r.contains(key)) << key << " missing from " << r.dump();
    const json run = show_json(r["run_id"].get<int>());
    SCOPED_TRACE("run " + std::to_string(r["run_id"].get<int>()));
    EXPECT_EQ(r["created_at"], run["created_at"]);
    EXPECT_EQ(r["strategy"], run["strategy"]);
    EXPECT_EQ(r["benchmark"], run["benchmark"]);
    EXPECT_EQ(r["inputs_hash"], run["inputs_hash"]);
    EXPECT_EQ(r["alpha"].get<double>(), run["coefficients"][0]["estimate"].get<double>());
    EXPECT_EQ(r["alpha_t"].get<double>(), run["coefficients"][0]["t_stat"].get<double>());
    EXPECT_EQ(r["alpha_p"].get<double>(), run["coefficients"][0]["p_value"].get<double>());
    EXPECT_EQ(r["beta"].get<double>(), run["coefficients"][1]["estimate"].get<double>());
    EXPECT_EQ(r["alpha_annualized"].get<double>(),
              run["statistics"]["alpha_annualized"].get<double>());
    EXPECT_EQ(r["r_squared"].get<double>(), run["statistics"]["r_squared"].get<double>());
    EXPECT_EQ(r["observations"], run["sample"]["observations"]);
    EXPECT_EQ(r["frequency"], run["sample"]["frequency"]);
    EXPECT_EQ(r["errors"], run["statistics"]["errors"]);
    EXPECT_EQ(r["lags"], run["statistics"]["lags"]);
    EXPECT_EQ(r["study"], run["study"]);
    EXPECT_EQ(r["stale"], false);
  }
  // Runs 1 and 2 are the same evaluation of trend-fast (only the study differs, which is not
  // an input): same inputs hash, same figures.
  EXPECT_EQ(runs[0]["inputs_hash"], runs[1]["inputs_hash"]);
  EXPECT_EQ(runs[0]["alpha"], runs[1]["alpha"]);
  EXPECT_NE(runs[0]["inputs_hash"], runs[2]["inputs_hash"]);
}

TEST_F(RunsTest, ShowUnknownRunExits5) {
  const CommandResult r = run_at(ledger(), {"show", "99"});
  EXPECT_EQ(r.exit_code, 5) << r.err;
  EXPECT_TRUE(contains(r.err, "no run 99")) << r.err;
  EXPECT_EQ(run_at(ledger(), {"show", "99", "--format", "json"}).exit_code, 5);
}

// show --format csv: a header and one row per coefficient, numbers that read back to the
// run object's values exactly.
TEST_F(RunsTest, ShowCsvGivesTheCoefficientRows) {
  const CommandResult r = run_at(ledger(), {"show", "4", "--format", "csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto lines = lines_of(r.out);
  ASSERT_EQ(lines.size(), 5u) << r.out;
  EXPECT_EQ(lines[0], "term,estimate,std_error,t_stat,p_value,ci_low,ci_high");
  const json run = show_json(4);
  const char* terms[] = {"alpha", "beta", "SMB", "HML"};
  const char* keys[] = {"estimate", "std_error", "t_stat", "p_value", "ci_low", "ci_high"};
  for (std::size_t j = 0; j < 4; ++j) {
    const auto fields = split_csv_line(lines[j + 1]);
    ASSERT_EQ(fields.size(), 7u) << lines[j + 1];
    EXPECT_EQ(fields[0], terms[j]);
    EXPECT_EQ(run["coefficients"][j]["term"], terms[j]);
    for (std::size_t k = 0; k < 6; ++k)
      EXPECT_EQ(std::strtod(fields[k + 1].c_str(), nullptr),
                run["coefficients"][j][keys[k]].get<double>())
          << terms[j] << " " << keys[k] << ": " << fields[k + 1];
  }
}

// show in text form names the run, its strategy and its reading.
TEST_F(RunsTest, ShowTextPrintsTheRun) {
  const CommandResult r = run_at(ledger(), {"show", "3"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(contains(r.out, "Run 3: trend-slow against market")) << r.out;
  EXPECT_TRUE(contains(r.out, "study grid")) << r.out;
  EXPECT_TRUE(contains(r.out, "Newey-West, 4 lags")) << r.out;
  EXPECT_TRUE(contains(r.out, "Reading")) << r.out;
}

// A revised benchmark (one level changed, fixtures/evaluate/benchmark_revised.csv) is a new
// version of 'market': every earlier run used the old one and is stale; a new run is not,
// and its inputs hash differs from the earlier run of the same evaluation.
TEST_F(RunsTest, RevisedInputMarksEarlierRunsStale) {
  ScratchDir copy;
  const std::string ledger = (copy / "ledger.db").string();
  for (const char* suffix : {"", "-wal"}) {
    const fs::path from = fs::path(RunsTest::ledger() + suffix);
    if (fs::exists(from)) fs::copy_file(from, ledger + suffix);
  }
  const auto stale_flags = [&] {
    const CommandResult r = run_at(ledger, {"runs", "--format", "json"});
    EXPECT_EQ(r.exit_code, 0) << r.err;
    std::vector<bool> flags;
    for (const auto& run : json::parse(r.out)) flags.push_back(run["stale"].get<bool>());
    return flags;
  };
  EXPECT_EQ(stale_flags(), (std::vector<bool>{false, false, false, false}));

  // Ingesting the same content again is no new version and stales nothing.
  ASSERT_EQ(run_at(ledger, {"ingest", "benchmark", evaluate_fixture("benchmark.csv"), "--levels",
                            "--name", "market"})
                .exit_code,
            0);
  EXPECT_EQ(stale_flags(), (std::vector<bool>{false, false, false, false}));

  const CommandResult revised =
      run_at(ledger, {"ingest", "benchmark", evaluate_fixture("benchmark_revised.csv"), "--levels",
                      "--name", "market"});
  ASSERT_EQ(revised.exit_code, 0) << revised.err;
  EXPECT_TRUE(contains(revised.out, "version 2")) << revised.out;
  EXPECT_EQ(stale_flags(), (std::vector<bool>{true, true, true, true}));

  const CommandResult again = run_at(ledger, {"evaluate", "trend-fast", "--benchmark", "market",
                                              "--rate", "bills", "--format", "json"});
  ASSERT_EQ(again.exit_code, 0) << again.err;
  EXPECT_EQ(stale_flags(), (std::vector<bool>{true, true, true, true, false}));
  const json runs = json::parse(run_at(ledger, {"runs", "--format", "json"}).out);
  ASSERT_EQ(runs.size(), 5u);
  EXPECT_NE(runs[4]["inputs_hash"], runs[0]["inputs_hash"]);
  EXPECT_NE(runs[4]["alpha"], runs[0]["alpha"]);
  // The run object says which version it used and which is the latest.
  const json old_run = json::parse(run_at(ledger, {"show", "1", "--format", "json"}).out);
  bool benchmark_seen = false;
  for (const auto& in : old_run["inputs"])
    if (in["role"] == "benchmark") {
      benchmark_seen = true;
      EXPECT_EQ(in["version"], 1);
      EXPECT_EQ(in["latest_version"], 2);
    }
  EXPECT_TRUE(benchmark_seen) << old_run["inputs"].dump();
  // The table marks them too.
  const CommandResult table = run_at(ledger, {"runs"});
  ASSERT_EQ(table.exit_code, 0) << table.err;
  int stale_lines = 0;
  for (const auto& line : lines_of(table.out))
    if (contains(line, "stale") && !contains(line, "stale:")) ++stale_lines;
  EXPECT_EQ(stale_lines, 1 + 4) << table.out;  // the header's column and runs 1-4
}

}  // namespace
