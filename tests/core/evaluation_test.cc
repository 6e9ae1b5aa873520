// Unit tests of core::Evaluator: the risk-free conversion and its timing, compounding to the
// evaluation frequency, the derived figures (each recomputed here from the GUIDE.md section 2
// formulas), the sample warnings and refusals, and the batch entry point.
//
// All data are built in the test (no files): monthly month-end dates, benchmark returns and
// percent yields that change every month, strategies built from them.
#include "core/evaluation.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "core/error.h"
#include "core/reading.h"
#include "support/test_support.h"

namespace alphatrail::core {
namespace {

using testing::month_end;
using testing::month_ends;

// Uniform in [0, 1) from the standardized mt19937 sequence (portable, unlike the
// distributions of <random>).
struct Uniform {
  std::mt19937 rng;
  explicit Uniform(unsigned seed) : rng(seed) {}
  double operator()() { return static_cast<double>(rng()) / 4294967296.0; }
};

ReturnInput returns(std::string name, std::vector<Day> dates, std::vector<double> values,
                    Frequency f = Frequency::monthly) {
  return ReturnInput{std::move(name), {std::move(dates), std::move(values)}, f};
}

// A monthly world: T months of benchmark returns from (2015, 1) and the month-end percent
// yields from the month before (T + 1 values, 2014-12 .. ), changing every month.
struct World {
  int T = 0;
  std::vector<Day> dates;        // month ends of the T return months
  std::vector<Day> yield_dates;  // month ends of T + 1 months, one earlier
  std::vector<double> market;    // r_m
  std::vector<double> yields;    // percent, yields[i] at yield_dates[i]
  SharedInputs shared;

