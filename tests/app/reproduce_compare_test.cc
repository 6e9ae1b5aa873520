// Reproducing and comparing runs of fixtures/ledgers/track-record.db (made by engine 0.3.0; see
// DEVELOPERS.md): every run reproduces bit for bit, and a comparison pairs the inputs, lists
// the parameters that differ, the periods one sample lacks and every figure of both runs.
#include <gtest/gtest.h>

#include <filesystem>
#include <sstream>

#include "app/compare.h"
#include "app/json_diff.h"
#include "app/reproduce.h"
#include "core/error.h"
#include "store/ledger.h"
#include "support/test_support.h"

namespace alphatrail::app {
namespace {

namespace fs = std::filesystem;
using nlohmann::ordered_json;
using testing::ScratchDir;
using testing::source_path;

// Opens an upgraded copy of the track-record fixture (the fixture itself stays as it is).
class TrackRecordLedger : public ::testing::Test {
 protected:
  void SetUp() override {
    const fs::path copy = dir_ / "track-record.db";
    fs::copy_file(source_path("fixtures/ledgers/track-record.db"), copy);
    std::ostringstream notices;
    ledger_ = store::open_ledger(copy, store::OpenMode::existing, notices);
  }
  store::Ledger& ledger() { return *ledger_; }

 private:
  ScratchDir dir_;
  std::unique_ptr<store::Ledger> ledger_;
};

TEST_F(TrackRecordLedger, EveryRunReproducesWithTheSameHashAndFigures) {
  for (std::int64_t id = 1; id <= 16; ++id) {
    SCOPED_TRACE(id);
    const ReproduceOutcome o = reproduce_run(ledger(), id);
    EXPECT_EQ(o.run_id, id);
    EXPECT_EQ(o.recorded_by_engine, "0.3.0");
    EXPECT_EQ(o.stored_inputs_hash.size(), 64u);
    EXPECT_EQ(o.recomputed_inputs_hash, o.stored_inputs_hash);
    EXPECT_TRUE(o.differences.empty());
    EXPECT_TRUE(o.matched());
  }
  EXPECT_EQ(reproduce_run(ledger(), 4).strategy, "carry-g10");
}

TEST_F(TrackRecordLedger, ReproducingAnUnknownRunIsNotFound) {
  try {
    reproduce_run(ledger(), 999);
    FAIL() << "run 999 does not exist";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::not_found);
    EXPECT_NE(std::string(e.what()).find("no run 999"), std::string::npos) << e.what();
  }
}

TEST(ReproduceOutcome, MatchesOnlyWithTheSameHashAndNoDifference) {
  ReproduceOutcome o;
  o.stored_inputs_hash = o.recomputed_inputs_hash = "abc";
  EXPECT_TRUE(o.matched());
  o.differences.push_back({"statistics.r_squared", 0.5, 0.25});
  EXPECT_FALSE(o.matched());
  o.differences.clear();
  o.recomputed_inputs_hash = "abd";
  EXPECT_FALSE(o.inputs_hash_matches());
  EXPECT_FALSE(o.matched());
}

// Run 7 revises run 1: the same parameters over version 2 of the benchmark, whose revision
// changed two returns (counted from the fixture's stored JSON).
TEST_F(TrackRecordLedger, ARevisionShowsAsTheBenchmarkVersionsAndTheirChanges) {
  const Comparison c = compare_runs(ledger(), 1, 7);
  EXPECT_EQ(c.run_a, 1);
  EXPECT_EQ(c.run_b, 7);
  EXPECT_EQ(c.strategy_a, "trend-12m");
  EXPECT_EQ(c.strategy_b, "trend-12m");
  ASSERT_EQ(c.inputs.size(), 4u);
  const std::vector<std::string> roles{"strategy", "benchmark", "rate", "factor"};
  for (std::size_t i = 0; i < roles.size(); ++i) {
    const InputComparison& in = c.inputs[i];
    SCOPED_TRACE(in.role);
    EXPECT_EQ(in.role, roles[i]);
    ASSERT_TRUE(in.a && in.b);
    EXPECT_EQ(in.a->series, in.b->series);
    if (in.role == "benchmark") {
      EXPECT_EQ(in.a->version, 1);
      EXPECT_EQ(in.b->version, 2);
      ASSERT_TRUE(in.revision);
      EXPECT_EQ(in.revision->from_version, 1);
      EXPECT_EQ(in.revision->to_version, 2);
      EXPECT_EQ(in.revision->changed, 2u);
      EXPECT_EQ(in.revision->added, 0u);
      EXPECT_EQ(in.revision->removed, 0u);
      EXPECT_FALSE(in.same);
    } else {
      EXPECT_EQ(in.a->version, in.b->version);
      EXPECT_FALSE(in.revision);
      EXPECT_TRUE(in.same);
    }
  }
  EXPECT_TRUE(c.parameters.empty());
  EXPECT_TRUE(c.sample.same_frequency);
  EXPECT_TRUE(c.sample.periods_gained.empty());
  EXPECT_TRUE(c.sample.periods_lost.empty());
  EXPECT_EQ(c.sample.a.observations, 300);
  EXPECT_EQ(c.sample.b.observations, 300);
}

// Run 13 is trend-12m again in the robustness study: single-index, HC3, 2005 to 2014.
TEST_F(TrackRecordLedger, AnotherModelShowsAsParametersSampleAndFigures) {
  const Comparison c = compare_runs(ledger(), 1, 13);
  ASSERT_EQ(c.inputs.size(), 4u);
  const InputComparison& factor = c.inputs[3];
  EXPECT_EQ(factor.role, "factor");
  ASSERT_TRUE(factor.a);
  EXPECT_EQ(factor.a->series, "brindle-styles");
  EXPECT_FALSE(factor.b);  // run 13 used no factors
  EXPECT_FALSE(factor.same);

  std::vector<std::string> paths;
  for (const auto& d : c.parameters) paths.push_back(d.path);
  EXPECT_EQ(paths, (std::vector<std::string>{"errors", "factors", "from", "model", "rolling_window",
                                             "to"}));
  EXPECT_EQ(c.parameters[0].before, "newey-west");
  EXPECT_EQ(c.parameters[0].after, "hc3");
  EXPECT_TRUE(c.parameters[2].before.is_null());
  EXPECT_EQ(c.parameters[2].after, "2005-01-01");

  EXPECT_EQ(c.sample.a.first, "2000-01");
  EXPECT_EQ(c.sample.b.first, "2005-01");
  EXPECT_EQ(c.sample.b.last, "2014-12");
  EXPECT_EQ(c.sample.b.observations, 120);
  EXPECT_TRUE(c.sample.same_frequency);
  EXPECT_TRUE(c.sample.periods_gained.empty());
  ASSERT_EQ(c.sample.periods_lost.size(), 180u);  // 2000-2004 and 2015-2024
  EXPECT_EQ(c.sample.periods_lost.front(), "2000-01");
  EXPECT_EQ(c.sample.periods_lost[59], "2004-12");
  EXPECT_EQ(c.sample.periods_lost[60], "2015-01");
  EXPECT_EQ(c.sample.periods_lost.back(), "2024-12");

  // Four figures for each of run 1's four terms, then run 1's 27 statistics.
  ASSERT_EQ(c.figures.size(), 4u * 4u + 27u);
  EXPECT_EQ(c.figures[0].figure, "alpha estimate");
  EXPECT_TRUE(c.figures[0].a.is_number());
  EXPECT_TRUE(c.figures[0].b.is_number());
  EXPECT_EQ(c.figures[8].figure, "size-spread estimate");
  EXPECT_TRUE(c.figures[8].a.is_number());
  EXPECT_TRUE(c.figures[8].b.is_null());  // run 13 has no size-spread term
  EXPECT_EQ(c.figures[16].figure, "r_squared");
}

TEST_F(TrackRecordLedger, ComparingWithAnUnknownRunIsNotFound) {
  try {
    compare_runs(ledger(), 1, 999);
    FAIL() << "run 999 does not exist";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::not_found);
  }
}

TEST(JsonDifferences, NamesEachDifferingLeafByItsPath) {
  const auto a = ordered_json::parse(R"({"x": 1, "s": {"r": 0.5, "k": "a"}, "c": [1, 2], "o": 1})");
  const auto b =
      ordered_json::parse(R"({"x": 1, "s": {"r": 0.25, "k": "a"}, "c": [1, 3], "n": 2})");
  const auto d = json_differences(a, b);
  ASSERT_EQ(d.size(), 4u);
  EXPECT_EQ(d[0].path, "s.r");
  EXPECT_EQ(d[0].before, 0.5);
  EXPECT_EQ(d[0].after, 0.25);
  EXPECT_EQ(d[1].path, "c[1]");
  EXPECT_EQ(d[2].path, "o");  // only in a
  EXPECT_TRUE(d[2].after.is_null());
  EXPECT_EQ(d[3].path, "n");  // only in b
  EXPECT_TRUE(d[3].before.is_null());
  // Arrays of other lengths differ as a whole.
  EXPECT_EQ(json_differences(ordered_json::parse("[1]"), ordered_json::parse("[1, 2]")).size(), 1u);
}

}  // namespace
}  // namespace alphatrail::app
