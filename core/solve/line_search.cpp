// Backtracking (Armijo) and strong-Wolfe (Moré-Thuente) line searches.
#include "core/solve/line_search.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace sw::solve {

std::string LineSearchSettings::check() const {
    if (!(initialStep > 0) || !std::isfinite(initialStep)) return "the initial step must be > 0";
    if (!(sufficientDecrease > 0 && sufficientDecrease < 1)) return "sufficient_decrease must be in (0, 1)";
    if (!(curvature > sufficientDecrease && curvature < 1))
        return "curvature must be in (sufficient_decrease, 1) = (" + shortNumber(sufficientDecrease) + ", 1) (got " +
               shortNumber(curvature) + ")";
    if (!(backtrackFactor > 0 && backtrackFactor < 1)) return "backtrack_factor must be in (0, 1)";
    if (maxTrials < 1) return "max_trials must be >= 1";
    if (!(maxStep > 0)) return "the largest step must be > 0";
    return "";
}

std::string describeTrials(const std::vector<LineSearchTrial>& trials, std::size_t count) {
    std::string text;
    const std::size_t first = trials.size() > count ? trials.size() - count : 0;
    for (std::size_t i = first; i < trials.size(); ++i) {
        const LineSearchTrial& t = trials[i];
        if (!text.empty()) text += "; ";
        text += "alpha=" + shortNumber(t.alpha) + " f=" + shortNumber(t.value);
        if (!std::isnan(t.slope)) text += " slope=" + shortNumber(t.slope);
        if (t.accepted) text += " (accepted)";
        else (text += " (").append(t.failed) += ')';
    }
    return text;
}

double stepFromPreviousDecrease(double previousDecrease, double slope) {
    const double guess = std::min(1.0, 1.01 * 2 * previousDecrease / -slope);
    return std::isfinite(guess) && guess > 0 ? guess : 1.0;
}

double firstStepFromGradient(const Vector& gradient, double slope) {
    return stepFromPreviousDecrease(gradient.norm() / 2, slope);
}

std::vector<OptionSpec> lineSearchOptionSpecs(double defaultCurvature) {
    using T = OptionSpec::Type;
    return {
        {"sufficient_decrease", "c1 of the sufficient-decrease (Armijo) condition", T::Real, 1e-4, 0, 1, true, true, {}},
        {"curvature", "c2 of the strong Wolfe curvature condition (must exceed c1)", T::Real, defaultCurvature, 0, 1,
         true, true, {}},
        {"backtrack_factor", "backtracking shrinks the trial step by this factor", T::Real, 0.5, 0, 1, true, true, {}},
        {"max_trials", "line-search trials before giving up", T::Integer, 30, 1, 1000, false, false, {}},
    };
}

LineSearchSettings lineSearchSettings(const std::vector<OptionSpec>& specs, const OptionValues& values) {
    LineSearchSettings s;
    auto read = [&](const char* name, double fallback) {
        const OptionSpec* spec = findOption(specs, name);
        if (!spec) return fallback;
        return values.empty() ? spec->defaultValue : optionNumber(specs, values, name);
    };
    s.sufficientDecrease = read("sufficient_decrease", s.sufficientDecrease);
    s.curvature = read("curvature", s.curvature);
    s.backtrackFactor = read("backtrack_factor", s.backtrackFactor);
    s.maxTrials = static_cast<int>(read("max_trials", s.maxTrials));
    return s;
}

namespace {

void notDescent(double slope0, LineSearchResult& result) {
    result.message = "the search direction is not a descent direction (g'd = " + shortNumber(slope0) + " >= 0)";
}

// Clears a result for a new search but keeps the storage of its vectors (searchAndMove reuses
// one result per thread, so a search allocates nothing once the buffers have grown).
void reset(LineSearchResult& result, Eigen::Index n) {
    result.success = result.curvatureMet = false;
    result.alpha = 0;
    result.value = kNaN;
    result.x.resize(n);
    result.gradient.resize(n);
    result.trials.clear();
    result.trials.reserve(4);  // most searches end within a few trials
    result.message.clear();
}

void armijoInto(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                const LineSearchSettings& settings, LineSearchResult& result);
void strongWolfeInto(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                     const LineSearchSettings& settings, LineSearchResult& result);

}  // namespace