  // The yield known at the start of return month t is yields[t] (the previous month-end).
  double y_start(int t) const { return yields[static_cast<std::size_t>(t)] / 100.0; }
};

World make_world(int T, unsigned seed = 7) {
  World w;
  w.T = T;
  w.dates = month_ends(2015, 1, T);
  w.yield_dates = month_ends(2014, 12, T + 1);
  Uniform u(seed);
  for (int t = 0; t < T; ++t) w.market.push_back(0.006 + 0.08 * (u() - 0.5));
  for (int i = 0; i <= T; ++i) w.yields.push_back(1.0 + 3.0 * u());  // 1% .. 4%, every month new
  w.shared.benchmark = returns("market", w.dates, w.market);
  w.shared.rate.name = "bills";
  w.shared.rate.tenor = "1M";
  w.shared.rate.yields = {w.yield_dates, w.yields};
  w.shared.rate.unit = RateUnit::percent;
  return w;
}

// Per-period rate of month t (0-based) under a basis, from the yield known at its start,
// per GUIDE.md section 2: compound (1 + y)^(1/12) - 1, simple y / 12, money-market
// y * days / 360 with days the calendar length of the month.
double rf_of(const World& w, int t, RateBasis basis) {
  const double y = w.y_start(t);
  switch (basis) {
    case RateBasis::compound: return std::pow(1.0 + y, 1.0 / 12.0) - 1.0;
    case RateBasis::simple: return y / 12.0;
    case RateBasis::act360: {
      const auto c = to_civil(w.dates[static_cast<std::size_t>(t)]);
      return y * days_in_month(c.year, c.month) / 360.0;
    }
  }
  return NAN;
}

EvaluationSettings settings_with(RateBasis basis, ErrorKind errors = ErrorKind::newey_west) {
  EvaluationSettings s;
  s.rate_basis = basis;
  s.covariance.kind = errors;
  return s;
}

// Strategy r_s = r_f + alpha + beta (r_m - r_f) + noise[t] on the world's months.
std::vector<double> strategy_values(const World& w, RateBasis basis, double alpha, double beta,
                                    const std::vector<double>& noise = {}) {
  std::vector<double> s;
  for (int t = 0; t < w.T; ++t) {
    const double rf = rf_of(w, t, basis);
    s.push_back(rf + alpha + beta * (w.market[static_cast<std::size_t>(t)] - rf) +
                (noise.empty() ? 0.0 : noise[static_cast<std::size_t>(t)]));
  }
  return s;
}

std::vector<double> noise_of(int T, unsigned seed, double scale) {
  Uniform u(seed);
  std::vector<double> e;
  for (int t = 0; t < T; ++t) e.push_back(scale * (u() - 0.5));
  return e;
}

double mean_of(const std::vector<double>& x) {
  double s = 0;
  for (double v : x) s += v;
  return s / static_cast<double>(x.size());
}

// Sample standard deviation, T - 1 in the denominator (common practice).
double sd_of(const std::vector<double>& x) {
  const double m = mean_of(x);
  double ss = 0;
  for (double v : x) ss += (v - m) * (v - m);
  return std::sqrt(ss / static_cast<double>(x.size() - 1));
}

double cov_of(const std::vector<double>& x, const std::vector<double>& y) {
  const double mx = mean_of(x);
  const double my = mean_of(y);
  double s = 0;
  for (std::size_t i = 0; i < x.size(); ++i) s += (x[i] - mx) * (y[i] - my);
  return s / static_cast<double>(x.size() - 1);
}

bool has_warning(const EvaluationResult& r, const std::string& part) {
  for (const auto& w : r.sample.warnings)
    if (w.find(part) != std::string::npos) return true;
  return false;
}

// ---------------------------------------------------------------------------------------

class EvaluationBasisTest : public ::testing::TestWithParam<RateBasis> {};

// A strategy built exactly as r_f + b (r_m - r_f) has alpha 0 and beta b (GUIDE.md section 2:
// the model r_s - r_f = alpha + beta (r_m - r_f) + e) only when the engine's r_f is the one
// built here, so this also checks each basis' conversion and the start timing.
TEST_P(EvaluationBasisTest, ExactCapmStrategyHasZeroAlphaAndItsBeta) {
  const RateBasis basis = GetParam();
  const World w = make_world(48);
  const double b = 0.7;
  const Evaluator ev(w.shared, Frequency::monthly, settings_with(basis));
  const auto r = ev.evaluate(returns("capm", w.dates, strategy_values(w, basis, 0.0, b)));
  ASSERT_EQ(r.sample.observations, 48);
  EXPECT_LT(std::fabs(r.fit.coefficients[0].estimate), 1e-12) << rate_basis_name(basis);
  EXPECT_NEAR(r.fit.coefficients[1].estimate, b, 1e-12) << rate_basis_name(basis);
  ASSERT_EQ(r.risk_free.size(), 48u);
  for (int t = 0; t < 48; ++t)
    EXPECT_NEAR(r.risk_free[static_cast<std::size_t>(t)], rf_of(w, t, basis), 1e-17)
        << rate_basis_name(basis) << " month " << t;
}

INSTANTIATE_TEST_SUITE_P(EvaluationBases, EvaluationBasisTest,
                         ::testing::Values(RateBasis::compound, RateBasis::simple,
                                           RateBasis::act360),
                         [](const auto& info) { return std::string(rate_basis_name(info.param)); });

// The rate of month t is the yield known at its start: the last observation at or before the
// end of month t-1 (GUIDE.md section 2, common practice). Check value for y = 5%:
// (1.05)^(1/12) - 1 = 0.00407412 (GUIDE.md section 2, computed).
TEST(EvaluationRates, RiskFreeUsesTheYieldKnownAtThePeriodStart) {
  World w = make_world(24);
  // Observations on the 15th of every month too, with other values: the month-end one of the
  // previous month is the last at or before the as-of day, the 15th of month t is too late.
  std::vector<Day> dates;
  std::vector<double> values;
  for (std::size_t i = 0; i < w.yield_dates.size(); ++i) {
    const auto c = to_civil(w.yield_dates[i]);
    dates.push_back(to_day({c.year, c.month, 15}));
    values.push_back(9.0 + static_cast<double>(i % 3));  // 9% .. 11%: must never be used
    dates.push_back(w.yield_dates[i]);
    values.push_back(w.yields[i]);
  }
  w.yields[6] = 5.0;  // 2015-06-30: the rate of 2015-07
  values[13] = 5.0;
  w.shared.rate.yields = {dates, values};

  const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));
  const auto r = ev.evaluate(returns(
      "s", w.dates, strategy_values(w, RateBasis::compound, 0.001, 0.5, noise_of(24, 3, 0.01))));
  ASSERT_EQ(r.risk_free.size(), 24u);
  for (int t = 0; t < 24; ++t)
    EXPECT_NEAR(r.risk_free[static_cast<std::size_t>(t)],
                std::pow(1.0 + w.yields[static_cast<std::size_t>(t)] / 100.0, 1.0 / 12.0) - 1.0,
                1e-17)
        << "month " << t;
  EXPECT_NEAR(r.risk_free[6], 0.00407412, 5e-9);            // 2015-07, from the 5% of 2015-06-30
  EXPECT_GT(std::fabs(r.risk_free[5] - 0.00407412), 1e-6);  // 2015-06 does not see it yet

