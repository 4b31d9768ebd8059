#pragma once
// Student's t distribution for confidence intervals, written out so the core needs no
// statistics library: the regularized incomplete beta function by its continued fraction,
// the t distribution function from it, and the quantile by safeguarded Newton iteration.

namespace sw::fit {

// I_x(a, b) for a, b > 0 and 0 <= x <= 1; NaN outside that domain.
double regularizedIncompleteBeta(double a, double b, double x);
// P(T <= t) for T ~ Student t with `dof` > 0 degrees of freedom (dof need not be whole).
double studentTDistribution(double t, double dof);
// The t with P(T <= t) = p, for 0 < p < 1 and dof > 0; NaN outside that domain.
double studentTQuantile(double p, double dof);

}  // namespace sw::fit

namespace sw::fit {
// The standard normal quantile: z with Phi(z) = p, 0 < p < 1 (NaN outside).
double normalQuantile(double p);
}  // namespace sw::fit
