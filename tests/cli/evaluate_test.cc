// Command-level tests of `alphatrail evaluate`, end to end through the real binary: CSV files
// ingested into a scratch ledger, evaluated, and the JSON output compared with statsmodels
// (statsmodels from Debian, computed by fixtures/evaluate/make_fixtures.py, which documents how
// it computes the regressors exactly as alphatrail does); the run record (contract keys,
// inputs hash, immutability), the options and the errors.
#include <SQLiteCpp/Database.h>
#include <SQLiteCpp/Statement.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <memory>
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
using alphatrail::testing::ingest_evaluate_fixtures;
using alphatrail::testing::lines_of;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::ScratchDir;
using nlohmann::json;

// The ledger every test starts from: the fixtures ingested once, copied per test.
//   strategies trend-fast, trend-slow, carry (2010-01 .. 2019-12) and tiny (3 months);
//   benchmark "market" from levels; rate curve "bills" (1M, 3M, percent); factor set "ff"
//   (SMB, HML).
class EvaluateTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    base_ = new ScratchDir();
    const std::string ledger = (*base_ / "base.db").string();
    ASSERT_EQ(ingest_evaluate_fixtures(ledger), "");
    expected_ = new json(json::parse(read_file(evaluate_fixture("expected.json"))));
  }
  static void TearDownTestSuite() {
    delete base_;
    delete expected_;
    base_ = nullptr;
    expected_ = nullptr;
  }

  void SetUp() override {
    ASSERT_NE(base_, nullptr);
    for (const char* suffix : {"", "-wal"}) {
      const fs::path from = *base_ / (std::string("base.db") + suffix);
      if (fs::exists(from)) fs::copy_file(from, dir_ / (std::string("ledger.db") + suffix));
    }
  }

  std::string ledger() const { return (dir_ / "ledger.db").string(); }

  CommandResult cli(const std::vector<std::string>& args) const {
    std::vector<std::string> all{"--ledger", ledger()};
    all.insert(all.end(), args.begin(), args.end());
    return run_alphatrail(all);
  }

  // Runs `evaluate ARGS --format json`, expects success and returns the array of runs.
  json evaluate_json(const std::vector<std::string>& args) const {
    std::vector<std::string> all{"evaluate"};
    all.insert(all.end(), args.begin(), args.end());
    all.insert(all.end(), {"--format", "json"});
    const CommandResult r = cli(all);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    if (r.exit_code != 0) return json::array();
    json j = json::parse(r.out);
    EXPECT_TRUE(j.is_array()) << r.out;
    return j;
  }

  // Evaluates one strategy against market and bills (plus the arguments).
  json evaluate_one(const std::vector<std::string>& args) const {
    std::vector<std::string> all{"--benchmark", "market", "--rate", "bills"};
    all.insert(all.begin(), args.begin(), args.end());
    const json runs = evaluate_json(all);
    EXPECT_EQ(runs.size(), 1u) << runs.dump();
    return runs.empty() ? json::object() : runs[0];
  }

  long long count(const std::string& sql) const {
    SQLite::Database db(ledger(), SQLite::OPEN_READONLY);
    return db.execAndGet(sql).getInt64();
  }

  static const json& expected(const std::string& label) { return (*expected_)["cases"][label]; }

  ScratchDir dir_;
  static ScratchDir* base_;
  static json* expected_;
};

ScratchDir* EvaluateTest::base_ = nullptr;
json* EvaluateTest::expected_ = nullptr;

// |got - want| <= 1e-9 |want|: the agreement asked of statsmodels' values.
void expect_relative(double got, double want, const std::string& what) {
  EXPECT_LE(std::fabs(got - want), 1e-9 * std::fabs(want))
      << what << ": got " << got << ", statsmodels " << want << " (relative "
      << std::fabs(got - want) / std::fabs(want) << ")";
}

