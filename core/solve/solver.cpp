// The solver loop shared by every method: start, one step at a time, the stopping checks
// (each named after what it checks), the records' common fields, and the end-point
// classification by the exact Hessian.
#include "core/solve/method.h"

#include <algorithm>
#include <cmath>
#include <exception>
#include <utility>

namespace sw::solve {

namespace {

// Above this dimension the end point is not classified (an n x n eigendecomposition per run).
constexpr int kClassifyMaxDimension = 300;

class Engine final : public Solver {
public:
    Engine(const MethodRegistration& registration, std::unique_ptr<MethodState> method, const Objective& objective,
           Vector start, const StoppingRules& rules)
        : info_(registration.info),
          method_(std::move(method)),
          objective_(objective),
          eval_(objective, rules.maxEvaluations),
          rules_(rules),
          start_(std::move(start)) {
        run_.methodId = info_.id;
        run_.label = info_.id;
    }

    const MethodInfo& info() const override { return info_; }
    bool finished() const override { return run_.finished(); }
    const Run& run() const override { return run_; }
    Run takeRun() override { return std::move(run_); }

    void begin() override {
        if (begun_) return;
        begun_ = true;
        state_.x = start_;
        state_.iteration = 0;
        // Most runs end within a few hundred iterations; a record moves cheaply (its vectors and
        // strings are moved, not copied) when the trace grows past this. Reserving for the
        // iteration limit instead would ask for megabytes per run.
        run_.trace.reserve(static_cast<std::size_t>(std::min(rules_.maxIterations, 128)) + 1);
        evaluatePoint();
        // The absolute floor of "within rounding of f" tests: |f(x0)|, at most 1. A problem of
        // ordinary size keeps the floor 1; f scaled by 1e-150 gets a floor of its own size.
        state_.valueFloor = std::isfinite(state_.value) ? std::min(1.0, std::abs(state_.value)) : 1.0;
        if (eval_.sawNonFinite()) {
            appendPointRecord();
            finish(Termination::NonFinite, "not finite at the start point: " + eval_.nonFinite() + " at " +
                                               pointText(eval_.nonFinitePoint(), objective_.variableNames()));
            return;
        }
        method_->start(eval_, state_);
        // A derivative-free method may start from another point (Nelder-Mead: its best vertex).
        if (!info_.needsGradient && state_.x != start_) diagnosticGradient();
        appendPointRecord();
        initialGradientNorm_ = run_.trace.back().gradientNorm;
        stoppedAtCurrentPoint(kNaN, false);
    }

    void step() override {
        if (!begun_) begin();
        if (finished()) return;
        previousX_ = state_.x;  // a member: no allocation after the first step
        const Vector& previousX = previousX_;
        const double previousValue = state_.value;
        StepOutcome outcome;
        {
            IterationRecord& record = run_.trace.back();
            try {
                outcome = method_->iterate(eval_, state_, record);
            } catch (const std::exception& e) {
                outcome = {Termination::Failed, std::string("the method broke down: ") + e.what()};
            }
            if (record.step.size() != previousX.size()) record.step = state_.x - previousX;
            record.stepNorm = record.step.norm();
            if (std::isnan(record.actualDecrease) && record.accepted && std::isfinite(state_.value))
                record.actualDecrease = previousValue - state_.value;
            record.evaluations = eval_.counts();
        }
        const bool accepted = run_.trace.back().accepted;
        const double stepNorm = run_.trace.back().stepNorm;
        ++state_.iteration;
        if (!state_.hasHessian && info_.needsHessian) state_.hessian.resize(0, 0);
        // The shown gradient of a derivative-free method only changes with the point (a simplex
        // step often keeps its best vertex).
        if (!info_.needsGradient && state_.x != previousX) diagnosticGradient();
        appendPointRecord();

        if (outcome.termination != Termination::Running) {
            finish(outcome.termination, outcome.message);
            return;
        }
        if (eval_.sawNonFinite()) {
            finish(Termination::NonFinite, "non-finite result in iteration " + std::to_string(state_.iteration) +
                                               ": " + eval_.nonFinite() + " at " +
                                               pointText(eval_.nonFinitePoint(), objective_.variableNames()));
            return;
        }
        const double change = accepted ? std::abs(previousValue - state_.value) : kNaN;
        if (stoppedAtCurrentPoint(accepted ? stepNorm : kNaN, accepted, previousX, change, previousValue)) return;
    }

