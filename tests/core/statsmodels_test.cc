// Checks fit_ols against statsmodels (Debian python3-statsmodels, run with /usr/bin/python3):
// OLS estimates, R^2, the F test, and the classic, HC0-HC3 and HAC (Newey-West) standard
// errors, t statistics, Student-t p-values and 95% intervals.
// Source: statsmodels OLS(...).fit(cov_type=..., use_t=True), via
// tests/reference/statsmodels_reference.py (see tests/reference/README.md).
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "core/regression.h"
#include "support/test_support.h"

namespace alphatrail::core {
namespace {

using nlohmann::json;

constexpr double tolerance = 1e-10;  // relative; asked for 1e-9 or better

struct Sample {
  Eigen::VectorXd strategy;
  Eigen::MatrixXd factors;  // market, size, value
};

Sample read_sample(const std::filesystem::path& file) {
  const auto rows = testing::read_number_rows(file, "strategy,market,size,value");
  Sample s;
  const auto T = static_cast<Eigen::Index>(rows.size());
  s.strategy.resize(T);
  s.factors.resize(T, 3);
  for (Eigen::Index t = 0; t < T; ++t) {
    const auto& row = rows[static_cast<std::size_t>(t)];
    s.strategy(t) = row[0];
    for (int j = 0; j < 3; ++j) s.factors(t, j) = row[static_cast<std::size_t>(j) + 1];
  }
  return s;
}

void expect_relative(double got, double want, double scale, const std::string& what) {
  EXPECT_LE(std::fabs(got - want), tolerance * scale)
      << what << ": got " << got << ", statsmodels " << want << " (relative "
      << std::fabs(got - want) / scale << ")";
}

void expect_relative(double got, double want, const std::string& what) {
  expect_relative(got, want, std::fabs(want), what);
}

// Maps a fit name of the reference script to our covariance options.
CovarianceOptions options_for(const std::string& name) {
  if (name == "classic") return {ErrorKind::classic, -1, false};
  if (name == "hc0") return {ErrorKind::hc0, -1, false};
  if (name == "hc1") return {ErrorKind::hc1, -1, false};
  if (name == "hc2") return {ErrorKind::hc2, -1, false};
  if (name == "hc3") return {ErrorKind::hc3, -1, false};
  const std::string prefix = "newey-west-";
  EXPECT_EQ(name.rfind(prefix, 0), 0u) << "unknown fit " << name;
  const std::string rest = name.substr(prefix.size());
  const bool corrected = rest.find("-corrected") != std::string::npos;
  return {ErrorKind::newey_west, std::stoi(rest), corrected};
}

void compare_fit(const std::string& label, const OlsResult& fit, const json& ref) {
  const auto k = static_cast<std::size_t>(fit.k);
  ASSERT_EQ(ref["params"].size(), k) << label;
  EXPECT_EQ(fit.df, ref["df_resid"].get<double>()) << label;
  for (std::size_t j = 0; j < k; ++j) {
    const Coefficient& c = fit.coefficients[j];
    const std::string what = label + " " + c.term;
    expect_relative(c.estimate, ref["params"][j].get<double>(), what + " estimate");
    expect_relative(c.std_error, ref["bse"][j].get<double>(), what + " standard error");
    expect_relative(c.t_stat, ref["tvalues"][j].get<double>(), what + " t");
    expect_relative(c.p_value, ref["pvalues"][j].get<double>(), what + " p-value");
    expect_relative(c.ci_low, ref["conf_int"][j][0].get<double>(), what + " 95% interval low");
    expect_relative(c.ci_high, ref["conf_int"][j][1].get<double>(), what + " 95% interval high");
    for (std::size_t i = 0; i < k; ++i) {
      const auto ii = static_cast<Eigen::Index>(i);
      const auto jj = static_cast<Eigen::Index>(j);
      const double scale = std::sqrt(fit.covariance(ii, ii) * fit.covariance(jj, jj));
      expect_relative(fit.covariance(ii, jj), ref["cov"][i][j].get<double>(), scale,
                      what + " covariance with " + fit.coefficients[i].term);
    }
  }
  expect_relative(fit.r_squared, ref["rsquared"].get<double>(), label + " R-squared");
  expect_relative(fit.adj_r_squared, ref["rsquared_adj"].get<double>(),
                  label + " adjusted R-squared");
  expect_relative(fit.rss, ref["ssr"].get<double>(), label + " residual sum of squares");
}

// statsmodels reference: every covariance kind, with and without intercept.
TEST(Statsmodels, MatchesOlsAndEveryCovarianceKind) {
  testing::ScratchDir dir;
  const auto script = testing::source_path("tests/reference/statsmodels_reference.py");
  const auto run = testing::run_program({"/usr/bin/python3", script.string(), dir.path().string()});
  if (run.exit_code != 0) {
    FAIL() << "the statsmodels reference did not run (exit " << run.exit_code
           << "): /usr/bin/python3 needs statsmodels; run scripts/install-deps --test\n"
           << run.err;
  }
  const Sample sample = read_sample(dir / "data.csv");
  const json doc = json::parse(testing::read_file(dir / "results.json"));
  const auto T = sample.strategy.size();
  ASSERT_EQ(T, doc["T"].get<Eigen::Index>());
  EXPECT_EQ(auto_newey_west_lags(static_cast<int>(T)), doc["auto_lags"].get<int>());
  RecordProperty("statsmodels_version", doc["statsmodels_version"].get<std::string>());

  for (const bool with_intercept : {true, false}) {
    const json& part = doc[with_intercept ? "with_intercept" : "without_intercept"];
    const auto names = part["names"].get<std::vector<std::string>>();
    Eigen::MatrixXd X(T, static_cast<Eigen::Index>(names.size()));
    if (with_intercept) {
      X.col(0).setOnes();
      X.rightCols(3) = sample.factors;
    } else {
      X = sample.factors;
    }
    const json& classic = part["fits"]["classic"];
    int compared = 0;
    for (const auto& [name, ref] : part["fits"].items()) {
      const std::string label =
          std::string(with_intercept ? "with" : "without") + " intercept, " + name;
      const CovarianceOptions opts = options_for(name);
      const OlsResult fit = fit_ols(X, sample.strategy, names, with_intercept, opts);
      EXPECT_EQ(fit.lags, opts.kind == ErrorKind::newey_west ? opts.lags : 0) << label;
      compare_fit(label, fit, ref);
      // Our F test is the classic one for every error kind (see regression.h).
      expect_relative(fit.f_stat, classic["fvalue"].get<double>(), label + " F");
      expect_relative(fit.f_p_value, classic["f_pvalue"].get<double>(), label + " F p-value");
      ++compared;
    }
    EXPECT_EQ(compared, 9);
  }
}

}  // namespace
}  // namespace alphatrail::core
