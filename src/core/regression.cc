#include "core/regression.h"

#include <algorithm>
#include <array>
#include <boost/math/distributions/fisher_f.hpp>
#include <cmath>
#include <cstdio>
#include <exception>
#include <limits>
#include <type_traits>

#include "core/error.h"
#include "core/parallel.h"
#include "core/student_t.h"

namespace alphatrail::core {
namespace {

constexpr double kNanValue = std::numeric_limits<double>::quiet_NaN();

// A pivot of the scaled QR at or below this fraction of the largest one counts as zero: the
// regressors are collinear (exactly, up to rounding of the data).
constexpr double kCollinearTolerance = 1e-13;
// Above this 2-norm condition number of the column-scaled design, refuse: the rounding of the
// inputs to double alone (relative 1e-16 each) may move the solution by cond * 1e-16, so fewer
// than 6 of its digits would be determined by the data. (NIST Filip, 5e9, keeps 7 digits.)
constexpr double kConditionLimit = 1e10;
// Refinement of the least-squares solution: at most this many passes after the first solve;
// stop once a correction is this small or stops shrinking; refuse when the last correction
// is larger than kTrustedCorrection of the solution (fewer than about 9 digits settled).
// A design whose column-scaled condition number is at most kRefineAbove is solved by the QR
// alone: Householder QR is backward stable, so its solution is off by about
// (cond + cond^2 |r| / (|X| |beta|)) 1e-16 relative, 12 digits or more at cond 100 (Golub &
// Van Loan, Matrix Computations, 4th ed., section 5.3.7). Above it the solution is refined.
constexpr double kRefineAbove = 100;
constexpr int kMaxRefinements = 6;
constexpr double kSettledCorrection = 1e-12;
constexpr double kTrustedCorrection = 1e-9;

std::string quoted(const std::string& name) {
  return "'" + name + "'";
}

// Joins names as "'a'", "'a' and 'b'", "'a', 'b' and 'c'".
std::string join_names(const std::vector<std::string>& names) {
  std::string text;
  for (std::size_t i = 0; i < names.size(); ++i) {
    if (i > 0) text += (i + 1 == names.size()) ? " and " : ", ";
    text += quoted(names[i]);
  }
  return text;
}

std::string format_general(double value) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.3g", value);
  return buffer;
}

[[noreturn]] void estimation_error(const std::string& message) {
  throw Error(Failure::cannot_estimate, message);
}

// Everything about the design that does not depend on y: computed once, shared by every
// column of a batch, so fit_ols and fit_ols_many run the very same arithmetic.
struct Design {
  const Eigen::MatrixXd* X = nullptr;  // the caller's design, alive during the call
  std::vector<std::string> names;
  bool has_intercept = false;
  int n = 0;
  int k = 0;
  Eigen::VectorXd scale;                           // column norms of X
  Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr;  // of X with unit-norm columns
  Eigen::MatrixXd upper;                           // R, k x k
  Eigen::MatrixXd q;                               // thin Q, T x k
  Eigen::MatrixXd a;                               // D^-1 P R^-1: X'X^-1 = A A'
  Eigen::MatrixXd xtx_inv;                         // (X'X)^-1 = A A'
  Eigen::VectorXd leverage;                        // h_t = ||Q_t||^2
  double condition_number = 0;
};

void check_finite_design(const Eigen::MatrixXd& X, const std::vector<std::string>& names) {
  for (Eigen::Index j = 0; j < X.cols(); ++j) {
    for (Eigen::Index t = 0; t < X.rows(); ++t) {
      if (!std::isfinite(X(t, j))) {
        estimation_error("regressor " + quoted(names[j]) +
                         " has a non-finite value at observation " + std::to_string(t + 1) +
                         "; remove or fill that observation");
      }
    }
  }
}

bool is_constant(const Eigen::MatrixXd& X, Eigen::Index j) {
  const double first = X(0, j);
  for (Eigen::Index t = 1; t < X.rows(); ++t) {
    if (X(t, j) != first) return false;
  }
  return true;
}

// Checks zero and duplicate-intercept columns, which deserve a plainer message than the
// general collinearity one.
void check_special_columns(const Eigen::MatrixXd& X, const std::vector<std::string>& names,
                           bool has_intercept) {
  Eigen::Index intercept = -1;
  for (Eigen::Index j = 0; j < X.cols(); ++j) {
    if (X.col(j).cwiseAbs().maxCoeff() == 0) {
      estimation_error("regressor " + quoted(names[j]) + " is zero in every observation; drop it");
    }
    if (!is_constant(X, j)) continue;
    if (intercept < 0) {
      intercept = j;
    } else if (has_intercept) {
      estimation_error("regressor " + quoted(names[j]) +
                       " is constant, which duplicates the intercept " + quoted(names[intercept]) +
                       "; drop it");
    }
  }
  if (has_intercept && intercept < 0) {
    throw Error(Failure::internal,
                "fit_ols: has_intercept is set but no column of the design is constant; "
                "add a column of ones or clear has_intercept");
  }
}

// Names the regressors that the rank-deficient QR shows to be collinear: each column beyond
// the rank together with the columns it is a combination of.
[[noreturn]] void collinear_error(const Design& d, Eigen::Index rank) {
  const Eigen::Index k = d.k;
  const auto& perm = d.qr.colsPermutation().indices();
  Eigen::MatrixXd r = d.qr.matrixR().topLeftCorner(k, k).triangularView<Eigen::Upper>();
  std::vector<bool> involved(static_cast<std::size_t>(k), false);
  for (Eigen::Index j = rank; j < k; ++j) {
    involved[static_cast<std::size_t>(perm(j))] = true;
    if (rank == 0) continue;
    // Unit-norm columns: column j ~ (kept columns) z with R11 z = R12(:, j).
    Eigen::VectorXd z =
        r.topLeftCorner(rank, rank).triangularView<Eigen::Upper>().solve(r.col(j).head(rank));
    const double biggest = std::max(1.0, z.cwiseAbs().maxCoeff());
    for (Eigen::Index i = 0; i < rank; ++i) {
      if (std::fabs(z(i)) > 1e-8 * biggest) involved[static_cast<std::size_t>(perm(i))] = true;
    }
  }
  std::vector<std::string> names;
  for (Eigen::Index j = 0; j < k; ++j) {
    if (involved[static_cast<std::size_t>(j)])
      names.push_back(d.names[static_cast<std::size_t>(j)]);
  }
  const Eigen::Index drop = k - rank;
  estimation_error("regressors " + join_names(names) + " are collinear (rank " +
                   std::to_string(rank) + " of " + std::to_string(k) + "); drop " +
                   (drop == 1 ? std::string("one") : std::to_string(drop)) + " of them");
}

Design factorize(const Eigen::MatrixXd& X, const std::vector<std::string>& names,
                 bool has_intercept) {
  Design d;
  d.X = &X;
  d.names = names;
  d.has_intercept = has_intercept;
  d.n = static_cast<int>(X.rows());
  d.k = static_cast<int>(X.cols());
  if (static_cast<Eigen::Index>(names.size()) != X.cols()) {
    throw Error(Failure::internal, "fit_ols: " + std::to_string(names.size()) + " names for " +
                                       std::to_string(X.cols()) +
                                       " columns; pass one name per column");
  }
  if (d.k < 1) throw Error(Failure::internal, "fit_ols: the design has no column; add a regressor");
  if (d.n < d.k + 2) {
    estimation_error("sample too short: " + std::to_string(d.n) + " observations for " +
                     std::to_string(d.k) + " coefficients; need at least " +
                     std::to_string(d.k + 2));
  }
  check_finite_design(X, names);
  check_special_columns(X, names, has_intercept);

  d.scale = X.colwise().norm().transpose();
  Eigen::MatrixXd scaled = X * d.scale.cwiseInverse().asDiagonal();
  d.qr.setThreshold(kCollinearTolerance);
  d.qr.compute(scaled);
  const Eigen::Index rank = d.qr.rank();
  if (rank < d.k) collinear_error(d, rank);

  d.upper = d.qr.matrixR().topLeftCorner(d.k, d.k).triangularView<Eigen::Upper>();
  Eigen::JacobiSVD<Eigen::MatrixXd> svd(d.upper);
  const auto& sv = svd.singularValues();
  d.condition_number = sv(0) / sv(sv.size() - 1);
  if (!(d.condition_number <= kConditionLimit)) {
    estimation_error(
        "design is too ill-conditioned (condition number " + format_general(d.condition_number) +
        " after scaling the columns) for double precision; rescale or drop regressors");
  }

  d.q = d.qr.householderQ() * Eigen::MatrixXd::Identity(d.n, d.k);  // thin Q
  d.leverage = d.q.rowwise().squaredNorm();
  Eigen::MatrixXd r_inv =
      d.upper.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(d.k, d.k));
  d.a = d.qr.colsPermutation() * r_inv;             // rows permuted: P R^-1
  d.a = d.scale.cwiseInverse().asDiagonal() * d.a;  // D^-1 P R^-1
  d.xtx_inv = d.a * d.a.transpose();
  return d;
}