  // End timing (look-ahead, by request) reads the yield at the period's own end instead.
  EvaluationSettings end = settings_with(RateBasis::compound);
  end.rate_timing = RateTiming::end;
  const Evaluator ev_end(w.shared, Frequency::monthly, end);
  const auto r_end =
      ev_end.evaluate(returns("s", w.dates, strategy_values(w, RateBasis::compound, 0.0, 1.0)));
  ASSERT_GE(r_end.risk_free.size(), 6u);
  EXPECT_NEAR(r_end.risk_free[5], 0.00407412, 5e-9);  // 2015-06 with its own month-end 5%
}

// Daily returns compounded to a month: R = prod(1 + r_d) - 1 over the month's days
// (GUIDE.md section 2). The strategy's own monthly return is excess + r_f in the output.
TEST(EvaluationResampling, DailyStrategyCompoundsToMonthly) {
  // Benchmark and yields monthly for 2021-02 .. 2021-12 (yields from 2021-01).
  SharedInputs shared;
  const auto dates = month_ends(2021, 2, 11);
  std::vector<double> market;
  for (int t = 0; t < 11; ++t) market.push_back(0.01 * std::sin(1.3 * t) + 0.004);
  shared.benchmark = returns("market", dates, market);
  shared.rate = {"bills",
                 "1M",
                 {month_ends(2021, 1, 12), std::vector<double>(12, 2.0)},
                 RateUnit::percent,
                 RateQuote::yield};
  // Every weekday from Monday 2021-02-01 to Friday 2021-12-31: no partial month.
  std::vector<Day> days;
  std::vector<double> daily;
  for (Day d = to_day({2021, 2, 1}); d <= to_day({2021, 12, 31}); ++d) {
    if (weekday(d) >= 5) continue;
    days.push_back(d);
    daily.push_back(0.002 * std::sin(0.7 * static_cast<double>(d)) + 0.0003);
  }
  std::vector<double> expected(11, 1.0);  // prod(1 + r_d) per month, then - 1
  for (std::size_t i = 0; i < days.size(); ++i)
    expected[static_cast<std::size_t>(to_civil(days[i]).month - 2)] *= 1.0 + daily[i];
  for (double& v : expected) v -= 1.0;

  const Evaluator ev(shared, Frequency::monthly, settings_with(RateBasis::compound));
  const auto r = ev.evaluate(returns("daily", days, daily, Frequency::daily));
  ASSERT_EQ(r.sample.observations, 11) << ::testing::PrintToString(r.sample.warnings);
  EXPECT_EQ(r.sample.first, "2021-02");
  EXPECT_EQ(r.sample.last, "2021-12");
  for (std::size_t t = 0; t < 11; ++t)
    EXPECT_NEAR(r.strategy_excess[t] + r.risk_free[t], expected[t], 1e-15) << "month " << t;
  // Hand check of the first month's size: 20 weekdays in 2021-02, so about 20 * 0.0003 plus
  // the sine terms; the compounded value is not the plain sum.
  double sum = 0;
  for (std::size_t i = 0; i < 20; ++i) sum += daily[i];
  EXPECT_GT(std::fabs(expected[0] - sum), 1e-9);
}

