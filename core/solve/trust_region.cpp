// Trust-region methods (dogleg, Steihaug–Toint CG, exact Moré–Sorensen), adaptive cubic
// regularisation, and the SR1 quasi-Newton method with a trust region. The subproblems
// themselves live in trust_subproblem.cpp; this file holds the outer loops: the ratio of
// actual to predicted decrease, the radius (or sigma) update, acceptance, and the records.
#include "core/solve/method.h"
#include "core/solve/trust_subproblem.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace sw::solve {

namespace {

constexpr double kUnbounded = std::numeric_limits<double>::infinity();  // no upper bound
constexpr double kEps = std::numeric_limits<double>::epsilon();

// ---- settings ------------------------------------------------------------------------

// The radius update of Nocedal & Wright (2006), Alg. 4.1, with its thresholds as options.
struct RadiusSettings {
    double initialRadius = 1.0;  // Delta_0
    double maxRadius = 1e10;     // Delta never grows past this
    double eta = 0.1;            // accept the step when rho > eta (N&W: eta in [0, 1/4))
    double shrinkBelow = 0.25;   // rho below this shrinks the region
    double expandAbove = 0.75;   // rho above this, with a step on the boundary, expands it
    double shrinkFactor = 0.25;  // on a shrink: new radius = shrinkFactor * radius (or * |p|, see below)
    bool shrinkFromStep = false; // shrink from min(radius, |p|) instead of the radius (N&W Alg. 4.1 uses the radius)
    double expandFactor = 2.0;   // new radius = expandFactor * radius on an expansion
    double minRadius = 1e-13;    // collapse when the radius < minRadius * (1 + |x|)

