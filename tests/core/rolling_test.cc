// Unit tests of rolling estimates (core/rolling.h): every window is fit_ols of its own slice,
// bit for bit; the windows agree with statsmodels' RollingOLS (classic errors) and with
// statsmodels' HAC fit on single windows (Newey-West); a window that cannot be estimated
// leaves the others alone; windows that cannot hold the model are refused; and the
// Evaluator keeps rolling estimates bit-identical between evaluate() and evaluate_many().
//
// Outside reference: statsmodels from Debian (python3-statsmodels, run with /usr/bin/python3),
// via tests/reference/rolling_reference.py (see tests/reference/README.md).
#include "core/rolling.h"

#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <cstdint>
#include <nlohmann/json.hpp>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "core/error.h"
#include "core/evaluation.h"
#include "support/test_support.h"

namespace alphatrail::core {
namespace {

using testing::month_end;
using testing::month_ends;

using nlohmann::json;

// True when two doubles have the same bits (NaN included): "bit for bit".
bool same_bits(double a, double b) {
  return std::bit_cast<std::uint64_t>(a) == std::bit_cast<std::uint64_t>(b);
}

#define EXPECT_SAME_BITS(a, b) \
  EXPECT_TRUE(same_bits((a), (b))) << #a << " = " << (a) << ", " << #b << " = " << (b)

// Uniform in [0, 1) from the standardized mt19937 sequence (portable).
struct Uniform {
  std::mt19937 rng;
  explicit Uniform(unsigned seed) : rng(seed) {}
  double operator()() { return static_cast<double>(rng()) / 4294967296.0; }
};

// A design [1, market, factor] and a response with noise, T monthly periods from 2000-01.
struct Data {
  Eigen::MatrixXd X;
  Eigen::VectorXd y;
  std::vector<std::int64_t> keys;
  std::vector<std::string> names{"alpha", "beta", "size"};
};

Data make_data(int T, unsigned seed) {
  Data d;
  d.X.resize(T, 3);
  d.y.resize(T);
  Uniform u(seed);
  for (int t = 0; t < T; ++t) {
    d.X(t, 0) = 1.0;
    d.X(t, 1) = 0.08 * (u() - 0.5);
    d.X(t, 2) = 0.05 * (u() - 0.5);
    d.y(t) = 0.002 + 0.9 * d.X(t, 1) + 0.3 * d.X(t, 2) + 0.02 * (u() - 0.5);
    d.keys.push_back(2000 * 12 + t);  // month keys: year * 12 + month - 1
  }
  return d;
}

RollingOptions options(int window, CovarianceOptions covariance,
                       Annualize annualize = Annualize::compound) {
  return {window, covariance, 0.95, annualize, 12};
}

// --- the window rule ----------------------------------------------------------------------

// Three years of periods (common practice), the same as the short-sample threshold.
TEST(RollingWindowRule, DefaultIsThreeYearsOfPeriods) {
  EXPECT_EQ(default_rolling_window(Frequency::monthly), 36);
  EXPECT_EQ(default_rolling_window(Frequency::weekly), 156);
  EXPECT_EQ(default_rolling_window(Frequency::daily), 756);
  EXPECT_EQ(default_rolling_window(Frequency::quarterly), 12);
  for (Frequency f :
       {Frequency::daily, Frequency::weekly, Frequency::monthly, Frequency::quarterly})
    EXPECT_EQ(default_rolling_window(f), short_sample_threshold(f));
}

// fit_ols needs T >= k + 2 and a Newey-West lag below T: a window must too.
TEST(RollingWindowRule, WindowThatCannotHoldTheModelIsRefused) {
  EXPECT_EQ(rolling_window_problem(4, 2, {}), "");
  EXPECT_NE(rolling_window_problem(3, 2, {}).find("use at least 4 periods"), std::string::npos)
      << rolling_window_problem(3, 2, {});
  EXPECT_NE(rolling_window_problem(4, 3, {}).find("at least 5"), std::string::npos);
  const CovarianceOptions twelve{ErrorKind::newey_west, 12, false};
  EXPECT_NE(rolling_window_problem(12, 2, twelve).find("12 Newey-West lags"), std::string::npos)
      << rolling_window_problem(12, 2, twelve);
  EXPECT_EQ(rolling_window_problem(13, 2, twelve), "");
  // Lags only matter to Newey-West errors.
  EXPECT_EQ(rolling_window_problem(12, 2, {ErrorKind::classic, 12, false}), "");

  const Data d = make_data(40, 3);
  try {
    rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(4, {}));
    FAIL() << "a 4-period window for 3 coefficients was accepted";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::invalid_argument) << e.what();
  }
}

