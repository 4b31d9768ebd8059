#pragma once
// The observed convergence rate of a run's last iterations, from its records alone.
//
// Two published estimates, each used where it is reliable:
//  - the order q, by the approximated computational order of convergence (ACOC) of
//    Cordero & Torregrosa (2007), "Variants of Newton's method using fifth-order quadrature
//    formulas", Appl. Math. Comput. 190, 686-698:
//        q ~ ln(|s_k| / |s_{k-1}|) / ln(|s_{k-1}| / |s_{k-2}|),   s_k = x_{k+1} - x_k,
//    which needs no knowledge of the solution (the COC of Weerakoon & Fernando (2000) uses
//    x* instead). Over the last run of 3 to 5 shrinking steps we fit the slope of ln|s_{k+1}|
//    against ln|s_k| by least squares: with three steps that is the formula above, and more
//    steps steady it against the pre-asymptotic wobble of a single ratio.
//  - the linear factor r, the ratio of successive gradient norms |g_{k+1}| / |g_k| (N&W
//    (2006) sec. 2.2 and Thm 3.3 for steepest descent), averaged as exp(slope) of a least-
//    squares line through log|g_k| against k over the last iterations. The line copes with
//    zig-zag (ratios that alternate) and with gaps in iteration numbers (thinned records).
//
// Classification (thresholds in rules.h): order >= 1.8 quadratic, order >= 1.2 superlinear
// (either only when the last gradient-norm ratio is <= 0.1), or superlinear when the last (up
// to) six gradient-norm ratios fall by a factor 10 or more along a least-squares line; else a
// factor below 0.999 is linear with that factor, and anything slower sublinear.

#include "core/solve/record.h"

namespace sw::diagnose {

struct RateEstimate {
    enum class Kind { Unknown, Sublinear, Linear, Superlinear, Quadratic };
    Kind kind = Kind::Unknown;
    double order = solve::kNaN;   // ACOC estimate; NaN when too few steps
    double factor = solve::kNaN;  // per-iteration factor of the gradient norm over the window
    int first = -1;               // first and last iteration of the window used
    int last = -1;
    int samples = 0;              // gradient norms in the window
    // Iterations the factor needs to shrink the gradient norm from `from` to `to`; NaN when the
    // factor is not below 1.
    double iterationsToReach(double from, double to) const;
};
const char* toString(RateEstimate::Kind kind);  // "unknown", "sublinear", "linear", "superlinear", "quadratic"

// window: how many of the last records with a finite, positive gradient norm enter the
// linear factor (at least 4 are needed).
RateEstimate estimateRate(const solve::Run& run, int window = 12);

// The per-iteration factor alone: exp(slope) of log(values) against iterations (least
// squares). NaN when fewer than 3 finite positive values.
double logLinearFactor(const std::vector<int>& iterations, const std::vector<double>& values);

}  // namespace sw::diagnose
