#include "core/diagnose/remedy.h"

#include "core/diagnose/scaled_objective.h"
#include "core/solve/solver.h"

#include <cmath>

namespace sw::diagnose {

namespace {

std::string num(double v, int digits = 4) { return solve::shortNumber(v, digits); }

std::string endText(const solve::Run& run) {
    if (run.endPoint.kind == solve::PointKind::Unknown) return "an unclassified point";
    std::string text = solve::toString(run.endPoint.kind);
    if (run.endPoint.kind == solve::PointKind::Saddle) text = "a saddle of index " + std::to_string(run.endPoint.index);
    else if (run.endPoint.kind == solve::PointKind::Minimum) text = "a local minimum";
    else if (run.endPoint.kind == solve::PointKind::Maximum) text = "a local maximum";
    else if (run.endPoint.kind == solve::PointKind::Degenerate)
        text = run.endPoint.index == 0 ? "a local minimum in a flat trough" : "a degenerate point";
    if (!run.endPoint.critical) text = "a point that is not critical (|∇f| = " + num(run.gradientNorm, 3) + ")";
    return text;
}

std::string endText(const solve::Run& run, bool kinkMinimum) {
    return kinkMinimum ? "a kink where f rises in every direction tried (a minimum of a non-smooth f)" : endText(run);
}

}  // namespace

RunSetup changedSetup(const RunSetup& setup, const Change& change) {
    RunSetup s = setup;
    switch (change.kind) {
        case Change::Kind::SwitchMethod: {
            s.methodId = change.method;
            s.options = change.options;
            // A data fit's rules have no absolute gradient test for least-squares methods (they stop
            // on their own relative tests); runFit then gives any other method a relative one. The
            // same here, so a fit switched away from Levenberg-Marquardt still has a gradient test.
            const solve::MethodInfo* info = solve::findMethod(change.method);
            if (info && !info->needsResiduals && s.rules.gradientTolerance == 0 && s.rules.relativeGradientTolerance == 0)
                s.rules.relativeGradientTolerance = 1e-12;
            break;
        }
        case Change::Kind::SetOptions:
            for (const auto& [name, value] : change.options) s.options[name] = value;
            break;
        case Change::Kind::RescaleVariables: break;
        case Change::Kind::RaiseIterationLimit: s.rules.maxIterations = change.maxIterations; break;
        case Change::Kind::StartPoint: s.start = change.start; break;
    }
    return s;
}

bool helped(const solve::Run& original, const solve::Run& rerun, bool rerunAtKinkMinimum) {
    const bool good = isHealthyEnd(rerun) || (rerunAtKinkMinimum && solve::isConvergence(rerun.termination));
    if (!good) return false;
    if (std::isfinite(original.value) && rerun.value > original.value + 1e-8 * (1.0 + std::abs(original.value)))
        return false;
    if (isHealthyEnd(original) && rerun.iterations() >= original.iterations()) return false;
    return true;
}

Outcome tryChange(const Objective& objective, const RunSetup& setup, const solve::Run& original, const Change& change,
                  const std::atomic<bool>* cancel) {
    const RunSetup s = changedSetup(setup, change);
    const solve::Observer observer = [cancel](const solve::Run&) { return !(cancel && cancel->load()); };
    solve::Run rerun;
    if (change.kind == Change::Kind::RescaleVariables) {
        const ScaledObjective scaled(objective, change.scale);
        solve::SolverOrError made = solve::makeSolver(s.methodId, scaled, scaled.toScaled(s.start), s.options, s.rules);
        if (made.solver) {
            rerun = mapRunBack(solve::solve(std::move(made.solver), observer), objective, change.scale);
        } else {
            rerun.methodId = s.methodId;
            rerun.termination = solve::Termination::Failed;
            rerun.message = made.error;
        }
    } else {
        solve::SolverOrError made = solve::makeSolver(s.methodId, objective, s.start, s.options, s.rules);
        if (made.solver) {
            rerun = solve::solve(std::move(made.solver), observer);
        } else {
            rerun.methodId = s.methodId;
            rerun.termination = solve::Termination::Failed;
            rerun.message = made.error;
        }
    }
    rerun.label = original.label;

    Outcome o;
    o.termination = rerun.termination;
    o.value = rerun.value;
    o.gradientNorm = rerun.gradientNorm;
    o.x = rerun.x;
    o.endKind = rerun.endPoint.kind;
    o.endIndex = rerun.endPoint.index;
    o.endCritical = rerun.endPoint.critical;
    o.iterations = rerun.iterations();
    o.evaluations = rerun.evaluations;
    // A non-smooth objective's minimum (a kink) never has a small gradient; judge it by sampling.
    const bool kinkMinimum = solve::isConvergence(rerun.termination) && !rerun.endPoint.critical &&
                             looksLikeKinkMinimum(objective, rerun.x);
    o.helped = helped(original, rerun, kinkMinimum);
    if (rerun.termination == solve::Termination::StoppedByCaller) {
        o.helped = false;
        o.text = "Not finished: the rerun was cancelled.";
    } else if (rerun.termination == solve::Termination::Failed && rerun.trace.empty()) {
        o.text = "Could not be tried: " + rerun.message + ".";
    } else {
        const std::string how = solve::isConvergence(rerun.termination)
                                    ? "converged"
                                    : "stopped (" + std::string(solve::toString(rerun.termination)) + ")";
        o.text = "Tried: it " + how + " after " + std::to_string(rerun.iterations()) + " iterations at f = " +
                 num(rerun.value, 6) + ", " + endText(rerun, kinkMinimum) + " - ";
        if (o.helped)
            o.text += isHealthyEnd(original) ? "it helped (the original took " + std::to_string(original.iterations()) +
                                                   " iterations)."
                                             : "it helped.";
        else if ((isHealthyEnd(rerun) || kinkMinimum) && isHealthyEnd(original))
            o.text += "no faster than the original (" + std::to_string(original.iterations()) + " iterations), so it did not help.";
        else if (isHealthyEnd(rerun) || kinkMinimum)
            o.text += "a minimum, but with a higher f than the original (" + num(original.value, 6) + "), so it did not help.";
        else
            o.text += "it did not help.";
    }
    o.run = std::make_shared<const solve::Run>(std::move(rerun));
    return o;
}

}  // namespace sw::diagnose
