#pragma once
// The rules that turn a run into findings, one function per finding, and every threshold
// they use, each with its source. docs/findings.md lists the same table for users; a test
// keeps the two in step (every id is documented there).
//
// Rules read only the run's records, its end, and (uncounted) the objective's exact Hessian
// at a few points: the end, and the start or last iterate when the records carry no
// spectrum. They cope with gaps in iteration numbers (a thinned trace keeps the first, the
// last, every k-th and event records): per-iteration quantities are computed from iteration
// numbers, and quantities between successive steps only from records that are adjacent.

#include "core/diagnose/finding.h"
#include "core/diagnose/rate.h"
#include "core/objective/objective.h"
#include "core/solve/options.h"

#include <optional>
#include <string>
#include <vector>

namespace sw::diagnose {

namespace thresholds {
// How many of the last records the trace rules look at, and the fewest that make a judgement.
inline constexpr int kWindow = 30;                // common practice, no published source
inline constexpr int kMinWindow = 8;              // common practice, no published source

// An eigenvalue counts as zero when |lambda| <= kZeroEigenvalue * max(1, max |lambda|): the
// end-point classification's own tolerance (solve::classifyPoint), so the two never disagree.
inline constexpr double kZeroEigenvalue = 1e-8;
// flat-direction: the smallest eigenvalue of the Jacobi-scaled Hessian D H D (D = diag(H)^-1/2,
// unit diagonal, so bad units alone never trigger it) is at most this fraction of the largest,
// or the Hessian's own smallest |eigenvalue| is at most this fraction of max(1, largest) and at
// most this in f's units: a direction is flat to about the square root of machine precision.
// Common practice (the sqrt(eps) relative rank tolerance), no published source for the value.
inline constexpr double kFlatRatio = 1e-8;

// narrow-valley: all three must hold over the window.
inline constexpr double kValleyCondition = 100;   // Hessian condition number; steepest descent's
                                                  // bound ((k-1)/(k+1))^2 (N&W 2006, Thm 3.3) is then >= 0.96
inline constexpr double kZigZagAlternation = 0.6; // at least this share of successive steps cross the valley
                                                  // (the steep eigenvector) in opposite directions
                                                  // (common practice, no published source)
inline constexpr double kSlowRate = 0.9;          // gradient-norm factor per iteration at least this
                                                  // (common practice, no published source)

// poor-scaling: the Hessian's diagonal spans at least kScalingSpread (curvatures 4 decades
// apart, i.e. natural units 2 decades apart), and Jacobi scaling D H D lowers the condition
// number by at least kScalingGain, so the units, not the shape, make it ill-conditioned.
// The remedy's factors are powers of ten near diag(H)^-1/2 (Jacobi / diagonal scaling:
// Gill, Murray & Wright (1981), Practical Optimization, sec. 8.7; N&W (2006) sec. 2.2).
inline constexpr double kScalingSpread = 1e4;
inline constexpr double kScalingGain = 100;

// line-search-collapse (besides the line-search-failed ending): in the window, at least
// kCollapsedSearches searches needed kManyTrials trials or more, and the last accepted step
// length is at most kCollapsedStep times the run's median. Common practice, no published source.
inline constexpr int kManyTrials = 10;
inline constexpr int kCollapsedSearches = 3;
inline constexpr double kCollapsedStep = 1e-3;

// radius-collapse (besides the trust-region-collapsed ending): the radius at the end is at most
// kRadiusShrink of the largest radius in the run, and at least half the window's steps were
// rejected. Common practice, no published source.
inline constexpr double kRadiusShrink = 1e-6;

// stagnation: over the window f changed by at most kStagnantChange * (1 + |f|) while the end is
// not a critical point by the solver's own test (|g| > max(1e-4, sqrt(gtol)) (1 + |f|)).
// Common practice, no published source.
inline constexpr double kStagnantChange = 1e-10;

// divergence: f rose to f_min + kBlowUp * (1 + |f_min|), rising in at least kDriftMonotone of the
// window's moves (or the run ended non-finite); or a drift: |x| grew by at least
// kDriftGrowth * (1 + |x_0|), growing in at least kDriftMonotone of the window's moves, while
// the curvature along the drift faded to kDriftFading of its value at the window's start (or to
// zero): an asymptote or an endless slope, not a far minimum. Common practice, no published source.
inline constexpr double kBlowUp = 1e6;
inline constexpr double kDriftGrowth = 5;
inline constexpr double kDriftMonotone = 0.8;
inline constexpr double kDriftFading = 1e-3;

// budget-exhausted: over the window f fell by more than kProgress * (1 + |f|). The estimate of
// the iterations still needed uses the observed gradient-norm factor (rate.h). A rerun with a
// raised limit is tried when the estimate is at most kMaxRaise times the run's iterations.
inline constexpr double kProgress = 1e-10;
inline constexpr double kMaxRaise = 50;
inline constexpr int kRaiseCap = 1000000;

// Convergence rate (rate.h). Order >= 2 is quadratic in theory; 1.8 allows for the estimate's
// noise. Order >= 1.2, or gradient-norm ratios that keep falling to <= 0.1, is superlinear.
// A factor >= 0.999 is no linear convergence at all. Common practice, no published source.
inline constexpr double kQuadraticOrder = 1.8;
inline constexpr double kSuperlinearOrder = 1.2;
inline constexpr double kSuperlinearLastRatio = 0.1;
inline constexpr double kSublinearFactor = 0.999;
inline constexpr double kRoundingSteps = 100;     // steps below 100 eps (1 + |x|) are rounding
// An estimated order above this (no method here converges faster than cubically) comes from a
// lucky last step; such a run is called superlinear without a number.
inline constexpr double kMostCredibleOrder = 3.5;
}  // namespace thresholds

// The Hessian at a point, with its eigen-decomposition and that of the Jacobi-scaled Hessian
// D H D. Computed once per point (uncounted: diagnostics, not the method's work).
struct Curvature {
    bool valid = false;
    Matrix hessian;
    Vector eigenvalues;            // ascending
    Matrix eigenvectors;           // columns, unit length
    double tolerance = solve::kNaN;  // |lambda| below this counts as zero
    int negative = 0, zero = 0, positive = 0;
    double condition = solve::kNaN;  // max|lambda| / min|lambda|
    Vector jacobiScale;            // D, with d_i = 1/sqrt(H_ii) (1/sqrt(max H_jj) where H_ii <= 0)
    Vector scaledEigenvalues;      // of D H D, ascending
    Matrix scaledEigenvectors;
    double scaledCondition = solve::kNaN;
};
Curvature curvatureAt(const Objective& objective, const Vector& x);

// What one run is diagnosed with: the run, the objective it ran on, and how it was started
// (so a remedy can rerun from the same start with one change).
struct RunSetup {
    std::string methodId;
    solve::OptionValues options;
    solve::StoppingRules rules;
    Vector start;
};

// Shared facts about one run that several rules need, computed once.
struct RunFacts {
    const solve::Run* run = nullptr;
    const Objective* objective = nullptr;
    const RunSetup* setup = nullptr;
    std::vector<std::string> names;
    bool isFit = false;              // a data fit: flat directions name parameter combinations
    bool finished = false;
    bool healthyEnd = false;         // converged at a critical point with no negative curvature
    int stepsInWindow = 0;
    std::size_t windowBegin = 0;     // index into run->trace of the window's first record
    Curvature end;                   // at run->x when finished and finite
    RateEstimate rate;
};
RunFacts gatherFacts(const solve::Run& run, const Objective& objective, const RunSetup& setup);

// True when the run converged at a point that is critical with no negative eigenvalue.
bool isHealthyEnd(const solve::Run& run);

// True when f does not fall (beyond rounding) at distance h = 1e-6 (1 + |x|) from x along + and -
// each coordinate, each pair e_i +- e_j (n <= 10) and the gradient: how the minimum of a
// non-smooth objective (a kink from abs, min, max) looks where its gradient is not small.
// Common practice, no published source.
bool looksLikeKinkMinimum(const Objective& objective, const Vector& x);
// True when f has a kink across direction d at x: the one-sided slopes along d differ by far more
// than the smooth curvature h d'Hd allows. Common practice, no published source.
bool kinkAcross(const Objective& objective, const Vector& x, const Vector& d);

// One rule per finding. Each returns the finding when its rule holds; remedies are proposed
// (change only) and tried later by remedy.h.
std::optional<Finding> ruleNonFinite(const RunFacts& facts);
std::optional<Finding> ruleMethodFailed(const RunFacts& facts);
std::optional<Finding> ruleSaddleEnd(const RunFacts& facts);
std::optional<Finding> ruleMaximumEnd(const RunFacts& facts);
std::optional<Finding> ruleFlatDirection(const RunFacts& facts);
std::optional<Finding> ruleNarrowValley(const RunFacts& facts);
std::optional<Finding> rulePoorScaling(const RunFacts& facts);
std::optional<Finding> ruleUphillNewton(const RunFacts& facts);
std::optional<Finding> ruleLineSearchCollapse(const RunFacts& facts);
std::optional<Finding> ruleRadiusCollapse(const RunFacts& facts);
std::optional<Finding> ruleDivergence(const RunFacts& facts);
std::optional<Finding> ruleStagnation(const RunFacts& facts);
std::optional<Finding> ruleBudgetExhausted(const RunFacts& facts);
std::optional<Finding> ruleConvergenceRate(const RunFacts& facts);

// "valve_a - 0.5 valve_b": a direction as a combination of named variables (components below
// 5 % of the largest left out, the largest scaled to 1).
std::string combinationText(const Vector& direction, const std::vector<std::string>& names);

}  // namespace sw::diagnose
