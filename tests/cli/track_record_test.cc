// Command-level tests of the track record through the real binary on real ledger files:
// a revised benchmark marks runs stale, `series --diff` lists exactly the changed periods,
// `rerun` re-runs stale runs once (dry run records nothing) with plain verdicts (FLIPPED when
// significance changes), `compare` shows two runs side by side and `reproduce` recomputes a
// run bit for bit.
#include <SQLiteCpp/Database.h>
#include <fmt/format.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdlib>
#include <filesystem>
#include <map>
#include <nlohmann/json.hpp>
#include <random>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "support/ledger_fixtures.h"
#include "support/test_support.h"

namespace {

namespace fs = std::filesystem;
using alphatrail::testing::CommandResult;
using alphatrail::testing::contains;
using alphatrail::testing::lines_of;
using alphatrail::testing::read_file;
using alphatrail::testing::run_alphatrail;
using alphatrail::testing::run_at;
using alphatrail::testing::ScratchDir;
using alphatrail::testing::SixRunLedgerTest;
using nlohmann::json;

constexpr const char* kBenchmark = "alder-vale-composite";
constexpr const char* kRate = "alder-vale-bills";
constexpr const char* kFactors = "brindle-styles";

// Runs a command that must succeed and parses its JSON output.
json json_at(const std::string& ledger, const std::vector<std::string>& args) {
  const CommandResult r = run_at(ledger, args);
  EXPECT_EQ(r.exit_code, 0) << args.front() << ": " << r.err;
  if (r.exit_code != 0) return json();
  try {
    return json::parse(r.out);
  } catch (const std::exception& e) {
    ADD_FAILURE() << args.front() << " printed no JSON (" << e.what() << "):\n" << r.out;
    return json();
  }
}

json show(const std::string& ledger, std::int64_t run) {
  return json_at(ledger, {"show", std::to_string(run), "--format", "json"});
}

// Counts through the ledger's own read-only query command.
std::int64_t count_of(const std::string& ledger, const std::string& table) {
  const json rows =
      json_at(ledger, {"query", "select count(*) n from " + table, "--format", "json"});
  if (!rows.is_array() || rows.size() != 1) return -1;
  return rows[0]["n"].get<std::int64_t>();
}

// Copies a ledger file (and its write-ahead log when one is left).

struct Level {
  std::string date;
  double level = 0;
  std::string text;  // as written in the file
};

std::vector<Level> read_levels(const fs::path& csv) {
  std::vector<Level> out;
  const auto lines = lines_of(read_file(csv));
  for (std::size_t i = 1; i < lines.size(); ++i) {
    if (lines[i].empty()) continue;
    const auto comma = lines[i].find(',');
    Level l;
    l.date = lines[i].substr(0, comma);
    l.text = lines[i].substr(comma + 1);
    l.level = std::strtod(l.text.c_str(), nullptr);
    out.push_back(l);
  }
  return out;
}

std::string write_levels(const std::vector<Level>& levels) {
  std::string text = "date,level\n";
  for (const auto& l : levels) text += l.date + "," + l.text + "\n";
  return text;
}

// The return alphatrail derives from two consecutive levels.
double level_return(double now, double before) {
  return now / before - 1;
}

// The verdict rule of the re-run, stated independently: significance at the run's own level.
std::string expected_verdict(const json& before, const json& after) {
  const double level = 1.0 - before["parameters"]["confidence"].get<double>();
  const auto p = [](const json& run) { return run["coefficients"][0]["p_value"].get<double>(); };
  const auto a = [](const json& run) { return run["coefficients"][0]["estimate"].get<double>(); };
  std::vector<std::string> flips;
  if (p(before) < level && !(p(after) < level)) flips.push_back("significance lost");
  if (!(p(before) < level) && p(after) < level) flips.push_back("became significant");
  if ((a(before) > 0) != (a(after) > 0)) flips.push_back("alpha changed sign");
  if (flips.empty()) return "conclusion unchanged";
  std::string text = "FLIPPED: ";
  for (std::size_t i = 0; i < flips.size(); ++i) text += (i ? ", " : "") + flips[i];
  return text;
}

// Checks one side of a re-run figure block against the run object of `show`.
void expect_figures(const json& figures, const json& run, const std::string& side) {
  SCOPED_TRACE(side + " of run " + std::to_string(run["run_id"].get<std::int64_t>()));
  EXPECT_EQ(figures["alpha_annualized"].get<double>(),
            run["statistics"]["alpha_annualized"].get<double>());
  EXPECT_EQ(figures["alpha_t"].get<double>(), run["coefficients"][0]["t_stat"].get<double>());
  EXPECT_EQ(figures["alpha_p"].get<double>(), run["coefficients"][0]["p_value"].get<double>());
  EXPECT_EQ(figures["beta"].get<double>(), run["coefficients"][1]["estimate"].get<double>());
  EXPECT_EQ(figures["r_squared"].get<double>(), run["statistics"]["r_squared"].get<double>());
}

// The six-run ledger, built once; every test works on its own copy.
class TrackRecordTest : public SixRunLedgerTest {
 protected:
  // Writes the benchmark with one level revised (row `row` of the data, times `factor`) and
  // ingests it as version 2 of the benchmark. Returns the levels before and after.
  std::pair<std::vector<Level>, std::vector<Level>> revise_benchmark(std::size_t row,
                                                                     double factor) {
    const auto before = read_levels(benchmark_csv());
    auto after = before;
    after[row].text = fmt::format("{:.2f}", before[row].level * factor);
    after[row].level = std::strtod(after[row].text.c_str(), nullptr);
    const auto file = scratch_.write("alder-vale-composite-revised.csv", write_levels(after));
    const CommandResult r =
        run_at(ledger(), {"ingest", "benchmark", file.string(), "--levels", "--name", kBenchmark});
    EXPECT_EQ(r.exit_code, 0) << r.err;
    EXPECT_TRUE(contains(r.out, "version 2")) << r.out;
    return {before, after};
  }
};

// The demo's own track record: it restates the index and re-runs the six evaluations; the
// re-runs revise the originals, nothing is left to re-run, and every run reproduces.
TEST_F(TrackRecordTest, DemoLedgerRerunsItsRestatedIndex) {
  const std::string demo_ledger = demo().string();
  const json runs = json_at(demo_ledger, {"runs", "--format", "json"});
  ASSERT_EQ(runs.size(), 12u);
  for (const auto& r : runs) {
    const std::int64_t id = r["run_id"];
    EXPECT_EQ(r["stale"].get<bool>(), id <= 6) << r.dump();
    if (id > 6) {
      EXPECT_EQ(r["revises_run_id"], id - 6) << r.dump();
    } else {
      EXPECT_TRUE(r["revises_run_id"].is_null()) << r.dump();
    }
  }
  const CommandResult none = run_at(demo_ledger, {"rerun", "--all-stale", "--dry-run"});
  EXPECT_EQ(none.exit_code, 0) << none.err;
  EXPECT_TRUE(contains(none.out, "no stale runs")) << none.out;
  for (int id : {1, 7, 12}) {
    const CommandResult r = run_at(demo_ledger, {"reproduce", std::to_string(id)});
    EXPECT_EQ(r.exit_code, 0) << id << ": " << r.out << r.err;
    EXPECT_TRUE(contains(r.out, "reproduced:")) << r.out;
  }
  const json cmp = json_at(demo_ledger, {"compare", "1", "7", "--format", "json"});
  ASSERT_TRUE(cmp.is_object());
  for (const auto& in : cmp["inputs"])
    if (in["role"] == "benchmark") {
      EXPECT_EQ(in["a"], "alder-vale-composite v1");
      EXPECT_EQ(in["b"], "alder-vale-composite v2");
      EXPECT_TRUE(in.contains("revision")) << in.dump();
    }
  EXPECT_TRUE(cmp["parameters"].empty()) << cmp["parameters"].dump();
}

// The fixture itself: six runs, none stale, none revising another.
TEST_F(TrackRecordTest, DemoLedgerHasSixFreshRuns) {
  const json runs = json_at(ledger(), {"runs", "--format", "json"});
  ASSERT_EQ(runs.size(), 6u);
  for (const auto& r : runs) {
    EXPECT_FALSE(r["stale"].get<bool>()) << r.dump();
    EXPECT_TRUE(r["revises_run_id"].is_null()) << r.dump();
    EXPECT_EQ(r["benchmark"], kBenchmark);
  }
  const CommandResult none = run_at(ledger(), {"rerun", "--all-stale"});
  EXPECT_EQ(none.exit_code, 0) << none.err;
  EXPECT_TRUE(contains(none.out, "no stale runs")) << none.out;
  EXPECT_EQ(count_of(ledger(), "runs"), 6);
}

// A revised level moves two returns: its own month's and the next one's. The diff lists
// exactly those, with the values computed here from the CSV levels.
TEST_F(TrackRecordTest, DiffListsExactlyTheTwoReturnsOneLevelMoves) {
  const std::size_t row = 100;
  const auto [before, after] = revise_benchmark(row, 1.03);
  const json diff =
      json_at(ledger(), {"series", kBenchmark, "--diff", "1", "2", "--format", "json"});
  ASSERT_TRUE(diff.is_object()) << diff.dump();
  EXPECT_EQ(diff["name"], kBenchmark);
  EXPECT_EQ(diff["from_version"], 1);
  EXPECT_EQ(diff["to_version"], 2);
  ASSERT_EQ(diff["columns"].size(), 1u) << diff.dump();
  const json& column = diff["columns"][0];
  EXPECT_TRUE(column["added"].empty()) << column.dump();
  EXPECT_TRUE(column["removed"].empty()) << column.dump();
  ASSERT_EQ(column["changed"].size(), 2u) << column.dump();

  std::map<std::string, std::pair<double, double>> expected{
      {before[row].date,
       {level_return(before[row].level, before[row - 1].level),
        level_return(after[row].level, after[row - 1].level)}},
      {before[row + 1].date,
       {level_return(before[row + 1].level, before[row].level),
        level_return(after[row + 1].level, after[row].level)}}};
  for (const auto& c : column["changed"]) {
    const std::string date = c["date"];
    ASSERT_TRUE(expected.count(date)) << "unexpected changed date " << date;
    EXPECT_EQ(c["before"].get<double>(), expected[date].first) << date;
    EXPECT_EQ(c["after"].get<double>(), expected[date].second) << date;
    expected.erase(date);
  }
  EXPECT_TRUE(expected.empty());
  // Largest change first.
  const auto size = [](const json& c) {
    return std::abs(c["after"].get<double>() - c["before"].get<double>());
  };
  EXPECT_GE(size(column["changed"][0]), size(column["changed"][1])) << column.dump();

  // The table form names the same two dates and the counts.
  const CommandResult table = run_at(ledger(), {"series", kBenchmark, "--diff", "1", "2"});
  ASSERT_EQ(table.exit_code, 0) << table.err;
  EXPECT_TRUE(contains(table.out, "2 changed, 0 added, 0 removed")) << table.out;
  EXPECT_TRUE(contains(table.out, before[row].date)) << table.out;
  EXPECT_TRUE(contains(table.out, before[row + 1].date)) << table.out;
  // A version against itself has no differences.
  const json same =
      json_at(ledger(), {"series", kBenchmark, "--diff", "2", "2", "--format", "json"});
  ASSERT_EQ(same["columns"].size(), 1u);
  EXPECT_TRUE(same["columns"][0]["changed"].empty()) << same.dump();
  // A version that does not exist is not found.
  EXPECT_EQ(run_at(ledger(), {"series", kBenchmark, "--diff", "1", "3"}).exit_code, 5);
}

TEST_F(TrackRecordTest, RevisedBenchmarkMarksRunsStaleAndRerunRevisesEachOnce) {
  const json old_runs_before = json_at(ledger(), {"runs", "--format", "json"});
  revise_benchmark(150, 0.98);
  const json runs = json_at(ledger(), {"runs", "--format", "json"});
  ASSERT_EQ(runs.size(), 6u);
  for (const auto& r : runs) EXPECT_TRUE(r["stale"].get<bool>()) << r.dump();
  // Staleness is derived: the stored figures did not move.
  for (std::size_t i = 0; i < runs.size(); ++i)
    EXPECT_EQ(runs[i]["alpha"], old_runs_before[i]["alpha"]);

  // Dry run: lists the six runs and why, records nothing.
  const CommandResult dry = run_at(ledger(), {"rerun", "--all-stale", "--dry-run"});
  ASSERT_EQ(dry.exit_code, 0) << dry.err;
  const auto dry_lines = lines_of(dry.out);
  EXPECT_EQ(dry_lines.size(), 6u) << dry.out;
  for (int id = 1; id <= 6; ++id) {
    bool found = false;
    for (const auto& line : dry_lines)
      if (line.rfind(fmt::format("would re-run run {} ", id), 0) == 0) {
        found = true;
        EXPECT_TRUE(contains(line, "alder-vale-composite v1 -> v2")) << line;
        EXPECT_TRUE(contains(line, runs[id - 1]["strategy"].get<std::string>())) << line;
      }
    EXPECT_TRUE(found) << "run " << id << " missing from\n" << dry.out;
  }
  EXPECT_EQ(count_of(ledger(), "runs"), 6);
  EXPECT_EQ(count_of(ledger(), "run_inputs"), 6 * 4);

  // The re-run records six new runs, each revising its old run.
  const json rerun = json_at(ledger(), {"rerun", "--all-stale", "--format", "json"});
  ASSERT_TRUE(rerun.is_array()) << rerun.dump();
  ASSERT_EQ(rerun.size(), 6u) << rerun.dump();
  EXPECT_EQ(count_of(ledger(), "runs"), 12);
  std::set<std::int64_t> new_ids;
  for (std::size_t i = 0; i < rerun.size(); ++i) {
    const json& entry = rerun[i];
    const std::int64_t old_id = entry["run_id"];
    const std::int64_t new_id = entry["new_run_id"];
    SCOPED_TRACE(fmt::format("run {} -> {}", old_id, new_id));
    EXPECT_EQ(old_id, static_cast<std::int64_t>(i) + 1);
    EXPECT_GT(new_id, 6);
    new_ids.insert(new_id);
    const json before = show(ledger(), old_id);
    const json after = show(ledger(), new_id);
    ASSERT_TRUE(after.is_object());
    EXPECT_EQ(after["revises_run_id"], old_id);
    EXPECT_TRUE(before["revises_run_id"].is_null());
    EXPECT_EQ(entry["strategy"], before["strategy"]);
    EXPECT_EQ(after["strategy"], before["strategy"]);
    // Same parameters, the latest benchmark, the same other inputs.
    EXPECT_EQ(after["parameters"], before["parameters"]);
    EXPECT_EQ(after["study"], before["study"]);
    for (const auto& in : after["inputs"]) {
      EXPECT_EQ(in["version"], in["role"] == "benchmark" ? 2 : 1) << in.dump();
      EXPECT_EQ(in["latest_version"], in["version"]) << in.dump();
    }
    EXPECT_NE(after["inputs_hash"], before["inputs_hash"]);
    expect_figures(entry["before"], before, "before");
    expect_figures(entry["after"], after, "after");
    EXPECT_EQ(entry["conclusion"], expected_verdict(before, after));
  }
  EXPECT_EQ(new_ids, (std::set<std::int64_t>{7, 8, 9, 10, 11, 12}));

  // Old runs stay stale (they used v1) but are revised; the new runs are current.
  for (const auto& r : json_at(ledger(), {"runs", "--format", "json"})) {
    const std::int64_t id = r["run_id"];
    EXPECT_EQ(r["stale"].get<bool>(), id <= 6) << r.dump();
    if (id > 6) {
      EXPECT_EQ(r["revises_run_id"], id - 6) << r.dump();
    }
  }

  // A second re-run finds nothing left to do and records nothing.
  const CommandResult again = run_at(ledger(), {"rerun", "--all-stale"});
  EXPECT_EQ(again.exit_code, 0) << again.err;
  EXPECT_TRUE(contains(again.out, "no stale runs")) << again.out;
  const CommandResult again_dry = run_at(ledger(), {"rerun", "--all-stale", "--dry-run"});
  EXPECT_EQ(again_dry.exit_code, 0) << again_dry.err;
  EXPECT_FALSE(contains(again_dry.out, "would re-run")) << again_dry.out;
  EXPECT_EQ(count_of(ledger(), "runs"), 12);
  EXPECT_EQ(run_at(ledger(), {"verify"}).exit_code, 0);
}

TEST_F(TrackRecordTest, RerunOfAMissingRunIsNotFoundAndRecordsNothing) {
  const CommandResult r = run_at(ledger(), {"rerun", "99"});
  EXPECT_EQ(r.exit_code, 5) << r.out << r.err;
  const CommandResult dry = run_at(ledger(), {"rerun", "99", "--dry-run"});
  EXPECT_EQ(dry.exit_code, 5) << dry.out << dry.err;
  // One good id and one missing: all or nothing.
  const CommandResult mixed = run_at(ledger(), {"rerun", "1", "99"});
  EXPECT_EQ(mixed.exit_code, 5) << mixed.out << mixed.err;
  EXPECT_EQ(count_of(ledger(), "runs"), 6);
  EXPECT_EQ(run_at(ledger(), {"rerun"}).exit_code, 2);
}

// compare: the benchmark revision, the changed parameters, the periods lost and gained and
// every figure with its change b - a.
TEST_F(TrackRecordTest, CompareShowsInputsParametersSampleAndFigures) {
  revise_benchmark(60, 1.04);
  const CommandResult ev = run_at(
      ledger(), {"evaluate", "trend-12m", "--benchmark", kBenchmark, "--rate", kRate, "--factor",
                 kFactors, "--errors", "classic", "--from", "2005-01", "--format", "json"});
  ASSERT_EQ(ev.exit_code, 0) << ev.err;
  const std::int64_t b_id = json::parse(ev.out)[0]["run_id"];
  ASSERT_EQ(b_id, 7);
  const json a = show(ledger(), 1);
  const json b = show(ledger(), b_id);
  ASSERT_EQ(a["strategy"], "trend-12m");
  ASSERT_EQ(b["strategy"], "trend-12m");

  const json cmp = json_at(ledger(), {"compare", "1", "7", "--format", "json"});
  ASSERT_TRUE(cmp.is_object()) << cmp.dump();
  EXPECT_EQ(cmp["a"], 1);
  EXPECT_EQ(cmp["b"], 7);

  // Inputs: the benchmark went from v1 to v2 with two changed returns; the others are equal.
  ASSERT_EQ(cmp["inputs"].size(), 4u) << cmp["inputs"].dump();
  int benchmarks = 0;
  for (const auto& in : cmp["inputs"]) {
    SCOPED_TRACE(in.dump());
    if (in["role"] == "benchmark") {
      ++benchmarks;
      EXPECT_EQ(in["a"], "alder-vale-composite v1");
      EXPECT_EQ(in["b"], "alder-vale-composite v2");
      EXPECT_EQ(in["revision"], "v1 -> v2: 2 changed, 0 added, 0 removed");
      EXPECT_FALSE(in["same"].get<bool>());
    } else {
      EXPECT_FALSE(in.contains("revision"));
      EXPECT_TRUE(in["same"].get<bool>());
      EXPECT_EQ(in["a"], in["b"]);
    }
  }
  EXPECT_EQ(benchmarks, 1);

  // Parameters: exactly the errors and the start.
  std::map<std::string, std::pair<json, json>> params;
  for (const auto& p : cmp["parameters"]) params[p["parameter"]] = {p["a"], p["b"]};
  EXPECT_EQ(params.size(), 2u) << cmp["parameters"].dump();
  EXPECT_EQ(params["errors"].first, "newey-west");
  EXPECT_EQ(params["errors"].second, "classic");
  EXPECT_TRUE(params["from"].first.is_null());
  EXPECT_EQ(params["from"].second, "2005-01-01");

  // Sample: run 7 starts five years later; the sixty months before are lost, none gained.
  const json& sample = cmp["sample"];
  EXPECT_EQ(sample["a"]["first"], a["sample"]["first"]);
  EXPECT_EQ(sample["b"]["first"], b["sample"]["first"]);
  EXPECT_EQ(sample["a"]["observations"], a["sample"]["observations"]);
  EXPECT_EQ(sample["b"]["observations"], b["sample"]["observations"]);
  EXPECT_EQ(a["sample"]["observations"].get<int>() - b["sample"]["observations"].get<int>(), 60);
  EXPECT_TRUE(sample["periods_gained"].empty()) << sample.dump();
  ASSERT_EQ(sample["periods_lost"].size(), 60u) << sample.dump();
  EXPECT_EQ(sample["periods_lost"].front(), a["sample"]["first"]);
  EXPECT_EQ(sample["periods_lost"].front(), "2000-01");
  EXPECT_EQ(sample["periods_lost"].back(), "2004-12");
  EXPECT_EQ(b["sample"]["first"], "2005-01");

  // Figures: each coefficient figure as stored, and the change is b - a.
  std::map<std::string, json> figures;
  for (const auto& f : cmp["figures"]) figures[f["figure"]] = f;
  for (std::size_t c = 0; c < a["coefficients"].size(); ++c)
    for (const char* key : {"estimate", "std_error", "t_stat", "p_value"}) {
      const std::string name = a["coefficients"][c]["term"].get<std::string>() + " " + key;
      SCOPED_TRACE(name);
      ASSERT_TRUE(figures.count(name));
      const json& f = figures[name];
      const double va = a["coefficients"][c][key].get<double>();
      const double vb = b["coefficients"][c][key].get<double>();
      EXPECT_EQ(f["a"].get<double>(), va);
      EXPECT_EQ(f["b"].get<double>(), vb);
      EXPECT_EQ(f["change"], vb - va == 0 ? "" : fmt::format("{:+.6g}", vb - va));
    }
  ASSERT_TRUE(figures.count("alpha estimate"));
  const double alpha_change =
      std::strtod(figures["alpha estimate"]["change"].get<std::string>().c_str(), nullptr);
  const double exact = b["coefficients"][0]["estimate"].get<double>() -
                       a["coefficients"][0]["estimate"].get<double>();
  EXPECT_NEAR(alpha_change, exact, 1e-5 * std::abs(exact));
  ASSERT_TRUE(figures.count("observations"));
  EXPECT_EQ(figures["observations"]["change"], "-60");
  ASSERT_TRUE(figures.count("errors"));
  EXPECT_EQ(figures["errors"]["a"], "newey-west");
  EXPECT_EQ(figures["errors"]["b"], "classic");
  EXPECT_EQ(figures["errors"]["change"], "changed");

  // The other way round the same months are gained and the changes change sign.
  const json back = json_at(ledger(), {"compare", "7", "1", "--format", "json"});
  EXPECT_EQ(back["sample"]["periods_gained"], sample["periods_lost"]);
  EXPECT_TRUE(back["sample"]["periods_lost"].empty());
  for (const auto& f : back["figures"])
    if (f["figure"] == "alpha estimate") {
      EXPECT_EQ(f["change"], fmt::format("{:+.6g}", -exact));
    }

  // The table form carries the revision summary and the parameter rows.
  const CommandResult table = run_at(ledger(), {"compare", "1", "7"});
  ASSERT_EQ(table.exit_code, 0) << table.err;
  EXPECT_TRUE(contains(table.out, "v1 -> v2: 2 changed, 0 added, 0 removed")) << table.out;
  EXPECT_TRUE(contains(table.out, "parameter errors")) << table.out;
  EXPECT_TRUE(contains(table.out, "60 lost")) << table.out;
}

TEST_F(TrackRecordTest, CompareOfARunWithItselfFindsNoDifference) {
  const json cmp = json_at(ledger(), {"compare", "2", "2", "--format", "json"});
  ASSERT_TRUE(cmp.is_object());
  EXPECT_TRUE(cmp["parameters"].empty()) << cmp["parameters"].dump();
  EXPECT_TRUE(cmp["sample"]["periods_gained"].empty());
  EXPECT_TRUE(cmp["sample"]["periods_lost"].empty());
  for (const auto& in : cmp["inputs"]) EXPECT_TRUE(in["same"].get<bool>()) << in.dump();
  for (const auto& f : cmp["figures"]) EXPECT_EQ(f["change"], "") << f.dump();
  EXPECT_EQ(run_at(ledger(), {"compare", "1", "42"}).exit_code, 5);
}

// compare lists what either run has: the factor set and the factor terms of a multi-factor run
// appear whichever side of the comparison it is on.
TEST_F(TrackRecordTest, CompareListsInputsAndTermsOnlyOneRunHas) {
  const CommandResult ev = run_at(ledger(), {"evaluate", "trend-12m", "--benchmark", kBenchmark,
                                             "--rate", kRate, "--format", "json"});
  ASSERT_EQ(ev.exit_code, 0) << ev.err;
  ASSERT_EQ(json::parse(ev.out)[0]["run_id"], 7);
  const json multi = show(ledger(), 1);  // trend-12m with the style factors
  ASSERT_EQ(multi["coefficients"].size(), 4u);
  const std::string term = multi["coefficients"][2]["term"];
  const double estimate = multi["coefficients"][2]["estimate"];

  for (const auto& [a, b] :
       std::vector<std::pair<std::string, std::string>>{{"1", "7"}, {"7", "1"}}) {
    SCOPED_TRACE("compare " + a + " " + b);
    const json cmp = json_at(ledger(), {"compare", a, b, "--format", "json"});
    ASSERT_TRUE(cmp.is_object());
    const std::string side = a == "1" ? "a" : "b";
    const std::string other = a == "1" ? "b" : "a";
    int factors = 0;
    for (const auto& in : cmp["inputs"])
      if (in["role"] == "factor") {
        ++factors;
        EXPECT_EQ(in[side], "brindle-styles v1") << in.dump();
        EXPECT_TRUE(in[other].is_null()) << in.dump();
        EXPECT_FALSE(in["same"].get<bool>()) << in.dump();
      }
    EXPECT_EQ(factors, 1) << cmp["inputs"].dump();
    int terms = 0;
    for (const auto& f : cmp["figures"])
      if (f["figure"] == term + " estimate") {
        ++terms;
        EXPECT_EQ(f[side].get<double>(), estimate) << f.dump();
        EXPECT_TRUE(f[other].is_null()) << f.dump();
      }
    EXPECT_EQ(terms, 1) << "no figure '" << term << " estimate'";
  }
}

// A column the newer version no longer has is a column whose periods were all removed.
TEST_F(TrackRecordTest, DiffReportsAColumnTheNewVersionDropped) {
  const auto both = scratch_.write("ff1.csv",
                                   "date,SMB,HML\n2020-01-31,0.01,0.02\n"
                                   "2020-02-29,0.01,0.03\n2020-03-31,0.02,0.01\n");
  const auto one = scratch_.write("ff2.csv",
                                  "date,SMB\n2020-01-31,0.01\n2020-02-29,0.01\n"
                                  "2020-03-31,0.02\n");
  ASSERT_EQ(run_at(ledger(), {"ingest", "factor", both.string(), "--name", "ff"}).exit_code, 0);
  ASSERT_EQ(run_at(ledger(), {"ingest", "factor", one.string(), "--name", "ff"}).exit_code, 0);
  const std::vector<std::string> dates{"2020-01-31", "2020-02-29", "2020-03-31"};

  // Back from 2 to 1 the column comes back: its periods are added.
  const json back = json_at(ledger(), {"series", "ff", "--diff", "2", "1", "--format", "json"});
  bool hml_added = false;
  for (const auto& c : back["columns"])
    if (c["column"] == "HML") hml_added = c["added"] == json(dates);
  EXPECT_TRUE(hml_added) << back.dump();

  // Forward from 1 to 2 the column's periods are removed.
  const json forward = json_at(ledger(), {"series", "ff", "--diff", "1", "2", "--format", "json"});
  bool hml_removed = false;
  for (const auto& c : forward["columns"]) {
    if (c["column"] == "SMB") {
      EXPECT_TRUE(c["changed"].empty() && c["added"].empty() && c["removed"].empty()) << c.dump();
    }
    if (c["column"] == "HML") hml_removed = c["removed"] == json(dates);
  }
  EXPECT_TRUE(hml_removed) << "series --diff 1 2 does not report the dropped column HML:\n"
                           << forward.dump(1);
  const CommandResult table = run_at(ledger(), {"series", "ff", "--diff", "1", "2"});
  EXPECT_TRUE(contains(table.out, "HML")) << table.out;
}

// reproduce: from the stored versions, even after an input was revised.
TEST_F(TrackRecordTest, ReproduceSaysIdenticalAndAMissingRunIsNotFound) {
  for (int id : {1, 6}) {
    const CommandResult r = run_at(ledger(), {"reproduce", std::to_string(id)});
    EXPECT_EQ(r.exit_code, 0) << r.out << r.err;
    EXPECT_TRUE(contains(r.out, "(identical)")) << r.out;
    EXPECT_TRUE(contains(r.out, "reproduced: every coefficient and statistic is identical"))
        << r.out;
  }
  revise_benchmark(200, 1.01);
  const CommandResult pinned = run_at(ledger(), {"reproduce", "3"});
  EXPECT_EQ(pinned.exit_code, 0) << pinned.out << pinned.err;
  EXPECT_TRUE(contains(pinned.out, "identical")) << pinned.out;
  ASSERT_EQ(run_at(ledger(), {"rerun", "3"}).exit_code, 0);
  const CommandResult fresh = run_at(ledger(), {"reproduce", "7"});
  EXPECT_EQ(fresh.exit_code, 0) << fresh.out << fresh.err;
  EXPECT_TRUE(contains(fresh.out, "identical")) << fresh.out;

  const CommandResult missing = run_at(ledger(), {"reproduce", "999"});
  EXPECT_EQ(missing.exit_code, 5) << missing.out << missing.err;
  EXPECT_TRUE(contains(missing.err, "no run 999")) << missing.err;
  EXPECT_EQ(count_of(ledger(), "runs"), 7);
}

// A ledger built here from its own CSV files, where revising the strategies' histories must
// flip conclusions: "edge" loses a strong alpha, "reverse" turns a strong positive alpha into
// a strong negative one, and "steady" moves by one month's return only.
class RerunFlipTest : public ::testing::Test {
 protected:
  static constexpr int kMonths = 72;