// --- windows ------------------------------------------------------------------------------

// T - N + 1 windows; window i is exactly fit_ols on rows i .. i + N - 1, for every error kind
// (Newey-West auto lags applied to N, fixed lags with the small-sample factor, classic, HC3);
// alpha annualized and its bounds by the run's rule, (1 + a)^12 - 1 or 12 a.
TEST(RollingWindows, EachWindowIsFitOlsOfItsOwnSlice) {
  const int T = 80;
  const int N = 24;
  const Data d = make_data(T, 11);
  const std::vector<CovarianceOptions> kinds{{ErrorKind::newey_west, -1, false},
                                             {ErrorKind::newey_west, 5, true},
                                             {ErrorKind::classic, -1, false},
                                             {ErrorKind::hc3, -1, false}};
  for (const auto& c : kinds) {
    for (Annualize rule : {Annualize::compound, Annualize::arithmetic}) {
      SCOPED_TRACE(std::string(error_kind_name(c.kind)) + " lags " + std::to_string(c.lags) + " " +
                   annualize_name(rule));
      const auto windows =
          rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(N, c, rule));
      ASSERT_EQ(windows.size(), static_cast<std::size_t>(T - N + 1));
      for (int i = 0; i <= T - N; ++i) {
        const RollingWindow& w = windows[static_cast<std::size_t>(i)];
        const Eigen::MatrixXd X = d.X.middleRows(i, N);
        const Eigen::VectorXd y = d.y.segment(i, N);
        const OlsResult fit = fit_ols(X, y, d.names, true, c, 0.95);
        const auto& a = fit.coefficients[0];
        const auto& b = fit.coefficients[1];
        EXPECT_EQ(w.problem, "");
        EXPECT_EQ(w.observations, N);
        EXPECT_EQ(w.first, period_label(Frequency::monthly, d.keys[static_cast<std::size_t>(i)]));
        EXPECT_EQ(w.end,
                  period_label(Frequency::monthly, d.keys[static_cast<std::size_t>(i + N - 1)]));
        EXPECT_EQ(w.lags, fit.lags);
        EXPECT_SAME_BITS(w.alpha, a.estimate);
        EXPECT_SAME_BITS(w.alpha_std_error, a.std_error);
        EXPECT_SAME_BITS(w.alpha_ci_low, a.ci_low);
        EXPECT_SAME_BITS(w.alpha_ci_high, a.ci_high);
        EXPECT_SAME_BITS(w.beta, b.estimate);
        EXPECT_SAME_BITS(w.beta_std_error, b.std_error);
        EXPECT_SAME_BITS(w.beta_ci_low, b.ci_low);
        EXPECT_SAME_BITS(w.beta_ci_high, b.ci_high);
        const auto yearly = [rule](double x) {
          return rule == Annualize::compound ? std::pow(1.0 + x, 12) - 1.0 : 12 * x;
        };
        EXPECT_SAME_BITS(w.alpha_annualized, yearly(a.estimate));
        EXPECT_SAME_BITS(w.alpha_annualized_ci_low, yearly(a.ci_low));
        EXPECT_SAME_BITS(w.alpha_annualized_ci_high, yearly(a.ci_high));
        EXPECT_LT(w.alpha_annualized_ci_low, w.alpha_annualized);
        EXPECT_LT(w.alpha_annualized, w.alpha_annualized_ci_high);
      }
      // Newey-West auto lags follow floor(4 (N/100)^(2/9)) = floor(4 x 0.728) = 2 for N = 24.
      if (c.kind == ErrorKind::newey_west)
        EXPECT_EQ(windows.front().lags, c.lags == -1 ? 2 : 5);
      else
        EXPECT_EQ(windows.front().lags, 0);
    }
  }
  EXPECT_EQ(
      rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(N, {})).front().first,
      "2000-01");
}