// Scratch vectors and matrices of one fit, reused from column to column so that a batch
// does not allocate (and fault in fresh pages for) a T x k temporary per column.
struct Workspace {
  Eigen::VectorXd f;           // solve_refined: y - r - X beta
  Eigen::VectorXd residuals;   // y - X beta of the column being fitted
  std::vector<double> scores;  // robust_meat: T x k, row-major
};

// Solves min ||y - X beta|| with the QR and refines the solution on the augmented system
// [I X; X' 0][r; beta] = [y; 0] (Bjorck 1967), computing its residuals in long double from
// the unscaled data. The first pass is the plain QR solution; the refinement restores the
// digits that the plain solve loses on ill-conditioned or large-residual problems (NIST
// Wampler5) and shows whether the answer can be trusted: when the corrections do not settle,
// the design is refused as too ill-conditioned. A well-conditioned design (condition number
// up to kRefineAbove) needs no refinement; a moderately conditioned one takes one pass.
void solve_refined(const Design& d, const Eigen::Ref<const Eigen::VectorXd>& y,
                   Eigen::VectorXd& beta, Eigen::VectorXd& r, Workspace& ws) {
  const Eigen::MatrixXd& X = *d.X;
  const auto& perm = d.qr.colsPermutation();
  beta = Eigen::VectorXd::Zero(d.k);
  r = Eigen::VectorXd::Zero(d.n);
  Eigen::VectorXd& f = ws.f;
  f = y;                                            // pass 0: f = y - r - X beta = y
  Eigen::VectorXd gs = Eigen::VectorXd::Zero(d.k);  // pass 0: g = -X' r = 0
  std::vector<long double> g(static_cast<std::size_t>(d.k));
  double correction = std::numeric_limits<double>::infinity();
  for (int pass = 0; pass <= kMaxRefinements; ++pass) {
    if (pass > 0) {
      // f = y - r - X beta and g = -X' r, accumulated in extended precision.
      std::fill(g.begin(), g.end(), 0.0L);
      for (int t = 0; t < d.n; ++t) {
        long double acc = static_cast<long double>(y(t)) - r(t);
        for (int j = 0; j < d.k; ++j) {
          acc -= static_cast<long double>(X(t, j)) * beta(j);
          g[static_cast<std::size_t>(j)] -= static_cast<long double>(X(t, j)) * r(t);
        }
        f(t) = static_cast<double>(acc);
      }
      for (int j = 0; j < d.k; ++j)
        gs(j) = static_cast<double>(g[static_cast<std::size_t>(j)]) / d.scale(j);
    }
    // With X = Q R P' D (thin Q): h = R^-T P' D^-1 g, c = Q'f, w = R^-1 (c - h),
    // dr = Q h + (I - Q Q') f = f - Q (c - h).
    const Eigen::VectorXd h =
        d.upper.triangularView<Eigen::Upper>().transpose().solve(perm.transpose() * gs);
    const Eigen::VectorXd c = d.q.transpose() * f - h;
    const Eigen::VectorXd w = d.upper.triangularView<Eigen::Upper>().solve(c);
    beta += (perm * w).cwiseQuotient(d.scale);
    r += f - d.q * c;
    // Size of the correction relative to the solution, in the scaled coordinates.
    const double size = (perm.transpose() * beta.cwiseProduct(d.scale)).norm();
    const double previous = correction;
    correction = size > 0 ? w.norm() / size : 0.0;
    if (pass == 0) {
      if (d.condition_number <= kRefineAbove) return;
      continue;
    }
    if (correction <= kSettledCorrection || correction > 0.5 * previous) break;
  }
  if (!(correction <= kTrustedCorrection)) {
    estimation_error(
        "design is too ill-conditioned (condition number " + format_general(d.condition_number) +
        " after scaling the columns) for double precision: the solution does not settle "
        "(last correction " +
        format_general(correction) + " of its size); rescale or drop regressors");
  }
}