// Annualizing alpha (GUIDE.md section 2): compound (1 + a)^P - 1, arithmetic a P.
// With a = 0.002 exactly: 1.002^12 - 1 = 0.02426577 (hand: 12 ln 1.002 = 12 x 0.00199800 =
// x = 0.02397603, e^x - 1 = x + x^2/2 + x^3/6 + ... = 0.02397603 + 0.00028743 + 0.00000230
// + 0.00000001 = 0.02426577); 12 x 0.002 = 0.024.
TEST(EvaluationDerived, AnnualizeCompoundAndArithmetic) {
  const World w = make_world(48);
  const auto s = returns("s", w.dates, strategy_values(w, RateBasis::compound, 0.002, 0.9));
  EvaluationSettings compound = settings_with(RateBasis::compound, ErrorKind::classic);
  EvaluationSettings arithmetic = compound;
  arithmetic.annualize = Annualize::arithmetic;
  const auto rc = Evaluator(w.shared, Frequency::monthly, compound).evaluate(s);
  const auto ra = Evaluator(w.shared, Frequency::monthly, arithmetic).evaluate(s);
  const double a = rc.fit.coefficients[0].estimate;
  EXPECT_NEAR(a, 0.002, 1e-12);
  EXPECT_EQ(ra.fit.coefficients[0].estimate, a);
  EXPECT_NEAR(rc.derived.alpha_annualized, std::pow(1.0 + a, 12) - 1.0, 1e-15);
  EXPECT_NEAR(rc.derived.alpha_annualized, 0.02426577, 1e-8);
  EXPECT_NEAR(ra.derived.alpha_annualized, 12.0 * a, 1e-15);
  EXPECT_NEAR(ra.derived.alpha_annualized, 0.024, 1e-11);
}

// Sharpe, Treynor, tracking error, information ratio, appraisal ratio and correlation,
// recomputed from the inputs with the formulas of GUIDE.md section 2, annualized with P = 12
// and sqrt(P); sd is the sample sd (T - 1), beta = cov / var (the single-index slope).
TEST(EvaluationDerived, RatiosEqualIndependentComputations) {
  const int T = 60;
  const World w = make_world(T, 11);
  const auto values = strategy_values(w, RateBasis::compound, 0.003, 1.1, noise_of(T, 5, 0.04));
  const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));
  const auto r = ev.evaluate(returns("s", w.dates, values));
  ASSERT_EQ(r.sample.observations, T);

  std::vector<double> ex_s, ex_m, active;
  for (int t = 0; t < T; ++t) {
    const double rf = rf_of(w, t, RateBasis::compound);
    ex_s.push_back(values[static_cast<std::size_t>(t)] - rf);
    ex_m.push_back(w.market[static_cast<std::size_t>(t)] - rf);
    active.push_back(values[static_cast<std::size_t>(t)] - w.market[static_cast<std::size_t>(t)]);
  }
  const double root12 = std::sqrt(12.0);
  const double beta = cov_of(ex_s, ex_m) / cov_of(ex_m, ex_m);
  const double alpha = mean_of(ex_s) - beta * mean_of(ex_m);
  double rss = 0;
  for (int t = 0; t < T; ++t) {
    const double e =
        ex_s[static_cast<std::size_t>(t)] - alpha - beta * ex_m[static_cast<std::size_t>(t)];
    rss += e * e;
  }
  const double sd_e = std::sqrt(rss / (T - 2));  // s of the regression, T - k
  const double te = sd_of(active);
  const auto& d = r.derived;
  const auto near = [](double got, double want, const char* what) {
    EXPECT_NEAR(got, want, 1e-10 * std::max(1.0, std::fabs(want))) << what;
  };
  near(r.fit.coefficients[1].estimate, beta, "beta");
  near(r.fit.coefficients[0].estimate, alpha, "alpha");
  EXPECT_EQ(d.periods_per_year, 12);
  near(d.mean_excess_strategy, mean_of(ex_s), "mean excess strategy");
  near(d.mean_excess_benchmark, mean_of(ex_m), "mean excess benchmark");
  near(d.sharpe_strategy, mean_of(ex_s) / sd_of(ex_s) * root12, "Sharpe strategy");
  near(d.sharpe_benchmark, mean_of(ex_m) / sd_of(ex_m) * root12, "Sharpe benchmark");
  near(d.treynor_ratio, mean_of(ex_s) * 12.0 / beta, "Treynor");
  near(d.tracking_error, te * root12, "tracking error");
  near(d.information_ratio, mean_of(active) / te * root12, "information ratio");
  near(d.appraisal_ratio, alpha / sd_e * root12, "appraisal ratio");
  near(d.correlation, cov_of(ex_s, ex_m) / (sd_of(ex_s) * sd_of(ex_m)), "correlation");
  near(r.fit.residual_std, sd_e, "residual sd");
}

