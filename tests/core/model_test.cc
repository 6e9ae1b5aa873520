// Unit tests of the model specification (core/model.h): the terms and roles of the
// single-index and factor models, the design matrix built from the spec bit for bit equal to the
// one built by hand as before specs ([1, r_m - r_f, factors...]), coefficients found by role,
// and the Evaluator's results carrying the spec they were fitted with.
#include "core/model.h"

#include <fmt/format.h>
#include <gtest/gtest.h>

#include <bit>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "core/align.h"
#include "core/error.h"
#include "core/evaluation.h"
#include "core/reading.h"
#include "core/regression.h"
#include "core/rolling.h"
#include "support/test_support.h"

namespace alphatrail::core {
namespace {

using testing::month_ends;

bool same_bits(double a, double b) {
  return std::bit_cast<std::uint64_t>(a) == std::bit_cast<std::uint64_t>(b);
}

// Uniform in [0, 1) from the standardized mt19937 sequence (portable).
struct Uniform {
  std::mt19937 rng;
  explicit Uniform(unsigned seed) : rng(seed) {}
  double operator()() { return static_cast<double>(rng()) / 4294967296.0; }
};

std::vector<TermRole> roles_of(const ModelSpec& spec) {
  std::vector<TermRole> out;
  for (const auto& term : spec.terms()) out.push_back(term.role);
  return out;
}

// --- terms and roles ----------------------------------------------------------------------

TEST(ModelSpecTerms, SingleIndexIsAlphaThenBeta) {
  const ModelSpec spec = ModelSpec::single_index();
  ASSERT_EQ(spec.size(), 2u);
  EXPECT_EQ(spec.term_names(), (std::vector<std::string>{"alpha", "beta"}));
  EXPECT_EQ(roles_of(spec), (std::vector<TermRole>{TermRole::intercept, TermRole::market}));
  EXPECT_EQ(spec.terms()[0].name, "alpha");
  EXPECT_EQ(spec.terms()[1].name, "beta");
  EXPECT_TRUE(spec.factor_names().empty());
  EXPECT_EQ(spec.index_of(TermRole::intercept), 0u);
  EXPECT_EQ(spec.index_of(TermRole::market), 1u);
  EXPECT_FALSE(spec.has(TermRole::factor));
  EXPECT_FALSE(spec.find(TermRole::factor).has_value());
  for (const auto& term : spec.terms()) EXPECT_FALSE(is_factor_loading(term)) << term.name;
  EXPECT_EQ(spec, ModelSpec::with_factors({}));
}

TEST(ModelSpecTerms, TwoFactorsFollowAlphaAndBetaInTheOrderGiven) {
  const ModelSpec spec = ModelSpec::with_factors({"SMB", "HML"});
  ASSERT_EQ(spec.size(), 4u);
  EXPECT_EQ(spec.term_names(), (std::vector<std::string>{"alpha", "beta", "SMB", "HML"}));
  EXPECT_EQ(roles_of(spec), (std::vector<TermRole>{TermRole::intercept, TermRole::market,
                                                   TermRole::factor, TermRole::factor}));
  EXPECT_EQ(spec.factor_names(), (std::vector<std::string>{"SMB", "HML"}));
  EXPECT_EQ(spec.index_of(TermRole::intercept), 0u);
  EXPECT_EQ(spec.index_of(TermRole::market), 1u);
  EXPECT_EQ(spec.index_of(TermRole::factor), 2u);  // the first factor
  EXPECT_FALSE(is_factor_loading(spec.terms()[0]));
  EXPECT_FALSE(is_factor_loading(spec.terms()[1]));
  EXPECT_TRUE(is_factor_loading(spec.terms()[2]));
  EXPECT_TRUE(is_factor_loading(spec.terms()[3]));
  // The order is the spec's: the same factors the other way round are another model.
  EXPECT_NE(spec, ModelSpec::with_factors({"HML", "SMB"}));
}

TEST(ModelSpecTerms, NamesAndRoleNames) {
  EXPECT_EQ(term_name(TermRole::intercept), "alpha");
  EXPECT_EQ(term_name(TermRole::market), "beta");
  EXPECT_EQ(term_name(TermRole::factor, "UMD"), "UMD");
  EXPECT_STREQ(role_name(TermRole::intercept), "intercept");
  EXPECT_STREQ(role_name(TermRole::market), "market");
  EXPECT_STREQ(role_name(TermRole::factor), "factor");
}

TEST(ModelSpecTerms, MissingRoleIsAnInternalError) {
  const ModelSpec none;
  EXPECT_TRUE(none.empty());
  try {
    (void)none.index_of(TermRole::market);
    FAIL() << "index_of found a market term in an empty spec";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::internal);
    EXPECT_NE(std::string(e.what()).find("no market term"), std::string::npos) << e.what();
  }
}

// --- the design ---------------------------------------------------------------------------

// T months from 2010-01 of strategy, benchmark, rate and two factors; the benchmark lacks one
// month so that the alignment drops a row inside the sample.
Aligned sample_with_factors(int T) {
  Uniform u(5);
  const auto series = [&](double level, double spread) {
    PeriodSeries s;
    s.frequency = Frequency::monthly;
    for (int t = 0; t < T; ++t) {
      s.keys.push_back(2010 * 12 + t);
      s.values.push_back(level + spread * (u() - 0.5));
    }
    return s;
  };
  PeriodSeries strategy = series(0.007, 0.1);
  PeriodSeries benchmark = series(0.006, 0.08);
  PeriodSeries rate = series(0.002, 0.001);
  PeriodSeries smb = series(0.0, 0.04);
  PeriodSeries hml = series(0.0, 0.05);
  benchmark.keys.erase(benchmark.keys.begin() + 7);
  benchmark.values.erase(benchmark.values.begin() + 7);
  return align({{"strategy", strategy},
                {"benchmark", benchmark},
                {"rate", rate},
                {"SMB", smb},
                {"HML", hml}});
}

// The design as evaluation.cc built it by hand before specs, kept here as the reference.
Eigen::MatrixXd hand_built_design(const Aligned& a, const std::vector<std::string>& factor_names) {
  const auto T = static_cast<Eigen::Index>(a.keys->size());
  const auto k = static_cast<Eigen::Index>(2 + factor_names.size());
  Eigen::MatrixXd X(T, k);
  const auto& m = a.column("benchmark");
  const auto& rf = a.column("rate");
  for (Eigen::Index t = 0; t < T; ++t) {
    X(t, 0) = 1.0;
    X(t, 1) = m[t] - rf[t];
  }
  for (std::size_t j = 0; j < factor_names.size(); ++j) {
    const auto& f = a.column(factor_names[j]);
    for (Eigen::Index t = 0; t < T; ++t) X(t, static_cast<Eigen::Index>(2 + j)) = f[t];
  }
  return X;
}

void expect_same_matrix(const Eigen::MatrixXd& a, const Eigen::MatrixXd& b) {
  ASSERT_EQ(a.rows(), b.rows());
  ASSERT_EQ(a.cols(), b.cols());
  for (Eigen::Index j = 0; j < a.cols(); ++j)
    for (Eigen::Index t = 0; t < a.rows(); ++t)
      ASSERT_TRUE(same_bits(a(t, j), b(t, j)))
          << "(" << t << ", " << j << "): " << a(t, j) << " vs " << b(t, j);
}

TEST(ModelSpecDesign, SingleIndexDesignEqualsTheHandBuiltOneBitForBit) {
  const Aligned a = sample_with_factors(40);
  ASSERT_EQ(a.keys->size(), 39u);  // the month the benchmark lacks is dropped
  const Eigen::MatrixXd X = design_matrix(ModelSpec::single_index(), a);
  expect_same_matrix(X, hand_built_design(a, {}));
  // Independently of the reference: ones, then benchmark - rate.
  const auto& m = a.column("benchmark");
  const auto& rf = a.column("rate");
  for (Eigen::Index t = 0; t < X.rows(); ++t) {
    EXPECT_EQ(X(t, 0), 1.0);
    EXPECT_TRUE(same_bits(X(t, 1), m[t] - rf[t])) << t;
  }
}

TEST(ModelSpecDesign, FactorDesignEqualsTheHandBuiltOneBitForBit) {
  const Aligned a = sample_with_factors(40);
  const Eigen::MatrixXd X = design_matrix(ModelSpec::with_factors({"SMB", "HML"}), a);
  expect_same_matrix(X, hand_built_design(a, {"SMB", "HML"}));
  const auto& smb = a.column("SMB");
  const auto& hml = a.column("HML");
  for (Eigen::Index t = 0; t < X.rows(); ++t) {
    EXPECT_TRUE(same_bits(X(t, 2), smb[t])) << t;
    EXPECT_TRUE(same_bits(X(t, 3), hml[t])) << t;
  }
  // The spec's order is the column order.
  const Eigen::MatrixXd swapped = design_matrix(ModelSpec::with_factors({"HML", "SMB"}), a);
  EXPECT_TRUE(same_bits(swapped(3, 2), hml[3]));
  EXPECT_TRUE(same_bits(swapped(3, 3), smb[3]));
}

TEST(ModelSpecDesign, FactorTheSampleLacksIsAnInternalError) {
  const Aligned a = sample_with_factors(12);
  try {
    (void)design_matrix(ModelSpec::with_factors({"UMD"}), a);
    FAIL() << "a design with a factor the sample does not hold was built";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::internal);
  }
}

