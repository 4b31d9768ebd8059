// Nonlinear conjugate gradient: Fletcher-Reeves and Polak-Ribiere+ with a strong Wolfe line
// search and restarts (Nocedal & Wright 2006, Section 5.2).
#include "core/solve/line_search.h"

#include <algorithm>
#include <cmath>

namespace sw::solve {

namespace {

enum class BetaRule { FletcherReeves, PolakRibierePlus };

class NonlinearCg final : public MethodState {
public:
    NonlinearCg(BetaRule rule, bool periodicRestart, int restartEvery, double orthogonalityRestart, double descentTest,
                LineSearchSettings settings)
        : rule_(rule), periodicRestart_(periodicRestart), restartEvery_(restartEvery),
          orthogonalityRestart_(orthogonalityRestart), descentTest_(descentTest), settings_(settings) {
        if (descentTest_ > 0) {
            // Sufficient descent of the next direction, g+'d+ <= -sigma |g+|^2 (the condition of the
            // PR+ convergence analysis of Gilbert & Nocedal 1992), required of the step itself: the
            // search goes on until the direction it leads to is downhill enough.
            settings_.extraCondition = [this](const Vector& next) { return nextDirectionDescends(next); };
            settings_.extraConditionName = "descent test";
        }
    }
    // The search settings hold a callback into this object: it is neither copied nor moved.
    NonlinearCg(const NonlinearCg&) = delete;
    NonlinearCg& operator=(const NonlinearCg&) = delete;

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const Vector& g = state.gradient;
        const int period = restartEvery_ > 0 ? restartEvery_ : static_cast<int>(g.size());
        std::string restart;
        if (direction_.size() != g.size()) {
            restart = "start";
        } else if (periodicRestart_ && sinceRestart_ >= period) {
            restart = "restart after " + std::to_string(period) + " steps";
        } else if (orthogonalityRestart_ > 0 &&
                   std::abs(g.dot(previousGradient_)) >= orthogonalityRestart_ * g.squaredNorm()) {
            // Nocedal & Wright eq. 5.52: successive gradients far from orthogonal.
            restart = "restart: |g'g_prev| >= " + shortNumber(orthogonalityRestart_) + " |g|^2";
        }
        double beta = 0;
        if (restart.empty()) {
            if (rule_ == BetaRule::FletcherReeves) {
                beta = g.squaredNorm() / previousGradient_.squaredNorm();  // eq. 5.41a
            } else {
                const double pr = g.dot(g - previousGradient_) / previousGradient_.squaredNorm();  // eq. 5.44
                beta = std::max(pr, 0.0);                                                       // PR+, eq. 5.45
                if (pr < 0) restart = "restart: Polak-Ribiere beta " + shortNumber(pr) + " < 0 (PR+ takes 0)";
            }
            direction_ = -g + beta * direction_;
            if (!(g.dot(direction_) < 0)) {
                restart = "restart: the conjugate direction was not downhill";
                beta = 0;
                direction_ = -g;
            }
        } else {
            direction_ = -g;
        }
        if (beta == 0) sinceRestart_ = 0;
        ++sinceRestart_;
        record.stepKind = beta == 0 ? StepKind::Gradient : StepKind::ConjugateGradient;
        record.damping = beta;
        record.dampingName = "beta";
        if (!restart.empty() && restart != "start") record.note = restart;

        LineSearchSettings settings = settings_;
        // Nocedal & Wright eq. 3.60: expect the last decrease again; the first step has length about 1.
        const double slope = g.dot(direction_);
        if (previousDecrease_ > 0) settings.initialStep = std::min(1.0, 1.01 * 2 * previousDecrease_ / -slope);
        else settings.initialStep = std::min(1.0, 1.0 / std::max(direction_.norm(), 1e-300));
        const double valueBefore = state.value;
        previousGradient_ = g;
        StepOutcome outcome = searchAndMove(eval, state, record, direction_, LineSearchKind::Wolfe, settings);
        previousDecrease_ = valueBefore - state.value;
        return outcome;
    }

private:
    // Beta of the rule for the next gradient `next` after the current one (before restarts).
    double betaFor(const Vector& next, const Vector& current) const {
        if (rule_ == BetaRule::FletcherReeves) return next.squaredNorm() / current.squaredNorm();  // eq. 5.41a
        return std::max(next.dot(next - current) / current.squaredNorm(), 0.0);                   // eqs. 5.44-5.45
    }