// Compares a run with a case of expected.json (statsmodels from Debian, computed by
// make_fixtures.py): every coefficient's estimate, standard error, t, p and 95% interval,
// R^2, adjusted R^2, residual sd, T and the Newey-West lag, to relative 1e-9.
void expect_matches_statsmodels(const json& run, const json& want, const std::string& label) {
  SCOPED_TRACE(label);
  ASSERT_TRUE(run.contains("coefficients")) << run.dump();
  EXPECT_EQ(run["strategy"], want["strategy"]);
  EXPECT_EQ(run["sample"]["observations"], want["observations"]);
  EXPECT_EQ(run["statistics"]["errors"], want["errors"]);
  EXPECT_EQ(run["statistics"]["lags"], want["lags"]);
  const json& got = run["coefficients"];
  const json& exp = want["coefficients"];
  ASSERT_EQ(got.size(), exp.size()) << got.dump();
  for (std::size_t j = 0; j < exp.size(); ++j) {
    const std::string term = exp[j]["term"];
    EXPECT_EQ(got[j]["term"], term);
    for (const char* key : {"estimate", "std_error", "t_stat", "p_value", "ci_low", "ci_high"})
      expect_relative(got[j][key].get<double>(), exp[j][key].get<double>(), term + " " + key);
  }
  for (const char* key : {"r_squared", "adj_r_squared", "residual_std"})
    expect_relative(run["statistics"][key].get<double>(), want[key].get<double>(), key);
}

// --- statsmodels ------------------------------------------------------------------------

// Default errors: Newey-West with floor(4 (T/100)^(2/9)) = floor(4 x 1.2^(2/9)) = floor(4.166)
// = 4 lags for T = 120, no small-sample factor (statsmodels HAC maxlags=4,
// use_correction=False, use_t=True).
TEST_F(EvaluateTest, MatchesStatsmodelsNeweyWestAutoLags) {
  const json run = evaluate_one({"trend-fast"});
  expect_matches_statsmodels(run, expected("trend-fast newey-west"), "trend-fast newey-west");
  EXPECT_EQ(run["statistics"]["lags"], 4);
  EXPECT_EQ(run["statistics"]["small_sample_factor"], false);
  EXPECT_EQ(run["parameters"]["lags"], "auto");
  EXPECT_EQ(run["parameters"]["errors"], "newey-west");
  EXPECT_EQ(run["parameters"]["rate_basis"], "compound");
  EXPECT_EQ(run["parameters"]["rate_timing"], "start");
}

// statsmodels OLS fit() (nonrobust).
TEST_F(EvaluateTest, MatchesStatsmodelsClassic) {
  const json run = evaluate_one({"trend-fast", "--errors", "classic"});
  expect_matches_statsmodels(run, expected("trend-fast classic"), "trend-fast classic");
}

// statsmodels OLS fit(cov_type="HC1", use_t=True).
TEST_F(EvaluateTest, MatchesStatsmodelsHc1) {
  const json run = evaluate_one({"trend-fast", "--errors", "hc1"});
  expect_matches_statsmodels(run, expected("trend-fast hc1"), "trend-fast hc1");
}

// Multi-factor model with the factor set's two columns (statsmodels HAC, 4 lags).
TEST_F(EvaluateTest, MatchesStatsmodelsWithTwoFactors) {
  const json run = evaluate_one({"carry", "--factor", "ff"});
  expect_matches_statsmodels(run, expected("carry newey-west factors"), "carry with factors");
  EXPECT_EQ(run["parameters"]["model"], "multi-factor");
  EXPECT_EQ(run["factors"], "ff:SMB,HML");
  // Naming the columns gives the same regression.
  const json named = evaluate_one({"carry", "--factor", "ff:SMB,HML"});
  EXPECT_EQ(named["coefficients"], run["coefficients"]);
}

// The tenor closest to a month is 1M by default; --rate bills:3M uses the 3M column, and the
// result matches statsmodels on r_f from the 3M yields.
TEST_F(EvaluateTest, TenorDefaultsTo1MAndCanBeChosen) {
  const json one = evaluate_one({"trend-fast"});
  EXPECT_EQ(one["parameters"]["rate_tenor"], "1M");
  EXPECT_EQ(one["parameters"]["tenor_rule"], "closest to the period length");
  EXPECT_EQ(one["rate"], "bills:1M");
  const json three = evaluate_json({"trend-fast", "--benchmark", "market", "--rate", "bills:3M"});
  ASSERT_EQ(three.size(), 1u);
  EXPECT_EQ(three[0]["parameters"]["rate_tenor"], "3M");
  EXPECT_EQ(three[0]["parameters"]["tenor_rule"], "given");
  EXPECT_EQ(three[0]["rate"], "bills:3M");
  expect_matches_statsmodels(three[0], expected("trend-fast newey-west 3M"), "trend-fast 3M");
  EXPECT_NE(three[0]["inputs_hash"], one["inputs_hash"]);
}

