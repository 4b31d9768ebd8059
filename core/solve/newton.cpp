// The Newton family: pure Newton (full steps, so it walks onto saddles and uphill when the
// Hessian says so), damped Newton (a line search, falling back to steepest descent),
// modified Newton (Hessian + tau I, Nocedal & Wright 2006, Algorithm 3.3) and
// saddle-free Newton (|H| from the eigendecomposition, Dauphin et al. 2014).
#include "core/solve/line_search.h"

#include <Eigen/Cholesky>
#include <Eigen/Eigenvalues>
#include <Eigen/LU>

#include <algorithm>
#include <limits>
#include <cmath>

namespace sw::solve {

namespace {

constexpr double kUnbounded = std::numeric_limits<double>::infinity();  // no upper bound

// Solves H p = -g. Cholesky first (the common case near a minimiser); otherwise a rank-revealing
// LU so an indefinite but invertible H still gives its Newton step. False when H is singular.
bool newtonStep(const Matrix& h, const Vector& g, Vector& p, bool& positiveDefinite) {
    Eigen::LLT<Matrix> cholesky(h);
    positiveDefinite = cholesky.info() == Eigen::Success;
    if (positiveDefinite) {
        p = cholesky.solve(-g);
        if (p.allFinite()) return true;
        positiveDefinite = false;
    }
    Eigen::FullPivLU<Matrix> lu(h);
    lu.setThreshold(1e-13);
    if (!lu.isInvertible()) return false;
    p = lu.solve(-g);
    return p.allFinite();
}

double modelDecrease(const Vector& g, const Matrix& h, const Vector& p) {
    return -(g.dot(p) + 0.5 * p.dot(h * p));
}

std::string singularMessage(const State& state) {
    Vector eig;
    double condition = kNaN;
    spectrum(state.hessian, eig, condition);
    std::string list;
    for (Eigen::Index i = 0; i < eig.size() && i < 6; ++i) list += (i ? ", " : "") + shortNumber(eig[i]);
    return "the Hessian is singular in iteration " + std::to_string(state.iteration) + " (eigenvalues " + list +
           "), so the Newton step is undefined; try modified-newton, saddle-free-newton or a trust-region method";
}

// Moves the state to x + p and refreshes value, gradient and Hessian.
void fullStep(Evaluator& eval, State& state, const Vector& p) {
    state.x += p;
    state.value = eval.hessian(state.x, state.gradient, state.hessian);
    state.hasHessian = true;
}

// After a line search moved the state: the Newton family needs the Hessian there too.
void refreshHessian(Evaluator& eval, State& state) {
    state.value = eval.hessian(state.x, state.gradient, state.hessian);
    state.hasHessian = true;
}

LineSearchKind searchKind(const std::string& name) {
    return name == "wolfe" ? LineSearchKind::Wolfe : LineSearchKind::Armijo;
}

// ---- newton -------------------------------------------------------------------------------------

class PureNewton final : public MethodState {
public:
    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        Vector p;
        bool positiveDefinite = false;
        record.stepKind = StepKind::Newton;
        if (!newtonStep(state.hessian, state.gradient, p, positiveDefinite)) {
            record.accepted = false;
            record.step = Vector::Zero(state.x.size());
            return {Termination::Failed, singularMessage(state)};
        }
        record.stepLength = 1;
        record.predictedDecrease = modelDecrease(state.gradient, state.hessian, p);
        const double slope = state.gradient.dot(p);
        if (slope > 0) record.note = "uphill: g'p = " + shortNumber(slope) + " > 0 (the Hessian is not positive definite)";
        else if (!positiveDefinite) record.note = "the Hessian is indefinite: the step heads for a saddle point of the model";
        fullStep(eval, state, p);
        return {};
    }
};

// ---- damped-newton ------------------------------------------------------------------------------

class DampedNewton final : public MethodState {
public:
    DampedNewton(LineSearchKind kind, LineSearchSettings settings) : kind_(kind), settings_(settings) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        Vector p;
        bool positiveDefinite = false;
        const bool solved = newtonStep(state.hessian, state.gradient, p, positiveDefinite);
        const double slope = solved ? state.gradient.dot(p) : kNaN;
        // Descent needs g'p < 0, with some margin so rounding cannot pass off an orthogonal direction.
        const bool descent = solved && slope < -1e-12 * state.gradient.norm() * p.norm();
        Vector direction;
        if (descent) {
            direction = p;
            record.stepKind = StepKind::Newton;
            record.predictedDecrease = modelDecrease(state.gradient, state.hessian, p);
        } else {
            direction = -state.gradient;
            record.stepKind = StepKind::Gradient;
            record.note = solved ? "Newton direction is not a descent direction (g'p = " + shortNumber(slope) +
                                       " >= 0); fell back to steepest descent"
                                 : "the Hessian is singular; fell back to steepest descent";
        }
        LineSearchSettings settings = settings_;
        settings.initialStep = 1.0;
        if (!descent) {
            // -g has no natural length (unlike the Newton step): a first trial of alpha = 1 can
            // overshoot by orders of magnitude on badly scaled problems. Expect the last
            // decrease again (Nocedal & Wright 2006, eq. 3.60), else a step of length 1.
            const double downhill = state.gradient.dot(direction);
            const double gradientNorm = state.gradient.norm();
            settings.initialStep = previousDecrease_ > 0 ? std::min(1.0, 1.01 * 2 * previousDecrease_ / -downhill)
                                                         : std::min(1.0, 1.0 / gradientNorm);
            if (!(settings.initialStep > 0)) settings.initialStep = std::min(1.0, 1.0 / gradientNorm);
        }
        const double valueBefore = state.value;
        StepOutcome outcome = searchAndMove(eval, state, record, direction, kind_, settings);
        if (outcome.termination == Termination::Running) {
            previousDecrease_ = valueBefore - state.value;
            refreshHessian(eval, state);
        }
        return outcome;
    }

private:
    LineSearchKind kind_;
    LineSearchSettings settings_;
    double previousDecrease_ = kNaN;
};