    std::string check() const {
        if (initialRadius > maxRadius)
            return "option initial_radius (" + shortNumber(initialRadius) + ") must not exceed max_radius (" +
                   shortNumber(maxRadius) + ")";
        if (!(shrinkBelow < expandAbove))
            return "option shrink_below (" + shortNumber(shrinkBelow) + ") must be less than expand_above (" +
                   shortNumber(expandAbove) + ")";
        if (eta > shrinkBelow)
            return "option eta (" + shortNumber(eta) + ") must not exceed shrink_below (" + shortNumber(shrinkBelow) +
                   ")";
        return "";
    }
};

std::vector<OptionSpec> radiusOptionSpecs(double etaDefault, int shrinkFromDefault) {
    return {
        realOption("initial_radius", "trust radius of the first step", 1.0, 0, kUnbounded, true, false),
        realOption("max_radius", "the radius never grows past this", 1e10, 0, kUnbounded, true, false),
        realOption("eta", "a step is accepted when the ratio rho of actual to predicted decrease exceeds this",
                   etaDefault, 0, 0.25, false, true),
        realOption("shrink_below", "a ratio below this shrinks the region", 0.25, 0, 1, true, true),
        realOption("expand_above", "a ratio above this, with the step on the boundary, expands the region", 0.75, 0,
                   1, true, true),
        choiceOption("shrink_from",
                     "a shrink multiplies this by shrink_factor: the radius (Nocedal & Wright Alg. 4.1) or the step "
                     "length when it is shorter",
                     {"radius", "step"}, shrinkFromDefault),
        realOption("shrink_factor", "on a shrink the new radius is this times the radius or step (see shrink_from)", 0.25, 0, 1, true,
                   true),
        realOption("expand_factor", "on an expansion the radius is multiplied by this", 2.0, 1, kUnbounded, true,
                   false),
        realOption("min_radius", "the run ends (trust region collapsed) when the radius falls below this times (1 + |x|)",
                   1e-13, 0, 1, true, true),
    };
}

RadiusSettings radiusSettings(const std::vector<OptionSpec>& specs, const OptionValues& v) {
    RadiusSettings s;
    s.initialRadius = optionNumber(specs, v, "initial_radius");
    s.maxRadius = optionNumber(specs, v, "max_radius");
    s.eta = optionNumber(specs, v, "eta");
    s.shrinkBelow = optionNumber(specs, v, "shrink_below");
    s.expandAbove = optionNumber(specs, v, "expand_above");
    s.shrinkFactor = optionNumber(specs, v, "shrink_factor");
    s.shrinkFromStep = optionChoice(specs, v, "shrink_from") == "step";
    s.expandFactor = optionNumber(specs, v, "expand_factor");
    s.minRadius = optionNumber(specs, v, "min_radius");
    return s;
}

// ---- the ratio test shared by every method here ---------------------------------------

struct Trial {
    Vector x;
    double value = kNaN;
    Vector gradient;       // only when asked for
    double ratio = kNaN;   // rho
    bool finite = true;
    bool withinRounding = false;
};

// Evaluates f (and the gradient when wanted) at x + p and forms rho = actual / predicted.
// A non-finite trial value gives rho = -inf (the step is rejected and the region shrinks)
// and is forgotten by the evaluator, so the run goes on from x. When both decreases are
// within rounding of f, the model cannot be judged and rho is taken as 1 (common practice,
// no published source).
Trial evaluateTrial(Evaluator& eval, const State& state, const Vector& step, double predicted, bool wantGradient,
                    IterationRecord& record) {
    Trial t;
    t.x = state.x + step;
    t.value = wantGradient ? eval.gradient(t.x, t.gradient) : eval.value(t.x);
    if (eval.sawNonFinite()) {
        eval.clearNonFinite();
        t.finite = false;
        t.ratio = -std::numeric_limits<double>::infinity();
        record.actualDecrease = kNaN;
        return t;
    }
    const double actual = state.value - t.value;
    record.actualDecrease = actual;
    record.predictedDecrease = predicted;
    const double rounding = 100 * kEps * (state.valueFloor + std::abs(state.value));
    if (std::abs(actual) <= rounding && std::abs(predicted) <= rounding) {
        t.withinRounding = true;
        t.ratio = 1.0;
    } else if (predicted > 0) {
        t.ratio = actual / predicted;
    } else {
        t.ratio = actual > 0 ? 1.0 : -std::numeric_limits<double>::infinity();
    }
    return t;
}

const char* ratioNote(const Trial& t) {
    if (!t.finite) return "trial point not finite";
    if (t.withinRounding) return "decreases within rounding, ratio taken as 1";
    return "";
}


// ---- trust-region methods with the exact Hessian --------------------------------------

enum class Subproblem { Dogleg, Steihaug, Exact };

class TrustRegion final : public MethodState {
public:
    TrustRegion(Subproblem kind, RadiusSettings settings, int maxCgIterations)
        : kind_(kind), settings_(settings), maxCgIterations_(maxCgIterations), radius_(settings.initialRadius) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        SubproblemResult sub;
        switch (kind_) {
            case Subproblem::Dogleg: sub = doglegStep(state.gradient, state.hessian, radius_); break;
            case Subproblem::Steihaug: sub = steihaugStep(state.gradient, state.hessian, radius_, maxCgIterations_); break;
            case Subproblem::Exact: sub = exactTrustRegionStep(state.gradient, state.hessian, radius_); break;
        }
        record.trustRadius = radius_;
        record.step = std::move(sub.step);
        record.stepKind = sub.kind;
        record.stepLength = 1.0;
        record.note = std::move(sub.note);
        if (kind_ == Subproblem::Dogleg && sub.multiplier > 0) {
            record.damping = sub.multiplier;
            record.dampingName = "tau";
        } else if (kind_ == Subproblem::Exact) {
            record.damping = sub.multiplier;
            record.dampingName = "lambda";
        }
        const double stepNorm = record.step.norm();
        Trial trial = evaluateTrial(eval, state, record.step, sub.predictedDecrease, false, record);
        record.ratio = trial.ratio;
        record.note.add(ratioNote(trial));

        // Nocedal & Wright (2006), Alg. 4.1.
        const double before = radius_;
        if (trial.ratio < settings_.shrinkBelow) {
            radius_ = settings_.shrinkFactor * (settings_.shrinkFromStep ? std::min(radius_, stepNorm) : radius_);
        } else if (trial.ratio > settings_.expandAbove && stepNorm >= 0.99 * radius_) {
            radius_ = std::min(settings_.expandFactor * radius_, settings_.maxRadius);
        }
        if (radius_ < before) record.note.add("radius shrinks to {}", radius_);
        else if (radius_ > before) record.note.add("radius grows to {}", radius_);