// Returns the robust "meat" Q' S Q in the orthogonal basis from the scores u_t = q_t e_t c_t
// (c_t = 1, or the HC2/HC3 leverage factor): sum u_t u_t', plus for Newey-West with L lags the
// Bartlett-weighted autocovariances sum_l w_l (G_l + G_l'), G_l = sum_{t>l} u_t u_{t-l}',
// w_l = 1 - l / (L + 1).
//
// It is computed as (1 / (L + 1)) sum_m b_m b_m', where b_m sums the scores of the window of
// L + 1 periods m .. m + L, for every window that holds a period of the sample (m = -L ..
// T - 1, cut at the ends): periods t and s share L + 1 - |t - s| windows, so each pair enters
// with its Bartlett weight (the Bartlett kernel is the self-convolution of a uniform window;
// common practice). That is 2 k + k (k + 1) / 2 operations a period instead of (L + 2) k + k^2,
// and a sum of outer products, positive semi-definite as the estimator must be. The window
// sum is carried from one window to the next (the period entering added, the one leaving
// subtracted) and summed afresh every 64 windows, so rounding cannot build up.
// The window loop of robust_meat: adds the upper triangle of sum_m b_m b_m' to sum (k x k,
// row-major). u holds the n x k scores row-major after lags + 1 rows of zeros and before lags
// more, so every window is lags + 1 rows and its change from one window to the next is the
// row entering minus the row leaving, with no case for the ends. K is k known at compile
// time, which keeps the window and the sums in registers, or 0 for any k.
template <int K>
void add_window_products(const double* u, int n, int k, int lags, double* sum) {
  using Window = std::conditional_t<(K > 0), std::array<double, K>, std::vector<double>>;
  using Outer = std::conditional_t<(K > 0), std::array<double, static_cast<std::size_t>(K) * K>,
                                   std::vector<double>>;
  Window window{};
  Outer outer{};
  if constexpr (K > 0) {
    k = K;
  } else {
    window.assign(static_cast<std::size_t>(k), 0.0);
    outer.assign(static_cast<std::size_t>(k) * k, 0.0);
  }
  const auto row = [&](int t) { return u + static_cast<std::size_t>(t + lags + 1) * k; };
  for (int m = -lags; m < n; ++m) {
    if ((m + lags) % 64 == 0) {  // afresh now and then, so rounding cannot build up
      for (int j = 0; j < k; ++j) window[j] = 0.0;
      for (int t = m; t <= m + lags; ++t)
        for (int j = 0; j < k; ++j) window[j] += row(t)[j];
    } else {
      const double* entering = row(m + lags);
      const double* leaving = row(m - 1);
      for (int j = 0; j < k; ++j) window[j] += entering[j] - leaving[j];
    }
    // The whole square rather than a triangle: a row is one multiple of the window, which
    // vectorizes without shuffling.
    for (int i = 0; i < k; ++i)
      for (int j = 0; j < k; ++j) outer[i * k + j] += window[i] * window[j];
  }
  for (int i = 0; i < k * k; ++i) sum[i] += outer[i];
}