    void stop() override {
        if (!begun_) begin();
        if (finished()) return;
        finish(Termination::StoppedByCaller,
               "stopped by the caller after " + std::to_string(run_.iterations()) + " iterations");
    }

private:
    // Fills value, gradient (and Hessian) at state_.x, counted, as the method needs them.
    void evaluatePoint() {
        if (info_.needsHessian) {
            state_.value = eval_.hessian(state_.x, state_.gradient, state_.hessian);
            state_.hasHessian = true;
        } else if (info_.needsGradient) {
            state_.value = eval_.gradient(state_.x, state_.gradient);
        } else {
            state_.value = eval_.value(state_.x);
            diagnosticGradient();
        }
    }

    // Derivative-free methods still show the gradient in their records; it is not counted.
    void diagnosticGradient() {
        if (state_.x.allFinite()) objective_.valueGradient(state_.x, state_.gradient);
        else state_.gradient = Vector::Constant(state_.x.size(), kNaN);
    }

    // Appends the record of the current point, built in place (a record is a few hundred bytes).
    void appendPointRecord() {
        if (!run_.trace.empty()) {
            // The step fields of the previous record are final now: is it one findings need?
            IterationRecord& last = run_.trace.back();
            const bool kindChanged = run_.trace.size() >= 2 && run_.trace[run_.trace.size() - 2].stepKind != last.stepKind;
            bool nonFinite = !std::isfinite(last.value) || !last.gradient.allFinite();
            for (const LineSearchTrial& t : last.trials) nonFinite = nonFinite || !std::isfinite(t.value);
            last.notable = last.notable || !last.accepted || kindChanged || nonFinite;
            traceBytes_ += recordBytes(last);
            if (traceBytes_ > rules_.traceMemoryLimit) thinTrace();
        }
        IterationRecord& r = run_.trace.emplace_back();
        r.iteration = state_.iteration;
        r.x = state_.x;
        r.value = state_.value;
        r.gradient = state_.gradient;
        r.gradientNorm = state_.gradient.size() == state_.x.size() ? state_.gradient.norm() : kNaN;
        r.evaluations = eval_.counts();
        if (state_.x.size() <= rules_.spectrumMaxDimension && state_.x.allFinite()) {
            if (state_.hasHessian && state_.hessian.rows() == state_.x.size()) {
                spectrum(state_.hessian, r.hessianEigenvalues, r.conditionNumber);
            } else {
                Vector g;
                Matrix h;
                objective_.valueGradientHessian(state_.x, g, h);  // diagnostics only: not counted
                spectrum(h, r.hessianEigenvalues, r.conditionNumber);
            }
        }
    }

    // Heap and inline bytes of one record, for the trace memory limit.
    static std::size_t recordBytes(const IterationRecord& r) {
        constexpr std::size_t kBlock = 16;  // allocator overhead per heap block
        auto vectorBytes = [](const Vector& v) {
            return v.size() ? static_cast<std::size_t>(v.size()) * sizeof(double) + kBlock : std::size_t{0};
        };
        std::size_t bytes = sizeof(IterationRecord) + vectorBytes(r.x) + vectorBytes(r.gradient) + vectorBytes(r.step) +
                            vectorBytes(r.hessianEigenvalues);
        if (r.trials.capacity()) bytes += r.trials.capacity() * sizeof(LineSearchTrial) + kBlock;
        if (r.dampingName.capacity() > 15) bytes += r.dampingName.capacity() + kBlock;
        return bytes;
    }

