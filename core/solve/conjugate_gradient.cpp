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
    NonlinearCg(BetaRule rule, int restartEvery, double orthogonalityRestart, LineSearchSettings settings)
        : rule_(rule), restartEvery_(restartEvery), orthogonalityRestart_(orthogonalityRestart), settings_(settings) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const Vector& g = state.gradient;
        const int period = restartEvery_ > 0 ? restartEvery_ : static_cast<int>(g.size());
        std::string restart;
        if (direction_.size() != g.size()) {
            restart = "start";
        } else if (sinceRestart_ >= period) {
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
    BetaRule rule_;
    int restartEvery_;
    double orthogonalityRestart_;
    LineSearchSettings settings_;
    Vector direction_, previousGradient_;
    int sinceRestart_ = 0;
    double previousDecrease_ = kNaN;
};

MethodRegistration cgRegistration(std::string id, std::string summary, BetaRule rule, double defaultOrthogonality) {
    MethodInfo info;
    info.id = std::move(id);
    info.family = "conjugate-gradient";
    info.summary = std::move(summary);
    info.options = {
        integerOption("restart_every", "restart with steepest descent every this many steps (0 = n)", 0, 0, 1000000),
        realOption("restart_orthogonality", "restart when |g'g_prev| >= this |g|^2 (0 = off; N&W eq. 5.52)",
                   defaultOrthogonality, 0, 1, false, false),
    };
    // c2 = 0.1: Fletcher-Reeves needs c2 < 1/2 for descent (N&W Lemma 5.6); 0.1 suits both.
    for (OptionSpec& s : lineSearchOptionSpecs(0.1))
        if (s.name != "backtrack_factor") info.options.push_back(std::move(s));
    const std::vector<OptionSpec> specs = info.options;
    return {info,
            [specs, rule](const OptionValues& v) {
                return std::make_unique<NonlinearCg>(rule, static_cast<int>(optionNumber(specs, v, "restart_every")),
                                                     optionNumber(specs, v, "restart_orthogonality"),
                                                     lineSearchSettings(specs, v));
            },
            [specs](const OptionValues& v) { return lineSearchSettings(specs, v).check(); }};
}

}  // namespace

std::vector<MethodRegistration> conjugateGradientMethods() {
    return {cgRegistration("cg-fletcher-reeves", "nonlinear conjugate gradient, Fletcher-Reeves beta, strong Wolfe",
                           BetaRule::FletcherReeves, 0.0),
            cgRegistration("cg-polak-ribiere", "nonlinear conjugate gradient, Polak-Ribiere+ beta with restarts",
                           BetaRule::PolakRibierePlus, 0.1)};
}

}  // namespace sw::solve
