// Tests of the trust-region family, cubic regularisation and SR1 through the solver engine.
#include "core/solve/solver.h"
#include "tests/core/solve/solve_test_problems.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

namespace sw::solve {
namespace {

// Inside a TEST body the name Run means testing::Test::Run.
using RunResult = sw::solve::Run;

const char* const kTrustMethods[] = {"trust-region-dogleg", "trust-region-cg", "trust-region-exact",
                                     "cubic-regularization", "sr1"};

RunResult solveOrFail(const std::string& id, const Objective& objective, const Vector& start, const OptionValues& options = {},
                StoppingRules rules = {}) {
    SolverOrError made = makeSolver(id, objective, start, options, rules);
    EXPECT_TRUE(made.solver) << made.error;
    if (!made.solver) return {};
    return solve(*made.solver);
}

class TrustFamily : public ::testing::TestWithParam<const char*> {};

// Rosenbrock (1960) from (-1.2, 1): minimum f* = 0 at (1, 1) (value from memory; the
// published catalogue run lives in tests/reference/solve).
TEST_P(TrustFamily, ReachesTheRosenbrockMinimum) {
    const FunctionObjective f = problems::rosenbrock();
    const RunResult run = solveOrFail(GetParam(), f, problems::point(-1.2, 1.0));
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_NEAR(run.x[0], 1.0, 1e-6);
    EXPECT_NEAR(run.x[1], 1.0, 1e-6);
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum);
}

TEST_P(TrustFamily, RecordsRatioPredictedAndActualDecreaseOnEveryStep) {
    const FunctionObjective f = problems::rosenbrock();
    const RunResult run = solveOrFail(GetParam(), f, problems::point(-1.2, 1.0));
    ASSERT_GT(run.trace.size(), 2u);
    for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        SCOPED_TRACE("iteration " + std::to_string(k));
        EXPECT_TRUE(std::isfinite(r.ratio));
        EXPECT_GT(r.predictedDecrease, 0);
        EXPECT_TRUE(std::isfinite(r.actualDecrease));
        EXPECT_NE(r.stepKind, StepKind::None);
        EXPECT_FALSE(r.note.empty());
        if (r.accepted) {
            EXPECT_NEAR((run.trace[k + 1].x - r.x - r.step).norm(), 0, 1e-12 * (1 + r.x.norm()));
        } else {
            EXPECT_EQ(run.trace[k + 1].x, r.x);  // a rejected step leaves the point where it was
        }
    }
}

INSTANTIATE_TEST_SUITE_P(AllTrustMethods, TrustFamily, ::testing::ValuesIn(kTrustMethods),
                         [](const auto& paramInfo) {
                             std::string name = paramInfo.param;
                             for (char& c : name)
                                 if (c == '-') c = '_';
                             return name;
                         });

TEST(TrustRegion, StepsStayInsideTheRadiusAndTheRadiusObeysItsBounds) {
    const FunctionObjective f = problems::rosenbrock();
    for (const char* id : {"trust-region-dogleg", "trust-region-cg", "trust-region-exact", "sr1"}) {
        const RunResult run = solveOrFail(id, f, problems::point(-1.2, 1.0), {{"initial_radius", "0.5"}, {"max_radius", "2"}});
        for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
            const IterationRecord& r = run.trace[k];
            EXPECT_LE(r.step.norm(), r.trustRadius * (1 + 1e-12)) << id << " iteration " << k;
            EXPECT_LE(r.trustRadius, 2.0) << id;
        }
    }
}

TEST(TrustRegion, ARejectedStepShrinksTheRadius) {
    const FunctionObjective f = problems::rosenbrock();
    // A huge first region: the full Newton step from (-1.2, 1) is poor, so some step is rejected.
    const RunResult run = solveOrFail("trust-region-exact", f, problems::point(-1.2, 1.0), {{"initial_radius", "100"}});
    int rejected = 0;
    for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        if (r.accepted) continue;
        ++rejected;
        EXPECT_LT(r.ratio, 0.1);
        EXPECT_LT(run.trace[k + 1].trustRadius, r.trustRadius);
        EXPECT_NE(r.note.text().find("rejected"), std::string::npos) << r.note.text();
    }
    EXPECT_GT(rejected, 0);
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
}

TEST(TrustRegion, SteihaugRecordsNegativeCurvatureNearASaddle) {
    const FunctionObjective f = problems::himmelblau();
    // Start close to the computed saddle of Himmelblau's function near (-0.127961, -1.953715).
    const RunResult run = solveOrFail("trust-region-cg", f, problems::point(-0.13, -1.95));
    bool sawNegativeCurvature = false;
    for (const IterationRecord& r : run.trace) sawNegativeCurvature |= r.stepKind == StepKind::NegativeCurvature;
    EXPECT_TRUE(sawNegativeCurvature);
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum) << run.endPoint.description;
}