// A sample shorter than the window has no window; one exactly as long has one.
TEST(RollingWindows, SampleShorterThanTheWindowHasNone) {
  const Data d = make_data(35, 5);
  EXPECT_TRUE(rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(36, {})).empty());
  EXPECT_EQ(rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(35, {})).size(),
            1u);
}

// The market is flat for 30 periods in the middle, so the windows inside that stretch have a
// constant beta column (collinear with the intercept): they get NaN figures and the reason,
// while the windows around them are estimated as usual.
TEST(RollingWindows, WindowThatCannotBeEstimatedLeavesTheOthers) {
  const int T = 90;
  const int N = 24;
  Data d = make_data(T, 23);
  for (int t = 30; t < 60; ++t) d.X(t, 1) = 0.01;
  const auto windows = rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(N, {}));
  ASSERT_EQ(windows.size(), static_cast<std::size_t>(T - N + 1));
  int failed = 0;
  for (int i = 0; i <= T - N; ++i) {
    const RollingWindow& w = windows[static_cast<std::size_t>(i)];
    const bool inside = i >= 30 && i + N <= 60;
    if (inside) {
      ++failed;
      EXPECT_NE(w.problem.find("duplicates the intercept"), std::string::npos) << w.problem;
      for (double v : {w.alpha, w.alpha_std_error, w.alpha_ci_low, w.alpha_ci_high,
                       w.alpha_annualized, w.alpha_annualized_ci_low, w.alpha_annualized_ci_high,
                       w.beta, w.beta_std_error, w.beta_ci_low, w.beta_ci_high})
        EXPECT_TRUE(std::isnan(v)) << "window " << i;
      EXPECT_EQ(w.lags, 2) << "the lag it would have used: floor(4 (24/100)^(2/9))";
      EXPECT_EQ(w.observations, N);
    } else {
      EXPECT_EQ(w.problem, "") << "window " << i;
      EXPECT_TRUE(std::isfinite(w.alpha) && std::isfinite(w.beta_std_error)) << "window " << i;
    }
  }
  EXPECT_EQ(failed, 30 - N + 1);
}

// --- statsmodels ----------------------------------------------------------------------------

struct Reference {
  Data data;
  json doc;
};

Reference compute_reference(const testing::ScratchDir& dir) {
  const auto script = testing::source_path("tests/reference/rolling_reference.py");
  const auto run = testing::run_program({"/usr/bin/python3", script.string(), dir.path().string()});
  EXPECT_EQ(run.exit_code, 0)
      << "the statsmodels reference did not run: /usr/bin/python3 needs statsmodels; run "
         "scripts/install-deps --test\n"
      << run.err;
  Reference r;
  if (run.exit_code != 0) return r;
  const auto rows = testing::read_number_rows(dir / "data.csv", "strategy,market,size");
  const auto T = static_cast<Eigen::Index>(rows.size());
  r.data.X.resize(T, 3);
  r.data.y.resize(T);
  for (Eigen::Index t = 0; t < T; ++t) {
    const auto& row = rows[static_cast<std::size_t>(t)];
    r.data.y(t) = row[0];
    r.data.X(t, 0) = 1.0;
    r.data.X(t, 1) = row[1];
    r.data.X(t, 2) = row[2];
    r.data.keys.push_back(2000 * 12 + t);
  }
  r.doc = json::parse(testing::read_file(dir / "results.json"));
  return r;
}

// Runs the reference script once for the suites below (importing statsmodels takes a second).
const Reference& reference() {
  static const testing::ScratchDir dir;
  static const Reference ref = compute_reference(dir);
  return ref;
}

void expect_relative(double got, double want, const std::string& what) {
  EXPECT_LE(std::fabs(got - want), 1e-9 * std::fabs(want))
      << what << ": got " << got << ", statsmodels " << want << " (relative "
      << std::fabs(got - want) / std::fabs(want) << ")";
}

