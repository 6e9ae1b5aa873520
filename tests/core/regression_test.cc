// Unit tests of the regression engine and Student's t: handbook values, facts of the trade,
// the refusals, and the identities between the covariance kinds and the batch entry point.
#include "core/regression.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <random>
#include <string>
#include <vector>

#include "core/error.h"
#include "core/student_t.h"

namespace alphatrail::core {
namespace {

// A reproducible sample: a market excess return, two factors and noisy strategies.
struct Sample {
  Eigen::MatrixXd X;  // 1, market, f1, f2
  Eigen::MatrixXd Y;  // one column per strategy
};

Sample make_sample(int T, int strategies, unsigned seed) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> normal(0.0, 1.0);
  Sample s;
  s.X.resize(T, 4);
  s.Y.resize(T, strategies);
  for (int t = 0; t < T; ++t) {
    const double market = 0.0004 + 0.01 * normal(rng);
    s.X(t, 0) = 1;
    s.X(t, 1) = market;
    s.X(t, 2) = 0.2 * market + 0.005 * normal(rng);
    s.X(t, 3) = 0.004 * normal(rng);
  }
  for (int j = 0; j < strategies; ++j) {
    double e = 0;
    for (int t = 0; t < T; ++t) {
      e = 0.3 * e +
          0.004 * (1 + 20 * std::fabs(s.X(t, 1))) * normal(rng);  // AR(1), heteroskedastic
      s.Y(t, j) = 0.0001 * j + (0.5 + 0.01 * j) * s.X(t, 1) + 0.3 * s.X(t, 2) - 0.1 * s.X(t, 3) + e;
    }
  }
  return s;
}

const std::vector<std::string> four_names = {"alpha", "market", "f1", "f2"};

// Returns the message of the estimation error that running f throws ("" when none).
template <typename F>
std::string estimation_message(F f) {
  try {
    f();
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::cannot_estimate) << e.what();
    return e.what();
  } catch (const std::exception& e) {
    ADD_FAILURE() << "unexpected exception: " << e.what();
  }
  return "";
}

// NIST/SEMATECH e-Handbook of Statistical Methods, table of t critical values (values from
// memory): t(0.975, 10) = 2.228, t(0.975, 30) = 2.042, t(0.975, inf) = 1.960.
TEST(StudentT, MatchesHandbookTable) {
  EXPECT_NEAR(student_t_quantile(0.975, 10), 2.228, 5e-4);
  EXPECT_NEAR(student_t_quantile(0.975, 30), 2.042, 5e-4);
  EXPECT_NEAR(student_t_quantile(0.975, std::numeric_limits<double>::infinity()), 1.960, 5e-4);
  EXPECT_NEAR(student_t_quantile(0.025, 10), -2.228, 5e-4);  // symmetry
}

TEST(StudentT, TwoSidedPValueInvertsTheQuantile) {
  for (double df : {1.0, 3.0, 10.0, 238.0, 1e6, std::numeric_limits<double>::infinity()}) {
    EXPECT_NEAR(student_t_two_sided_p(student_t_quantile(0.975, df), df), 0.05, 1e-12) << df;
    EXPECT_NEAR(student_t_two_sided_p(-student_t_quantile(0.995, df), df), 0.01, 1e-12) << df;
  }
  EXPECT_EQ(student_t_two_sided_p(0.0, 10), 1.0);
  EXPECT_EQ(student_t_two_sided_p(std::numeric_limits<double>::infinity(), 10), 0.0);
  EXPECT_TRUE(std::isnan(student_t_two_sided_p(std::nan(""), 10)));
  // Large df approaches the normal (1.959964 is the normal 97.5% point, from memory).
  EXPECT_NEAR(student_t_quantile(0.975, 1e12), 1.959964, 1e-6);
  // Tiny p-values stay accurate (no 1 - cdf cancellation).
  EXPECT_GT(student_t_two_sided_p(40, 200), 0.0);
  EXPECT_LT(student_t_two_sided_p(40, 200), 1e-90);
}