// Up- and down-market betas: slopes over the months with positive / negative market excess.
// Built with slope 1.5 in up months and 0.5 in down months (no intercept, no noise).
TEST(EvaluationDerived, UpAndDownMarketBeta) {
  const int T = 40;
  World w = make_world(T, 13);
  std::vector<double> s;
  int up = 0;
  int down = 0;
  for (int t = 0; t < T; ++t) {
    const double rf = rf_of(w, t, RateBasis::compound);
    // market excess alternating in sign, of varying size
    const double x =
        (t % 2 == 0 ? 1.0 : -1.0) * (0.005 + 0.001 * (t % 7)) + (t % 5 == 0 ? 0.02 : 0.0);
    w.market[static_cast<std::size_t>(t)] = rf + x;
    s.push_back(rf + (x > 0 ? 1.5 * x : 0.5 * x));
    (x > 0 ? up : down) += 1;
  }
  w.shared.benchmark = returns("market", w.dates, w.market);
  const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));
  const auto r = ev.evaluate(returns("s", w.dates, s));
  EXPECT_EQ(r.derived.up_periods, up);
  EXPECT_EQ(r.derived.down_periods, down);
  EXPECT_EQ(up + down, T);
  EXPECT_NEAR(r.derived.up_market_beta, 1.5, 1e-12);
  EXPECT_NEAR(r.derived.down_market_beta, 0.5, 1e-12);
  const double beta = r.fit.coefficients[1].estimate;
  EXPECT_GT(beta, 0.5);
  EXPECT_LT(beta, 1.5);
}

// Fewer than 36 monthly periods (three years, common practice) is a short sample.
TEST(EvaluationSample, ShortSampleWarningBelow36Months) {
  for (int T : {35, 36}) {
    const World w = make_world(T);
    const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));
    const auto r = ev.evaluate(returns(
        "s", w.dates, strategy_values(w, RateBasis::compound, 0.001, 1.0, noise_of(T, 2, 0.02))));
    ASSERT_EQ(r.sample.observations, T);
    EXPECT_EQ(has_warning(r, "short sample"), T < 36) << "T = " << T;
  }
  EXPECT_EQ(short_sample_threshold(Frequency::monthly), 36);
  EXPECT_EQ(short_sample_threshold(Frequency::quarterly), 12);
  EXPECT_EQ(short_sample_threshold(Frequency::daily), 756);
}

// T < k + 2 cannot be estimated: Error with Failure::cannot_estimate; T = k + 2 can.
TEST(EvaluationSample, TooShortThrowsEstimationError) {
  const World w = make_world(4);
  const Evaluator ev(w.shared, Frequency::monthly,
                     settings_with(RateBasis::compound, ErrorKind::classic));
  const auto values = strategy_values(w, RateBasis::compound, 0.001, 1.0, noise_of(4, 9, 0.02));
  std::vector<Day> three(w.dates.begin(), w.dates.begin() + 3);
  std::vector<double> three_values(values.begin(), values.begin() + 3);
  try {
    ev.evaluate(returns("short", three, three_values));
    FAIL() << "3 observations for 2 coefficients were estimated";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::cannot_estimate) << e.what();
    EXPECT_NE(std::string(e.what()).find("too short"), std::string::npos) << e.what();
  }
  EXPECT_EQ(ev.evaluate(returns("four", w.dates, values)).sample.observations, 4);
}

// A factor equal to the market excess return duplicates the beta regressor: refused, and the
// message names both regressors.
TEST(EvaluationSample, CollinearFactorThrowsNamingTheRegressors) {
  World w = make_world(48);
  std::vector<double> mkt;
  for (int t = 0; t < 48; ++t)
    mkt.push_back(w.market[static_cast<std::size_t>(t)] - rf_of(w, t, RateBasis::simple));
  w.shared.factors.push_back(returns("MKT", w.dates, mkt));
  const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::simple));
  try {
    ev.evaluate(returns("s", w.dates,
                        strategy_values(w, RateBasis::simple, 0.001, 1.0, noise_of(48, 4, 0.02))));
    FAIL() << "a factor equal to the market excess was accepted";
  } catch (const Error& e) {
    const std::string m = e.what();
    EXPECT_EQ(e.kind(), Failure::cannot_estimate) << m;
    EXPECT_NE(m.find("collinear"), std::string::npos) << m;
    EXPECT_NE(m.find("'beta'"), std::string::npos) << m;
    EXPECT_NE(m.find("'MKT'"), std::string::npos) << m;
  }
}

