#include "core/fit/run_fit.h"

#include <cmath>

namespace sw::fit {

std::string defaultFitMethod(Loss loss) {
    if (hasResidualForm(loss)) return "levenberg-marquardt";
    // A method using the exact Hessian suits likelihoods and robust losses (small n).
    for (const char* id : {"trust-region-exact", "damped-newton", "bfgs"})
        if (solve::findMethod(id)) return id;
    return "levenberg-marquardt";
}

FitResult runFit(std::shared_ptr<const Table> table, const FitRequest& request, const solve::Observer& observer) {
    FitResult result;
    auto objective = std::make_shared<const FitObjective>(std::move(table), request.definition);
    result.objective = objective;
    const std::vector<std::string>& names = request.definition.parameters;
    if (request.start.size() != names.size())
        throw FitError("give one start value per parameter (" + std::to_string(names.size()) + " parameters, " +
                       std::to_string(request.start.size()) + " start values)");
    for (std::size_t j = 0; j < names.size(); ++j)
        if (!std::isfinite(request.start[j])) throw FitError("the start value of " + names[j] + " is not finite");

    const std::string method = request.method.empty() ? defaultFitMethod(request.definition.loss) : request.method;
    const solve::MethodInfo* info = solve::findMethod(method);
    if (!info) throw FitError("unknown method '" + method + "'; known: " + solve::methodIdList());
    if (info->needsResiduals && !objective->hasResiduals())
        throw FitError("method " + method + " needs residuals, and the " + std::string(toString(request.definition.loss)) +
                       " loss has none; use " + defaultFitMethod(request.definition.loss) +
                       " or another method that uses the gradient and Hessian");

    const Vector start = Eigen::Map<const Vector>(request.start.data(), static_cast<Eigen::Index>(request.start.size()));
    solve::StoppingRules rules = request.rules;
    if (!info->needsResiduals && rules.gradientTolerance == 0 && rules.relativeGradientTolerance == 0)
        rules.relativeGradientTolerance = 1e-12;
    solve::SolverOrError made = solve::makeSolver(method, *objective, start, request.options, rules);
    if (!made.solver) throw FitError(made.error);
    result.run = solve::solve(std::move(made.solver), observer);
    result.statistics = computeStatistics(*objective, result.run.x, request.confidenceLevel);
    result.warnings = fitWarnings(result.run, result.statistics);
    return result;
}

std::vector<std::string> fitWarnings(const solve::Run& run, const FitStatistics& statistics) {
    std::vector<std::string> warnings;
    if (!solve::isConvergence(run.termination))
        warnings.push_back("The method did not converge (" + std::string(solve::toString(run.termination)) + ": " +
                           run.message + "); the statistics describe where it stopped.");
    warnings.insert(warnings.end(), statistics.warnings.begin(), statistics.warnings.end());
    return warnings;
}

}  // namespace sw::fit
