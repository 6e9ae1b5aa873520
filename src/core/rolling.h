// Rolling estimates: the run's regression refitted on every window of N consecutive
// observations of its aligned sample, to show whether alpha and beta held up through time.
// Pure computation: the evaluation supplies the design, the ledger stores the windows.
//
// Windows count observations, not calendar time: a window spans N kept periods, so it may
// cross a gap in the sample (the run's warnings list the gaps). The window ending at
// observation t holds observations t - N + 1 .. t; a sample of T observations has T - N + 1
// windows (none when T < N). Each window is fitted with fit_ols under the run's error kind,
// small-sample setting and confidence; Newey-West lags follow the run's rule, the automatic
// floor(4 (N/100)^(2/9)) applied to N, or the run's fixed lag.
//
// Failure: rolling_fits throws Error(Failure::invalid_argument) when the window cannot hold the
// model (see rolling_window_problem). A window that cannot be estimated (collinear regressors in
// that stretch, leverage 1 under HC2/HC3) does not fail the run: its figures are NaN and
// `problem` says why.
#pragma once

#include <Eigen/Dense>
#include <cstdint>
#include <string>
#include <vector>

#include "core/annualize.h"
#include "core/dates.h"
#include "core/model.h"
#include "core/regression.h"

namespace alphatrail::core {

// Alpha and beta of one window, per period (alpha a decimal return) unless annualized.
struct RollingWindow {
  std::string first;  // label of the window's first period, e.g. "2002-01"
  std::string end;    // label of its last period, e.g. "2004-12"
  int observations = 0;
  int lags = 0;  // Newey-West lag used; 0 for other kinds
  double alpha = 0;
  double alpha_std_error = 0;
  double alpha_ci_low = 0;
  double alpha_ci_high = 0;
  double alpha_annualized = 0;  // the interval bounds annualized the same way
  double alpha_annualized_ci_low = 0;
  double alpha_annualized_ci_high = 0;
  double beta = 0;
  double beta_std_error = 0;
  double beta_ci_low = 0;
  double beta_ci_high = 0;
  std::string problem;  // why the window could not be estimated; empty when it was
};

// One figure of a window: its name as stored, in run_windows and in `show --format csv`, and
// its member. The one list of the figures, in their stored order.
struct WindowFigure {
  const char* name;
  double RollingWindow::*member;
};
inline constexpr WindowFigure kWindowFigures[] = {
    {"alpha", &RollingWindow::alpha},
    {"alpha_std_error", &RollingWindow::alpha_std_error},
    {"alpha_ci_low", &RollingWindow::alpha_ci_low},
    {"alpha_ci_high", &RollingWindow::alpha_ci_high},
    {"alpha_annualized", &RollingWindow::alpha_annualized},
    {"alpha_annualized_ci_low", &RollingWindow::alpha_annualized_ci_low},
    {"alpha_annualized_ci_high", &RollingWindow::alpha_annualized_ci_high},
    {"beta", &RollingWindow::beta},
    {"beta_std_error", &RollingWindow::beta_std_error},
    {"beta_ci_low", &RollingWindow::beta_ci_low},
    {"beta_ci_high", &RollingWindow::beta_ci_high},
};

struct RollingOptions {
  int window = 0;                // N observations
  CovarianceOptions covariance;  // the run's: lags -1 is the automatic rule per window
  double confidence = 0.95;
  Annualize annualize = Annualize::compound;
  int periods_per_year = 12;
};

// Returns the default window: three years of periods (36 months, 156 weeks, 756 business
// days, 12 quarters), the same as the short-sample threshold.
// Example: default_rolling_window(Frequency::monthly) == 36.
int default_rolling_window(Frequency f);

// Returns why a window of N observations cannot hold a model of k coefficients under the
// covariance options (N < k + 2, or a fixed Newey-West lag of N or more); empty when it can.
// Example: rolling_window_problem(3, 2, {}) names the minimum of 4.
std::string rolling_window_problem(int window, int coefficients,
                                   const CovarianceOptions& covariance);

// Fits y on the columns of X, one per term of the model (design_matrix in model.h), over every
// window of options.window consecutive rows; keys are the rows' period keys at frequency f.
// Alpha and beta are the model's intercept and market terms. Returns one window per end,
// oldest first. Also throws Error(Failure::internal) when the model has no intercept or market
// term or not one term per column.
// Example: rolling_fits(X, y, ModelSpec::single_index(), keys, Frequency::monthly, {36}).size()
//          == keys.size() - 35.
std::vector<RollingWindow> rolling_fits(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                        const ModelSpec& model,
                                        const std::vector<std::int64_t>& keys, Frequency f,
                                        const RollingOptions& options);

// The same by position, as before model specs: column 0 is the intercept alpha, column 1 the
// benchmark's beta, names one term name per column. Kept for callers that build their own
// design; prefer the ModelSpec overload.
// Example: rolling_fits(X, y, {"alpha", "beta"}, keys, Frequency::monthly, {36}).size()
//          == keys.size() - 35.
std::vector<RollingWindow> rolling_fits(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                                        const std::vector<std::string>& names,
                                        const std::vector<std::int64_t>& keys, Frequency f,
                                        const RollingOptions& options);

}  // namespace alphatrail::core