Eigen::MatrixXd robust_meat(const Design& d, const Eigen::VectorXd& e, ErrorKind kind, int lags,
                            Workspace& ws) {
  const int n = d.n;
  const int k = d.k;
  // Row-major, so the k scores of a period are together, between rows of zeros (see
  // add_window_products).
  std::vector<double>& u = ws.scores;
  const auto pad = static_cast<std::size_t>(lags + 1) * k;  // zeros before; lags * k after
  u.resize(static_cast<std::size_t>(n + 2 * lags + 1) * k);
  std::fill(u.begin(), u.begin() + static_cast<std::ptrdiff_t>(pad), 0.0);
  std::fill(u.end() - static_cast<std::ptrdiff_t>(pad - k), u.end(), 0.0);
  const bool leverage_weighted = kind == ErrorKind::hc2 || kind == ErrorKind::hc3;
  for (int t = 0; t < n; ++t) {
    double factor = e(t);
    if (leverage_weighted) {
      const double room = 1 - d.leverage(t);
      if (!(room > 1e-12)) {
        estimation_error("observation " + std::to_string(t + 1) +
                         " has leverage 1, so HC2 and HC3 errors are undefined; use hc1 or "
                         "newey-west errors, or drop that observation");
      }
      factor = kind == ErrorKind::hc2 ? e(t) / std::sqrt(room) : e(t) / room;
    }
    double* scores = u.data() + static_cast<std::size_t>(t + lags + 1) * k;
    for (int j = 0; j < k; ++j) scores[j] = d.q(t, j) * factor;
  }
  std::vector<double> sum(static_cast<std::size_t>(k) * k, 0.0);
  switch (k) {
    case 1: add_window_products<1>(u.data(), n, k, lags, sum.data()); break;
    case 2: add_window_products<2>(u.data(), n, k, lags, sum.data()); break;
    case 3: add_window_products<3>(u.data(), n, k, lags, sum.data()); break;
    case 4: add_window_products<4>(u.data(), n, k, lags, sum.data()); break;
    case 5: add_window_products<5>(u.data(), n, k, lags, sum.data()); break;
    case 6: add_window_products<6>(u.data(), n, k, lags, sum.data()); break;
    case 7: add_window_products<7>(u.data(), n, k, lags, sum.data()); break;
    case 8: add_window_products<8>(u.data(), n, k, lags, sum.data()); break;
    default: add_window_products<0>(u.data(), n, k, lags, sum.data()); break;
  }
  Eigen::MatrixXd meat(k, k);
  for (int i = 0; i < k; ++i)
    for (int j = i; j < k; ++j)
      meat(i, j) = meat(j, i) = sum[static_cast<std::size_t>(i) * k + j] / (lags + 1);
  return meat;
}