LineSearchResult backtrackingArmijo(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                                    const LineSearchSettings& settings) {
    LineSearchResult result;
    armijoInto(eval, x, f, g, d, settings, result);
    return result;
}

LineSearchResult strongWolfe(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                             const LineSearchSettings& settings) {
    LineSearchResult result;
    strongWolfeInto(eval, x, f, g, d, settings, result);
    return result;
}

namespace {

void armijoInto(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                const LineSearchSettings& settings, LineSearchResult& result) {
    reset(result, x.size());
    const double slope0 = g.dot(d);
    if (!(slope0 < 0)) return notDescent(slope0, result);
    double alpha = settings.initialStep;
    Vector& trialX = result.x;  // the trial point is built where the result lives
    for (int trial = 0; trial < settings.maxTrials; ++trial) {
        trialX.noalias() = x + alpha * d;
        const double value = eval.value(trialX);
        LineSearchTrial t;
        t.alpha = alpha;
        t.value = value;
        if (!std::isfinite(value)) {
            // A step into a region where f is not defined is too long: back off.
            eval.clearNonFinite();
            t.failed = "non-finite";
        } else if (value <= f + settings.sufficientDecrease * alpha * slope0) {
            t.accepted = true;
            result.success = true;
            result.alpha = alpha;
            result.value = eval.gradient(result.x, result.gradient);
            result.trials.push_back(t);
            result.trials.back().slope = result.gradient.dot(d);
            return;
        } else {
            t.failed = "sufficient decrease";
        }
        result.trials.push_back(t);
        alpha *= settings.backtrackFactor;
    }
    result.message = "no step with sufficient decrease in " + std::to_string(settings.maxTrials) +
                     " trials (g'd = " + shortNumber(slope0) + "); last trials: " + describeTrials(result.trials);
}

// One end of the Moré-Thuente interval: step, value and derivative along d.
struct EndPoint1D {
    double step = 0, value = 0, slope = 0;
};

// The step rules of Moré & Thuente (1994), Section 4 (cases 1-4): choose the next trial
// from the interval ends `best` (lowest value so far) and `other`, and the current trial,
// and update the interval. Returns the new trial step.
double nextTrialStep(EndPoint1D& best, EndPoint1D& other, const EndPoint1D& trial, bool& bracketed, double lowest,
                     double highest) {
    const double stp = trial.step, fp = trial.value, dp = trial.slope;
    const double stx = best.step, fx = best.value, dx = best.slope;
    const double sign = dp * (dx / std::abs(dx));
    double next;
    if (fp > fx) {
        // Case 1: higher value; the minimiser is bracketed. Cubic or quadratic, whichever is closer to stx.
        const double theta = 3 * (fx - fp) / (stp - stx) + dx + dp;
        const double s = std::max({std::abs(theta), std::abs(dx), std::abs(dp)});
        double gamma = s * std::sqrt(std::max(0.0, (theta / s) * (theta / s) - (dx / s) * (dp / s)));
        if (stp < stx) gamma = -gamma;
        const double p = (gamma - dx) + theta, q = ((gamma - dx) + gamma) + dp;
        const double cubic = stx + (p / q) * (stp - stx);
        const double quadratic = stx + ((dx / ((fx - fp) / (stp - stx) + dx)) / 2) * (stp - stx);
        next = std::abs(cubic - stx) < std::abs(quadratic - stx) ? cubic : cubic + (quadratic - cubic) / 2;
        bracketed = true;
    } else if (sign < 0) {
        // Case 2: derivatives of opposite sign; bracketed. Cubic or secant, whichever is farther from stp.
        const double theta = 3 * (fx - fp) / (stp - stx) + dx + dp;
        const double s = std::max({std::abs(theta), std::abs(dx), std::abs(dp)});
        double gamma = s * std::sqrt(std::max(0.0, (theta / s) * (theta / s) - (dx / s) * (dp / s)));
        if (stp > stx) gamma = -gamma;
        const double p = (gamma - dp) + theta, q = ((gamma - dp) + gamma) + dx;
        const double cubic = stp + (p / q) * (stx - stp);
        const double secant = stp + (dp / (dp - dx)) * (stx - stp);
        next = std::abs(cubic - stp) > std::abs(secant - stp) ? cubic : secant;
        bracketed = true;
    } else if (std::abs(dp) < std::abs(dx)) {
        // Case 3: lower value, same-sign derivative of decreasing magnitude.
        const double theta = 3 * (fx - fp) / (stp - stx) + dx + dp;
        const double s = std::max({std::abs(theta), std::abs(dx), std::abs(dp)});
        double gamma = s * std::sqrt(std::max(0.0, (theta / s) * (theta / s) - (dx / s) * (dp / s)));
        if (stp > stx) gamma = -gamma;
        const double p = (gamma - dp) + theta, q = (gamma + (dx - dp)) + gamma;
        const double r = p / q;
        double cubic;
        if (r < 0 && gamma != 0) cubic = stp + r * (stx - stp);
        else cubic = stp > stx ? highest : lowest;
        const double secant = stp + (dp / (dp - dx)) * (stx - stp);
        if (bracketed) {
            next = std::abs(cubic - stp) < std::abs(secant - stp) ? cubic : secant;
            next = stp > stx ? std::min(stp + 0.66 * (other.step - stp), next)
                             : std::max(stp + 0.66 * (other.step - stp), next);
        } else {
            next = std::abs(cubic - stp) > std::abs(secant - stp) ? cubic : secant;
            next = std::clamp(next, lowest, highest);
        }
    } else {
        // Case 4: lower value, derivative not decreasing in magnitude.
        if (bracketed) {
            const double sty = other.step, fy = other.value, dy = other.slope;
            const double theta = 3 * (fp - fy) / (sty - stp) + dy + dp;
            const double s = std::max({std::abs(theta), std::abs(dy), std::abs(dp)});
            double gamma = s * std::sqrt(std::max(0.0, (theta / s) * (theta / s) - (dy / s) * (dp / s)));
            if (stp > sty) gamma = -gamma;
            const double p = (gamma - dp) + theta, q = ((gamma - dp) + gamma) + dy;
            next = stp + (p / q) * (sty - stp);
        } else {
            next = stp > stx ? highest : lowest;
        }
    }
    // Update the interval (their "updating algorithm").
    if (fp > fx) {
        other = trial;
    } else {
        if (sign < 0) other = best;
        best = trial;
    }
    return next;
}

// Relative change of f treated as rounding by the approximate Wolfe test.
constexpr double kRoundingSlack = 1e-12;

void strongWolfeInto(Evaluator& eval, const Vector& x, double f, const Vector& g, const Vector& d,
                     const LineSearchSettings& settings, LineSearchResult& result) {
    reset(result, x.size());
    const double slope0 = g.dot(d);
    if (!(slope0 < 0)) return notDescent(slope0, result);
    const double c1 = settings.sufficientDecrease, c2 = settings.curvature;
    const double decreaseSlope = c1 * slope0;  // the line f0 + alpha * c1 * g'd
    const double relativeWidth = 1e-12;        // interval narrower than this (relative) cannot improve

    double highestAllowed = settings.maxStep;
    double stp = std::min(settings.initialStep, highestAllowed);
    bool bracketed = false;
    bool secondStage = false;  // Moré-Thuente switch from psi to f
    double width = highestAllowed, previousWidth = 2 * highestAllowed;
    EndPoint1D best{0, f, slope0}, other{0, f, slope0};
    double lowest = 0, highest = stp + 4 * stp;

    // The best point with sufficient decrease found so far, returned when the search must stop early.
    double fallbackAlpha = 0, fallbackValue = f;
    Vector fallbackX, fallbackGradient;

    Vector& trialX = result.x;  // trials are built where the result lives
    Vector& trialG = result.gradient;
    bool extraFailed = false;   // this trial met the Wolfe conditions but not settings.extraCondition
    for (int trialNo = 0; trialNo < settings.maxTrials; ++trialNo) {
        trialX.noalias() = x + stp * d;
        const double value = eval.gradient(trialX, trialG);
        LineSearchTrial t;
        t.alpha = stp;
        t.value = value;
        if (!std::isfinite(value) || !trialG.allFinite()) {
            eval.clearNonFinite();
            t.failed = "non-finite";
            result.trials.push_back(t);
            // Beyond this step f is not usable: cap the search below it and retreat toward the best point.
            highestAllowed = std::max(best.step, 0.0) + 0.5 * (stp - best.step);
            highest = std::min(highest, highestAllowed);
            stp = best.step + 0.5 * (stp - best.step);
            if (!(stp > best.step)) break;
            continue;
        }
        const double slope = trialG.dot(d);
        t.slope = slope;
        const double armijoLine = f + stp * decreaseSlope;
        const bool decreaseOk = value <= armijoLine;
        const bool curvatureOk = std::abs(slope) <= c2 * (-slope0);
        // Near a minimiser f is flat to rounding and sufficient decrease cannot be seen; accept a
        // step that keeps f within rounding and meets the curvature condition (the approximate
        // Wolfe conditions of Hager & Zhang 2005, with a tighter epsilon).
        const bool flatWithinRounding = value <= f + kRoundingSlack * std::abs(f);
        const bool wolfeOk = (decreaseOk || flatWithinRounding) && curvatureOk;
        if (wolfeOk && settings.extraCondition && !settings.extraCondition(trialG)) {
            t.failed = settings.extraConditionName;
            extraFailed = true;
        } else if (wolfeOk) {
            if (!decreaseOk) result.message = "accepted on the approximate Wolfe conditions: f is flat to rounding";
            t.accepted = true;
            result.trials.push_back(t);
            result.success = result.curvatureMet = true;
            result.alpha = stp;
            result.value = value;
            return;
        }
        if (!extraFailed) t.failed = decreaseOk ? "curvature" : "sufficient decrease";
        extraFailed = false;
        result.trials.push_back(t);
        if (decreaseOk && value < fallbackValue) {
            fallbackAlpha = stp;
            fallbackValue = value;
            fallbackX = trialX;
            fallbackGradient = trialG;
        }
        if (!secondStage && decreaseOk && slope >= std::min(c1, c2) * slope0)
            secondStage = true;
        if (stp >= highestAllowed && decreaseOk && slope <= decreaseSlope) break;  // wants longer, not allowed
        if (bracketed && (stp <= lowest || stp >= highest)) break;                 // rounding errors
        if (bracketed && highest - lowest <= relativeWidth * highest) break;       // interval too small

        EndPoint1D trial{stp, value, slope};
        if (!secondStage && value <= best.value && value > armijoLine) {
            // Work with the auxiliary psi(a) = f(a) - f0 - a c1 g'd while in the first stage (their eq. 3.3).
            EndPoint1D bestPsi{best.step, best.value - best.step * decreaseSlope, best.slope - decreaseSlope};
            EndPoint1D otherPsi{other.step, other.value - other.step * decreaseSlope, other.slope - decreaseSlope};
            EndPoint1D trialPsi{stp, value - stp * decreaseSlope, slope - decreaseSlope};
            stp = nextTrialStep(bestPsi, otherPsi, trialPsi, bracketed, lowest, highest);
            best = {bestPsi.step, bestPsi.value + bestPsi.step * decreaseSlope, bestPsi.slope + decreaseSlope};
            other = {otherPsi.step, otherPsi.value + otherPsi.step * decreaseSlope, otherPsi.slope + decreaseSlope};
        } else {
            stp = nextTrialStep(best, other, trial, bracketed, lowest, highest);
        }
        if (bracketed) {
            // Force sufficient shrinkage of the interval (bisect when it shrank too little).
            if (std::abs(other.step - best.step) >= 0.66 * previousWidth) stp = best.step + 0.5 * (other.step - best.step);
            previousWidth = width;
            width = std::abs(other.step - best.step);
            lowest = std::min(best.step, other.step);
            highest = std::max(best.step, other.step);
        } else {
            lowest = stp + 1.1 * (stp - best.step);
            highest = stp + 4 * (stp - best.step);
        }
        stp = std::clamp(stp, 0.0, highestAllowed);
        if (bracketed && (stp <= lowest || stp >= highest || highest - lowest <= relativeWidth * highest))
            stp = best.step;
        if (!(stp > 0)) break;
    }
    if (fallbackAlpha > 0) {
        // Sufficient decrease holds here, the curvature condition does not: usable, but say so.
        result.success = true;
        result.alpha = fallbackAlpha;
        result.x = fallbackX;
        result.value = fallbackValue;
        result.gradient = fallbackGradient;
        result.message = "strong Wolfe curvature condition not met; took the best step with sufficient decrease";
        for (const LineSearchTrial& t : result.trials)
            if (settings.extraCondition && t.failed == settings.extraConditionName) {
                result.message = std::string("no step met both Wolfe conditions and the ") +
                                 settings.extraConditionName + "; took the best step with sufficient decrease";
                break;
            }
        for (LineSearchTrial& t : result.trials)
            if (t.alpha == fallbackAlpha && t.value == fallbackValue) {
                t.accepted = true;
                t.failed = {};
                break;
            }
        return;
    }
    result.message = "no step satisfied the strong Wolfe conditions in " + std::to_string(result.trials.size()) +
                     " trials (g'd = " + shortNumber(slope0) + "); last trials: " + describeTrials(result.trials);
}

}  // namespace

