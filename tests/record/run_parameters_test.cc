// Tests of the typed run parameters: the writer's canonical text, the reader's round trip and
// its messages for every kind of field it cannot read (tests/store checks the writer against
// every run of the fixture ledger).
#include "record/run_parameters.h"

#include <gtest/gtest.h>

#include <functional>
#include <nlohmann/json.hpp>
#include <string>

#include "record/stored_result.h"
#include "record/stored_text.h"

namespace {

using alphatrail::Failure;
using alphatrail::record::FrequencyRule;
using alphatrail::record::read_parameters;
using alphatrail::record::read_result;
using alphatrail::record::RunParameters;
using alphatrail::record::StoredTextError;
using alphatrail::record::TenorRule;
namespace core = alphatrail::core;

// Run 16 of fixtures/ledgers/track-record.db, as stored by engine 0.3.0.
const std::string kQuarterly =
    R"j({"alignment":"complete cases by calendar period (exact dates for daily)","annualize":"compound","confidence":0.95,"errors":"newey-west","factors":[{"columns":["size-spread","value-spread"],"set":"brindle-styles"}],"frequency":"quarterly","frequency_rule":"given","from":null,"lag_rule":"floor(4 (T/100)^(2/9))","lags":2,"model":"multi-factor","partial_periods":"dropped","rate_basis":"compound","rate_tenor":"3M","rate_timing":"start","returns":"simple returns, compounded within a period","rolling_window":12,"small_sample":true,"tenor_rule":"closest to the period length","to":null})j";

// The message for stored text `text` of run 7, or "" when it reads.
std::string problem_of(const std::string& text, const std::string& engine = "0.3.0") {
  try {
    read_parameters(7, engine, text);
  } catch (const StoredTextError& e) {
    EXPECT_EQ(e.kind(), Failure::corruption);
    EXPECT_EQ(e.run_id(), 7);
    return e.what();
  }
  return "";
}

std::string edited(const std::string& key, const nlohmann::json& value) {
  auto j = nlohmann::json::parse(kQuarterly);
  j[key] = value;
  return j.dump();
}

std::string without(const std::string& key) {
  auto j = nlohmann::json::parse(kQuarterly);
  j.erase(key);
  return j.dump();
}

const std::string kAdvice =
    "; the ledger was changed outside alphatrail (`alphatrail verify` lists what was altered)";

TEST(RunParameters, ReadsStoredTextAndWritesItBackByteForByte) {
  const RunParameters p = read_parameters(16, "0.3.0", kQuarterly);
  EXPECT_EQ(p.frequency, core::Frequency::quarterly);
  EXPECT_EQ(p.frequency_rule, FrequencyRule::given);
  EXPECT_FALSE(p.from);
  EXPECT_FALSE(p.to);
  EXPECT_EQ(p.errors, core::ErrorKind::newey_west);
  EXPECT_EQ(p.lags, 2);
  EXPECT_TRUE(p.small_sample);
  EXPECT_EQ(p.confidence, 0.95);
  EXPECT_EQ(p.rate_tenor, "3M");
  EXPECT_EQ(p.tenor_rule, TenorRule::closest_to_period_length);
  ASSERT_EQ(p.factors.size(), 1u);
  EXPECT_EQ(p.factors[0].set, "brindle-styles");
  EXPECT_EQ(p.factors[0].columns, (std::vector<std::string>{"size-spread", "value-spread"}));
  EXPECT_EQ(p.rolling_window, 12);
  EXPECT_EQ(parameters_text(p), kQuarterly);
}

TEST(RunParameters, WritesDefaultsAndDatesAsEvaluateDoes) {
  RunParameters p;
  p.rate_tenor = "1M";
  p.from = core::to_day({2005, 1, 1});
  p.to = core::to_day({2014, 12, 31});
  p.errors = core::ErrorKind::hc3;
  EXPECT_EQ(
      parameters_text(p),
      R"j({"alignment":"complete cases by calendar period (exact dates for daily)","annualize":"compound","confidence":0.95,"errors":"hc3","factors":[],"frequency":"monthly","frequency_rule":"lowest among the inputs","from":"2005-01-01","lag_rule":"floor(4 (T/100)^(2/9))","lags":"auto","model":"single-index","partial_periods":"dropped","rate_basis":"compound","rate_tenor":"1M","rate_timing":"start","returns":"simple returns, compounded within a period","rolling_window":null,"small_sample":false,"tenor_rule":"closest to the period length","to":"2014-12-31"})j");
  EXPECT_EQ(read_parameters(1, "0.3.0", parameters_text(p)), p);
}

TEST(RunParameters, RunsBeforeEngine020HaveNoRollingWindowAndKeepTheirText) {
  const std::string old = without("rolling_window");
  const RunParameters p = read_parameters(3, "0.1.0", old);
  EXPECT_FALSE(p.rolling_window);
  EXPECT_FALSE(p.rolling_window_recorded);
  EXPECT_EQ(parameters_text(p), old);
  // From engine 0.2.0 on the key is always written: without it the text was altered.
  EXPECT_EQ(problem_of(old, "0.2.0"),
            "run 7: stored parameters: field 'rolling_window' is missing" + kAdvice);
}

TEST(RunParameters, NamesTheRunAndTheFieldOfAnUnknownName) {
  EXPECT_EQ(problem_of(edited("errors", "bogus")),
            "run 7: stored parameters: field 'errors' holds \"bogus\", not one of classic, hc0, "
            "hc1, hc2, hc3, newey-west" +
                kAdvice);
  EXPECT_EQ(problem_of(edited("frequency", "hourly")),
            "run 7: stored parameters: field 'frequency' holds \"hourly\", not one of daily, "
            "weekly, monthly, quarterly" +
                kAdvice);
  EXPECT_EQ(
      problem_of(edited("lags", "sometimes")),
      "run 7: stored parameters: field 'lags' holds \"sometimes\", not one of auto" + kAdvice);
}

TEST(RunParameters, NamesTheRunAndTheFieldOfAWrongType) {
  EXPECT_EQ(
      problem_of(edited("confidence", "0.95")),
      "run 7: stored parameters: field 'confidence' holds \"0.95\" (text), not a number" + kAdvice);
  EXPECT_EQ(problem_of(edited("small_sample", 1)),
            "run 7: stored parameters: field 'small_sample' holds 1 (a whole number), not true or "
            "false" +
                kAdvice);
  EXPECT_EQ(problem_of(edited("errors", nlohmann::json::object())),
            "run 7: stored parameters: field 'errors' holds {} (an object), not text" + kAdvice);
  EXPECT_EQ(problem_of(edited("lags", 2.5)),
            "run 7: stored parameters: field 'lags' holds 2.5 (a number), not a whole number "
            "(0 or more)" +
                kAdvice);
  auto j = nlohmann::json::parse(kQuarterly);
  j["factors"][0]["columns"][1] = nullptr;
  EXPECT_EQ(problem_of(j.dump()),
            "run 7: stored parameters: field 'factors[0].columns[1]' holds null (null), not text" +
                kAdvice);
}

TEST(RunParameters, NamesTheRunAndTheFieldOfAMissingKey) {
  for (const char* key :
       {"alignment", "annualize",       "confidence",   "errors",     "factors",
        "frequency", "frequency_rule",  "from",         "lag_rule",   "lags",
        "model",     "partial_periods", "rate_basis",   "rate_tenor", "rate_timing",
        "returns",   "rolling_window",  "small_sample", "tenor_rule", "to"})
    EXPECT_EQ(problem_of(without(key)),
              "run 7: stored parameters: field '" + std::string(key) + "' is missing" + kAdvice);
}

TEST(RunParameters, NamesTheRunAndTheFieldOfANumberOutOfRange) {
  EXPECT_EQ(problem_of(edited("confidence", 1.5)),
            "run 7: stored parameters: field 'confidence' holds 1.5, out of range (between 0 and "
            "1)" +
                kAdvice);
  EXPECT_EQ(problem_of(edited("lags", -1)),
            "run 7: stored parameters: field 'lags' holds -1, out of range (0 or more)" + kAdvice);
  EXPECT_EQ(problem_of(edited("lags", 100000000000)),
            "run 7: stored parameters: field 'lags' holds 100000000000, larger than 2147483647" +
                kAdvice);
  EXPECT_EQ(problem_of(edited("rolling_window", 0)),
            "run 7: stored parameters: field 'rolling_window' holds 0, out of range (1 or more)" +
                kAdvice);
  EXPECT_EQ(problem_of(edited("from", "2021-02-30")),
            "run 7: stored parameters: field 'from' holds \"2021-02-30\", not a calendar date "
            "YYYY-MM-DD" +
                kAdvice);
}

TEST(RunParameters, NamesFieldsThatContradictEachOther) {
  auto j = nlohmann::json::parse(kQuarterly);
  j["errors"] = "hc3";
  EXPECT_EQ(problem_of(j.dump()),
            "run 7: stored parameters: field 'lags' holds 2, but lags apply to newey-west errors "
            "only (errors is hc3)" +
                kAdvice);
  EXPECT_EQ(problem_of(edited("model", "single-index")),
            "run 7: stored parameters: field 'model' holds \"single-index\", but the run has 1 "
            "factor sets" +
                kAdvice);
  j = nlohmann::json::parse(kQuarterly);
  j["from"] = "2015-01-01";
  j["to"] = "2010-01-31";
  EXPECT_EQ(problem_of(j.dump()),
            "run 7: stored parameters: field 'to' holds \"2010-01-31\", before from "
            "(\"2015-01-01\")" +
                kAdvice);
}

TEST(RunParameters, NamesTextThatIsNotJson) {
  EXPECT_EQ(problem_of("garbage"),
            "run 7: stored parameters: not JSON text (syntax error at byte 1)" + kAdvice);
  EXPECT_EQ(problem_of(""),
            "run 7: stored parameters: not JSON text (syntax error at byte 1)" + kAdvice);
  EXPECT_EQ(problem_of("[1,2]"),
            "run 7: stored parameters: not a JSON object but an array" + kAdvice);
}

TEST(StoredResult, NamesTheRunAndTheFieldItCannotRead) {
  const auto problem = [](const std::string& text) -> std::string {
    try {
      read_result(4, text);
    } catch (const StoredTextError& e) {
      return e.problem();
    }
    return "";
  };
  EXPECT_EQ(problem("{"), "stored result: not JSON text (syntax error at byte 2)");
  EXPECT_EQ(problem("{}"), "stored result: field 'sample' is missing");
  EXPECT_EQ(problem(R"({"sample":{"first":3}})"),
            "stored result: field 'sample.first' holds 3 (a whole number), not text");
}

// A result as result_json_text writes it, with one window of rolling estimates.
const std::string kResult =
    R"j({"sample":{"first":"2000-01","last":"2000-03","observations":3,"frequency":"monthly",)j"
    R"j("periods_per_year":12,"dropped":1,"dropped_by_reason":{"missing":1},)j"
    R"j("dropped_periods":[{"period":"2000-04","reason":"missing"}],"gaps":[]},)j"
    R"j("coefficients":[{"term":"alpha","estimate":0.1,"std_error":null,"t_stat":null,)j"
    R"j("p_value":null,"ci_low":null,"ci_high":null},{"term":"beta","estimate":1,)j"
    R"j("std_error":0.1,"t_stat":10,"p_value":0.01,"ci_low":0.8,"ci_high":1.2}],)j"
    R"j("statistics":{"r_squared":0.5,"adj_r_squared":0.4,"residual_std":0.01,"f_stat":null,)j"
    R"j("f_p_value":null,"observations":3,"coefficients":2,"degrees_of_freedom":1,)j"
    R"j("errors":"hc3","lags":0,"small_sample_factor":false,"confidence":0.95,)j"
    R"j("condition_number":1.5,"alpha_annualized":0.2,"appraisal_ratio":null,)j"
    R"j("sharpe_strategy":0.5,"sharpe_benchmark":0.4,"treynor_ratio":null,)j"
    R"j("tracking_error":0.1,"information_ratio":0.2,"correlation":0.7,)j"
    R"j("mean_excess_strategy":0.01,"mean_excess_benchmark":0.01,"up_market_beta":null,)j"
    R"j("down_market_beta":null,"up_periods":2,"down_periods":1},"reading":["a"],)j"
    R"j("preparation":["b"],"warnings":[],"rolling":{"window":2,"errors":"hc3",)j"
    R"j("lag_rule":"fixed","confidence":0.95,"annualize":"compound","windows":[{"end":"2000-02",)j"
    R"j("first":"2000-01","observations":2,"lags":0,"alpha":null,"alpha_std_error":null,)j"
    R"j("alpha_ci_low":null,"alpha_ci_high":null,"alpha_annualized":null,)j"
    R"j("alpha_annualized_ci_low":null,"alpha_annualized_ci_high":null,"beta":1,)j"
    R"j("beta_std_error":null,"beta_ci_low":null,"beta_ci_high":null}]}})j";

TEST(StoredResult, ReadsWhatTheEngineWritesWithOrWithoutRollingEstimates) {
  EXPECT_EQ(read_result(4, kResult).dump(), kResult);
  auto j = nlohmann::ordered_json::parse(kResult);
  j["rolling"] = nullptr;
  EXPECT_EQ(read_result(4, j.dump()).dump(), j.dump());
  j.erase("rolling");  // recorded before engine 0.2.0
  EXPECT_EQ(read_result(4, j.dump()).dump(), j.dump());
}

TEST(StoredResult, RefusesANegativeCountAndAnUnknownName) {
  const auto problem = [](const std::function<void(nlohmann::ordered_json&)>& edit) {
    auto j = nlohmann::ordered_json::parse(kResult);
    edit(j);
    try {
      read_result(4, j.dump());
    } catch (const StoredTextError& e) {
      return e.problem();
    }
    return std::string();
  };
  EXPECT_EQ(problem([](auto& j) { j["sample"]["dropped_by_reason"]["missing"] = -1; }),
            "stored result: field 'sample.dropped_by_reason.missing' holds -1, out of range (0 or "
            "more)");
  EXPECT_EQ(problem([](auto& j) { j["rolling"]["lag_rule"] = "sometimes"; }),
            "stored result: field 'rolling.lag_rule' holds \"sometimes\", not one of auto, fixed");
  EXPECT_EQ(problem([](auto& j) { j["rolling"]["windows"][0].erase("beta"); }),
            "stored result: field 'rolling.windows[0].beta' is missing");
  EXPECT_EQ(problem([](auto& j) { j["coefficients"].erase(1); }),
            "stored result: field 'coefficients' holds fewer than alpha and beta");
}

}  // namespace