// Newey & West (1994) pilot rule floor(4 (T/100)^(2/9)); values computed by hand:
// T=100: 4; T=240: 4 * 1.2148 = 4.86 -> 4; T=360: 4 * 1.3293 = 5.32 -> 5; T=5000: 4 * 2.3853 = 9.54
// -> 9.
TEST(Regression, AutoNeweyWestLagRule) {
  EXPECT_EQ(auto_newey_west_lags(100), 4);
  EXPECT_EQ(auto_newey_west_lags(240), 4);
  EXPECT_EQ(auto_newey_west_lags(360), 5);
  EXPECT_EQ(auto_newey_west_lags(5000), 9);
  EXPECT_EQ(auto_newey_west_lags(0), 0);
}

// Fact of the trade (GUIDE 2): the single-index beta is cov(rs - rf, rm - rf) / var(rm - rf)
// and alpha is mean(rs - rf) - beta mean(rm - rf); computed here independently of the QR.
TEST(Regression, SingleIndexSlopeIsCovarianceOverVariance) {
  const Sample s = make_sample(500, 1, 7);
  const Eigen::Index T = s.X.rows();
  Eigen::MatrixXd X(T, 2);
  X.col(0).setOnes();
  X.col(1) = s.X.col(1);
  const Eigen::VectorXd y = s.Y.col(0);
  double mx = 0, my = 0;
  for (Eigen::Index t = 0; t < T; ++t) {
    mx += X(t, 1) / T;
    my += y(t) / T;
  }
  double sxy = 0, sxx = 0;
  for (Eigen::Index t = 0; t < T; ++t) {
    sxy += (X(t, 1) - mx) * (y(t) - my);
    sxx += (X(t, 1) - mx) * (X(t, 1) - mx);
  }
  const OlsResult fit = fit_ols(X, y, {"alpha", "beta"}, true, {ErrorKind::classic});
  EXPECT_NEAR(fit.beta(1), sxy / sxx, 1e-12 * std::fabs(sxy / sxx));
  EXPECT_NEAR(fit.beta(0), my - sxy / sxx * mx, 1e-15);
  // Correlation squared is R^2 for a single regressor.
  double syy = 0;
  for (Eigen::Index t = 0; t < T; ++t) syy += (y(t) - my) * (y(t) - my);
  EXPECT_NEAR(fit.r_squared, sxy * sxy / (sxx * syy), 1e-12);
}

// Fact of the trade: a strategy built as rf + b (rm - rf) has alpha 0 and beta b.
TEST(Regression, LeveredMarketHasZeroAlphaAndItsBeta) {
  const Sample s = make_sample(250, 1, 11);
  const Eigen::Index T = s.X.rows();
  for (double b : {0.5, 1.0, 1.7, -0.8}) {
    Eigen::MatrixXd X(T, 2);
    Eigen::VectorXd y(T);
    for (Eigen::Index t = 0; t < T; ++t) {
      const double rf = 0.00015 + 0.00001 * std::sin(t / 20.0);
      const double rm = rf + s.X(t, 1);
      const double rs = rf + b * (rm - rf);
      X(t, 0) = 1;
      X(t, 1) = rm - rf;
      y(t) = rs - rf;
    }
    for (ErrorKind kind : {ErrorKind::classic, ErrorKind::hc3, ErrorKind::newey_west}) {
      const OlsResult fit = fit_ols(X, y, {"alpha", "beta"}, true, {kind});
      EXPECT_NEAR(fit.beta(0), 0.0, 1e-12) << b;
      EXPECT_NEAR(fit.beta(1), b, 1e-12) << b;
      EXPECT_NEAR(fit.r_squared, 1.0, 1e-12) << b;
    }
  }
}