// --- the run object ---------------------------------------------------------------------

TEST_F(EvaluateTest, JsonContractKeysArePresent) {
  const json run = evaluate_one({"trend-fast"});
  for (const char* key : {"run_id", "inputs_hash", "strategy", "benchmark", "rate", "parameters",
                          "sample", "coefficients", "statistics", "reading"})
    EXPECT_TRUE(run.contains(key)) << key << " missing from " << run.dump();
  EXPECT_TRUE(run["run_id"].is_number_integer());
  EXPECT_EQ(run["run_id"], 1);
  EXPECT_EQ(run["strategy"], "trend-fast");
  EXPECT_EQ(run["benchmark"], "market");
  ASSERT_TRUE(run["inputs_hash"].is_string());
  EXPECT_EQ(run["inputs_hash"].get<std::string>().size(), 64u);
  EXPECT_TRUE(run["parameters"].is_object());
  for (const char* key : {"first", "last", "observations", "frequency"})
    EXPECT_TRUE(run["sample"].contains(key)) << "sample." << key;
  EXPECT_EQ(run["sample"]["first"], "2010-01");
  EXPECT_EQ(run["sample"]["last"], "2019-12");
  EXPECT_EQ(run["sample"]["observations"], 120);
  EXPECT_EQ(run["sample"]["frequency"], "monthly");
  ASSERT_EQ(run["coefficients"].size(), 2u);
  EXPECT_EQ(run["coefficients"][0]["term"], "alpha");
  EXPECT_EQ(run["coefficients"][1]["term"], "beta");
  for (const auto& c : run["coefficients"])
    for (const char* key :
         {"term", "estimate", "std_error", "t_stat", "p_value", "ci_low", "ci_high"})
      EXPECT_TRUE(c.contains(key)) << "coefficient." << key;
  for (const char* key : {"r_squared", "adj_r_squared", "residual_std", "alpha_annualized", "lags"})
    EXPECT_TRUE(run["statistics"].contains(key)) << "statistics." << key;
  // alpha annualized with the default compound rule, (1 + alpha)^12 - 1.
  const double alpha = run["coefficients"][0]["estimate"];
  EXPECT_NEAR(run["statistics"]["alpha_annualized"].get<double>(), std::pow(1 + alpha, 12) - 1,
              1e-15);
  ASSERT_TRUE(run["reading"].is_array());
  ASSERT_FALSE(run["reading"].empty());
  for (const auto& sentence : run["reading"]) EXPECT_TRUE(sentence.is_string());
  // The first sentence reads beta (1.30 here: more strongly than the market).
  EXPECT_TRUE(contains(run["reading"][0].get<std::string>(), "Beta is 1.30")) << run["reading"][0];
  // show --format json prints the same run object.
  const CommandResult shown = cli({"show", "1", "--format", "json"});
  ASSERT_EQ(shown.exit_code, 0) << shown.err;
  EXPECT_EQ(json::parse(shown.out), run);
}

// A glob pattern selects every matching strategy: one run each, in name order.
TEST_F(EvaluateTest, GlobPatternEvaluatesEachMatchingStrategy) {
  const json runs = evaluate_json({"trend-*", "--benchmark", "market", "--rate", "bills"});
  ASSERT_EQ(runs.size(), 2u) << runs.dump();
  EXPECT_EQ(runs[0]["strategy"], "trend-fast");
  EXPECT_EQ(runs[1]["strategy"], "trend-slow");
  EXPECT_NE(runs[0]["run_id"], runs[1]["run_id"]);
  expect_matches_statsmodels(runs[0], expected("trend-fast newey-west"), "trend-fast via glob");
  expect_matches_statsmodels(runs[1], expected("trend-slow newey-west"), "trend-slow via glob");
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 2);
  // A pattern that matches nothing is an unknown strategy.
  const CommandResult none =
      cli({"evaluate", "nothing-*", "--benchmark", "market", "--rate", "bills"});
  EXPECT_EQ(none.exit_code, 5) << none.err;
  EXPECT_TRUE(contains(none.err, "nothing-*")) << none.err;
}