void expect_same(const EvaluationResult& a, const EvaluationResult& b) {
  ASSERT_EQ(a.fit.coefficients.size(), b.fit.coefficients.size());
  for (std::size_t j = 0; j < a.fit.coefficients.size(); ++j) {
    const auto& x = a.fit.coefficients[j];
    const auto& y = b.fit.coefficients[j];
    EXPECT_EQ(x.term, y.term);
    EXPECT_EQ(x.estimate, y.estimate) << a.strategy << " " << x.term;
    EXPECT_EQ(x.std_error, y.std_error) << a.strategy << " " << x.term;
    EXPECT_EQ(x.t_stat, y.t_stat) << a.strategy << " " << x.term;
    EXPECT_EQ(x.p_value, y.p_value) << a.strategy << " " << x.term;
    EXPECT_EQ(x.ci_low, y.ci_low) << a.strategy << " " << x.term;
    EXPECT_EQ(x.ci_high, y.ci_high) << a.strategy << " " << x.term;
  }
  EXPECT_EQ(a.fit.r_squared, b.fit.r_squared);
  EXPECT_EQ(a.fit.residual_std, b.fit.residual_std);
  EXPECT_EQ(a.fit.lags, b.fit.lags);
  EXPECT_EQ(a.sample.observations, b.sample.observations);
  EXPECT_EQ(a.sample.first, b.sample.first);
  EXPECT_EQ(a.derived.alpha_annualized, b.derived.alpha_annualized);
  EXPECT_EQ(a.derived.sharpe_strategy, b.derived.sharpe_strategy);
  EXPECT_EQ(a.derived.information_ratio, b.derived.information_ratio);
}

// evaluate_many is documented as bit-identical to evaluate() on each strategy; strategies on
// two different samples (one misses a month) and one that cannot be estimated are mixed in.
TEST(EvaluationMany, BitIdenticalToEvaluateForEachStrategy) {
  const int T = 60;
  World w = make_world(T, 17);
  std::vector<double> smb;
  Uniform u(99);
  for (int t = 0; t < T; ++t) smb.push_back(0.03 * (u() - 0.5));
  w.shared.factors.push_back(returns("SMB", w.dates, smb));
  const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));

  std::vector<ReturnInput> inputs;
  for (int j = 0; j < 5; ++j)
    inputs.push_back(returns("s" + std::to_string(j), w.dates,
                             strategy_values(w, RateBasis::compound, 0.001 * j, 0.5 + 0.2 * j,
                                             noise_of(T, 100 + static_cast<unsigned>(j), 0.03))));
  inputs[3].data.values[20] = NAN;  // another sample: 59 months
  inputs.push_back(returns("short", {w.dates[0], w.dates[1]}, {0.01, 0.02}));

  for (int threads : {0, 1, 3}) {
    const auto outcomes = ev.evaluate_many(inputs, threads);
    ASSERT_EQ(outcomes.size(), inputs.size());
    for (std::size_t j = 0; j + 1 < inputs.size(); ++j) {
      ASSERT_TRUE(outcomes[j].result.has_value()) << inputs[j].name << ": " << outcomes[j].error;
      expect_same(*outcomes[j].result, ev.evaluate(inputs[j]));
    }
    EXPECT_EQ(outcomes[3].result->sample.observations, T - 1);
    EXPECT_FALSE(outcomes.back().result.has_value());
    EXPECT_EQ(outcomes.back().failure, Failure::cannot_estimate);
    EXPECT_NE(outcomes.back().error.find("too short"), std::string::npos) << outcomes.back().error;
  }
}

