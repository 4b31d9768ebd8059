// Findings over the whole published catalogue: every registered non-least-squares method on
// every problem of Moré, Garbow & Hillstrom (1981) from the standard starts (the same runs as
// catalogue_test.cpp).
//  - A run that reached the published f* (or the paper's published local minimum) and ended
//    healthily - converged at a critical point with no negative curvature - gets no `problem`
//    finding: f* from Moré, Garbow & Hillstrom (1981), problem numbers as in the paper.
//  - A run that did not converge gets at least one `problem` finding that says why.
// Remedies are not rerun here (the rules alone decide what is found).
#include "core/diagnose/diagnose.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "tests/reference/solve/published_problems.h"

#include <gtest/gtest.h>

#include <cstdio>
#include <map>
#include <string>
#include <vector>

namespace sw::reference {
namespace {

sw::solve::StoppingRules rules() {
    // catalogue_test.cpp's rules, with the records' spectra on (the window shows them).
    sw::solve::StoppingRules r;
    r.maxIterations = 3000;
    r.maxEvaluations = 200000;
    r.gradientTolerance = 1e-10;
    return r;
}

std::vector<std::string> methodsForFormulas() {
    std::vector<std::string> ids;
    for (const sw::solve::MethodInfo& m : sw::solve::methods())
        if (!m.needsResiduals) ids.push_back(m.id);
    return ids;
}

class FindingsCatalogue : public ::testing::TestWithParam<std::string> {};

TEST_P(FindingsCatalogue, HealthyRunsAtThePublishedValueHaveNoProblemAndStalledRunsAreExplained) {
    const std::string method = GetParam();
    for (const PublishedProblem& p : publishedProblems()) {
        SCOPED_TRACE(method + " on " + p.name + " (" + p.source() + ")");
        const FormulaObjective objective(p.formula, p.variables);
        const Vector start = Eigen::Map<const Vector>(p.start.data(), static_cast<Eigen::Index>(p.start.size()));
        const sw::solve::Run run = sw::solve::solve(method, objective, start, {}, rules());
        const diagnose::Findings found =
            diagnose::findFindings(run, objective, diagnose::RunSetup{method, {}, rules(), start});
        std::string list;
        for (const diagnose::Finding& f : found)
            list += std::string(" ") + diagnose::toString(f.id) + "(" + diagnose::toString(f.severity) + "): " +
                    f.message + "\n";
        const bool published = reachesValue(run.value, p.fStar) ||
                               (std::isfinite(p.localMinimum) && reachesValue(run.value, p.localMinimum));
        if (published && diagnose::isHealthyEnd(run)) {
            EXPECT_FALSE(diagnose::hasProblem(found))
                << "reached the published value " << run.value << " healthily, yet:\n" << list;
        }
        if (!sw::solve::isConvergence(run.termination)) {
            EXPECT_TRUE(diagnose::hasProblem(found))
                << "ended " << sw::solve::toString(run.termination) << " (" << run.message
                << ") with no problem finding:\n" << list;
        }
        if (std::getenv("SW_PRINT_FINDINGS"))
            std::printf("%-22s %-20s %-22s %s", method.c_str(), p.name.c_str(), sw::solve::toString(run.termination),
                        list.empty() ? " -\n" : ("\n" + list).c_str());
    }
}

INSTANTIATE_TEST_SUITE_P(AllMethods, FindingsCatalogue, ::testing::ValuesIn(methodsForFormulas()),
                         [](const ::testing::TestParamInfo<std::string>& paramInfo) {
                             std::string name = paramInfo.param;
                             std::replace(name.begin(), name.end(), '-', '_');
                             return name;
                         });

}  // namespace
}  // namespace sw::reference