// --study tags runs; from the second run of a study on, the reading says how many runs the
// study holds.
TEST_F(EvaluateTest, StudyTagsRunsAndTheReadingCountsThem) {
  const auto study_sentence = [](const json& run) {
    for (const auto& s : run["reading"])
      if (contains(s.get<std::string>(), "runs recorded in study")) return s.get<std::string>();
    return std::string();
  };
  const json first = evaluate_one({"trend-fast", "--study", "trend-grid"});
  EXPECT_EQ(first["study"], "trend-grid");
  EXPECT_EQ(study_sentence(first), "") << first["reading"].dump();
  const json second = evaluate_one({"trend-slow", "--study", "trend-grid"});
  EXPECT_TRUE(contains(study_sentence(second), "one of 2 runs recorded in study 'trend-grid'"))
      << second["reading"].dump();
  // Two more in one command: the count includes the runs recorded before in the same command.
  const json more = evaluate_json(
      {"trend-*", "--benchmark", "market", "--rate", "bills", "--study", "trend-grid"});
  ASSERT_EQ(more.size(), 2u);
  EXPECT_TRUE(contains(study_sentence(more[0]), "one of 3 runs")) << more[0]["reading"].dump();
  EXPECT_TRUE(contains(study_sentence(more[1]), "one of 4 runs")) << more[1]["reading"].dump();
  // A run outside the study is not counted and says nothing about it.
  const json other = evaluate_one({"carry"});
  EXPECT_TRUE(other["study"].is_null());
  EXPECT_EQ(study_sentence(other), "");
  EXPECT_EQ(count("SELECT count(*) FROM runs WHERE study = 'trend-grid'"), 4);
}

// The same evaluation twice: two runs with the same inputs hash and identical coefficients;
// another parameter (--errors classic) gives another inputs hash.
TEST_F(EvaluateTest, InputsHashIsReproducibleAndCoversParameters) {
  const json a = evaluate_one({"trend-fast"});
  const json b = evaluate_one({"trend-fast"});
  EXPECT_EQ(a["run_id"], 1);
  EXPECT_EQ(b["run_id"], 2);
  EXPECT_EQ(a["inputs_hash"], b["inputs_hash"]);
  EXPECT_EQ(a["coefficients"], b["coefficients"]);
  for (std::size_t j = 0; j < 2; ++j)
    EXPECT_EQ(a["coefficients"][j]["estimate"].get<double>(),
              b["coefficients"][j]["estimate"].get<double>());
  const json c = evaluate_one({"trend-fast", "--errors", "classic"});
  EXPECT_NE(c["inputs_hash"], a["inputs_hash"]);
  EXPECT_EQ(c["coefficients"][0]["estimate"], a["coefficients"][0]["estimate"]);  // same fit
  const json d = evaluate_one({"trend-fast", "--lags", "4"});
  EXPECT_NE(d["inputs_hash"], a["inputs_hash"]);  // "auto" and 4 are recorded differently
  EXPECT_EQ(d["coefficients"], a["coefficients"]);
  EXPECT_EQ(count("SELECT count(DISTINCT inputs_hash) FROM runs"), 3);
}

// Runs are immutable: the ledger's triggers refuse UPDATE and DELETE on runs, run_inputs and
// run_coefficients (migrations/0002_create_runs.sql), and the rows stay as they were.
TEST_F(EvaluateTest, RunsAreImmutable) {
  evaluate_one({"carry", "--factor", "ff"});
  const long long inputs = count("SELECT count(*) FROM run_inputs");
  const long long coefficients = count("SELECT count(*) FROM run_coefficients");
  EXPECT_EQ(inputs, 4);        // strategy, benchmark, rate, factor
  EXPECT_EQ(coefficients, 4);  // alpha, beta, SMB, HML
  SQLite::Database db(ledger(), SQLite::OPEN_READWRITE);
  const std::vector<std::pair<std::string, std::string>> refused{
      {"UPDATE runs SET note = 'edited'", "runs are immutable"},
      {"UPDATE runs SET alpha = 0.5 WHERE run_id = 1", "runs are immutable"},
      {"DELETE FROM runs", "runs are never deleted"},
      {"UPDATE run_inputs SET columns = 'x'", "run inputs are immutable"},
      {"DELETE FROM run_inputs", "run inputs are never deleted"},
      {"UPDATE run_coefficients SET estimate = 0", "run coefficients are immutable"},
      {"DELETE FROM run_coefficients WHERE term = 'alpha'", "run coefficients are never deleted"}};
  for (const auto& [sql, message] : refused) {
    try {
      db.exec(sql);
      ADD_FAILURE() << sql << " was allowed";
    } catch (const SQLite::Exception& e) {
      EXPECT_TRUE(contains(e.what(), message)) << sql << ": " << e.what();
    }
  }
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM runs").getInt(), 1);
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM run_inputs").getInt64(), inputs);
  EXPECT_EQ(db.execAndGet("SELECT count(*) FROM run_coefficients").getInt64(), coefficients);
  EXPECT_TRUE(db.execAndGet("SELECT note FROM runs").isNull());
}