        if (trial.ratio > settings_.eta) {
            state.x = std::move(trial.x);
            state.value = eval.hessian(state.x, state.gradient, state.hessian);
            state.hasHessian = true;
        } else {
            record.accepted = false;
            record.note.add("step rejected (ratio {} <= eta {})", trial.ratio, settings_.eta);
        }
        if (radius_ < settings_.minRadius * (1.0 + state.x.norm()))
            return {Termination::TrustRegionCollapsed,
                    "trust region collapsed: radius " + shortNumber(radius_) + " < min_radius x (1 + |x|) after ratio " +
                        shortNumber(trial.ratio) + "; the model no longer predicts the function at this scale"};
        return {};
    }

private:
    Subproblem kind_;
    RadiusSettings settings_;
    int maxCgIterations_;
    double radius_;
};

// ---- adaptive cubic regularisation ------------------------------------------------------

// Cartis, Gould & Toint (2011), Part I, Alg. 2.1 (ARC) with the exact model minimiser.
struct CubicSettings {
    double initialSigma = 1.0;     // sigma_0
    double minSigma = 1e-8;        // sigma never falls below this
    double maxSigma = 1e16;        // the run ends when sigma must grow past this
    double eta = 0.1;              // eta_1: accept when rho >= eta
    double verySuccessful = 0.9;   // eta_2: rho >= this lowers sigma
    double increase = 2.0;         // gamma on an unsuccessful step
    double decrease = 0.5;         // factor on a very successful step

    std::string check() const {
        if (!(eta < verySuccessful))
            return "option eta (" + shortNumber(eta) + ") must be less than very_successful (" +
                   shortNumber(verySuccessful) + ")";
        if (minSigma > initialSigma || initialSigma > maxSigma)
            return "options must satisfy min_sigma <= initial_sigma <= max_sigma (got " + shortNumber(minSigma) +
                   ", " + shortNumber(initialSigma) + ", " + shortNumber(maxSigma) + ")";
        return "";
    }
};

class CubicRegularization final : public MethodState {
public:
    explicit CubicRegularization(CubicSettings s) : settings_(s), sigma_(s.initialSigma) {}

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const SubproblemResult sub = cubicStep(state.gradient, state.hessian, sigma_);
        record.step = sub.step;
        record.stepKind = sub.kind;
        record.stepLength = 1.0;
        record.damping = sigma_;
        record.dampingName = "sigma";
        record.note = sub.note;
        const Trial trial = evaluateTrial(eval, state, sub.step, sub.predictedDecrease, false, record);
        record.ratio = trial.ratio;
        record.note.add(ratioNote(trial));

        // Cartis, Gould & Toint (2011), Part I, eq. (2.5).
        if (trial.ratio >= settings_.verySuccessful) {
            sigma_ = std::max(settings_.minSigma, settings_.decrease * sigma_);
        } else if (!(trial.ratio >= settings_.eta)) {
            sigma_ *= settings_.increase;
        }
        if (sigma_ != record.damping) record.note.add("sigma becomes {}", sigma_);

        if (trial.ratio >= settings_.eta) {
            state.x = trial.x;
            state.value = eval.hessian(state.x, state.gradient, state.hessian);
            state.hasHessian = true;
        } else {
            record.accepted = false;
            record.note.add("step rejected (ratio {} < eta {})", trial.ratio, settings_.eta);
        }
        if (sigma_ > settings_.maxSigma)
            return {Termination::TrustRegionCollapsed,
                    "cubic regularisation collapsed: sigma " + shortNumber(sigma_) + " > max_sigma " +
                        shortNumber(settings_.maxSigma) + " without an acceptable step"};
        return {};
    }

private:
    CubicSettings settings_;
    double sigma_;
};

// ---- SR1 with a trust region -------------------------------------------------------------

// Nocedal & Wright (2006), Alg. 6.2.
struct Sr1Settings {
    RadiusSettings radius;
    double skipThreshold = 1e-8;  // r in the skip rule |s'(y - Bs)| < r |s| |y - Bs| (N&W eq. 6.26)
    bool exactSubproblem = true;  // exact (Moré–Sorensen) or Steihaug CG on the SR1 model
    bool scaleInitial = true;     // B0 = (y'y / y's) I before the first update (N&W eq. 6.20)
};

class Sr1 final : public MethodState {
public:
    explicit Sr1(Sr1Settings s) : settings_(s), radius_(s.radius.initialRadius) {}