int resolve_lags(const CovarianceOptions& opts, int n) {
  if (opts.kind != ErrorKind::newey_west) return 0;
  if (opts.lags == -1) return auto_newey_west_lags(n);
  if (opts.lags < 0 || opts.lags >= n) {
    estimation_error("Newey-West lag " + std::to_string(opts.lags) + " is out of range for " +
                     std::to_string(n) + " observations; use a lag from 0 to " +
                     std::to_string(n - 1) + " or -1 for the automatic rule");
  }
  return opts.lags;
}

// Fits one response on a factorized design; the single code path of fit_ols and fit_ols_many.
// `crit` is the Student t quantile at 0.5 + confidence / 2 with T - k degrees of freedom, the
// same for every column of a design. Without keep_series the result has no residuals and no
// fitted values (a batch that drops them does not allocate them).
OlsResult fit_column(const Design& d, const Eigen::Ref<const Eigen::VectorXd>& y,
                     const CovarianceOptions& opts, double confidence, double crit,
                     const std::string& what, bool keep_series, Workspace& ws) {
  const Eigen::MatrixXd& X = *d.X;
  if (y.size() != d.n) {
    throw Error(Failure::internal, "fit_ols: " + std::to_string(y.size()) + " responses for " +
                                       std::to_string(d.n) +
                                       " design rows; pass one response per row");
  }
  for (int t = 0; t < d.n; ++t) {
    if (!std::isfinite(y(t))) {
      estimation_error(what + " has a non-finite value at observation " + std::to_string(t + 1) +
                       "; remove or fill that observation");
    }
  }
  OlsResult res;
  res.n = d.n;
  res.k = d.k;
  res.df = d.n - d.k;
  res.has_intercept = d.has_intercept;
  res.errors = opts.kind;
  res.confidence = confidence;
  res.condition_number = d.condition_number;
  res.lags = resolve_lags(opts, d.n);

  Eigen::VectorXd& residuals = ws.residuals;
  solve_refined(d, y, res.beta, residuals, ws);
  if (keep_series) {
    res.residuals = residuals;
    res.fitted = X * res.beta;
  }

  res.rss = residuals.squaredNorm();
  if (d.has_intercept) {
    res.tss = (y.array() - y.mean()).matrix().squaredNorm();
  } else {
    res.tss = y.squaredNorm();
  }
  const double dfd = res.df;
  res.r_squared = res.tss > 0 ? 1 - res.rss / res.tss : kNanValue;
  const double centered = d.has_intercept ? 1.0 : 0.0;
  res.adj_r_squared = 1 - (1 - res.r_squared) * (d.n - centered) / dfd;
  const double s2 = res.rss / dfd;
  res.residual_std = std::sqrt(s2);

  const int q_tested = d.k - (d.has_intercept ? 1 : 0);
  if (q_tested > 0) {
    res.f_stat = ((res.tss - res.rss) / q_tested) / s2;
    if (std::isnan(res.f_stat)) {
      res.f_p_value = kNanValue;
    } else if (std::isinf(res.f_stat)) {
      res.f_p_value = 0;
    } else {
      using DoublePolicy =
          boost::math::policies::policy<boost::math::policies::promote_double<false>>;
      boost::math::fisher_f_distribution<double, DoublePolicy> f(q_tested, dfd);
      res.f_p_value = boost::math::cdf(boost::math::complement(f, std::max(0.0, res.f_stat)));
    }
  } else {
    res.f_stat = kNanValue;
    res.f_p_value = kNanValue;
  }

  const double small_sample_factor = static_cast<double>(d.n) / static_cast<double>(d.n - d.k);
  switch (opts.kind) {
    case ErrorKind::classic: res.covariance = s2 * d.xtx_inv; break;
    case ErrorKind::hc0:
    case ErrorKind::hc1:
    case ErrorKind::hc2:
    case ErrorKind::hc3:
    case ErrorKind::newey_west: {
      const ErrorKind weights = opts.kind == ErrorKind::hc1 ? ErrorKind::hc0 : opts.kind;
      const Eigen::MatrixXd meat = robust_meat(d, residuals, weights, res.lags, ws);
      Eigen::MatrixXd v = d.a * meat * d.a.transpose();
      res.covariance = 0.5 * (v + v.transpose());
      if (opts.kind == ErrorKind::hc1 ||
          (opts.kind == ErrorKind::newey_west && opts.small_sample)) {
        res.covariance *= small_sample_factor;
        res.small_sample_applied = true;
      }
      break;
    }
  }

  res.coefficients.resize(static_cast<std::size_t>(d.k));
  for (int j = 0; j < d.k; ++j) {
    Coefficient& c = res.coefficients[static_cast<std::size_t>(j)];
    c.term = d.names[static_cast<std::size_t>(j)];
    c.estimate = res.beta(j);
    c.std_error = std::sqrt(res.covariance(j, j));
    c.t_stat = c.estimate / c.std_error;
    c.p_value = student_t_two_sided_p(c.t_stat, dfd);
    c.ci_low = c.estimate - crit * c.std_error;
    c.ci_high = c.estimate + crit * c.std_error;
  }
  return res;
}