TEST(Regression, RefusesRankDeficientDesignNamingTheColumns) {
  Sample s = make_sample(60, 1, 3);
  Eigen::MatrixXd X = s.X;
  X.col(3) = 2 * X.col(2);
  std::string message = estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {}); });
  EXPECT_NE(message.find("regressors 'f1' and 'f2' are collinear (rank 3 of 4); drop one of them"),
            std::string::npos)
      << message;

  X = s.X;
  X.col(3) = X.col(1) - 0.5 * X.col(2);
  message = estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {}); });
  EXPECT_NE(message.find("regressors 'market', 'f1' and 'f2' are collinear (rank 3 of 4)"),
            std::string::npos)
      << message;

  X = s.X;
  X.col(2).setConstant(0.01);
  message = estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {}); });
  EXPECT_NE(
      message.find("regressor 'f1' is constant, which duplicates the intercept 'alpha'; drop it"),
      std::string::npos)
      << message;

  X = s.X;
  X.col(3).setZero();
  message = estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {}); });
  EXPECT_NE(message.find("regressor 'f2' is zero in every observation; drop it"), std::string::npos)
      << message;

  // The batch entry point refuses the same way.
  X = s.X;
  X.col(3) = 2 * X.col(2);
  message = estimation_message([&] { fit_ols_many(X, s.Y, four_names, true, {}); });
  EXPECT_NE(message.find("collinear"), std::string::npos) << message;
}

TEST(Regression, RefusesIllConditionedDesign) {
  Sample s = make_sample(200, 1, 5);
  Eigen::MatrixXd X = s.X;
  std::mt19937_64 rng(1);
  std::normal_distribution<double> normal(0.0, 1.0);
  // f2 is f1 up to a relative wobble of 1e-11: independent in double precision, but far
  // beyond what double precision can separate reliably.
  for (Eigen::Index t = 0; t < X.rows(); ++t) X(t, 3) = X(t, 2) * (1 + 1e-11 * normal(rng));
  const std::string message =
      estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {}); });
  EXPECT_NE(message.find("design is too ill-conditioned (condition number"), std::string::npos)
      << message;
  EXPECT_NE(message.find("rescale or drop regressors"), std::string::npos) << message;
}

TEST(Regression, RefusesTooShortSample) {
  Eigen::MatrixXd X(3, 2);
  X << 1, 0.1, 1, 0.2, 1, 0.4;
  Eigen::VectorXd y(3);
  y << 0.1, 0.3, 0.2;
  const std::string message = estimation_message([&] {
    fit_ols(X, y, {"alpha", "beta"}, true, {});
  });
  EXPECT_EQ(message, "sample too short: 3 observations for 2 coefficients; need at least 4");
}

TEST(Regression, RefusesNonFiniteDataAndBadLags) {
  Sample s = make_sample(40, 1, 9);
  Eigen::VectorXd y = s.Y.col(0);
  y(7) = std::numeric_limits<double>::quiet_NaN();
  std::string message = estimation_message([&] { fit_ols(s.X, y, four_names, true, {}); });
  EXPECT_NE(message.find("non-finite value at observation 8"), std::string::npos) << message;

  Eigen::MatrixXd X = s.X;
  X(2, 1) = std::numeric_limits<double>::infinity();
  message = estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {}); });
  EXPECT_NE(message.find("regressor 'market' has a non-finite value at observation 3"),
            std::string::npos)
      << message;

  message = estimation_message([&] {
    fit_ols(s.X, s.Y.col(0), four_names, true, {ErrorKind::newey_west, 40, false});
  });
  EXPECT_NE(message.find("Newey-West lag 40 is out of range"), std::string::npos) << message;
}

// MacKinnon & White (1985): HC2/HC3 divide by 1 - h, undefined when an observation has
// leverage 1 (a dummy that picks out one observation).
TEST(Regression, RefusesHc2AndHc3AtLeverageOne) {
  Sample s = make_sample(40, 1, 13);
  Eigen::MatrixXd X = s.X;
  X.col(3).setZero();
  X(17, 3) = 1;
  for (ErrorKind kind : {ErrorKind::hc2, ErrorKind::hc3}) {
    const std::string message =
        estimation_message([&] { fit_ols(X, s.Y.col(0), four_names, true, {kind}); });
    EXPECT_NE(message.find("observation 18 has leverage 1"), std::string::npos) << message;
  }
  EXPECT_NO_THROW(fit_ols(X, s.Y.col(0), four_names, true, {ErrorKind::hc1}));
}