TEST(TrustRegion, ExactSolverLeavesAnExactSaddleThroughTheHardCase) {
    const FunctionObjective f = problems::himmelblau();
    // f = x^2 - y^2 at the origin: gradient exactly zero is caught by the gradient test, so
    // start where the gradient is tiny but non-zero and lies along the positive-curvature axis.
    const FunctionObjective s = problems::saddle();
    SolverOrError made = makeSolver("trust-region-exact", s, problems::point(1e-5, 0.0));
    ASSERT_TRUE(made.solver) << made.error;
    made.solver->begin();
    made.solver->step();
    const IterationRecord& first = made.solver->run().trace.front();
    EXPECT_EQ(first.stepKind, StepKind::NegativeCurvature);
    EXPECT_NE(first.note.text().find("hard case"), std::string::npos) << first.note.text();
    EXPECT_NEAR(std::abs(first.step[1]), 1.0, 1e-9);  // to the boundary of the unit region along y
    (void)f;
}

TEST(CubicRegularization, RecordsSigmaAsDampingAndRaisesItAfterARejection) {
    const FunctionObjective f = problems::rosenbrock();
    const RunResult run = solveOrFail("cubic-regularization", f, problems::point(-1.2, 1.0), {{"initial_sigma", "1e-6"}, {"min_sigma", "1e-6"}});
    bool sawRejection = false;
    for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        EXPECT_EQ(r.dampingName, "sigma");
        EXPECT_EQ(r.stepKind, StepKind::Cubic);
        if (!r.accepted) {
            sawRejection = true;
            EXPECT_GT(run.trace[k + 1].damping, r.damping);
        }
    }
    EXPECT_TRUE(sawRejection);
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
}

TEST(Sr1, SkipsTheUpdateWhenTheDenominatorVanishes) {
    // On f = (x^2 + y^2)/2 the scaled first model B0 = I is already exact: y - B s = 0, so the
    // skip rule |s'(y - Bs)| < r |s| |y - Bs| holds with both sides 0 and the update is skipped.
    const FunctionObjective f({"x", "y"}, [](const Vector& v) { return 0.5 * v.squaredNorm(); },
                              [](const Vector& v, Vector& g) { g = v; },
                              [](const Vector&, Matrix& h) { h.setIdentity(); }, "round bowl");
    const RunResult run = solveOrFail("sr1", f, problems::point(0.3, -0.2));
    ASSERT_GE(run.trace.size(), 2u);
    EXPECT_NE(run.trace.front().note.text().find("SR1 update skipped"), std::string::npos) << run.trace.front().note.text();
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
}

TEST(Sr1, UpdatesOnAQuadraticAndFindsItsMinimiser) {
    const FunctionObjective f = problems::convexQuadratic();
    const RunResult run = solveOrFail("sr1", f, problems::point(2.0, -3.0));
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_NEAR(run.x[0], 0.2, 1e-8);
    EXPECT_NEAR(run.x[1], 0.4, 1e-8);
    // SR1 on a quadratic with a line-search-free unit step terminates in at most n + 1 steps
    // once the model is exact (Nocedal & Wright 2006, Thm 6.1); allow a few radius changes.
    EXPECT_LE(run.iterations(), 8);
}

TEST(TrustRegionOptions, RejectsBadValuesWithTheOptionAndItsRange) {
    const FunctionObjective f = problems::rosenbrock();
    SolverOrError a = makeSolver("trust-region-dogleg", f, problems::point(0, 0), {{"initial_radius", "-1"}});
    EXPECT_FALSE(a.solver);
    EXPECT_NE(a.error.find("initial_radius"), std::string::npos) << a.error;
    EXPECT_NE(a.error.find("> 0"), std::string::npos) << a.error;
    SolverOrError b = makeSolver("trust-region-exact", f, problems::point(0, 0), {{"initial_radius", "10"}, {"max_radius", "1"}});
    EXPECT_FALSE(b.solver);
    EXPECT_NE(b.error.find("max_radius"), std::string::npos) << b.error;
    SolverOrError c = makeSolver("cubic-regularization", f, problems::point(0, 0), {{"sigma_increase", "0.5"}});
    EXPECT_FALSE(c.solver);
    EXPECT_NE(c.error.find("sigma_increase"), std::string::npos) << c.error;
    SolverOrError d = makeSolver("sr1", f, problems::point(0, 0), {{"subproblem", "dogleg"}});
    EXPECT_FALSE(d.solver);
    EXPECT_NE(d.error.find("exact, cg"), std::string::npos) << d.error;
}

// Nocedal & Wright (2006), Alg. 4.1: a step with rho < 1/4 shrinks the radius to a quarter of
// the radius; shrink_from=step takes a quarter of the step length when that is shorter.
TEST(TrustRegion, ShrinksFromTheRadiusByDefaultAndFromTheStepWhenAsked) {
    const FunctionObjective f = problems::rosenbrock();
    for (const char* from : {"radius", "step"}) {
        SCOPED_TRACE(from);
        const RunResult run = solve("trust-region-cg", f, problems::point(-1.2, 1), {{"shrink_from", from}});
        int shrinks = 0;
        for (std::size_t k = 0; k + 2 < run.trace.size(); ++k) {
            const IterationRecord& r = run.trace[k];
            if (!(r.ratio < 0.25)) continue;
            const double base = std::string(from) == "radius" ? r.trustRadius : std::min(r.trustRadius, r.step.norm());
            EXPECT_DOUBLE_EQ(run.trace[k + 1].trustRadius, 0.25 * base) << "iteration " << k;
            ++shrinks;
        }
        EXPECT_GT(shrinks, 0) << "Rosenbrock from the standard start shrinks the region at least once";
    }
}

}  // namespace
}  // namespace sw::solve