double critical_value(const Design& d, double confidence) {
  return student_t_quantile(0.5 + confidence / 2, d.n - d.k);
}

void check_confidence(double confidence) {
  if (!(confidence > 0 && confidence < 1)) {
    throw Error(Failure::internal, "fit_ols: confidence " + std::to_string(confidence) +
                                       " is outside (0, 1); pass e.g. 0.95");
  }
}

}  // namespace

int auto_newey_west_lags(int T) {
  if (T <= 0) return 0;
  return static_cast<int>(std::floor(4.0 * std::pow(T / 100.0, 2.0 / 9.0)));
}

OlsResult fit_ols(const Eigen::MatrixXd& X, const Eigen::VectorXd& y,
                  const std::vector<std::string>& names, bool has_intercept,
                  const CovarianceOptions& opts, double confidence) {
  check_confidence(confidence);
  if (y.size() != X.rows()) {
    throw Error(Failure::internal, "fit_ols: " + std::to_string(y.size()) + " responses for " +
                                       std::to_string(X.rows()) +
                                       " design rows; pass one response per row");
  }
  const Design d = factorize(X, names, has_intercept);
  Workspace ws;
  return fit_column(d, y, opts, confidence, critical_value(d, confidence), "the response", true,
                    ws);
}

std::vector<OlsResult> fit_ols_many(const Eigen::MatrixXd& X, Eigen::Index m,
                                    const ResponseColumn& response,
                                    const std::vector<std::string>& names, bool has_intercept,
                                    const CovarianceOptions& opts, double confidence, int threads,
                                    bool keep_series) {
  check_confidence(confidence);
  const Design d = factorize(X, names, has_intercept);
  const double crit = critical_value(d, confidence);
  std::vector<OlsResult> results(static_cast<std::size_t>(m));
  std::vector<std::exception_ptr> failures(static_cast<std::size_t>(m));

  auto run_range = [&](Eigen::Index begin, Eigen::Index end) {
    Workspace ws;
    Eigen::VectorXd y(d.n);  // one response at a time: no T x m copy of the responses
    for (Eigen::Index j = begin; j < end; ++j) {
      try {
        response(j, y);
        results[static_cast<std::size_t>(j)] =
            fit_column(d, y, opts, confidence, crit, "response column " + std::to_string(j + 1),
                       keep_series, ws);
      } catch (...) {
        failures[static_cast<std::size_t>(j)] = std::current_exception();
      }
    }
  };

  parallel_ranges(static_cast<std::size_t>(m),
                  worker_count(static_cast<std::size_t>(m), 16, threads),
                  [&](std::size_t begin, std::size_t end) {
                    run_range(static_cast<Eigen::Index>(begin), static_cast<Eigen::Index>(end));
                  });
  for (const auto& failure : failures) {
    if (failure) std::rethrow_exception(failure);
  }
  return results;
}

std::vector<OlsResult> fit_ols_many(const Eigen::MatrixXd& X, const Eigen::MatrixXd& Y,
                                    const std::vector<std::string>& names, bool has_intercept,
                                    const CovarianceOptions& opts, double confidence, int threads) {
  if (Y.rows() != X.rows()) {
    throw Error(Failure::internal, "fit_ols_many: " + std::to_string(Y.rows()) +
                                       " response rows for " + std::to_string(X.rows()) +
                                       " design rows; pass one row per period");
  }
  return fit_ols_many(
      X, Y.cols(), [&](Eigen::Index j, Eigen::VectorXd& y) { y = Y.col(j); }, names, has_intercept,
      opts, confidence, threads);
}

}  // namespace alphatrail::core