// --- coefficients by role -----------------------------------------------------------------

TEST(ModelSpecCoefficient, FindsAlphaBetaAndFactorsByRole) {
  const Aligned a = sample_with_factors(60);
  const ModelSpec spec = ModelSpec::with_factors({"SMB", "HML"});
  const Eigen::MatrixXd X = design_matrix(spec, a);
  // y = 0.001 + 0.9 x + 0.3 SMB - 0.2 HML exactly: the fit recovers the coefficients.
  Eigen::VectorXd y(X.rows());
  for (Eigen::Index t = 0; t < X.rows(); ++t)
    y(t) = 0.001 + 0.9 * X(t, 1) + 0.3 * X(t, 2) - 0.2 * X(t, 3);
  const OlsResult fit = fit_ols(X, y, spec.term_names(), true, {ErrorKind::classic});
  const Coefficient& alpha = coefficient(fit, spec, TermRole::intercept);
  const Coefficient& beta = coefficient(fit, spec, TermRole::market);
  const Coefficient& first_factor = coefficient(fit, spec, TermRole::factor);
  EXPECT_EQ(alpha.term, "alpha");
  EXPECT_EQ(beta.term, "beta");
  EXPECT_EQ(first_factor.term, "SMB");
  EXPECT_NEAR(alpha.estimate, 0.001, 1e-12);
  EXPECT_NEAR(beta.estimate, 0.9, 1e-12);
  EXPECT_NEAR(first_factor.estimate, 0.3, 1e-12);
  EXPECT_EQ(&alpha, &fit.coefficients[0]);
  EXPECT_EQ(&beta, &fit.coefficients[1]);
  EXPECT_EQ(&first_factor, &fit.coefficients[2]);
}