// statsmodels RollingOLS(y, X, window=36).fit() (classic errors): alpha and beta with their
// standard errors in each of the T - N + 1 = 115 windows, to relative 1e-9.
TEST(RollingStatsmodels, ClassicWindowsMatchRollingOls) {
  const Reference& ref = reference();
  ASSERT_FALSE(ref.doc.is_null());
  RecordProperty("statsmodels_version", ref.doc["statsmodels_version"].get<std::string>());
  const int N = ref.doc["window"];
  const auto& d = ref.data;
  const auto windows = rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly,
                                    options(N, {ErrorKind::classic, -1, false}));
  const auto& params = ref.doc["rolling"]["params"];
  const auto& bse = ref.doc["rolling"]["bse"];
  ASSERT_EQ(windows.size(), params.size());
  ASSERT_EQ(windows.size(), static_cast<std::size_t>(ref.doc["T"].get<int>() - N + 1));
  for (std::size_t i = 0; i < windows.size(); ++i) {
    const std::string at = "window " + std::to_string(i) + " ending " + windows[i].end;
    expect_relative(windows[i].alpha, params[i][0], at + " alpha");
    expect_relative(windows[i].beta, params[i][1], at + " beta");
    expect_relative(windows[i].alpha_std_error, bse[i][0], at + " alpha standard error");
    expect_relative(windows[i].beta_std_error, bse[i][1], at + " beta standard error");
  }
}

// statsmodels OLS(...).fit(cov_type="HAC", cov_kwds={"maxlags": L, "use_correction": C}) on
// the first, a middle and the last window: L = 3 is our automatic rule for N = 36, L = 6 a
// fixed lag; C is our small-sample factor.
TEST(RollingStatsmodels, NeweyWestWindowsMatchHacFits) {
  const Reference& ref = reference();
  ASSERT_FALSE(ref.doc.is_null());
  const int N = ref.doc["window"];
  EXPECT_EQ(ref.doc["auto_lags"].get<int>(), auto_newey_west_lags(N));
  const auto& d = ref.data;
  int compared = 0;
  for (const auto& h : ref.doc["hac"]) {
    const int lags = h["maxlags"];
    const bool corrected = h["use_correction"];
    const std::size_t start = h["start"];
    // The automatic lag is asked for as "auto" (-1), so the rule itself is tested too.
    const CovarianceOptions c{ErrorKind::newey_west, lags == ref.doc["auto_lags"] ? -1 : lags,
                              corrected};
    const auto windows = rolling_fits(d.X, d.y, d.names, d.keys, Frequency::monthly, options(N, c));
    ASSERT_LT(start, windows.size());
    const RollingWindow& w = windows[start];
    const std::string at = "window from " + w.first + ", " + std::to_string(lags) + " lags" +
                           (corrected ? ", corrected" : "");
    EXPECT_EQ(w.lags, lags) << at;
    expect_relative(w.alpha, h["params"][0], at + " alpha");
    expect_relative(w.beta, h["params"][1], at + " beta");
    expect_relative(w.alpha_std_error, h["bse"][0], at + " alpha standard error");
    expect_relative(w.beta_std_error, h["bse"][1], at + " beta standard error");
    ++compared;
  }
  EXPECT_EQ(compared, 12);
}

// --- through the Evaluator ------------------------------------------------------------------

ReturnInput monthly(std::string name, std::vector<Day> dates, std::vector<double> values) {
  return ReturnInput{std::move(name), {std::move(dates), std::move(values)}, Frequency::monthly};
}

// T months of a market from 2015-01, percent yields from 2014-12, and strategies on them.
struct World {
  SharedInputs shared;
  std::vector<Day> dates;
  std::vector<double> market;
};

World make_world(int T) {
  World w;
  w.dates = month_ends(2015, 1, T);
  Uniform u(41);
  for (int t = 0; t < T; ++t) w.market.push_back(0.006 + 0.08 * (u() - 0.5));
  std::vector<double> yields;
  for (int i = 0; i <= T; ++i) yields.push_back(1.0 + 3.0 * u());
  w.shared.benchmark = monthly("market", w.dates, w.market);
  w.shared.rate = {
      "bills", "1M", {month_ends(2014, 12, T + 1), yields}, RateUnit::percent, RateQuote::yield};
  return w;
}

ReturnInput strategy(const World& w, const std::string& name, unsigned seed) {
  Uniform u(seed);
  std::vector<double> s;
  for (double m : w.market) s.push_back(0.003 + 1.1 * m + 0.03 * (u() - 0.5));
  return monthly(name, w.dates, s);
}