// ---- modified-newton ----------------------------------------------------------------------------

class ModifiedNewton final : public MethodState {
public:
    ModifiedNewton(double shiftFloor, LineSearchKind kind, LineSearchSettings settings)
        : shiftFloor_(shiftFloor), kind_(kind), settings_(settings) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        // Nocedal & Wright (2006), Algorithm 3.3 (Cholesky with added multiple of the identity):
        // tau_0 = 0 if min a_ii > 0, else -min a_ii + beta; then tau <- max(2 tau, beta).
        const Matrix& h = state.hessian;
        const auto n = h.rows();
        const double smallestDiagonal = h.diagonal().minCoeff();
        double tau = smallestDiagonal > 0 ? 0.0 : -smallestDiagonal + shiftFloor_;
        Eigen::LLT<Matrix> cholesky;
        int attempts = 0;
        for (;; ++attempts) {
            cholesky.compute(tau == 0 ? h : Matrix(h + tau * Matrix::Identity(n, n)));
            if (cholesky.info() == Eigen::Success) break;
            if (attempts >= 2000 || !std::isfinite(tau)) {
                record.accepted = false;
                record.step = Vector::Zero(state.x.size());
                return {Termination::Failed, "no shift tau made the Hessian positive definite in iteration " +
                                                 std::to_string(state.iteration) + " (last tau " + shortNumber(tau) + ")"};
            }
            tau = std::max(2 * tau, shiftFloor_);
        }
        const Vector p = cholesky.solve(-state.gradient);
        record.stepKind = tau > 0 ? StepKind::ModifiedNewton : StepKind::Newton;
        record.damping = tau;
        record.dampingName = "tau";
        record.predictedDecrease = modelDecrease(state.gradient, h, p);
        if (tau > 0)
            record.note = "added tau = " + shortNumber(tau) + " to the Hessian's diagonal after " +
                          std::to_string(attempts + 1) + " Cholesky attempt" + (attempts ? "s" : "");
        LineSearchSettings settings = settings_;
        settings.initialStep = 1.0;
        StepOutcome outcome = searchAndMove(eval, state, record, p, kind_, settings);
        if (outcome.termination == Termination::Running) refreshHessian(eval, state);
        return outcome;
    }

private:
    double shiftFloor_;
    LineSearchKind kind_;
    LineSearchSettings settings_;
};

// ---- saddle-free-newton -------------------------------------------------------------------------