    // g+'d+ <= -sigma |g+|^2 for d+ = -g+ + beta d, the direction the next iteration would take.
    bool nextDirectionDescends(const Vector& next) const {
        const double beta = betaFor(next, previousGradient_);
        const double gg = next.squaredNorm();
        return -gg + beta * next.dot(direction_) <= -descentTest_ * gg;
    }

    BetaRule rule_;
    bool periodicRestart_;
    int restartEvery_;
    double orthogonalityRestart_;
    double descentTest_;  // sigma of the descent test (0 = off)
    LineSearchSettings settings_;
    Vector direction_, previousGradient_;
    int sinceRestart_ = 0;
    double previousDecrease_ = kNaN;
};

// Defaults differ by rule. Fletcher-Reeves: restarts every n steps, c2 = 0.1 (it needs c2 < 1/2
// for descent, N&W Lemma 5.6). Polak-Ribiere+: PR+ restarts by itself when beta < 0, so no
// periodic restart (as N&W Section 5.2 note for practical codes); the orthogonality test with
// 0.4 and a near-exact line search (c2 = 0.02) keep successive directions close to conjugate.
// Those two values were chosen by measurement on the Moré-Garbow-Hillstrom catalogue (fewer
// iterations and evaluations than the textbook 0.1 / 0.1 on 10 of 11 problems; see
// docs/BENCHMARKS.md), not taken from a publication.
struct CgDefaults {
    bool periodicRestart;
    double orthogonality;
    double curvature;
};

MethodRegistration cgRegistration(std::string id, std::string summary, BetaRule rule, CgDefaults defaults) {
    MethodInfo info;
    info.id = std::move(id);
    info.family = "conjugate-gradient";
    info.summary = std::move(summary);
    info.options = {
        flagOption("periodic_restart", "restart with steepest descent every restart_every steps", defaults.periodicRestart),
        integerOption("restart_every", "period of the periodic restart (0 = n, the number of variables)", 0, 0, 1000000),
        realOption("restart_orthogonality", "restart when |g'g_prev| >= this |g|^2 (0 = off; N&W eq. 5.52)",
                   defaults.orthogonality, 0, 1, false, false),
        realOption("descent_test",
                   "sigma: the line search accepts a step only when the next direction d+ satisfies "
                   "g+'d+ <= -sigma |g+|^2 (sufficient descent, Gilbert & Nocedal 1992; 0 = off)",
                   0.0, 0, 1, false, true),
    };
    for (OptionSpec& s : lineSearchOptionSpecs(defaults.curvature))
        if (s.name != "backtrack_factor") info.options.push_back(std::move(s));
    const std::vector<OptionSpec> specs = info.options;
    return {info,
            [specs, rule](const OptionValues& v) {
                return std::make_unique<NonlinearCg>(rule, optionFlag(specs, v, "periodic_restart"),
                                                     static_cast<int>(optionNumber(specs, v, "restart_every")),
                                                     optionNumber(specs, v, "restart_orthogonality"),
                                                     optionNumber(specs, v, "descent_test"),
                                                     lineSearchSettings(specs, v));
            },
            [specs](const OptionValues& v) { return lineSearchSettings(specs, v).check(); }};
}

}  // namespace

std::vector<MethodRegistration> conjugateGradientMethods() {
    return {cgRegistration("cg-fletcher-reeves", "nonlinear conjugate gradient, Fletcher-Reeves beta, strong Wolfe",
                           BetaRule::FletcherReeves, {true, 0.0, 0.1}),
            cgRegistration("cg-polak-ribiere", "nonlinear conjugate gradient, Polak-Ribiere+ beta with restarts",
                           BetaRule::PolakRibierePlus, {false, 0.4, 0.02})};
}

}  // namespace sw::solve
