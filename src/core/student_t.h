// Student's t distribution: quantiles and two-sided p-values for regression inference.
// Pure computation on Boost.Math. An infinite number of degrees of freedom means the standard
// normal distribution. Arguments outside the domain (p outside [0, 1], df <= 0) throw
// alphatrail::Error(Failure::internal); NaN arguments give NaN.
#pragma once

namespace alphatrail::core {

// Returns the p-quantile of Student's t with df degrees of freedom (df may be infinite).
// Example: student_t_quantile(0.975, 10) == 2.228... ; p = 0 and p = 1 give -inf and +inf.
double student_t_quantile(double p, double df);

// Returns the two-sided p-value P(|T| >= |t|) of Student's t with df degrees of freedom.
// Example: student_t_two_sided_p(2.228, 10) is about 0.05; |t| = inf gives 0.
double student_t_two_sided_p(double t, double df);

}  // namespace alphatrail::core