// Dauphin et al. (2014), "Identifying and attacking the saddle point problem in
// high-dimensional non-convex optimization": rescale by |H|, the Hessian with its
// eigenvalues replaced by their absolute values, so negative curvature pushes away from a
// saddle instead of toward it. Eigenvalues below `floor` in magnitude are raised to it.
class SaddleFreeNewton final : public MethodState {
public:
    SaddleFreeNewton(double floor, std::string search, LineSearchSettings settings)
        : floor_(floor), search_(std::move(search)), settings_(settings) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        Eigen::SelfAdjointEigenSolver<Matrix> eigen(state.hessian);
        if (eigen.info() != Eigen::Success) {
            record.accepted = false;
            record.step = Vector::Zero(state.x.size());
            return {Termination::Failed, "the Hessian's eigendecomposition failed in iteration " +
                                             std::to_string(state.iteration)};
        }
        const Vector& lambda = eigen.eigenvalues();
        const Matrix& v = eigen.eigenvectors();
        Vector scaled = v.transpose() * state.gradient;
        std::string flipped, floored;
        for (Eigen::Index i = 0; i < lambda.size(); ++i) {
            double magnitude = std::abs(lambda[i]);
            if (magnitude < floor_) {
                floored += (floored.empty() ? "" : ", ") + shortNumber(lambda[i]);
                magnitude = floor_;
            } else if (lambda[i] < 0) {
                flipped += (flipped.empty() ? "" : ", ") + shortNumber(lambda[i]);
            }
            scaled[i] /= magnitude;
        }
        const Vector p = -(v * scaled);
        record.stepKind = StepKind::SaddleFreeNewton;
        if (!flipped.empty()) record.note = "flipped negative eigenvalues " + flipped;
        if (!floored.empty())
            record.note += (record.note.empty() ? "" : "; ") + std::string("raised eigenvalues ") + floored +
                           " to the floor " + shortNumber(floor_);
        record.predictedDecrease = modelDecrease(state.gradient, state.hessian, p);
        if (search_ == "none") {
            record.stepLength = 1;
            fullStep(eval, state, p);
            return {};
        }
        LineSearchSettings settings = settings_;
        settings.initialStep = 1.0;
        StepOutcome outcome = searchAndMove(eval, state, record, p, searchKind(search_), settings);
        if (outcome.termination == Termination::Running) refreshHessian(eval, state);
        return outcome;
    }

private:
    double floor_;
    std::string search_;
    LineSearchSettings settings_;
};

MethodInfo newtonInfo(std::string id, std::string summary) {
    MethodInfo info;
    info.id = std::move(id);
    info.family = "newton";
    info.summary = std::move(summary);
    info.needsHessian = true;
    return info;
}

void addLineSearchOptions(MethodInfo& info, std::vector<std::string> choices, int defaultChoice) {
    info.options.push_back(choiceOption("line_search", "how the step length along the direction is chosen",
                                        std::move(choices), defaultChoice));
    for (OptionSpec& s : lineSearchOptionSpecs(0.9)) info.options.push_back(std::move(s));
}

}  // namespace

std::vector<MethodRegistration> newtonMethods() {
    std::vector<MethodRegistration> list;
    list.push_back({newtonInfo("newton", "pure Newton: full step -H^{-1} g, even toward saddles and uphill"),
                    [](const OptionValues&) { return std::make_unique<PureNewton>(); },
                    {}});
    {
        MethodInfo info = newtonInfo("damped-newton",
                                     "Newton direction with a line search; steepest descent when it is not downhill");
        addLineSearchOptions(info, {"armijo", "wolfe"}, 0);
        const std::vector<OptionSpec> specs = info.options;
        list.push_back({info,
                        [specs](const OptionValues& v) {
                            return std::make_unique<DampedNewton>(searchKind(optionChoice(specs, v, "line_search")),
                                                                  lineSearchSettings(specs, v));
                        },
                        [specs](const OptionValues& v) { return lineSearchSettings(specs, v).check(); }});
    }
    {
        MethodInfo info = newtonInfo("modified-newton",
                                     "Newton on H + tau I, tau raised until Cholesky succeeds (Nocedal & Wright Alg. 3.3)");
        info.options.push_back(realOption("shift_floor", "beta: the smallest nonzero shift tau tried", 1e-3, 0,
                                          kUnbounded, true, false));
        addLineSearchOptions(info, {"armijo", "wolfe"}, 0);
        const std::vector<OptionSpec> specs = info.options;
        list.push_back({info,
                        [specs](const OptionValues& v) {
                            return std::make_unique<ModifiedNewton>(optionNumber(specs, v, "shift_floor"),
                                                                    searchKind(optionChoice(specs, v, "line_search")),
                                                                    lineSearchSettings(specs, v));
                        },
                        [specs](const OptionValues& v) { return lineSearchSettings(specs, v).check(); }});
    }
    {
        MethodInfo info = newtonInfo("saddle-free-newton",
                                     "Newton on |H| (eigenvalues made positive, with a floor): repelled by saddles");
        info.options.push_back(realOption("eigenvalue_floor", "eigenvalues smaller in magnitude are raised to this",
                                          1e-4, 0, kUnbounded, true, false));
        addLineSearchOptions(info, {"none", "armijo", "wolfe"}, 1);
        const std::vector<OptionSpec> specs = info.options;
        list.push_back({info,
                        [specs](const OptionValues& v) {
                            return std::make_unique<SaddleFreeNewton>(optionNumber(specs, v, "eigenvalue_floor"),
                                                                      optionChoice(specs, v, "line_search"),
                                                                      lineSearchSettings(specs, v));
                        },
                        [specs](const OptionValues& v) { return lineSearchSettings(specs, v).check(); }});
    }
    return list;
}

}  // namespace sw::solve