// A benchmark that misses one month inside the sample: that month is dropped with a reason
// naming the benchmark, T falls by 1 and the hole is reported as a gap inside the sample.
TEST(EvaluationSample, MissingBenchmarkMonthIsDroppedAndReported) {
  const int T = 48;
  const World full = make_world(T, 21);
  const auto values = strategy_values(full, RateBasis::compound, 0.001, 0.9, noise_of(T, 8, 0.02));
  const auto strategy = returns("s", full.dates, values);
  const std::size_t hole = 17;  // 2016-06
  ASSERT_EQ(period_label(Frequency::monthly, period_key(Frequency::monthly, full.dates[hole])),
            "2016-06");

  // (a) the benchmark has no observation for 2016-06; (b) it has one, but it is missing (NaN).
  for (const bool absent : {true, false}) {
    World w = full;
    if (absent) {
      w.market.erase(w.market.begin() + static_cast<std::ptrdiff_t>(hole));
      auto dates = w.dates;
      dates.erase(dates.begin() + static_cast<std::ptrdiff_t>(hole));
      w.shared.benchmark = returns("market", dates, w.market);
    } else {
      w.market[hole] = NAN;
      w.shared.benchmark = returns("market", w.dates, w.market);
    }
    const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));
    const auto r = ev.evaluate(strategy);
    EXPECT_EQ(r.sample.observations, T - 1) << (absent ? "absent" : "NaN");
    ASSERT_EQ(r.sample.dropped.size(), 1u) << (absent ? "absent" : "NaN");
    EXPECT_EQ(r.sample.dropped[0].label, "2016-06");
    EXPECT_NE(r.sample.dropped[0].reason.find("benchmark"), std::string::npos)
        << r.sample.dropped[0].reason;
    if (!absent) {
      EXPECT_EQ(r.sample.dropped[0].reason, "benchmark missing");
    }
    ASSERT_EQ(r.sample.gaps.size(), 1u);
    EXPECT_NE(r.sample.gaps[0].find("2016-05"), std::string::npos) << r.sample.gaps[0];
    EXPECT_NE(r.sample.gaps[0].find("2016-07"), std::string::npos) << r.sample.gaps[0];
    EXPECT_TRUE(has_warning(r, "gap inside the sample"));
    EXPECT_EQ(r.sample.first, "2015-01");
    EXPECT_EQ(r.sample.last, "2018-12");
  }
}

// The reading of beta (GUIDE.md section 2, facts of the trade: beta > 1 moves with the market
// more strongly, 0 < beta < 1 less strongly). A strategy equal to the benchmark has beta 1:
// it moves one for one with the market, neither more nor less strongly, so a sentence that
// prints "Beta is 1.00" must not call it either (a bug once: beta 1 and values that print as
// 1.00 fell into "less strongly", or "more strongly" for 1 + 1 ulp).
TEST(EvaluationReading, BetaOfOneIsReadAsOneForOne) {
  const World w = make_world(48);
  const Evaluator ev(w.shared, Frequency::monthly, settings_with(RateBasis::compound));
  const auto r = ev.evaluate(returns("copy", w.dates, w.market));
  ASSERT_NEAR(r.fit.coefficients[1].estimate, 1.0, 1e-12);
  const auto reading = compose_reading(r, settings_with(RateBasis::compound), {});
  ASSERT_FALSE(reading.empty());
  const std::string& sentence = reading[0];
  EXPECT_NE(sentence.find("Beta is 1.00"), std::string::npos) << sentence;
  EXPECT_EQ(sentence.find("less strongly"), std::string::npos) << sentence;
  EXPECT_EQ(sentence.find("more strongly"), std::string::npos) << sentence;
}

// The reading counts the study's runs from the second on and names the strategy's runs.
TEST(EvaluationReading, StudyAndStrategyRunsAreMentioned) {
  const World w = make_world(48);
  const EvaluationSettings s = settings_with(RateBasis::compound);
  const Evaluator ev(w.shared, Frequency::monthly, s);
  const auto r = ev.evaluate(returns(
      "s", w.dates, strategy_values(w, RateBasis::compound, 0.001, 0.8, noise_of(48, 6, 0.02))));
  const auto joined = [](const std::vector<std::string>& v) {
    std::string all;
    for (const auto& x : v) all += x + "\n";
    return all;
  };
  const std::string first = joined(compose_reading(r, s, {"grid", 1, 1}));
  EXPECT_EQ(first.find("study 'grid'"), std::string::npos) << first;
  EXPECT_EQ(first.find("runs of this strategy"), std::string::npos) << first;
  const std::string third = joined(compose_reading(r, s, {"grid", 3, 2}));
  EXPECT_NE(third.find("one of 3 runs recorded in study 'grid'"), std::string::npos) << third;
  EXPECT_NE(third.find("The ledger holds 2 runs of this strategy"), std::string::npos) << third;
  for (const auto& caution : standard_cautions())
    EXPECT_NE(third.find(caution), std::string::npos) << caution;
}

}  // namespace
}  // namespace alphatrail::core
