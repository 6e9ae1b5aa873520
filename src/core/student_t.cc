#include "core/student_t.h"

#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>
#include <cmath>
#include <limits>
#include <string>

#include "core/error.h"

namespace alphatrail::core {
namespace {

constexpr double kNanValue = std::numeric_limits<double>::quiet_NaN();
constexpr double kInfValue = std::numeric_limits<double>::infinity();

// Boost.Math computes in long double by default; double arithmetic is accurate to a few ulps
// here and several times faster, which counts when thousands of runs each need p-values.
using DoublePolicy = boost::math::policies::policy<boost::math::policies::promote_double<false>>;
using StudentT = boost::math::students_t_distribution<double, DoublePolicy>;
using Normal = boost::math::normal_distribution<double, DoublePolicy>;

void check_df(double df) {
  if (!(df > 0)) {
    throw Error(Failure::internal, "Student t: degrees of freedom must be positive, got " +
                                       std::to_string(df) + "; fit with more observations");
  }
}

}  // namespace

double student_t_quantile(double p, double df) {
  if (std::isnan(p) || std::isnan(df)) return kNanValue;
  check_df(df);
  if (p < 0 || p > 1) {
    throw Error(Failure::internal, "Student t: probability " + std::to_string(p) +
                                       " is outside [0, 1]; pass a probability");
  }
  if (p == 0) return -kInfValue;
  if (p == 1) return kInfValue;
  if (std::isinf(df)) return boost::math::quantile(Normal(), p);
  return boost::math::quantile(StudentT(df), p);
}

double student_t_two_sided_p(double t, double df) {
  if (std::isnan(t) || std::isnan(df)) return kNanValue;
  check_df(df);
  const double a = std::fabs(t);
  if (std::isinf(a)) return 0.0;
  // The upper tail by complement keeps tiny p-values accurate (no 1 - cdf cancellation).
  double tail = 0;
  if (std::isinf(df)) {
    tail = boost::math::cdf(boost::math::complement(Normal(), a));
  } else {
    tail = boost::math::cdf(boost::math::complement(StudentT(df), a));
  }
  return std::fmin(1.0, 2 * tail);
}

}  // namespace alphatrail::core