TEST(ModelSpecCoefficient, FitThatDoesNotMatchTheSpecIsAnInternalError) {
  const Aligned a = sample_with_factors(30);
  const ModelSpec spec = ModelSpec::single_index();
  const Eigen::MatrixXd X = design_matrix(spec, a);
  const Eigen::VectorXd y = 0.5 * X.col(1) + Eigen::VectorXd::Constant(X.rows(), 0.002);
  const OlsResult fit = fit_ols(X, y, spec.term_names(), true, {ErrorKind::classic});
  try {
    (void)coefficient(fit, ModelSpec::with_factors({"SMB"}), TermRole::market);
    FAIL() << "a two-coefficient fit was read with a three-term spec";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::internal);
  }
}

// --- the Evaluator ------------------------------------------------------------------------

ReturnInput monthly(std::string name, const std::vector<Day>& dates, std::vector<double> values) {
  return ReturnInput{std::move(name), {dates, std::move(values)}, Frequency::monthly};
}

struct FactorWorld {
  std::vector<Day> dates;
  std::vector<double> market, smb, hml, strategy;
  SharedInputs shared;
};

FactorWorld factor_world(int T) {
  FactorWorld w;
  w.dates = month_ends(2012, 1, T);
  Uniform u(9);
  for (int t = 0; t < T; ++t) {
    w.market.push_back(0.006 + 0.08 * (u() - 0.5));
    w.smb.push_back(0.04 * (u() - 0.5));
    w.hml.push_back(0.05 * (u() - 0.5));
    w.strategy.push_back(0.004 + 0.9 * w.market.back() + 0.25 * w.smb.back() - 0.15 * w.hml.back() +
                         0.01 * (u() - 0.5));
  }
  w.shared.benchmark = monthly("market", w.dates, w.market);
  w.shared.rate.name = "bills";
  w.shared.rate.tenor = "1M";
  w.shared.rate.yields = {month_ends(2011, 12, T + 1), std::vector<double>(T + 1, 2.0)};
  w.shared.rate.unit = RateUnit::percent;
  w.shared.factors = {monthly("SMB", w.dates, w.smb), monthly("HML", w.dates, w.hml)};
  return w;
}

