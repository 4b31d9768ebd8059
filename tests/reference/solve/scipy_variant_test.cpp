// Options that select the published variant SciPy's methods use, checked against SciPy's own
// iteration counts on problems of Moré, Garbow & Hillstrom (1981) from the standard starts,
// with scripts/bench_solve's stopping rule (|g|_2 <= 1e-8, exact derivatives).
// Iteration counts: reference computed with SciPy 1.10.1 scipy.optimize.minimize (Debian's
// python3-scipy, derivatives from SymPy 1.11 as in tests/bench/bench_solve_scipy.py), copied
// here so the check runs without Python. A variant must take no more iterations than SciPy.

#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "tests/reference/solve/published_problems.h"

#include <gtest/gtest.h>

#include <cstdio>
#include <string>
#include <vector>

namespace sw::reference {
namespace {

struct SciPyCount {
    int problem;     // Moré, Garbow & Hillstrom (1981) problem number
    int iterations;  // OptimizeResult.nit of SciPy 1.10.1
};

sw::solve::Run runProblem(int number, const std::string& method, const sw::solve::OptionValues& options) {
    for (const PublishedProblem& p : publishedProblems()) {
        if (p.number != number) continue;
        const FormulaObjective objective(p.formula, p.variables);
        const Vector start = Eigen::Map<const Vector>(p.start.data(), static_cast<Eigen::Index>(p.start.size()));
        sw::solve::StoppingRules rules;
        rules.maxIterations = 5000;
        rules.gradientTolerance = 1e-8;
        rules.spectrumMaxDimension = 0;
        return sw::solve::solve(method, objective, start, options, rules);
    }
    ADD_FAILURE() << "no problem " << number;
    return {};
}

void expectNoMoreIterationsThanSciPy(const std::string& method, const sw::solve::OptionValues& options,
                                     const char* scipyMethod, const std::vector<SciPyCount>& counts) {
    for (const SciPyCount& c : counts) {
        const sw::solve::Run run = runProblem(c.problem, method, options);
        SCOPED_TRACE(method + " on problem " + std::to_string(c.problem));
        ASSERT_TRUE(sw::solve::isConvergence(run.termination)) << run.message;
        EXPECT_LE(run.iterations(), c.iterations)
            << "SciPy 1.10.1 " << scipyMethod << " needs " << c.iterations << " iterations (reference computed with "
            << "SciPy 1.10.1 scipy.optimize.minimize)";
        std::printf("%-20s problem %2d: ours %3d iterations, SciPy 1.10.1 %s %3d\n", method.c_str(), c.problem,
                    run.iterations(), scipyMethod, c.iterations);
    }
}

TEST(SciPyVariants, BfgsWithTheDecreaseBasedFirstTrialNeedsNoMoreIterationsThanSciPysBfgs) {
    // SciPy 1.10.1 method='BFGS', gtol=1e-8, norm=2: nit on problems 1, 5, 6, 7, 8, 14.
    expectNoMoreIterationsThanSciPy("bfgs", {{"first_trial", "previous_decrease"}}, "BFGS",
                                    {{1, 34}, {5, 16}, {6, 19}, {7, 32}, {8, 23}, {14, 91}});
}

}  // namespace
}  // namespace sw::reference
