// Every registered method (least-squares methods excepted: a formula objective has no
// residual form) on the published catalogue of Moré, Garbow & Hillstrom (1981), from the
// standard starts. The honest outcome of every (method, problem) pair is recorded in
// kExpected below and asserted, so a regression (or an improvement) fails until the table
// is updated; the robust methods must reach a published minimum on every problem.
// Run with SW_PRINT_EXPECTED=1 to print the observed table in the source's own format.

#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "tests/reference/solve/published_problems.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <map>
#include <set>
#include <vector>
#include <string>

namespace sw::reference {
namespace {

using RunResult = sw::solve::Run;
using sw::solve::Termination;

enum class Outcome {
    ReachesFStar,          // |f - f*| within valueTolerance(f*)
    ReachesLocalMinimum,   // the paper's published local minimum (Freudenstein-Roth: 48.9842)
    ConvergesElsewhere,    // a convergence test fired at a point that is not a published minimum
    Stalls,                // iteration or evaluation limit, not at a published minimum
    BreaksDown,            // line search failed, region collapsed, non-finite value, ...
};

const char* outcomeName(Outcome o) {
    switch (o) {
        case Outcome::ReachesFStar: return "ReachesFStar";
        case Outcome::ReachesLocalMinimum: return "ReachesLocalMinimum";
        case Outcome::ConvergesElsewhere: return "ConvergesElsewhere";
        case Outcome::Stalls: return "Stalls";
        case Outcome::BreaksDown: return "BreaksDown";
    }
    return "?";
}

struct Expected {
    const char* method;
    int problem;  // Moré, Garbow & Hillstrom (1981) problem number
    Outcome outcome;
};

// Observed with the stopping rules of catalogueRules() below. Keep in step with the code:
// a changed entry is a changed behaviour, to be explained in the commit.
const std::vector<Expected> kExpected = {
#include "tests/reference/solve/catalogue_expected.inc"
};

// Methods that must reach a published minimum (f*, or the published local minimum where
// the paper gives one) on every problem of the catalogue.
const std::set<std::string> kRobust = {"trust-region-dogleg", "trust-region-cg", "trust-region-exact",
                                       "modified-newton", "bfgs"};

sw::solve::StoppingRules catalogueRules() {
    sw::solve::StoppingRules rules;
    rules.maxIterations = 3000;
    rules.maxEvaluations = 200000;
    rules.gradientTolerance = 1e-10;
    rules.spectrumMaxDimension = 0;
    return rules;
}

Outcome classify(const RunResult& run, const PublishedProblem& p) {
    if (reachesValue(run.value, p.fStar)) return Outcome::ReachesFStar;
    if (std::isfinite(p.localMinimum) && reachesValue(run.value, p.localMinimum)) return Outcome::ReachesLocalMinimum;
    if (sw::solve::isConvergence(run.termination)) return Outcome::ConvergesElsewhere;
    if (run.termination == Termination::IterationLimit || run.termination == Termination::EvaluationLimit)
        return Outcome::Stalls;
    return Outcome::BreaksDown;
}

std::vector<std::string> catalogueMethods() {
    std::vector<std::string> ids;
    for (const sw::solve::MethodInfo& m : sw::solve::methods())
        if (!m.needsResiduals) ids.push_back(m.id);
    return ids;
}

struct Row {
    std::string method, problem;
    Outcome outcome;
    int iterations;
    double value;
    std::string termination;
};

// The table is printed once, after all methods ran.
std::vector<Row>& observedRows() {
    static std::vector<Row> rows;
    return rows;
}

class PrintTable : public ::testing::Environment {
public:
    void TearDown() override {
        const std::vector<Row>& rows = observedRows();
        if (rows.empty()) return;
        std::printf("\nCatalogue of Moré, Garbow & Hillstrom (1981), standard starts; f* tolerance: relative 1e-5 "
                    "(absolute 1e-10 when f* = 0)\n");
        std::printf("%-22s %-20s %-20s %6s %14s  %s\n", "method", "problem", "outcome", "iter", "f", "termination");
        for (const Row& r : rows)
            std::printf("%-22s %-20s %-20s %6d %14.6g  %s\n", r.method.c_str(), r.problem.c_str(), outcomeName(r.outcome),
                        r.iterations, r.value, r.termination.c_str());
    }
};
const auto* const kPrintTable = ::testing::AddGlobalTestEnvironment(new PrintTable);

class Catalogue : public ::testing::TestWithParam<std::string> {};

TEST_P(Catalogue, EveryMethodMeetsItsRecordedOutcomeOnEveryPublishedProblem) {
    const std::string method = GetParam();
    const bool printExpected = std::getenv("SW_PRINT_EXPECTED") != nullptr;
    for (const PublishedProblem& p : publishedProblems()) {
        SCOPED_TRACE(method + " on " + p.name + " (" + p.source() + ")");
        const FormulaObjective objective(p.formula, p.variables);
        const Vector start = Eigen::Map<const Vector>(p.start.data(), static_cast<Eigen::Index>(p.start.size()));
        const RunResult run = sw::solve::solve(method, objective, start, {}, catalogueRules());
        ASSERT_NE(run.termination, Termination::Running);
        const Outcome observed = classify(run, p);
        observedRows().push_back({method, p.name, observed, run.iterations(), run.value, toString(run.termination)});
        if (printExpected)
            std::printf("    {\"%s\", %d, Outcome::%s},\n", method.c_str(), p.number, outcomeName(observed));

        const Expected* expected = nullptr;
        for (const Expected& e : kExpected)
            if (method == e.method && e.problem == p.number) expected = &e;
        if (!expected) {
            ADD_FAILURE() << "no recorded outcome for " << method << " on problem " << p.number << " (" << p.name
                          << "); observed " << outcomeName(observed) << " after " << run.iterations()
                          << " iterations, f = " << run.value << " (" << run.message
                          << "). Add it to catalogue_expected.inc.";
            continue;
        }
        EXPECT_EQ(outcomeName(observed), std::string(outcomeName(expected->outcome)))
            << "f = " << run.value << " after " << run.iterations() << " iterations; " << run.message;
        if (kRobust.count(method)) {
            EXPECT_TRUE(observed == Outcome::ReachesFStar || observed == Outcome::ReachesLocalMinimum)
                << "a robust method must reach the published value " << p.fStar << " (" << p.source()
                << "); got f = " << run.value << ", " << run.message;
        }
        if (observed == Outcome::ReachesFStar && isConvergence(run.termination)) {
            EXPECT_EQ(run.endPoint.kind == sw::solve::PointKind::Maximum, false) << run.endPoint.description;
        }
    }
}

INSTANTIATE_TEST_SUITE_P(AllMethods, Catalogue, ::testing::ValuesIn(catalogueMethods()),
                         [](const ::testing::TestParamInfo<std::string>& paramInfo) {
                             std::string name = paramInfo.param;
                             std::replace(name.begin(), name.end(), '-', '_');
                             return name;
                         });

TEST(Catalogue, RunsEveryRobustMethod) {
    const std::vector<std::string> ids = catalogueMethods();
    for (const char* id : {"trust-region-dogleg", "trust-region-cg", "trust-region-exact"})
        EXPECT_NE(std::find(ids.begin(), ids.end(), id), ids.end()) << id;
}

}  // namespace
}  // namespace sw::reference
