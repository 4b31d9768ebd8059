// Where our iteration counts differ from SciPy's on the bench pairs (scripts/bench_solve), the
// traced cause, checked: an option that selects the variant SciPy uses, or SciPy changed in the
// one respect found, must give the other side's count. Problems of Moré, Garbow & Hillstrom
// (1981) from the standard starts, scripts/bench_solve's stopping rule (|g|_2 <= 1e-8, exact
// derivatives).
// Iteration counts: reference computed with SciPy 1.10.1 scipy.optimize.minimize (Debian's
// python3-scipy, derivatives from SymPy 1.11 as in tests/bench/bench_solve_scipy.py), copied
// here so the check runs without Python. A variant must take SciPy's count within one
// iteration: the two follow the same path to rounding, and rounding can tip the last step
// (a rounding-level change in our BFGS update moved problem 3 from 155 to 156).

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

void expectSciPysIterations(const std::string& method, const sw::solve::OptionValues& options,
                            const char* scipyMethod, const std::vector<SciPyCount>& counts) {
    for (const SciPyCount& c : counts) {
        const sw::solve::Run run = runProblem(c.problem, method, options);
        SCOPED_TRACE(method + " on problem " + std::to_string(c.problem));
        ASSERT_TRUE(sw::solve::isConvergence(run.termination)) << run.message;
        EXPECT_NEAR(run.iterations(), c.iterations, 1)
            << "SciPy 1.10.1 " << scipyMethod << " needs " << c.iterations << " iterations (reference computed with "
            << "SciPy 1.10.1 scipy.optimize.minimize)";
        std::printf("%-20s problem %2d: ours %3d iterations, SciPy 1.10.1 %s %3d\n", method.c_str(), c.problem,
                    run.iterations(), scipyMethod, c.iterations);
    }
}

TEST(SciPyVariants, BfgsWithTheDecreaseBasedFirstTrialTakesSciPysBfgsIterations) {
    // SciPy 1.10.1 method='BFGS', gtol=1e-8, norm=2: nit on every problem of the catalogue where it
    // succeeds (on problem 2 it stops with "precision loss"). Our default (alpha = 1 first) differs.
    expectSciPysIterations("bfgs", {{"first_trial", "previous_decrease"}}, "BFGS",
                           {{1, 34}, {3, 155}, {4, 16}, {5, 16}, {6, 19}, {7, 32}, {8, 23}, {9, 4}, {13, 62}, {14, 91}});
}

TEST(SciPyVariants, TrustRegionExactTakesSciPysIterationsWhenSciPySolvesItsSubproblemToRounding) {
    // SciPy 1.10.1 method='trust-exact' stops its subproblem iteration when | |p| - radius | <= 0.1 radius
    // (k_easy = 0.1, k_hard = 0.2); run through scipy.optimize._trustregion._minimize_trust_region with
    // IterativeSubproblem(k_easy=1e-10, k_hard=1e-10) it takes these counts (reference computed with SciPy
    // 1.10.1). On Wood its default takes 43, ours 44: the loose subproblem, not the radius rule, makes the
    // difference. Problems where that SciPy run did not succeed (3, 4, 6) are left out.
    const std::vector<SciPyCount> counts = {{1, 25}, {2, 8}, {5, 8}, {7, 9}, {8, 14}, {9, 2}, {13, 21}, {14, 44}};
    for (const SciPyCount& c : counts) {
        const sw::solve::Run run = runProblem(c.problem, "trust-region-exact", {});
        SCOPED_TRACE("trust-region-exact on problem " + std::to_string(c.problem));
        ASSERT_TRUE(sw::solve::isConvergence(run.termination)) << run.message;
        // Within one iteration: both follow the same path to rounding, which can tip the last step.
        EXPECT_NEAR(run.iterations(), c.iterations, 1) << "reference computed with SciPy 1.10.1, trust-exact with "
                                                          "its subproblem solved to rounding";
        std::printf("trust-region-exact   problem %2d: ours %3d iterations, SciPy 1.10.1 trust-exact (subproblem to "
                    "rounding) %3d\n", c.problem, run.iterations(), c.iterations);
    }
}

TEST(SciPyVariants, TrustRegionExactWithSciPysLargestRadiusTakesSciPysIterationsOnBrownBadlyScaled) {
    // The minimiser of problem 4 lies at x1 = 1e6: SciPy 1.10.1 trust-exact (max_trust_radius 1000) needs
    // 1010 iterations (reference computed with SciPy 1.10.1 scipy.optimize.minimize); ours takes the same
    // with max_radius=1000, so the radius rules agree step for step (ours: 32 with max_radius 1e10).
    const sw::solve::Run run = runProblem(4, "trust-region-exact", {{"max_radius", "1000"}});
    ASSERT_TRUE(sw::solve::isConvergence(run.termination)) << run.message;
    EXPECT_NEAR(run.iterations(), 1010, 1) << "reference computed with SciPy 1.10.1, trust-exact";
    const sw::solve::Run ours = runProblem(4, "trust-region-exact", {});
    EXPECT_LT(ours.iterations(), 100);
}

}  // namespace
}  // namespace sw::reference