  struct Draw {
    std::mt19937_64 engine{20240917};
    double uniform() { return (static_cast<double>(engine() >> 11) + 0.5) * 0x1.0p-53; }
    double normal() {
      double s = 0;
      for (int i = 0; i < 12; ++i) s += uniform();
      return s - 6;
    }
  };

  static std::string month_end(int m) {  // m = 0: 2014-12
    int year = 2014 + (m + 11) / 12;
    int month = (m + 11) % 12 + 1;
    static const int days[] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    int day = days[month - 1] + (month == 2 && year % 4 == 0 ? 1 : 0);
    return fmt::format("{:04}-{:02}-{:02}", year, month, day);
  }

  void SetUp() override {
    Draw draw;
    std::string bench = "date,mkt\n";
    std::string bills = "date,1M\n";
    std::string strategies = "date,edge,reverse,steady\n";
    std::string revised = strategies;
    double yield = 1.5;
    bills += fmt::format("{},{:.3f}\n", month_end(0), yield);
    for (int m = 1; m <= kMonths; ++m) {
      const double rf = std::pow(1 + yield / 100, 1.0 / 12) - 1;
      const double mx = 0.006 + 0.04 * draw.normal();
      const double n1 = 0.004 * draw.normal();
      const double n2 = 0.004 * draw.normal();
      const double n3 = 0.004 * draw.normal();
      const double n4 = 0.004 * draw.normal();
      bench += fmt::format("{},{:.6f}\n", month_end(m), rf + mx);
      const double edge = rf + 0.012 + 0.5 * mx + n1;
      const double edge_revised = rf + 0.5 * mx + n2;
      const double reverse = rf + 0.010 + 0.3 * mx + n3;
      const double reverse_revised = rf - 0.010 + 0.3 * mx + n3;
      const double steady = rf + 0.008 + 0.8 * mx + n4;
      const double steady_revised = m == 30 ? steady + 0.001 : steady;
      strategies += fmt::format("{},{:.6f},{:.6f},{:.6f}\n", month_end(m), edge, reverse, steady);
      revised += fmt::format("{},{:.6f},{:.6f},{:.6f}\n", month_end(m), edge_revised,
                             reverse_revised, steady_revised);
      yield = std::clamp(yield + 0.1 * draw.normal(), 0.1, 5.0);
      bills += fmt::format("{},{:.3f}\n", month_end(m), yield);
    }
    const std::vector<std::vector<std::string>> commands{
        {"ingest", "benchmark", dir_.write("mkt.csv", bench).string(), "--name", "mkt"},
        {"ingest", "rate", dir_.write("bills.csv", bills).string(), "--name", "bills"},
        {"ingest", "strategy", dir_.write("strategies.csv", strategies).string()},
        {"evaluate", "edge", "reverse", "steady", "--benchmark", "mkt", "--rate", "bills"}};
    for (const auto& c : commands) {
      const CommandResult r = run_at(ledger(), c);
      ASSERT_EQ(r.exit_code, 0) << c[0] << ": " << r.err;
    }
    revised_ = dir_.write("strategies-revised.csv", revised);
  }