void expect_same_windows(const std::vector<RollingWindow>& a, const std::vector<RollingWindow>& b) {
  ASSERT_EQ(a.size(), b.size());
  for (std::size_t i = 0; i < a.size(); ++i) {
    EXPECT_EQ(a[i].first, b[i].first);
    EXPECT_EQ(a[i].end, b[i].end);
    EXPECT_EQ(a[i].lags, b[i].lags);
    for (auto field :
         {&RollingWindow::alpha, &RollingWindow::alpha_std_error, &RollingWindow::alpha_ci_low,
          &RollingWindow::alpha_ci_high, &RollingWindow::alpha_annualized,
          &RollingWindow::alpha_annualized_ci_low, &RollingWindow::alpha_annualized_ci_high,
          &RollingWindow::beta, &RollingWindow::beta_std_error, &RollingWindow::beta_ci_low,
          &RollingWindow::beta_ci_high})
      EXPECT_SAME_BITS(a[i].*field, b[i].*field);
  }
}

// evaluate_many, also when it frees the per-period series, returns the rolling windows that
// evaluate() does, bit for bit; without rolling_window there are none.
TEST(RollingEvaluator, EvaluateManyKeepsTheWindowsBitIdentical) {
  const int T = 60;
  const World w = make_world(T);
  EvaluationSettings settings;
  settings.rolling_window = 24;
  const Evaluator ev(w.shared, Frequency::monthly, settings);
  std::vector<ReturnInput> inputs{strategy(w, "a", 1), strategy(w, "b", 2), strategy(w, "c", 3)};
  inputs[2].data.values[30] = NAN;  // another sample: 59 months
  for (bool keep_series : {true, false}) {
    const auto outcomes = ev.evaluate_many(inputs, 2, keep_series);
    for (std::size_t j = 0; j < inputs.size(); ++j) {
      ASSERT_TRUE(outcomes[j].result.has_value()) << outcomes[j].error;
      const EvaluationResult& many = *outcomes[j].result;
      const EvaluationResult one = ev.evaluate(inputs[j]);
      EXPECT_EQ(many.rolling_window, 24);
      EXPECT_TRUE(many.rolling_auto_lags);
      EXPECT_EQ(many.rolling.size(), static_cast<std::size_t>(many.sample.observations - 24 + 1));
      expect_same_windows(many.rolling, one.rolling);
    }
  }
  const Evaluator plain(w.shared, Frequency::monthly, EvaluationSettings{});
  const EvaluationResult none = plain.evaluate(inputs[0]);
  EXPECT_EQ(none.rolling_window, 0);
  EXPECT_TRUE(none.rolling.empty());
}

// Windows count kept periods: with 2015-07 dropped (the strategy has no value), the 24-period
// window that holds the gap spans 25 calendar months; the warnings name the gap.
TEST(RollingEvaluator, WindowsCountKeptPeriodsAcrossAGap) {
  const World w = make_world(48);
  EvaluationSettings settings;
  settings.rolling_window = 24;
  const Evaluator ev(w.shared, Frequency::monthly, settings);
  ReturnInput s = strategy(w, "gappy", 5);
  s.data.values[6] = NAN;  // 2015-07
  const EvaluationResult r = ev.evaluate(s);
  ASSERT_EQ(r.sample.observations, 47);
  ASSERT_EQ(r.rolling.size(), 47u - 24u + 1u);
  EXPECT_EQ(r.rolling.front().first, "2015-01");
  EXPECT_EQ(r.rolling.front().end, "2017-01");  // 24 kept months: 2015-01 .. 2017-01 less 2015-07
  EXPECT_EQ(r.rolling[6].first, "2015-08");     // the first window after the gap
  EXPECT_EQ(r.rolling[6].end, "2017-07");
  EXPECT_EQ(r.rolling.back().end, "2018-12");
}

// A sample shorter than the window: no window, and a warning that says so; the run itself
// is estimated.
TEST(RollingEvaluator, ShortSampleHasNoWindowAndAWarning) {
  const World w = make_world(30);
  EvaluationSettings settings;
  settings.rolling_window = 36;
  const Evaluator ev(w.shared, Frequency::monthly, settings);
  const EvaluationResult r = ev.evaluate(strategy(w, "short", 9));
  EXPECT_EQ(r.rolling_window, 36);
  EXPECT_TRUE(r.rolling.empty());
  bool warned = false;
  for (const auto& text : r.sample.warnings)
    warned = warned || text.find("fewer than the window of 36") != std::string::npos;
  EXPECT_TRUE(warned);
}

}  // namespace
}  // namespace alphatrail::core