    // Drops records from the middle of the trace until it takes at most half the memory limit
    // (so thinning runs once per half-limit of new records: amortised constant work per step).
    // Kept: record 0, the last kTraceKeptTail records, notable records, and ordinary records
    // whose iteration is a multiple of the stride. The first pass uses the stride as it is
    // (records added since the last thinning that are off it go); the stride doubles only
    // while that is not enough. When notable records alone outgrow a quarter of the limit,
    // every other one of them goes too.
    void thinTrace() {
        std::vector<IterationRecord>& trace = run_.trace;
        const std::size_t target = rules_.traceMemoryLimit / 2;
        bool firstPass = true;
        while (traceBytes_ > target && trace.size() > kTraceKeptTail + 2) {
            const std::size_t end = trace.size() - kTraceKeptTail;  // records [1, end) may go
            std::size_t ordinaryBytes = 0, notableBytes = 0;
            for (std::size_t i = 1; i < end; ++i) (trace[i].notable ? notableBytes : ordinaryBytes) += recordBytes(trace[i]);
            const bool thinNotable = notableBytes > rules_.traceMemoryLimit / 4 || ordinaryBytes == 0;
            if (!thinNotable && !firstPass) {
                if (run_.recordStride > (long{1} << 40)) break;  // beyond any iteration count
                run_.recordStride *= 2;
            }
            firstPass = false;
            std::size_t write = 1;
            long notableOrdinal = 0;
            for (std::size_t read = 1; read < trace.size(); ++read) {
                IterationRecord& r = trace[read];
                bool keep = read >= end;
                if (!keep && r.notable) keep = !thinNotable || (notableOrdinal++ % 2 == 0);
                else if (!keep) keep = r.iteration % run_.recordStride == 0;
                if (!keep) {
                    traceBytes_ -= std::min(traceBytes_, recordBytes(r));
                    ++run_.droppedRecords;
                    if (r.notable) ++run_.droppedNotableRecords;
                    continue;
                }
                if (write != read) trace[write] = std::move(r);
                ++write;
            }
            if (write == trace.size()) {
                if (thinNotable) break;  // nothing could go
                continue;                // the stride doubles on the next pass
            }
            trace.erase(trace.begin() + static_cast<std::ptrdiff_t>(write), trace.end());
        }
    }

    bool stoppedAtCurrentPoint(double stepNorm, bool accepted, const Vector& previousX = {},
                               double valueChange = kNaN, double previousValue = kNaN) {
        std::string why;
        if (gradientSmallEnough(why)) return finish(Termination::GradientTolerance, why), true;
        if (gradientReducedEnough(why)) return finish(Termination::GradientRatioBelow, why), true;
        if (accepted && stepTooSmall(stepNorm, previousX, why)) return finish(Termination::StepTolerance, why), true;
        if (accepted && functionChangeTooSmall(valueChange, previousValue, why))
            return finish(Termination::FunctionTolerance, why), true;
        if (const Termination own = method_->ownConvergence(&why); own != Termination::Running)
            return finish(own, why), true;
        if (iterationLimitReached(why)) return finish(Termination::IterationLimit, why), true;
        if (evaluationLimitReached(why)) return finish(Termination::EvaluationLimit, why), true;
        return false;
    }

    bool gradientSmallEnough(std::string& why) const {
        if (!info_.needsGradient) return false;  // derivative-free methods judge by their own measure
        const double norm = run_.trace.back().gradientNorm;
        if (norm <= rules_.gradientTolerance) {
            why = "converged: gradient norm " + shortNumber(norm) + " <= gradient_norm_below " +
                  shortNumber(rules_.gradientTolerance);
            return true;
        }
        return false;
    }

    bool gradientReducedEnough(std::string& why) const {
        if (!info_.needsGradient || !(rules_.relativeGradientTolerance > 0)) return false;
        const double norm = run_.trace.back().gradientNorm;
        if (norm <= rules_.relativeGradientTolerance * initialGradientNorm_) {
            why = "converged: gradient norm " + shortNumber(norm) + " <= gradient_ratio_below " +
                  shortNumber(rules_.relativeGradientTolerance) + " x the start's gradient norm " +
                  shortNumber(initialGradientNorm_);
            return true;
        }
        return false;
    }

    bool stepTooSmall(double stepNorm, const Vector& previousX, std::string& why) const {
        if (!info_.needsGradient || !(stepNorm >= 0)) return false;
        // |x|_2 <= |x|_1: most steps are far longer than the tolerance, and this settles them
        // without the square root.
        if (stepNorm > rules_.stepTolerance * (1.0 + previousX.lpNorm<1>())) return false;
        const double scale = 1.0 + previousX.norm();
        if (stepNorm <= rules_.stepTolerance * scale) {
            why = "converged on step: step norm " + shortNumber(stepNorm) + " <= relative_step_below " +
                  shortNumber(rules_.stepTolerance) + " x (1 + |x|) = " + shortNumber(rules_.stepTolerance * scale);
            return true;
        }
        return false;
    }