StepOutcome searchAndMove(Evaluator& eval, State& state, IterationRecord& record, const Vector& direction,
                          LineSearchKind kind, const LineSearchSettings& settings) {
    // One result per thread, reused: its vectors keep their storage from search to search, and
    // on success they are swapped with the state's (so neither side allocates).
    thread_local LineSearchResult found;
    if (kind == LineSearchKind::Wolfe) strongWolfeInto(eval, state.x, state.value, state.gradient, direction, settings, found);
    else armijoInto(eval, state.x, state.value, state.gradient, direction, settings, found);
    record.trials = std::move(found.trials);  // the record takes the trials; the next search reserves anew
    if (!found.success) {
        record.accepted = false;
        record.step = Vector::Zero(state.x.size());
        record.stepLength = 0;
        // When even the first trial promises a decrease below the rounding of f, no line search
        // can make progress: the point is a minimiser to working precision.
        const double promised = -settings.initialStep * state.gradient.dot(direction);
        // The floor is min(1, |f(x0)|) rather than 1, so f scaled by 1e-150 is not "flat to rounding".
        const double rounding = 1e-15 * (state.valueFloor + std::abs(state.value));
        if (promised >= 0 && promised <= rounding)
            return {Termination::RoundingLimit,
                    "converged: the line search cannot decrease f beyond rounding in iteration " +
                        std::to_string(state.iteration) + " (first trial promises " + shortNumber(promised) +
                        " <= 1e-15 (" + (state.valueFloor == 1.0 ? std::string("1") : shortNumber(state.valueFloor)) +
                        " + |f|))"};
        return {Termination::LineSearchFailed, "line search failed in iteration " + std::to_string(state.iteration) +
                                                   ": " + found.message};
    }
    if (!found.message.empty()) record.note += (record.note.empty() ? "" : "; ") + found.message;
    record.stepLength = found.alpha;
    record.step = found.x - state.x;
    record.actualDecrease = state.value - found.value;
    state.x.swap(found.x);
    state.value = found.value;
    state.gradient.swap(found.gradient);
    state.hasHessian = false;
    return {};
}

}  // namespace sw::solve