  std::string ledger() const { return (dir_ / "flip.db").string(); }

  ScratchDir dir_;
  fs::path revised_;
};

TEST_F(RerunFlipTest, ConclusionSaysFlippedWhenSignificanceOrSignChanges) {
  ASSERT_EQ(count_of(ledger(), "runs"), 3);
  std::map<std::string, json> old_runs;
  for (int id = 1; id <= 3; ++id) {
    json run = show(ledger(), id);
    old_runs[run["strategy"]] = run;
  }
  // The fixture's premise: all three alphas are strongly significant at first.
  for (const auto& [name, run] : old_runs)
    ASSERT_LT(run["coefficients"][0]["p_value"].get<double>(), 0.01) << name;

  const CommandResult ingest = run_at(ledger(), {"ingest", "strategy", revised_.string()});
  ASSERT_EQ(ingest.exit_code, 0) << ingest.err;
  for (const char* name : {"edge", "reverse", "steady"})
    EXPECT_TRUE(contains(ingest.out, fmt::format("strategy {}: version 2", name))) << ingest.out;

  const json rerun = json_at(ledger(), {"rerun", "--all-stale", "--format", "json"});
  ASSERT_EQ(rerun.size(), 3u) << rerun.dump();
  std::map<std::string, std::string> conclusions;
  for (const auto& e : rerun) {
    const json before = show(ledger(), e["run_id"]);
    const json after = show(ledger(), e["new_run_id"]);
    EXPECT_EQ(after["revises_run_id"], e["run_id"]);
    expect_figures(e["before"], before, "before");
    expect_figures(e["after"], after, "after");
    EXPECT_EQ(e["conclusion"], expected_verdict(before, after));
    conclusions[e["strategy"]] = e["conclusion"];
    if (e["strategy"] == "edge") {  // the premise of the flip: the revised alpha is insignificant
      ASSERT_GE(after["coefficients"][0]["p_value"].get<double>(), 0.05);
    }
    if (e["strategy"] == "reverse") {
      ASSERT_LT(after["coefficients"][0]["estimate"].get<double>(), 0);
    }
  }
  EXPECT_EQ(conclusions["edge"].rfind("FLIPPED", 0), 0u) << conclusions["edge"];
  EXPECT_TRUE(contains(conclusions["edge"], "significance lost")) << conclusions["edge"];
  EXPECT_EQ(conclusions["reverse"], "FLIPPED: alpha changed sign");
  EXPECT_EQ(conclusions["steady"], "conclusion unchanged");

  // The table form says it in the same words.
  const CommandResult table = run_at(ledger(), {"rerun", "3", "--format", "csv"});
  ASSERT_EQ(table.exit_code, 0) << table.err;
  EXPECT_TRUE(contains(table.out, "conclusion unchanged")) << table.out;  // steady, again
  EXPECT_EQ(run_at(ledger(), {"rerun", "--all-stale"}).exit_code, 0);
  EXPECT_EQ(count_of(ledger(), "runs"), 7);
  EXPECT_EQ(run_at(ledger(), {"verify"}).exit_code, 0);
}

}  // namespace