    bool functionChangeTooSmall(double change, double previousValue, std::string& why) const {
        if (!(rules_.functionTolerance > 0) || !(change >= 0)) return false;
        const double bound = rules_.functionTolerance * (1.0 + std::abs(previousValue));
        if (change <= bound) {
            why = "converged on function change: |f change| " + shortNumber(change) + " <= relative_change_below " +
                  shortNumber(rules_.functionTolerance) + " x (1 + |f|) = " + shortNumber(bound);
            return true;
        }
        return false;
    }

    bool iterationLimitReached(std::string& why) const {
        if (run_.iterations() < rules_.maxIterations) return false;
        why = "stopped at the iteration limit (" + std::to_string(rules_.maxIterations) +
              ") with gradient norm " + shortNumber(run_.trace.back().gradientNorm);
        return true;
    }

    bool evaluationLimitReached(std::string& why) const {
        if (!eval_.overBudget()) return false;
        const EvaluationCounts& c = eval_.counts();
        why = "stopped at the evaluation limit (" + std::to_string(rules_.maxEvaluations) + "): " +
              std::to_string(c.value) + " values, " + std::to_string(c.gradient) + " gradients, " +
              std::to_string(c.hessian) + " Hessians";
        return true;
    }

    void finish(Termination kind, std::string message) {
        // Convergence is claimed only for a stopping test that held with finite numbers.
        if (isConvergence(kind) && !(std::isfinite(state_.value) && state_.x.allFinite() &&
                                     (state_.gradient.size() != state_.x.size() || state_.gradient.allFinite()))) {
            message = "failed: " + message + ", but the value or gradient there is not finite";
            kind = Termination::Failed;
        }
        run_.termination = kind;
        run_.message = std::move(message);
        run_.x = state_.x;
        run_.value = state_.value;
        run_.gradientNorm = run_.trace.empty() ? kNaN : run_.trace.back().gradientNorm;
        run_.evaluations = eval_.counts();
        if (!run_.trace.empty()) {
            IterationRecord& last = run_.trace.back();
            last.evaluations = eval_.counts();
            last.notable = last.notable || !std::isfinite(last.value) || !last.gradient.allFinite();
        }
        classifyEndPoint();
        // A stopping test can hold away from a critical point (an absolute gradient tolerance on
        // a tiny objective, a step tolerance on a slow method): say so beside the claim.
        if (isConvergence(run_.termination) && run_.endPoint.kind == PointKind::NotCritical)
            run_.message += "; but the end point is not a critical point (" + run_.endPoint.reason + ")";
    }

    void classifyEndPoint() {
        const int n = static_cast<int>(state_.x.size());
        if (n > kClassifyMaxDimension) {
            run_.endPoint.reason = std::to_string(n) + " variables is above the limit of " +
                                   std::to_string(kClassifyMaxDimension) + " for an eigendecomposition";
            run_.endPoint.description = "not classified: " + run_.endPoint.reason;
            return;
        }
        if (!state_.x.allFinite() || !std::isfinite(state_.value)) {
            run_.endPoint = solve::classifyEndPoint(Matrix(), state_.x, state_.value, state_.gradient);
            return;
        }
        Matrix h;
        Vector g = state_.gradient;
        if (state_.hasHessian && state_.hessian.rows() == n) {
            h = state_.hessian;
        } else {
            objective_.valueGradientHessian(state_.x, g, h);  // exact Hessian; not counted
        }
        if (g.size() != n) objective_.valueGradient(state_.x, g);
        // A class only where the point is stationary by a test that does not scale with f.
        run_.endPoint = solve::classifyEndPoint(h, state_.x, state_.value, g);
    }

