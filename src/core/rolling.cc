#include "core/rolling.h"

#include <fmt/format.h>

#include <cmath>
#include <limits>

#include "core/error.h"

namespace alphatrail::core {

namespace {

constexpr double kNanValue = std::numeric_limits<double>::quiet_NaN();

// The lag a window uses, known before fitting so that a failed window still reports it.
int window_lags(const CovarianceOptions& c, int window) {
  if (c.kind != ErrorKind::newey_west) return 0;
  return c.lags == -1 ? auto_newey_west_lags(window) : c.lags;
}

void set_unestimated(RollingWindow& w) {
  for (const auto& figure : kWindowFigures) w.*figure.member = kNanValue;
}

}  // namespace

int default_rolling_window(Frequency f) {
  return 3 * periods_per_year(f);
}

std::string rolling_window_problem(int window, int coefficients,
                                   const CovarianceOptions& covariance) {
  if (window < coefficients + 2)
    return fmt::format(
        "a window of {} period{} is too short for {} coefficients; use at least {} periods", window,
        window == 1 ? "" : "s", coefficients, coefficients + 2);
  if (covariance.kind == ErrorKind::newey_west && covariance.lags >= window)
    return fmt::format(
        "a window of {} periods cannot take {} Newey-West lags; use fewer lags than periods "
        "or a longer window",
        window, covariance.lags);
  return "";
}

namespace {

// Both overloads: alpha and beta are the coefficients at columns `alpha_at` and `beta_at`.
std::vector<RollingWindow> fit_windows(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                       const std::vector<std::string>& names, bool has_intercept,
                                       std::size_t alpha_at, std::size_t beta_at,
                                       const std::vector<std::int64_t>& keys, Frequency f,
                                       const RollingOptions& options) {
  if (X.rows() != y.size() || static_cast<std::size_t>(X.rows()) != keys.size() || X.cols() < 2)
    throw Error(Failure::internal,
                "rolling_fits: the design, response and keys must have one row per period and "
                "the design an intercept and a beta column");
  const int N = options.window;
  const std::string problem =
      rolling_window_problem(N, static_cast<int>(X.cols()), options.covariance);
  if (!problem.empty()) throw Error(Failure::invalid_argument, problem);

  const auto T = static_cast<int>(X.rows());
  std::vector<RollingWindow> windows;
  if (T < N) return windows;
  const int window_count = T - N + 1;
  windows.reserve(static_cast<std::size_t>(window_count));
  const int P = options.periods_per_year;
  for (int start = 0; start + N <= T; ++start) {
    RollingWindow w;
    w.first = period_label(f, keys[static_cast<std::size_t>(start)]);
    w.end = period_label(f, keys[static_cast<std::size_t>(start + N - 1)]);
    w.observations = N;
    w.lags = window_lags(options.covariance, N);
    // Copies, so that each window is exactly the fit_ols of its own slice.
    const Eigen::MatrixXd Xw = X.middleRows(start, N);
    const Eigen::VectorXd yw = y.segment(start, N);
    try {
      const OlsResult fit =
          fit_ols(Xw, yw, names, has_intercept, options.covariance, options.confidence);
      const Coefficient& a = fit.coefficients[alpha_at];
      const Coefficient& b = fit.coefficients[beta_at];
      w.lags = fit.lags;
      w.alpha = a.estimate;
      w.alpha_std_error = a.std_error;
      w.alpha_ci_low = a.ci_low;
      w.alpha_ci_high = a.ci_high;
      w.alpha_annualized = annualize(a.estimate, options.annualize, P);
      w.alpha_annualized_ci_low = annualize(a.ci_low, options.annualize, P);
      w.alpha_annualized_ci_high = annualize(a.ci_high, options.annualize, P);
      w.beta = b.estimate;
      w.beta_std_error = b.std_error;
      w.beta_ci_low = b.ci_low;
      w.beta_ci_high = b.ci_high;
    } catch (const Error& e) {
      // One stretch of the sample that cannot be estimated must not lose the whole run.
      if (e.kind() != Failure::cannot_estimate) throw;
      set_unestimated(w);
      w.problem = e.what();
    }
    windows.push_back(std::move(w));
  }
  return windows;
}

}  // namespace

std::vector<RollingWindow> rolling_fits(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                        const ModelSpec& model,
                                        const std::vector<std::int64_t>& keys, Frequency f,
                                        const RollingOptions& options) {
  if (static_cast<std::size_t>(X.cols()) != model.size())
    throw Error(Failure::internal,
                fmt::format("rolling_fits: the design has {} columns but the model {} terms",
                            X.cols(), model.size()));
  return fit_windows(X, y, model.term_names(), model.has(TermRole::intercept),
                     model.index_of(TermRole::intercept), model.index_of(TermRole::market), keys, f,
                     options);
}

std::vector<RollingWindow> rolling_fits(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                        const std::vector<std::string>& names,
                                        const std::vector<std::int64_t>& keys, Frequency f,
                                        const RollingOptions& options) {
  return fit_windows(X, y, names, true, 0, 1, keys, f, options);
}

}  // namespace alphatrail::core