// GUIDE 2 / MacKinnon & White (1985): HC1 = HC0 * T/(T-k), exactly as computed.
TEST(Regression, Hc1IsHc0TimesSmallSampleFactor) {
  const Sample s = make_sample(120, 1, 17);
  const OlsResult hc0 = fit_ols(s.X, s.Y.col(0), four_names, true, {ErrorKind::hc0});
  const OlsResult hc1 = fit_ols(s.X, s.Y.col(0), four_names, true, {ErrorKind::hc1});
  const double factor = 120.0 / (120.0 - 4.0);
  for (int i = 0; i < 4; ++i) {
    for (int j = 0; j < 4; ++j) EXPECT_EQ(hc1.covariance(i, j), hc0.covariance(i, j) * factor);
  }
  EXPECT_FALSE(hc0.small_sample_applied);
  EXPECT_TRUE(hc1.small_sample_applied);
  EXPECT_EQ(hc0.lags, 0);
}

// Newey & West (1987): with L = 0 the estimator is White's HC0; the optional small-sample
// version is the plain one times T/(T-k).
TEST(Regression, NeweyWestIdentities) {
  const Sample s = make_sample(300, 1, 19);
  const Eigen::VectorXd y = s.Y.col(0);
  const OlsResult hc0 = fit_ols(s.X, y, four_names, true, {ErrorKind::hc0});
  const OlsResult nw0 = fit_ols(s.X, y, four_names, true, {ErrorKind::newey_west, 0, false});
  EXPECT_EQ(nw0.lags, 0);
  for (int i = 0; i < 4; ++i) {
    for (int j = 0; j < 4; ++j) EXPECT_EQ(nw0.covariance(i, j), hc0.covariance(i, j));
  }
  const OlsResult nw = fit_ols(s.X, y, four_names, true, {ErrorKind::newey_west, -1, false});
  const OlsResult nw_small = fit_ols(s.X, y, four_names, true, {ErrorKind::newey_west, -1, true});
  EXPECT_EQ(nw.lags, auto_newey_west_lags(300));
  EXPECT_EQ(nw_small.lags, nw.lags);
  EXPECT_FALSE(nw.small_sample_applied);
  EXPECT_TRUE(nw_small.small_sample_applied);
  const double factor = 300.0 / (300.0 - 4.0);
  for (int i = 0; i < 4; ++i) {
    for (int j = 0; j < 4; ++j) EXPECT_EQ(nw_small.covariance(i, j), nw.covariance(i, j) * factor);
  }
  // The classic F does not depend on the error kind (documented in regression.h).
  EXPECT_EQ(nw.f_stat, hc0.f_stat);
}

// The Newey-West covariance written out as GUIDE.md section 2 states it (Newey & West 1987):
// V = (X'X)^-1 S (X'X)^-1, S = sum e_t^2 x_t x_t' + sum_l w_l sum_{t>l} e_t e_{t-l}
// (x_t x_{t-l}' + x_{t-l} x_t'), w_l = 1 - l/(L+1). The engine sums the scores over windows
// instead; both must agree for any number of regressors (k up to 8 and beyond take different
// code) and any lag, including lags past the 64 windows after which the window sum restarts.
Eigen::MatrixXd newey_west_by_lag_sums(const Eigen::MatrixXd& X, const Eigen::VectorXd& e, int L) {
  const Eigen::Index T = X.rows();
  Eigen::MatrixXd S = Eigen::MatrixXd::Zero(X.cols(), X.cols());
  for (Eigen::Index t = 0; t < T; ++t) S += e(t) * e(t) * X.row(t).transpose() * X.row(t);
  for (int l = 1; l <= L; ++l) {
    const double w = 1.0 - static_cast<double>(l) / (L + 1);
    for (Eigen::Index t = l; t < T; ++t) {
      const Eigen::MatrixXd g = e(t) * e(t - l) * X.row(t).transpose() * X.row(t - l);
      S += w * (g + g.transpose());
    }
  }
  const Eigen::MatrixXd bread =
      (X.transpose() * X).ldlt().solve(Eigen::MatrixXd::Identity(X.cols(), X.cols()));
  return bread * S * bread;
}