    void start(Evaluator& eval, State& state) override {
        model_ = Matrix::Identity(eval.dimension(), eval.dimension());
        (void)state;
    }

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        const SubproblemResult sub = settings_.exactSubproblem ? exactTrustRegionStep(state.gradient, model_, radius_)
                                                               : steihaugStep(state.gradient, model_, radius_);
        record.trustRadius = radius_;
        record.step = sub.step;
        record.stepKind = StepKind::QuasiNewton;
        record.stepLength = 1.0;
        record.note = std::string("SR1 model step (") + toString(sub.kind) + ")";
        const double stepNorm = sub.step.norm();
        const Trial trial = evaluateTrial(eval, state, sub.step, sub.predictedDecrease, true, record);
        record.ratio = trial.ratio;
        record.note.add(ratioNote(trial));

        // The model is updated from every trial, accepted or not (N&W Alg. 6.2).
        if (trial.finite) {
            const Vector s = sub.step;
            const Vector y = trial.gradient - state.gradient;
            if (settings_.scaleInitial && updates_ == 0 && y.dot(s) > 0) {
                model_ = (y.squaredNorm() / y.dot(s)) * Matrix::Identity(s.size(), s.size());
                record.note.add("B0 scaled to {} I", model_(0, 0));
            }
            const Vector v = y - model_ * s;
            const double denominator = s.dot(v);
            if (std::abs(denominator) < settings_.skipThreshold * s.norm() * v.norm() || !(std::abs(denominator) > 0)) {
                record.note.add("SR1 update skipped: |s'(y-Bs)| = {} < r |s| |y-Bs| = {}", std::abs(denominator),
                                settings_.skipThreshold * s.norm() * v.norm());
            } else {
                model_ += (v * v.transpose()) / denominator;
                ++updates_;
            }
        } else {
            record.note.add("SR1 update skipped: trial not finite");
        }

        // Nocedal & Wright (2006), Alg. 6.2 radius rule.
        const double before = radius_;
        if (trial.ratio > settings_.radius.expandAbove) {
            if (stepNorm > 0.8 * radius_) radius_ = std::min(settings_.radius.expandFactor * radius_, settings_.radius.maxRadius);
        } else if (!(trial.ratio >= settings_.radius.shrinkBelow)) {
            radius_ = settings_.radius.shrinkFactor *
                      (settings_.radius.shrinkFromStep ? std::min(radius_, std::max(stepNorm, kEps)) : radius_);
        }
        if (radius_ < before) record.note.add("radius shrinks to {}", radius_);
        else if (radius_ > before) record.note.add("radius grows to {}", radius_);

        if (trial.ratio > settings_.radius.eta) {
            state.x = trial.x;
            state.value = trial.value;
            state.gradient = trial.gradient;
        } else {
            record.accepted = false;
            record.note.add("step rejected (ratio {})", trial.ratio);
        }
        if (radius_ < settings_.radius.minRadius * (1.0 + state.x.norm()))
            return {Termination::TrustRegionCollapsed,
                    "trust region collapsed: radius " + shortNumber(radius_) + " < min_radius x (1 + |x|) after ratio " +
                        shortNumber(trial.ratio)};
        return {};
    }

private:
    Sr1Settings settings_;
    double radius_;
    Matrix model_;
    int updates_ = 0;
};

MethodInfo trustInfo(std::string id, std::string summary, std::vector<OptionSpec> extra = {}) {
    MethodInfo info;
    info.id = std::move(id);
    info.family = "trust-region";
    info.summary = std::move(summary);
    info.needsGradient = true;
    info.needsHessian = true;
    info.options = radiusOptionSpecs(0.1, 0);  // shrink from the radius, as N&W Alg. 4.1
    for (OptionSpec& s : extra) info.options.push_back(std::move(s));
    return info;
}

MethodRegistration trustRegistration(MethodInfo info, Subproblem kind) {
    const std::vector<OptionSpec> specs = info.options;
    const bool hasCg = findOption(specs, "max_cg_iterations") != nullptr;
    return {std::move(info),
            [specs, kind, hasCg](const OptionValues& v) -> std::unique_ptr<MethodState> {
                const int maxCg = hasCg ? static_cast<int>(optionNumber(specs, v, "max_cg_iterations")) : 0;
                return std::make_unique<TrustRegion>(kind, radiusSettings(specs, v), maxCg);
            },
            [specs](const OptionValues& v) { return radiusSettings(specs, v).check(); }};
}

}  // namespace

