// First-order methods: gradient descent (fixed step or a line search), heavy-ball momentum,
// Nesterov's accelerated gradient, and Adam.
#include "core/solve/line_search.h"

#include <cmath>
#include <limits>

namespace sw::solve {

namespace {

constexpr double kUnbounded = std::numeric_limits<double>::infinity();  // no upper bound

// ---- gradient-descent -------------------------------------------------------------------

struct GradientDescentOptions {
    std::string lineSearch = "armijo";  // fixed | armijo | wolfe
    double stepSize = 1e-3;             // the step length when lineSearch == fixed
    double initialStep = 1.0;           // first trial of the first line search
    LineSearchSettings search;
};

class GradientDescent final : public MethodState {
public:
    explicit GradientDescent(GradientDescentOptions o) : options_(std::move(o)) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        record.stepKind = StepKind::Gradient;
        const Vector direction = -state.gradient;
        if (options_.lineSearch == "fixed") {
            record.stepLength = options_.stepSize;
            state.x += options_.stepSize * direction;
            state.value = eval.gradient(state.x, state.gradient);
            return {};
        }
        LineSearchSettings settings = options_.search;
        settings.initialStep = initialTrial(state);
        const double valueBefore = state.value;
        const double slopeBefore = -state.gradient.squaredNorm();
        StepOutcome outcome = searchAndMove(eval, state, record, direction,
                                            options_.lineSearch == "wolfe" ? LineSearchKind::Wolfe : LineSearchKind::Armijo,
                                            settings);
        previousDecrease_ = valueBefore - state.value;
        previousSlope_ = slopeBefore;
        return outcome;
    }

private:
    // Nocedal & Wright (2006), eq. 3.60: expect the same first-order decrease as last time,
    // alpha0 = 2 (f_k - f_{k-1}) / phi'(0), taken 1.01 times.
    double initialTrial(const State& state) const {
        if (!(previousDecrease_ > 0)) return options_.initialStep;
        const double slope = -state.gradient.squaredNorm();
        const double guess = 1.01 * 2.0 * previousDecrease_ / -slope;
        return std::isfinite(guess) && guess > 0 ? guess : options_.initialStep;
    }

    GradientDescentOptions options_;
    double previousDecrease_ = kNaN;
    double previousSlope_ = kNaN;
};

// ---- momentum (heavy ball) ----------------------------------------------------------------

// Polyak (1964): x_{k+1} = x_k - a g_k + b (x_k - x_{k-1}), kept as a velocity v.
class HeavyBall final : public MethodState {
public:
    HeavyBall(double stepSize, double momentum) : stepSize_(stepSize), momentum_(momentum) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        if (velocity_.size() != state.x.size()) velocity_ = Vector::Zero(state.x.size());
        velocity_ = momentum_ * velocity_ - stepSize_ * state.gradient;
        record.stepKind = StepKind::Momentum;
        record.stepLength = stepSize_;
        record.damping = momentum_;
        record.dampingName = "momentum";
        state.x += velocity_;
        state.value = eval.gradient(state.x, state.gradient);
        return {};
    }

private:
    double stepSize_, momentum_;
    Vector velocity_;
};

// ---- nesterov -------------------------------------------------------------------------------

// Nesterov (1983) accelerated gradient with constant momentum b, in the form of Bengio,
// Boulanger-Lewandowski & Pascanu (2013), which needs the gradient at the iterate only:
//   x_{k+1} = x_k + b^2 v_k - (1 + b) a g_k,   v_{k+1} = b v_k - a g_k.
// The iterates are the look-ahead points of the original form.
class Nesterov final : public MethodState {
public:
    Nesterov(double stepSize, double momentum) : stepSize_(stepSize), momentum_(momentum) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        if (velocity_.size() != state.x.size()) velocity_ = Vector::Zero(state.x.size());
        const double b = momentum_;
        state.x += b * b * velocity_ - (1 + b) * stepSize_ * state.gradient;
        velocity_ = b * velocity_ - stepSize_ * state.gradient;
        record.stepKind = StepKind::Momentum;
        record.stepLength = stepSize_;
        record.damping = b;
        record.dampingName = "momentum";
        state.value = eval.gradient(state.x, state.gradient);
        return {};
    }

private:
    double stepSize_, momentum_;
    Vector velocity_;
};

// ---- adam -------------------------------------------------------------------------------------

