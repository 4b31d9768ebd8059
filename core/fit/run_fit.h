#pragma once
// One call from a table and a fit definition to a finished run and its statistics: makes the
// fit objective, runs the method from the start values, computes the statistics at the end.

#include "core/fit/fit_statistics.h"
#include "core/solve/solver.h"

#include <memory>
#include <string>
#include <utility>
#include <vector>

namespace sw::fit {

struct FitRequest {
    FitDefinition definition;
    std::vector<double> start;             // one value per definition.parameters entry
    std::string method;                    // "" = levenberg-marquardt for least squares, else a Hessian method
    solve::OptionValues options;           // the method's options
    solve::StoppingRules rules = defaultRules();
    double confidenceLevel = 0.95;

    // Stopping rules for fits: more iterations than the solver default, and no absolute
    // gradient test (a gradient's size depends on the data's units). Least-squares methods
    // stop on their own relative tests; for any other method runFit turns on a relative
    // gradient test (|g| <= 1e-12 |g0|) when both gradient tolerances are left at 0.
    static solve::StoppingRules defaultRules() {
        solve::StoppingRules r;
        r.maxIterations = 1000;
        r.gradientTolerance = 0;
        r.relativeGradientTolerance = 0;
        return r;
    }
};

struct FitResult {
    std::shared_ptr<const FitObjective> objective;
    solve::Run run;
    FitStatistics statistics;
    std::vector<std::string> warnings;  // the statistics' warnings, plus one when the run did not converge
    bool converged() const { return solve::isConvergence(run.termination); }
};

// The method used when the request names none.
std::string defaultFitMethod(Loss loss);

// The warnings a modeler reads with a fit: one when the run did not converge, then the
// statistics' own (FitResult::warnings, and each run of a data-fit study in `run --json`).
std::vector<std::string> fitWarnings(const solve::Run& run, const FitStatistics& statistics);

// Throws FitError (bad definition, start values, unknown method, a method needing residuals
// with a loss that has none) or expr::FormulaError (the model formula).
FitResult runFit(std::shared_ptr<const Table> table, const FitRequest& request,
                 const solve::Observer& observer = {});

}  // namespace sw::fit
