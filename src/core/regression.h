// Ordinary least squares with classic, White (HC0-HC3) and Newey-West standard errors: the
// pure estimation engine behind every alpha test (no SQL, no CLI, no I/O).
//
// The solution comes from a column-pivoting Householder QR of the design with its columns
// scaled to unit length, never from inverting X'X, refined on the augmented system with
// long double residuals (which also checks that the answer has settled); every covariance is
// formed in the orthogonal basis of that QR as A M A' with A = (column scale)^-1 P R^-1.
// NIST StRD Norris, Longley, Pontius, Wampler1-5 and NoInt1-2 agree to 11 or more digits,
// Filip to 7 (tests/core/nist_test.cc).
//
// On failure nothing is returned. fit_ols and fit_ols_many throw
// alphatrail::Error(Failure::cannot_estimate) with a message that names the problem and the fix
// when the sample is too short (T < k + 2), a regressor is zero or collinear with others, the
// design is too ill-conditioned to be solved in double precision, the data hold a non-finite
// value, the Newey-West lag is out of range, or HC2/HC3 meet an observation of leverage 1.
// Misuse of the API (sizes that do not match, a confidence outside (0, 1)) throws
// alphatrail::Error(Failure::internal).
#pragma once

#include <Eigen/Dense>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "core/vocabulary.h"

namespace alphatrail::core {

// How the coefficient covariance is estimated.
//   classic     s^2 (X'X)^-1, s^2 = e'e / (T - k)
//   hc0 .. hc3  White / MacKinnon & White (1985): weights e^2, e^2 T/(T-k), e^2/(1-h),
//               e^2/(1-h)^2 with h the leverage
//   newey_west  Newey & West (1987), Bartlett weights 1 - l/(L+1), optionally times T/(T-k)
enum class ErrorKind { classic, hc0, hc1, hc2, hc3, newey_west };

// The names used in options, output and the ledger.
inline constexpr auto kErrorKinds = vocabulary<Word<ErrorKind>>({
    {ErrorKind::classic, "classic"},
    {ErrorKind::hc0, "hc0"},
    {ErrorKind::hc1, "hc1"},
    {ErrorKind::hc2, "hc2"},
    {ErrorKind::hc3, "hc3"},
    {ErrorKind::newey_west, "newey-west"},
});

// Returns the name of an error kind: "classic", "hc0" .. "hc3", "newey-west".
inline const char* error_kind_name(ErrorKind kind) {
  return kErrorKinds.name(kind);
}

struct CovarianceOptions {
  ErrorKind kind = ErrorKind::newey_west;
  int lags = -1;              // Newey-West lag L; -1 picks auto_newey_west_lags(T)
  bool small_sample = false;  // Newey-West only: multiply the covariance by T/(T-k)
};

// Returns the default Newey-West lag floor(4 (T/100)^(2/9)) (Newey & West 1994 pilot value).
// Example: auto_newey_west_lags(100) == 4.
int auto_newey_west_lags(int T);

struct Coefficient {
  std::string term;
  double estimate = 0;
  double std_error = 0;
  double t_stat = 0;   // estimate / std_error; +-inf or NaN when std_error is 0 (exact fit)
  double p_value = 0;  // two-sided, Student's t with T - k degrees of freedom
  double ci_low = 0;   // estimate -+ t quantile * std_error at the requested confidence
  double ci_high = 0;
};

struct OlsResult {
  std::vector<Coefficient> coefficients;  // one per column of X, in column order
  Eigen::VectorXd beta;                   // k estimates
  Eigen::VectorXd residuals;              // T residuals y - X beta
  Eigen::VectorXd fitted;                 // T fitted values X beta
  Eigen::MatrixXd covariance;             // k x k covariance of beta for the chosen kind
  double r_squared = 0;                   // centered with an intercept, uncentered (y'y) without;
                                          // NaN when the total sum of squares is 0
  double adj_r_squared = 0;  // 1 - (1 - R^2) (T - c) / (T - k), c = 1 with intercept else 0
  double residual_std = 0;   // s = sqrt(rss / (T - k))
  double rss = 0;            // residual sum of squares e'e
  double tss = 0;            // total sum of squares, centered or uncentered like R^2
  // Classic F test of all slopes = 0 (with intercept) or all coefficients = 0 (without),
  // reported for every error kind (it does not use the robust covariance); NaN when an
  // intercept is the only regressor.
  double f_stat = 0;
  double f_p_value = 0;
  int n = 0;     // observations T
  int k = 0;     // coefficients
  int df = 0;    // residual degrees of freedom T - k
  int lags = 0;  // Newey-West lag used; 0 for other kinds
  bool has_intercept = false;
  bool small_sample_applied = false;  // a T/(T-k) factor was applied (hc1, or NW on request)
  ErrorKind errors = ErrorKind::classic;
  double confidence = 0.95;
  double condition_number = 0;  // 2-norm condition number of the column-scaled design
};

// Fits y on the columns of X by least squares and estimates the covariance as asked.
// X is the T x k design (the caller includes the intercept column when wanted and says so
// with has_intercept); names holds one term name per column.
// Example: fit_ols(X, y, {"alpha", "beta"}, true, {ErrorKind::newey_west}).coefficients[0].
OlsResult fit_ols(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                  const std::vector<std::string>& names, bool has_intercept,
                  const CovarianceOptions& opts, double confidence = 0.95);

// Fits every column of Y (T x m, one strategy per column) on the same design X, factorizing
// X once; each result is bit-identical to fit_ols on that column. Columns are shared out to
// `threads` worker threads (0: one per core; small batches run on the calling thread). If
// any column fails, the error of the first failing column is thrown and nothing is returned.
// Example: fit_ols_many(X, Y, names, true, {})[j] equals fit_ols(X, Y.col(j), names, true, {}).
std::vector<OlsResult> fit_ols_many(const Eigen::MatrixXd& X, const Eigen::MatrixXd& Y,
                                    const std::vector<std::string>& names, bool has_intercept,
                                    const CovarianceOptions& opts, double confidence = 0.95,
                                    int threads = 0);

// Writes response column j (T values, y already sized T) into y; called on worker threads.
using ResponseColumn = std::function<void(Eigen::Index j, Eigen::VectorXd& y)>;

// Fits m responses that `response` writes one at a time, as fit_ols_many on a matrix does
// (the same results, bit for bit), without holding all of them in a T x m matrix. Without
// keep_series the results have no residuals and no fitted values: a batch of thousands that
// would drop them does not allocate them.
// Example: fit_ols_many(X, 3, [&](Eigen::Index j, Eigen::VectorXd& y) { y = Y.col(j); }, ...).
std::vector<OlsResult> fit_ols_many(const Eigen::MatrixXd& X, Eigen::Index m,
                                    const ResponseColumn& response,
                                    const std::vector<std::string>& names, bool has_intercept,
                                    const CovarianceOptions& opts, double confidence = 0.95,
                                    int threads = 0, bool keep_series = true);

}  // namespace alphatrail::core