std::vector<MethodRegistration> trustRegionMethods() {
    std::vector<MethodRegistration> list;
    list.push_back(trustRegistration(
        trustInfo("trust-region-dogleg",
                  "trust region with the dogleg step (Powell 1970); B + tau I on an indefinite Hessian"),
        Subproblem::Dogleg));
    list.push_back(trustRegistration(
        trustInfo("trust-region-cg",
                  "trust region with Steihaug-Toint truncated CG: stops on negative curvature or the boundary",
                  {integerOption("max_cg_iterations", "inner CG iterations per step (0 means 2n)", 0, 0, 1000000)}),
        Subproblem::Steihaug));
    list.push_back(trustRegistration(
        trustInfo("trust-region-exact",
                  "trust region with the exact subproblem solution (More-Sorensen 1983, including the hard case)"),
        Subproblem::Exact));
    {
        MethodInfo info;
        info.id = "cubic-regularization";
        info.family = "trust-region";
        info.summary = "adaptive cubic regularisation (Cartis, Gould & Toint 2011): global minimiser of the cubic model, adaptive sigma";
        info.needsGradient = true;
        info.needsHessian = true;
        info.options = {
            realOption("initial_sigma", "weight sigma of the cubic term at the start", 1.0, 0, kUnbounded, true, false),
            realOption("min_sigma", "sigma never falls below this", 1e-8, 0, kUnbounded, true, false),
            realOption("max_sigma", "the run ends when sigma must grow past this", 1e16, 0, kUnbounded, true, false),
            realOption("eta", "a step is accepted when the ratio rho >= this", 0.1, 0, 1, true, true),
            realOption("very_successful", "a ratio at or above this lowers sigma", 0.9, 0, 1, true, true),
            realOption("sigma_increase", "sigma is multiplied by this after a rejected step", 2.0, 1, kUnbounded, true,
                       false),
            realOption("sigma_decrease", "sigma is multiplied by this after a very successful step", 0.5, 0, 1, true,
                       true),
        };
        const std::vector<OptionSpec> specs = info.options;
        auto settings = [specs](const OptionValues& v) {
            CubicSettings s;
            s.initialSigma = optionNumber(specs, v, "initial_sigma");
            s.minSigma = optionNumber(specs, v, "min_sigma");
            s.maxSigma = optionNumber(specs, v, "max_sigma");
            s.eta = optionNumber(specs, v, "eta");
            s.verySuccessful = optionNumber(specs, v, "very_successful");
            s.increase = optionNumber(specs, v, "sigma_increase");
            s.decrease = optionNumber(specs, v, "sigma_decrease");
            return s;
        };
        list.push_back({info,
                        [settings](const OptionValues& v) -> std::unique_ptr<MethodState> {
                            return std::make_unique<CubicRegularization>(settings(v));
                        },
                        [settings](const OptionValues& v) { return settings(v).check(); }});
    }
    {
        MethodInfo info;
        info.id = "sr1";
        info.family = "quasi-newton";
        info.summary = "symmetric rank-one quasi-Newton model in a trust region (Nocedal & Wright 2006, Alg. 6.2)";
        info.needsGradient = true;
        info.needsHessian = false;
        info.options = radiusOptionSpecs(1e-4, 1);  // SR1 keeps shrinking from the step (its records so far)
        info.options.push_back(realOption("skip_threshold",
                                          "r: the update is skipped when |s'(y - Bs)| < r |s| |y - Bs|", 1e-8, 0, 1,
                                          true, true));
        info.options.push_back(choiceOption("subproblem", "how the model is minimised in the region", {"exact", "cg"}, 0));
        info.options.push_back(flagOption("scale_initial", "scale B0 = (y'y / y's) I before the first update", true));
        const std::vector<OptionSpec> specs = info.options;
        auto settings = [specs](const OptionValues& v) {
            Sr1Settings s;
            s.radius = radiusSettings(specs, v);
            s.skipThreshold = optionNumber(specs, v, "skip_threshold");
            s.exactSubproblem = optionChoice(specs, v, "subproblem") == "exact";
            s.scaleInitial = optionFlag(specs, v, "scale_initial");
            return s;
        };
        list.push_back({info,
                        [settings](const OptionValues& v) -> std::unique_ptr<MethodState> {
                            return std::make_unique<Sr1>(settings(v));
                        },
                        [settings](const OptionValues& v) { return settings(v).radius.check(); }});
    }
    return list;
}

}  // namespace sw::solve