TEST(Regression, NeweyWestEqualsTheLagSumsOfItsDefinition) {
  std::mt19937_64 rng(41);
  std::normal_distribution<double> normal(0.0, 1.0);
  for (const int k : {1, 4, 10}) {
    const int T = 260;
    Eigen::MatrixXd X(T, k);
    Eigen::VectorXd y(T);
    double e = 0;
    for (int t = 0; t < T; ++t) {
      X(t, 0) = 1;
      for (int j = 1; j < k; ++j) X(t, j) = 0.01 * normal(rng) + 0.002 * j;
      e = 0.5 * e + 0.01 * normal(rng);  // autocorrelated errors
      y(t) = 0.001 + (k > 1 ? 0.8 * X(t, 1) : 0.0) + e;
    }
    std::vector<std::string> names;
    for (int j = 0; j < k; ++j) names.push_back(fmt::format("x{}", j));
    for (const int L : {0, 1, 7, 70, 150, T - 1}) {
      SCOPED_TRACE("k " + std::to_string(k) + ", lags " + std::to_string(L));
      const OlsResult fit = fit_ols(X, y, names, true, {ErrorKind::newey_west, L, false});
      const Eigen::MatrixXd want = newey_west_by_lag_sums(X, fit.residuals, L);
      for (int i = 0; i < k; ++i)
        for (int j = 0; j < k; ++j)
          EXPECT_NEAR(fit.covariance(i, j), want(i, j), 1e-11 * std::sqrt(want(i, i) * want(j, j)));
    }
  }
}

void expect_identical(const OlsResult& a, const OlsResult& b) {
  ASSERT_EQ(a.coefficients.size(), b.coefficients.size());
  for (std::size_t j = 0; j < a.coefficients.size(); ++j) {
    EXPECT_EQ(a.coefficients[j].term, b.coefficients[j].term);
    EXPECT_EQ(a.coefficients[j].estimate, b.coefficients[j].estimate);
    EXPECT_EQ(a.coefficients[j].std_error, b.coefficients[j].std_error);
    EXPECT_EQ(a.coefficients[j].t_stat, b.coefficients[j].t_stat);
    EXPECT_EQ(a.coefficients[j].p_value, b.coefficients[j].p_value);
    EXPECT_EQ(a.coefficients[j].ci_low, b.coefficients[j].ci_low);
    EXPECT_EQ(a.coefficients[j].ci_high, b.coefficients[j].ci_high);
  }
  EXPECT_TRUE(a.beta == b.beta);
  EXPECT_TRUE(a.residuals == b.residuals);
  EXPECT_TRUE(a.fitted == b.fitted);
  EXPECT_TRUE(a.covariance == b.covariance);
  EXPECT_EQ(a.r_squared, b.r_squared);
  EXPECT_EQ(a.adj_r_squared, b.adj_r_squared);
  EXPECT_EQ(a.residual_std, b.residual_std);
  EXPECT_EQ(a.rss, b.rss);
  EXPECT_EQ(a.tss, b.tss);
  EXPECT_EQ(a.f_stat, b.f_stat);
  EXPECT_EQ(a.f_p_value, b.f_p_value);
  EXPECT_EQ(a.n, b.n);
  EXPECT_EQ(a.k, b.k);
  EXPECT_EQ(a.df, b.df);
  EXPECT_EQ(a.lags, b.lags);
  EXPECT_EQ(a.has_intercept, b.has_intercept);
  EXPECT_EQ(a.small_sample_applied, b.small_sample_applied);
  EXPECT_EQ(a.errors, b.errors);
  EXPECT_EQ(a.condition_number, b.condition_number);
}

TEST(Regression, BatchEqualsSingleFitsBitForBit) {
  const Sample s = make_sample(400, 70, 23);
  for (ErrorKind kind : {ErrorKind::classic, ErrorKind::hc3, ErrorKind::newey_west}) {
    const CovarianceOptions opts{kind, -1, true};
    for (int threads : {1, 2, 3}) {
      const std::vector<OlsResult> batch =
          fit_ols_many(s.X, s.Y, four_names, true, opts, 0.9, threads);
      ASSERT_EQ(batch.size(), 70u);
      for (Eigen::Index j = 0; j < s.Y.cols(); ++j) {
        SCOPED_TRACE("strategy " + std::to_string(j) + ", threads " + std::to_string(threads));
        expect_identical(batch[static_cast<std::size_t>(j)],
                         fit_ols(s.X, s.Y.col(j), four_names, true, opts, 0.9));
      }
    }
  }
}