// --- errors -----------------------------------------------------------------------------

TEST_F(EvaluateTest, UnknownStrategyOrBenchmarkExits5) {
  const CommandResult s = cli({"evaluate", "no-such", "--benchmark", "market", "--rate", "bills"});
  EXPECT_EQ(s.exit_code, 5) << s.err;
  EXPECT_TRUE(contains(s.err, "no-such")) << s.err;
  const CommandResult b =
      cli({"evaluate", "trend-fast", "--benchmark", "no-index", "--rate", "bills"});
  EXPECT_EQ(b.exit_code, 5) << b.err;
  EXPECT_TRUE(contains(b.err, "no-index")) << b.err;
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 0);
}

TEST_F(EvaluateTest, MissingTenorExits2) {
  const CommandResult r =
      cli({"evaluate", "trend-fast", "--benchmark", "market", "--rate", "bills:6M"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_TRUE(contains(r.err, "6M")) << r.err;
  EXPECT_TRUE(contains(r.err, "1M, 3M")) << r.err;  // names the tenors it has
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 0);
}

TEST_F(EvaluateTest, LagsWithClassicErrorsExits2) {
  const CommandResult r = cli({"evaluate", "trend-fast", "--benchmark", "market", "--rate", "bills",
                               "--errors", "classic", "--lags", "3"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_TRUE(contains(r.err, "--lags")) << r.err;
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 0);
}

// A strategy with 3 months cannot be estimated (T < k + 2 = 4): exit 6 and no run recorded,
// also when it comes with strategies that can be (all or nothing).
TEST_F(EvaluateTest, FailedEvaluationExits6AndRecordsNothing) {
  evaluate_one({"trend-fast"});
  ASSERT_EQ(count("SELECT count(*) FROM runs"), 1);
  const long long inputs = count("SELECT count(*) FROM run_inputs");
  const long long coefficients = count("SELECT count(*) FROM run_coefficients");
  const CommandResult alone = cli({"evaluate", "tiny", "--benchmark", "market", "--rate", "bills"});
  EXPECT_EQ(alone.exit_code, 6) << alone.err;
  EXPECT_TRUE(contains(alone.err, "tiny")) << alone.err;
  EXPECT_TRUE(contains(alone.err, "no run was recorded")) << alone.err;
  const CommandResult mixed =
      cli({"evaluate", "trend-slow", "tiny", "--benchmark", "market", "--rate", "bills"});
  EXPECT_EQ(mixed.exit_code, 6) << mixed.err;
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 1);
  EXPECT_EQ(count("SELECT count(*) FROM run_inputs"), inputs);
  EXPECT_EQ(count("SELECT count(*) FROM run_coefficients"), coefficients);
}

// A return that is finite but absurd (confirmed at ingest with --allow-large-returns) makes
// the regression overflow: the evaluation must say it cannot be estimated, before anything is
// recorded, and not end on a constraint of the runs table.
TEST_F(EvaluateTest, NonFiniteEstimateExits6AndRecordsNothing) {
  const std::vector<std::string> rows = lines_of(read_file(evaluate_fixture("strategies.csv")));
  std::string csv = "date,absurd\n";
  for (std::size_t t = 1; t < rows.size(); ++t)
    csv += rows[t].substr(0, rows[t].find(',')) + (t == 60 ? ",1e300\n" : ",0.01\n");
  const std::string file = dir_.write("absurd.csv", csv).string();
  const CommandResult refused = cli({"ingest", "strategy", file});
  ASSERT_EQ(refused.exit_code, 3) << refused.err;
  ASSERT_EQ(cli({"ingest", "strategy", file, "--allow-large-returns"}).exit_code, 0);

  evaluate_one({"trend-fast"});
  const long long runs = count("SELECT count(*) FROM runs");
  const long long coefficients = count("SELECT count(*) FROM run_coefficients");
  for (const auto& strategies :
       std::vector<std::vector<std::string>>{{"absurd"}, {"trend-slow", "absurd", "carry"}}) {
    std::vector<std::string> args{"evaluate"};
    args.insert(args.end(), strategies.begin(), strategies.end());
    args.insert(args.end(), {"--benchmark", "market", "--rate", "bills"});
    const CommandResult r = cli(args);
    EXPECT_EQ(r.exit_code, 6) << r.err;
    EXPECT_TRUE(contains(
        r.err, "1 of " + std::to_string(strategies.size()) + " strategies cannot be evaluated"))
        << r.err;
    EXPECT_TRUE(contains(r.err, "\n  absurd: cannot estimate")) << r.err;
    EXPECT_TRUE(contains(r.err, "not a finite number")) << r.err;
    EXPECT_TRUE(contains(r.err, "no run was recorded")) << r.err;
    EXPECT_FALSE(contains(r.err, "constraint")) << r.err;
    EXPECT_EQ(count("SELECT count(*) FROM runs"), runs);
    EXPECT_EQ(count("SELECT count(*) FROM run_coefficients"), coefficients);
  }
}

// Text evaluate stores (--note, --study) is checked like every stored text: a Latin-1 note
// used to be recorded, after which every JSON output of the ledger failed.
TEST_F(EvaluateTest, NoteOrStudyThatCannotBeStoredIsAUsageError) {
  evaluate_one({"trend-fast"});
  const long long runs = count("SELECT count(*) FROM runs");
  const struct {
    std::vector<std::string> args;
    std::string message;
  } cases[] = {
      {{"--note", "revis\xe9"},
       "--note: byte 6 is not valid UTF-8 (0xe9) (write the text in UTF-8)"},
      {{"--study", "trend\tv2"},
       "--study: byte 6 is a control character (U+0009, a tab) (leave out control characters, "
       "tabs and line breaks: the text must fit on one line)"},
      {{"--study", "trend\xc2\x9b"},
       "--study: byte 6 is a control character (U+009B) (leave out control characters, tabs and "
       "line breaks: the text must fit on one line)"},
      {{"--study", "   "},
       "--study: the name is blank (give a name with at least one visible character)"},
      {{"--study", "trend "},
       "--study: the name ends with white space (U+0020 at byte 6) (remove the white space "
       "around the name)"},
  };
  for (const auto& c : cases) {
    std::vector<std::string> args{"evaluate", "trend-slow", "--benchmark",
                                  "market",   "--rate",     "bills"};
    args.insert(args.end(), c.args.begin(), c.args.end());
    const CommandResult r = cli(args);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_EQ(r.err, "alphatrail: error: " + c.message + "\n");
    EXPECT_EQ(r.out, "");
  }
  EXPECT_EQ(count("SELECT count(*) FROM runs"), runs);
}

// Names, notes and studies in UTF-8 go all the way through: ingest, evaluate, and every JSON
// output that shows them.
TEST_F(EvaluateTest, Utf8NamesNotesAndStudiesWorkInEveryJsonOutput) {
  const std::string name = "caf\xc3\xa9-strat";
  const std::string note = "r\xc3\xa9vis\xc3\xa9 \xe2\x80\x94 seconde passe";
  const std::string study = "\xc3\xa9tude \xe6\x97\xa5\xe6\x9c\xac";
  const std::vector<std::string> rows = lines_of(read_file(evaluate_fixture("strategies.csv")));
  std::string csv = "date," + name + "\n";
  for (std::size_t t = 1; t < rows.size(); ++t)
    csv += rows[t].substr(0, rows[t].find(',', rows[t].find(',') + 1)) + "\n";
  const CommandResult ingested =
      cli({"ingest", "strategy", dir_.write("cafe.csv", csv).string(), "--note", note});
  ASSERT_EQ(ingested.exit_code, 0) << ingested.err;

  const json run = evaluate_one({name, "--note", note, "--study", study});
  EXPECT_EQ(run["strategy"], name);
  EXPECT_EQ(run["note"], note);
  EXPECT_EQ(run["study"], study);

  const CommandResult series = cli({"series", "--format", "json"});
  ASSERT_EQ(series.exit_code, 0) << series.err;
  EXPECT_TRUE(contains(json::parse(series.out).dump(), name)) << series.out;
  const CommandResult history = cli({"series", name, "--format", "json"});
  ASSERT_EQ(history.exit_code, 0) << history.err;
  EXPECT_TRUE(contains(json::parse(history.out).dump(), note)) << history.out;
  const CommandResult runs = cli({"runs", "--format", "json"});
  ASSERT_EQ(runs.exit_code, 0) << runs.err;
  const json listed = json::parse(runs.out);
  ASSERT_FALSE(listed.empty());
  EXPECT_EQ(listed.back()["strategy"], name);
  EXPECT_EQ(listed.back()["study"], study);
  const CommandResult shown = cli({"show", run["run_id"].dump(), "--format", "json"});
  ASSERT_EQ(shown.exit_code, 0) << shown.err;
  EXPECT_EQ(json::parse(shown.out)["note"], note);
}

// More strategies than one chunk (128): each chunk is read while the one before is evaluated,
// and its runs are recorded while the next is evaluated. The runs still come out in name
// order with consecutive ids, each bit for bit what evaluating that strategy alone gives, and
// a strategy that fails in the last chunk still leaves nothing recorded.
TEST_F(EvaluateTest, ManyStrategiesInChunksRecordInOrderOrNotAtAll) {
  const std::vector<std::string> rows = lines_of(read_file(evaluate_fixture("strategies.csv")));
  const int wide = 300;
  std::string csv = "date";
  for (int j = 0; j < wide; ++j) csv += fmt::format(",wide-{:04}", j);
  csv += "\n";
  for (std::size_t t = 1; t < rows.size(); ++t) {
    const std::string date = rows[t].substr(0, rows[t].find(','));
    const double base = std::stod(rows[t].substr(rows[t].find(',') + 1));
    csv += date;
    for (int j = 0; j < wide; ++j)
      csv += fmt::format(",{:.8f}", base * (0.5 + j / 300.0) + 0.002 * std::sin(0.7 * t + j));
    csv += "\n";
  }
  ASSERT_EQ(cli({"ingest", "strategy", dir_.write("wide.csv", csv).string()}).exit_code, 0);

  const long long before = count("SELECT count(*) FROM runs");
  const json runs = evaluate_json({"wide-*", "--benchmark", "market", "--rate", "bills"});
  ASSERT_EQ(runs.size(), static_cast<std::size_t>(wide));
  for (int j = 0; j < wide; ++j) {
    EXPECT_EQ(runs[j]["strategy"], fmt::format("wide-{:04}", j));
    EXPECT_EQ(runs[j]["run_id"], before + 1 + j);
  }
  for (const int j : {0, 127, 128, 200, wide - 1}) {  // chunk edges and the last chunk
    const json alone = evaluate_one({fmt::format("wide-{:04}", j)});
    EXPECT_EQ(alone["inputs_hash"], runs[j]["inputs_hash"]);
    EXPECT_EQ(alone["coefficients"], runs[j]["coefficients"]);
    EXPECT_EQ(alone["statistics"], runs[j]["statistics"]);
  }

  // Three months are too few to estimate; the name sorts last, so it fails in the last chunk.
  ASSERT_EQ(cli({"ingest", "strategy",
                 dir_.write("short.csv",
                            "date,wide-0299b\n2015-01-31,0.01\n2015-02-28,0.02\n2015-03-31,0.0\n")
                     .string()})
                .exit_code,
            0);
  const long long recorded = count("SELECT count(*) FROM runs");
  const long long inputs = count("SELECT count(*) FROM run_inputs");
  const long long coefficients = count("SELECT count(*) FROM run_coefficients");
  const CommandResult failed =
      cli({"evaluate", "wide-*", "--benchmark", "market", "--rate", "bills"});
  EXPECT_EQ(failed.exit_code, 6) << failed.err;
  EXPECT_TRUE(contains(failed.err, "wide-0299b")) << failed.err;
  EXPECT_TRUE(contains(failed.err, "no run was recorded")) << failed.err;
  EXPECT_EQ(count("SELECT count(*) FROM runs"), recorded);
  EXPECT_EQ(count("SELECT count(*) FROM run_inputs"), inputs);
  EXPECT_EQ(count("SELECT count(*) FROM run_coefficients"), coefficients);
}

// --- options ----------------------------------------------------------------------------

// Monthly inputs compounded to quarters: 120 months are 40 quarters 2010-Q1 .. 2019-Q4; the
// tenor closest to a quarter is 3M. The regression matches statsmodels on quarterly returns
// prod(1 + r) - 1 and r_f = (1 + y_3M / 100)^(1/4) - 1 from the previous quarter-end (statsmodels
// from Debian, computed by make_fixtures.py).
TEST_F(EvaluateTest, QuarterlyFrequencyOnMonthlyInputs) {
  const json run = evaluate_one({"trend-fast", "--frequency", "quarterly"});
  expect_matches_statsmodels(run, expected("trend-fast newey-west quarterly"), "quarterly");
  EXPECT_EQ(run["sample"]["frequency"], "quarterly");
  EXPECT_EQ(run["sample"]["observations"], 120 / 3);
  EXPECT_EQ(run["sample"]["first"], "2010-Q1");
  EXPECT_EQ(run["sample"]["last"], "2019-Q4");
  EXPECT_EQ(run["sample"]["periods_per_year"], 4);
  EXPECT_EQ(run["parameters"]["frequency"], "quarterly");
  EXPECT_EQ(run["parameters"]["frequency_rule"], "given");
  EXPECT_EQ(run["parameters"]["rate_tenor"], "3M");
  EXPECT_EQ(run["statistics"]["lags"], 3);  // floor(4 (40/100)^(2/9)) = floor(3.26) = 3
  const double alpha = run["coefficients"][0]["estimate"];
  EXPECT_NEAR(run["statistics"]["alpha_annualized"].get<double>(), std::pow(1 + alpha, 4) - 1,
              1e-15);
}

// --from/--to restrict the sample to the periods between them: 2012-01 .. 2017-06 is
// 6 x 12 - 6 = 66 months.
TEST_F(EvaluateTest, FromAndToRestrictTheSample) {
  const json run = evaluate_one({"trend-fast", "--from", "2012-01", "--to", "2017-06"});
  EXPECT_EQ(run["sample"]["first"], "2012-01");
  EXPECT_EQ(run["sample"]["last"], "2017-06");
  EXPECT_EQ(run["sample"]["observations"], 66);
  EXPECT_EQ(run["parameters"]["from"], "2012-01-01");
  EXPECT_EQ(run["parameters"]["to"], "2017-06-30");
  const json whole = evaluate_one({"trend-fast"});
  EXPECT_NE(run["coefficients"][0]["estimate"], whole["coefficients"][0]["estimate"]);
  EXPECT_NE(run["inputs_hash"], whole["inputs_hash"]);
  const CommandResult swapped = cli({"evaluate", "trend-fast", "--benchmark", "market", "--rate",
                                     "bills", "--from", "2017-06", "--to", "2012-01"});
  EXPECT_EQ(swapped.exit_code, 2) << swapped.err;
}

// CSV output: a header and one row per run, the run id and strategy first.
TEST_F(EvaluateTest, CsvOutputHasOneRowPerRun) {
  const CommandResult r = cli({"evaluate", "trend-*", "carry", "--benchmark", "market", "--rate",
                               "bills", "--format", "csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto lines = lines_of(r.out);
  ASSERT_EQ(lines.size(), 4u) << r.out;
  EXPECT_EQ(lines[0].rfind("run,strategy,periods,", 0), 0u) << lines[0];
  EXPECT_EQ(lines[1].rfind("1,trend-fast,120,", 0), 0u) << lines[1];
  EXPECT_EQ(lines[2].rfind("2,trend-slow,120,", 0), 0u) << lines[2];
  EXPECT_EQ(lines[3].rfind("3,carry,120,", 0), 0u) << lines[3];
  EXPECT_EQ(count("SELECT count(*) FROM runs"), 3);
}

}  // namespace