TEST(ModelSpecEvaluation, ResultCarriesTheSpecItWasFittedWith) {
  const FactorWorld w = factor_world(48);
  EvaluationSettings settings;
  settings.rolling_window = 24;
  const Evaluator ev(w.shared, Frequency::monthly, settings);
  EXPECT_EQ(ev.model(), ModelSpec::with_factors({"SMB", "HML"}));
  const EvaluationResult r = ev.evaluate(monthly("s", w.dates, w.strategy));
  EXPECT_EQ(r.model, ev.model());
  ASSERT_EQ(r.fit.coefficients.size(), r.model.size());
  for (std::size_t j = 0; j < r.model.size(); ++j)
    EXPECT_EQ(r.fit.coefficients[j].term, r.model.terms()[j].name);
  EXPECT_EQ(coefficient(r.fit, r.model, TermRole::intercept).term, "alpha");
  EXPECT_EQ(coefficient(r.fit, r.model, TermRole::market).term, "beta");

  // The fit is fit_ols on the design built by hand from the result's own series, bit for bit:
  // no period is dropped, so the factor columns are the inputs as given.
  ASSERT_EQ(r.keys.size(), 48u);
  const auto T = static_cast<Eigen::Index>(r.keys.size());
  Eigen::MatrixXd X(T, 4);
  Eigen::VectorXd y(T);
  for (Eigen::Index t = 0; t < T; ++t) {
    const auto i = static_cast<std::size_t>(t);
    X(t, 0) = 1.0;
    X(t, 1) = r.benchmark_excess[i];
    X(t, 2) = w.smb[i];
    X(t, 3) = w.hml[i];
    y(t) = r.strategy_excess[i];
  }
  const std::vector<std::string> names{"alpha", "beta", "SMB", "HML"};
  const OlsResult fit = fit_ols(X, y, names, true, settings.covariance, settings.confidence);
  for (std::size_t j = 0; j < fit.coefficients.size(); ++j) {
    EXPECT_TRUE(same_bits(fit.coefficients[j].estimate, r.fit.coefficients[j].estimate)) << j;
    EXPECT_TRUE(same_bits(fit.coefficients[j].std_error, r.fit.coefficients[j].std_error)) << j;
  }
  // Rolling windows by the spec equal those by position.
  const auto by_position =
      rolling_fits(X, y, names, r.keys, Frequency::monthly,
                   {24, settings.covariance, settings.confidence, settings.annualize, 12});
  ASSERT_EQ(r.rolling.size(), by_position.size());
  ASSERT_EQ(r.rolling.size(), 25u);
  for (std::size_t i = 0; i < r.rolling.size(); ++i) {
    EXPECT_TRUE(same_bits(r.rolling[i].alpha, by_position[i].alpha)) << i;
    EXPECT_TRUE(same_bits(r.rolling[i].beta_std_error, by_position[i].beta_std_error)) << i;
  }
}

// The reading lists the factor loadings by role and says "the market and the factors".
TEST(ModelSpecEvaluation, ReadingNamesTheLoadingsOfTheFactorTerms) {
  const FactorWorld w = factor_world(48);
  const EvaluationSettings settings;
  const EvaluationResult r =
      Evaluator(w.shared, Frequency::monthly, settings).evaluate(monthly("s", w.dates, w.strategy));
  const auto reading = compose_reading(r, settings, {});
  std::string loadings;
  for (const auto& sentence : reading)
    if (sentence.rfind("Factor loadings: ", 0) == 0) loadings = sentence;
  const Coefficient& smb = r.fit.coefficients[2];
  const Coefficient& hml = r.fit.coefficients[3];
  EXPECT_EQ(loadings, fmt::format("Factor loadings: SMB {:.2f} (t {:.2f}), HML {:.2f} (t {:.2f}).",
                                  smb.estimate, smb.t_stat, hml.estimate, hml.t_stat));
  EXPECT_NE(reading[1].find("not explained by the market and the factors"), std::string::npos)
      << reading[1];

  // Without factors there is no such sentence and alpha is "not explained by the market".
  FactorWorld single = factor_world(48);
  single.shared.factors.clear();
  const EvaluationResult s = Evaluator(single.shared, Frequency::monthly, settings)
                                 .evaluate(monthly("s", single.dates, single.strategy));
  EXPECT_EQ(s.model, ModelSpec::single_index());
  for (const auto& sentence : compose_reading(s, settings, {}))
    EXPECT_EQ(sentence.find("Factor loadings"), std::string::npos) << sentence;
  EXPECT_NE(compose_reading(s, settings, {})[1].find("not explained by the market, is"),
            std::string::npos);
}

// A result without its spec (not made by the Evaluator) cannot be read by role.
TEST(ModelSpecEvaluation, ReadingOfAResultWithoutItsSpecIsAnInternalError) {
  const FactorWorld w = factor_world(48);
  const EvaluationSettings settings;
  EvaluationResult r =
      Evaluator(w.shared, Frequency::monthly, settings).evaluate(monthly("s", w.dates, w.strategy));
  r.model = ModelSpec();
  try {
    (void)compose_reading(r, settings, {});
    FAIL() << "a result without its model was read";
  } catch (const Error& e) {
    EXPECT_EQ(e.kind(), Failure::internal);
  }
}

}  // namespace
}  // namespace alphatrail::core