// Responses written one at a time give the matrix batch's results bit for bit; without
// keep_series they carry no residuals and no fitted values, and nothing else changes.
TEST(Regression, BatchFromAResponseFunctionEqualsTheMatrixBatch) {
  const Sample s = make_sample(300, 40, 29);
  const CovarianceOptions opts{ErrorKind::newey_west, -1, false};
  const auto from_matrix = fit_ols_many(s.X, s.Y, four_names, true, opts, 0.95, 2);
  const auto response = [&](Eigen::Index j, Eigen::VectorXd& y) { y = s.Y.col(j); };
  const auto kept = fit_ols_many(s.X, s.Y.cols(), response, four_names, true, opts, 0.95, 2, true);
  const auto dropped =
      fit_ols_many(s.X, s.Y.cols(), response, four_names, true, opts, 0.95, 2, false);
  ASSERT_EQ(kept.size(), from_matrix.size());
  ASSERT_EQ(dropped.size(), from_matrix.size());
  for (std::size_t j = 0; j < from_matrix.size(); ++j) {
    SCOPED_TRACE("strategy " + std::to_string(j));
    expect_identical(kept[j], from_matrix[j]);
    EXPECT_EQ(dropped[j].residuals.size(), 0);
    EXPECT_EQ(dropped[j].fitted.size(), 0);
    EXPECT_TRUE(dropped[j].covariance == from_matrix[j].covariance);
    EXPECT_EQ(dropped[j].rss, from_matrix[j].rss);
    EXPECT_EQ(dropped[j].coefficients[0].std_error, from_matrix[j].coefficients[0].std_error);
  }
}

TEST(Regression, UncenteredRSquaredWithoutIntercept) {
  const Sample s = make_sample(100, 1, 29);
  const Eigen::MatrixXd X = s.X.rightCols(3);
  const Eigen::VectorXd y = s.Y.col(0);
  const OlsResult fit = fit_ols(X, y, {"market", "f1", "f2"}, false, {ErrorKind::classic});
  EXPECT_FALSE(fit.has_intercept);
  EXPECT_DOUBLE_EQ(fit.tss, y.squaredNorm());
  EXPECT_DOUBLE_EQ(fit.r_squared, 1 - fit.rss / y.squaredNorm());
  EXPECT_DOUBLE_EQ(fit.adj_r_squared, 1 - (1 - fit.r_squared) * 100.0 / 97.0);
  // F tests all three coefficients: (explained / 3) / s^2.
  EXPECT_NEAR(fit.f_stat, ((fit.tss - fit.rss) / 3) / (fit.rss / 97), 1e-9 * fit.f_stat);
}

TEST(Regression, IntervalsUseStudentT) {
  const Sample s = make_sample(30, 1, 31);
  const OlsResult fit = fit_ols(s.X, s.Y.col(0), four_names, true, {ErrorKind::hc1}, 0.9);
  const double crit = student_t_quantile(0.95, 26);
  for (const Coefficient& c : fit.coefficients) {
    EXPECT_DOUBLE_EQ(c.ci_high - c.estimate, crit * c.std_error);
    EXPECT_DOUBLE_EQ(c.p_value, student_t_two_sided_p(c.estimate / c.std_error, 26));
  }
}

TEST(Regression, NamesErrorKinds) {
  for (ErrorKind kind : {ErrorKind::classic, ErrorKind::hc0, ErrorKind::hc1, ErrorKind::hc2,
                         ErrorKind::hc3, ErrorKind::newey_west}) {
    EXPECT_EQ(kErrorKinds.parse(error_kind_name(kind)), kind);
  }
  EXPECT_STREQ(error_kind_name(ErrorKind::newey_west), "newey-west");
  EXPECT_FALSE(kErrorKinds.parse("hac").has_value());
}

}  // namespace
}  // namespace alphatrail::core