// Kingma & Ba (2015), Algorithm 1, with bias-corrected first and second moment estimates.
class Adam final : public MethodState {
public:
    Adam(double stepSize, double beta1, double beta2, double epsilon)
        : stepSize_(stepSize), beta1_(beta1), beta2_(beta2), epsilon_(epsilon) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const auto n = state.x.size();
        if (firstMoment_.size() != n) {
            firstMoment_ = Vector::Zero(n);
            secondMoment_ = Vector::Zero(n);
        }
        ++t_;
        firstMoment_ = beta1_ * firstMoment_ + (1 - beta1_) * state.gradient;
        secondMoment_ = beta2_ * secondMoment_ + (1 - beta2_) * state.gradient.cwiseAbs2();
        const double correction1 = 1 - std::pow(beta1_, t_);
        const double correction2 = 1 - std::pow(beta2_, t_);
        const Vector scaled =
            (firstMoment_ / correction1).array() / ((secondMoment_ / correction2).array().sqrt() + epsilon_);
        state.x -= stepSize_ * scaled;
        record.stepKind = StepKind::Adaptive;
        record.stepLength = stepSize_;
        state.value = eval.gradient(state.x, state.gradient);
        return {};
    }

private:
    double stepSize_, beta1_, beta2_, epsilon_;
    Vector firstMoment_, secondMoment_;
    int t_ = 0;
};

std::string curvatureAboveDecrease(const OptionValues& values, const std::vector<OptionSpec>& specs) {
    return lineSearchSettings(specs, values).check();
}

}  // namespace

// Heavy ball and Nesterov share their options (a fixed step and a constant momentum).
template <class Method>
MethodRegistration fixedStepMomentum(const char* id, const char* summary, const char* momentumDescription) {
    MethodInfo info;
    info.id = id;
    info.family = "first-order";
    info.summary = summary;
    info.options = {
        realOption("step_size", "step length a multiplying the gradient", 1e-3, 0, kUnbounded, true, false),
        realOption("momentum", momentumDescription, 0.9, 0, 1, false, true),
    };
    const std::vector<OptionSpec> specs = info.options;
    return {info,
            [specs](const OptionValues& v) {
                return std::make_unique<Method>(optionNumber(specs, v, "step_size"), optionNumber(specs, v, "momentum"));
            },
            {}};
}

std::vector<MethodRegistration> firstOrderMethods() {
    std::vector<MethodRegistration> list;
    {
        MethodInfo info;
        info.id = "gradient-descent";
        info.family = "first-order";
        info.summary = "steepest descent -g with a fixed step, backtracking (Armijo) or a strong Wolfe line search";
        info.options = {
            choiceOption("line_search", "how the step length is chosen", {"fixed", "armijo", "wolfe"}, 1),
            realOption("step_size", "step length when line_search = fixed", 1e-3, 0, kUnbounded, true, false),
            realOption("initial_step", "first trial step of the first line search (later: Nocedal & Wright eq. 3.60)",
                       1.0, 0, kUnbounded, true, false),
        };
        for (OptionSpec& s : lineSearchOptionSpecs(0.9)) info.options.push_back(std::move(s));
        const std::vector<OptionSpec> specs = info.options;
        list.push_back({info,
                        [specs](const OptionValues& v) {
                            GradientDescentOptions o;
                            o.lineSearch = optionChoice(specs, v, "line_search");
                            o.stepSize = optionNumber(specs, v, "step_size");
                            o.initialStep = optionNumber(specs, v, "initial_step");
                            o.search = lineSearchSettings(specs, v);
                            return std::make_unique<GradientDescent>(o);
                        },
                        [specs](const OptionValues& v) { return curvatureAboveDecrease(v, specs); }});
    }
    list.push_back(fixedStepMomentum<HeavyBall>("momentum", "heavy-ball momentum (Polyak 1964) with a fixed step",
                                                "weight b of the previous step"));
    list.push_back(fixedStepMomentum<Nesterov>(
        "nesterov", "Nesterov's accelerated gradient (1983) with a fixed step and constant momentum", "momentum b"));
    {
        MethodInfo info;
        info.id = "adam";
        info.family = "first-order";
        info.summary = "Adam (Kingma & Ba 2015): per-coordinate steps from moment estimates of the gradient";
        info.options = {
            realOption("step_size", "step size alpha", 1e-3, 0, kUnbounded, true, false),
            realOption("beta1", "decay of the first-moment estimate", 0.9, 0, 1, false, true),
            realOption("beta2", "decay of the second-moment estimate", 0.999, 0, 1, false, true),
            realOption("epsilon", "added to the root of the second moment", 1e-8, 0, kUnbounded, true, false),
        };
        const std::vector<OptionSpec> specs = info.options;
        list.push_back({info,
                        [specs](const OptionValues& v) {
                            return std::make_unique<Adam>(
                                optionNumber(specs, v, "step_size"), optionNumber(specs, v, "beta1"),
                                optionNumber(specs, v, "beta2"), optionNumber(specs, v, "epsilon"));
                        },
                        {}});
    }
    return list;
}

}  // namespace sw::solve