    const MethodInfo& info_;  // the registration's, which lives as long as the program
    std::unique_ptr<MethodState> method_;
    const Objective& objective_;
    Evaluator eval_;
    StoppingRules rules_;
    Vector start_;
    Vector previousX_;
    State state_;
    Run run_;
    bool begun_ = false;
    double initialGradientNorm_ = kNaN;
    std::size_t traceBytes_ = 0;  // recordBytes of every record but the last
};

std::string firstNonFinite(const Vector& v, const std::vector<std::string>& names) {
    for (Eigen::Index i = 0; i < v.size(); ++i)
        if (!std::isfinite(v[i])) {
            const auto k = static_cast<std::size_t>(i);
            return (k < names.size() ? names[k] : "x" + std::to_string(i + 1)) + " = " + shortNumber(v[i]);
        }
    return "";
}

}  // namespace

SolverOrError makeSolver(const std::string& methodId, const Objective& objective, const Vector& start,
                         const OptionValues& options, const StoppingRules& rules) {
    SolverOrError result;
    const MethodRegistration* registration = findRegistration(methodId);
    if (!registration) {
        result.error = "unknown method '" + methodId + "'; known: " + methodIdList();
        return result;
    }
    const MethodInfo& info = registration->info;
    if (std::string why = checkOptions(info.options, options); !why.empty()) {
        result.error = "method " + methodId + ": " + why;
        return result;
    }
    // Values under a former option name (docs/names.md) are read under the current one.
    OptionValues renamed;
    const OptionValues* current = &options;
    for (const auto& entry : options)
        if (!findOption(info.options, entry.first)) {
            renamed = options;
            if (std::string why = renameFormerOptions(info.options, renamed); !why.empty()) {
                result.error = "method " + methodId + ": " + why;
                return result;
            }
            current = &renamed;
            break;
        }
    const OptionValues& chosen = *current;
    // Every method's defaults pass its own check (tested), so only chosen options need it.
    if (registration->check && !chosen.empty()) {
        if (std::string why = registration->check(chosen); !why.empty()) {
            result.error = "method " + methodId + ": " + why;
            return result;
        }
    }
    if (std::string why = rules.check(); !why.empty()) {
        result.error = "stopping rules: " + why;
        return result;
    }
    const int n = objective.dimension();
    if (start.size() != n) {
        const std::vector<std::string> names = objective.variableNames();
        std::string list;
        for (std::size_t i = 0; i < names.size() && i < 8; ++i) list += (i ? ", " : "") + names[i];
        if (names.size() > 8) list += ", ...";
        result.error = "the start point has " + std::to_string(start.size()) + " value" +
                       (start.size() == 1 ? "" : "s") + " but the objective has " + std::to_string(n) +
                       " variable" + (n == 1 ? "" : "s") + (list.empty() ? "" : " (" + list + ")");
        return result;
    }
    if (n == 0) {
        result.error = "the objective has no variables";
        return result;
    }
    if (!start.allFinite()) {
        result.error = "the start point is not finite: " + firstNonFinite(start, objective.variableNames());
        return result;
    }
    if (info.needsResiduals && !objective.hasResiduals()) {
        result.error = "method " + methodId +
                       " needs a least-squares objective (residuals and their Jacobian); this objective has none";
        return result;
    }
    {
        // The start must be a point where the method can begin: value and gradient finite.
        Evaluator probe(objective, 3);
        Vector g;
        Matrix h;
        Vector qtr;
        double residualValue = 0;
        if (info.needsHessian) probe.hessian(start, g, h);
        // A least-squares method's first request is the residual factor at the start: asking for
        // it here lets an objective that remembers its last point (a fit) answer it for free.
        else if (!info.needsResiduals || !probe.leastSquaresFactor(start, h, qtr, residualValue)) probe.gradient(start, g);
        if (probe.sawNonFinite()) {
            result.error = "the objective is not finite at the start point " +
                           pointText(start, objective.variableNames()) + ": " +
                           probe.nonFinite();
            return result;
        }
    }
    std::unique_ptr<MethodState> method = registration->make(chosen);
    if (!method) {
        result.error = "method " + methodId + " could not be set up";
        return result;
    }
    result.solver = std::make_unique<Engine>(*registration, std::move(method), objective, start, rules);
    return result;
}

namespace {
void runToEnd(Solver& solver, const Observer& observer) {
    solver.begin();
    while (!solver.finished()) {
        solver.step();
        if (observer && !solver.finished() && !observer(solver.run())) solver.stop();
    }
}
}  // namespace

Run solve(Solver& solver, const Observer& observer) {
    runToEnd(solver, observer);
    return solver.run();
}

Run solve(std::unique_ptr<Solver> solver, const Observer& observer) {
    if (!solver) return {};
    runToEnd(*solver, observer);
    return solver->takeRun();
}

Run solve(const std::string& methodId, const Objective& objective, const Vector& start, const OptionValues& options,
          const StoppingRules& rules) {
    SolverOrError made = makeSolver(methodId, objective, start, options, rules);
    if (!made.solver) {
        Run run;
        run.methodId = methodId;
        run.label = methodId;
        run.termination = Termination::Failed;
        run.message = made.error;
        return run;
    }
    return solve(std::move(made.solver));
}

}  // namespace sw::solve
