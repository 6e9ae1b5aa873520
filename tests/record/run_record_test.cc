// The stored text of a run's result: written directly, it must be exactly what a
// nlohmann-json document of it dumps (the form every stored run has), values and all.
#include "record/run_record.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <string>
#include <vector>

namespace alphatrail::record {
namespace {

using nlohmann::ordered_json;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// A result with every kind of value the text holds: integers, a boolean, numbers that print
// with and without exponents, whole numbers, NaN and infinities, and strings that need
// escaping (quotes, backslashes, control characters) or are not ASCII.
core::EvaluationResult awkward_result(bool rolling) {
  core::EvaluationResult r;
  r.sample.first = "2000-01";
  r.sample.last = "2024-12";
  r.sample.observations = 300;
  r.sample.frequency = core::Frequency::monthly;
  r.sample.dropped = {{0, "1999-12", "outside the common range", {}},
                      {1, "2003-04", "fund \"A\"\\B missing", {"fund \"A\"\\B"}}};
  r.sample.dropped_by_reason = {{"outside the common range", 1}, {"fund \"A\"\\B missing", 1}};
  r.sample.gaps = {"2003-03 .. 2003-05: 1 period missing"};
  r.sample.preparation = {"rate 'bills' tenor 1M: (1 + y)^(1/12) - 1", "tab\there, line\nbreak"};
  r.sample.warnings = {"short sample: 30 monthly periods", "caf\xc3\xa9 \x01 bell"};
  r.fit.coefficients = {{"alpha", 2.4e-3, 7.3e-4, 3.29, 0.0011, 9.7e-4, 3.83e-3},
                        {"beta", 0.544, 0.02, 27.2, 0.0, 0.5, 0.59},
                        {"value-spread", 1e-17, 0.0, kInf, kNaN, -kInf, 1e300}};
  r.fit.r_squared = 0.784;
  r.fit.adj_r_squared = 0.7823;
  r.fit.residual_std = 0.012;
  r.fit.f_stat = 361.25;
  r.fit.f_p_value = 1.2e-95;
  r.fit.n = 300;
  r.fit.k = 3;
  r.fit.df = 297;
  r.fit.lags = 5;
  r.fit.errors = core::ErrorKind::newey_west;
  r.fit.small_sample_applied = true;
  r.fit.confidence = 0.95;
  r.fit.condition_number = 1.0;
  r.derived.periods_per_year = 12;
  r.derived.alpha_annualized = 0.0292;
  r.derived.sharpe_strategy = 1234567890123456.0;
  r.derived.up_market_beta = kNaN;
  r.derived.up_periods = 170;
  r.derived.down_periods = 130;
  r.annualize = core::Annualize::compound;
  if (rolling) {
    r.rolling_window = 36;
    r.rolling_auto_lags = true;
    core::RollingWindow w;
    w.first = "2000-01";
    w.end = "2002-12";
    w.observations = 36;
    w.lags = 3;
    w.alpha = 0.001;
    w.alpha_std_error = kNaN;
    w.beta = 0.5;
    r.rolling = {w, w};
  }
  return r;
}

TEST(RunRecord, ResultTextIsNlohmannJsonsOwnDump) {
  const std::vector<std::string> reading = {"Beta is 0.54: \"less strongly\".", "p \\ q"};
  for (const bool rolling : {false, true}) {
    SCOPED_TRACE(rolling ? "with rolling windows" : "without");
    const std::string text = result_json_text(awkward_result(rolling), reading);
    const ordered_json j = ordered_json::parse(text);
    EXPECT_EQ(j.dump(), text);
    EXPECT_EQ(result_json(awkward_result(rolling), reading), j);

    std::vector<std::string> keys;
    for (const auto& [key, value] : j.items()) keys.push_back(key);
    EXPECT_EQ(keys, (std::vector<std::string>{"sample", "coefficients", "statistics", "reading",
                                              "preparation", "warnings", "rolling"}));
    EXPECT_EQ(j["sample"]["dropped"], 2);
    EXPECT_EQ(j["sample"]["dropped_by_reason"]["fund \"A\"\\B missing"], 1);
    EXPECT_EQ(j["sample"]["dropped_periods"][1]["reason"], "fund \"A\"\\B missing");
    EXPECT_EQ(j["coefficients"][2]["t_stat"], nullptr);   // infinite
    EXPECT_EQ(j["coefficients"][2]["p_value"], nullptr);  // NaN
    EXPECT_EQ(j["coefficients"][2]["ci_high"], 1e300);
    EXPECT_EQ(j["coefficients"][1]["p_value"].get<double>(), 0.0);
    EXPECT_TRUE(j["coefficients"][1]["p_value"].is_number_float());  // "0.0", not "0"
    EXPECT_EQ(j["statistics"]["small_sample_factor"], true);
    EXPECT_EQ(j["statistics"]["up_market_beta"], nullptr);
    EXPECT_EQ(j["statistics"]["sharpe_strategy"], 1234567890123456.0);
    EXPECT_EQ(j["reading"][0], reading[0]);
    EXPECT_EQ(j["preparation"][1], "tab\there, line\nbreak");
    EXPECT_EQ(j["warnings"][1], "caf\xc3\xa9 \x01 bell");
    if (rolling) {
      EXPECT_EQ(j["rolling"]["window"], 36);
      EXPECT_EQ(j["rolling"]["lag_rule"], "auto");
      ASSERT_EQ(j["rolling"]["windows"].size(), 2u);
      EXPECT_EQ(j["rolling"]["windows"][0]["alpha_std_error"], nullptr);
      EXPECT_EQ(j["rolling"]["windows"][1]["beta"], 0.5);
    } else {
      EXPECT_EQ(j["rolling"], nullptr);
    }
  }
}

}  // namespace
}  // namespace alphatrail::record
