#pragma once
// Line searches shared by the methods that step along a direction: backtracking (Armijo)
// and strong Wolfe (Moré & Thuente 1994). Both record every trial: alpha, f, the
// directional derivative when it was evaluated, and which condition failed.

#include "core/solve/method.h"

#include <functional>
#include <string>
#include <vector>

namespace sw::solve {

struct LineSearchSettings {
    double initialStep = 1.0;         // first trial alpha (> 0)
    double sufficientDecrease = 1e-4; // c1 in f(x + a d) <= f(x) + c1 a g'd, in (0, 1)
    double curvature = 0.9;           // c2 in |g(x + a d)'d| <= c2 |g'd| (strong Wolfe), in (c1, 1)
    double backtrackFactor = 0.5;     // backtracking: a <- factor * a, in (0, 1)
    int maxTrials = 30;               // trials before the search gives up
    double maxStep = 1e10;            // strong Wolfe: the largest alpha tried
    // Strong Wolfe only, optional: a further test on the gradient at a trial that meets both
    // Wolfe conditions; a trial that fails it is not accepted and the search goes on (toward
    // the exact minimiser along d). `extraConditionName` labels such trials in the record.
    std::function<bool(const Vector& trialGradient)> extraCondition;
    const char* extraConditionName = "extra condition";
    std::string check() const;        // "" or a sentence
};

struct LineSearchResult {
    bool success = false;        // a step with sufficient decrease was found
    bool curvatureMet = false;   // strong Wolfe: the curvature condition holds too
    double alpha = 0;
    Vector x;                    // x + alpha d (on success)
    double value = kNaN;
    Vector gradient;             // at x (always filled on success)
    std::vector<LineSearchTrial> trials;
    std::string message;         // on failure (or a weak success): why, with the last trials
};

// Backtracking from settings.initialStep until sufficient decrease (Nocedal & Wright 2006,
// Algorithm 3.1). Trials evaluate the value only; the gradient is evaluated once at the
// accepted point. `f` and `g` are at x; d must be a descent direction (g'd < 0).
LineSearchResult backtrackingArmijo(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                                    const LineSearchSettings& settings);

// Strong Wolfe conditions by the Moré & Thuente (1994) algorithm: a bracketing phase with
// safeguarded cubic/quadratic interpolation (their Section 4 step rules), switching from the
// auxiliary function psi to f once psi <= 0 and f' >= 0 (their Section 3).
LineSearchResult strongWolfe(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                             const LineSearchSettings& settings);

// First trial step from the last decrease (Nocedal & Wright 2006, eq. 3.60, with their advice
// to take min(1, 1.01 alpha0) so that a unit step is eventually tried): expect f to fall by
// as much as in the previous iteration, alpha0 = min(1, 1.01 * 2 (f_{k-1} - f_k) / -g'd).
// `previousDecrease` is f_{k-1} - f_k; `slope` is g'd (< 0). Falls back to 1 when the guess
// is not a positive finite number.
double stepFromPreviousDecrease(double previousDecrease, double slope);

// The same rule before the first step, where there is no previous decrease: it assumes a
// previous decrease of |g| / 2, so along d = -g the first trial is min(1, 1.01 / |g|), a step
// of length about 1 (common practice, no published source).
double firstStepFromGradient(const Vector& gradient, double slope);

// "alpha=1 f=3.2 (sufficient decrease); alpha=0.5 ..." for the last `count` trials.
std::string describeTrials(const std::vector<LineSearchTrial>& trials, std::size_t count = 4);

enum class LineSearchKind { Armijo, Wolfe };

// Searches along `direction` from the state; on success moves the state (x, value, gradient;
// hasHessian becomes false) and fills the record's trials, stepLength, step and
// actualDecrease. On failure the state stays, the record holds the trials, and the outcome
// is LineSearchFailed with the last trials in its message.
StepOutcome searchAndMove(Evaluator& eval, State& state, IterationRecord& record, const Vector& direction,
                          LineSearchKind kind, const LineSearchSettings& settings);

// Option specs every line-searching method shares, and reading them back.
std::vector<OptionSpec> lineSearchOptionSpecs(double defaultCurvature);
LineSearchSettings lineSearchSettings(const std::vector<OptionSpec>& specs, const OptionValues& values);

}  // namespace sw::solve
