// Each method of this file's families on small problems whose answers are known by hand:
// a convex quadratic (minimiser (0.2, 0.4), f* = -0.3; common practice, no published source)
// and Rosenbrock's function (minimiser (1, 1), f* = 0; Rosenbrock 1960, value from memory).
#include "core/objective/formula_objective.h"
#include "core/solve/method.h"
#include "core/solve/line_search.h"
#include "core/solve/quasi_newton.h"
#include "tests/core/solve/solve_test_problems.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cstdlib>
#include <cmath>

namespace sw::solve {
namespace {

using problems::point;

struct Case {
    const char* method;
    OptionValues options;
    int maxIterations;
};

void PrintTo(const Case& c, std::ostream* os) { *os << c.method; }

class EveryMethodOnTheQuadratic : public ::testing::TestWithParam<Case> {};

TEST_P(EveryMethodOnTheQuadratic, ReachesTheMinimiser) {
    const Case& c = GetParam();
    const FunctionObjective f = problems::convexQuadratic();
    StoppingRules rules;
    rules.maxIterations = c.maxIterations;
    rules.gradientTolerance = 1e-9;
    solve::Run run = solve(c.method, f, point(2, -1), c.options, rules);
    EXPECT_TRUE(isConvergence(run.termination)) << c.method << ": " << run.message;
    EXPECT_NEAR(run.x[0], 0.2, 1e-6) << c.method;
    EXPECT_NEAR(run.x[1], 0.4, 1e-6) << c.method;
    EXPECT_NEAR(run.value, -0.3, 1e-10) << c.method;
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum) << run.endPoint.description;
    EXPECT_EQ(run.endPoint.index, 0);
}

INSTANTIATE_TEST_SUITE_P(
    Solve, EveryMethodOnTheQuadratic,
    ::testing::Values(Case{"gradient-descent", {}, 500}, Case{"gradient-descent", {{"line_search", "wolfe"}}, 500},
                      Case{"gradient-descent", {{"line_search", "fixed"}, {"step_size", "0.2"}}, 500},
                      Case{"momentum", {{"step_size", "0.05"}, {"momentum", "0.5"}}, 2000},
                      Case{"nesterov", {{"step_size", "0.05"}, {"momentum", "0.5"}}, 2000},
                      Case{"adam", {{"step_size", "0.01"}}, 20000}, Case{"newton", {}, 5},
                      Case{"damped-newton", {}, 5}, Case{"modified-newton", {}, 5},
                      Case{"saddle-free-newton", {}, 5}, Case{"bfgs", {}, 50}, Case{"lbfgs", {}, 50},
                      Case{"lbfgs", {{"memory", "1"}}, 50}, Case{"cg-fletcher-reeves", {}, 100},
                      Case{"cg-polak-ribiere", {}, 100}),
    [](const ::testing::TestParamInfo<Case>& param) {
        std::string name = param.param.method;
        for (char& ch : name)
            if (ch == '-') ch = '_';
        return name + "_" + std::to_string(param.index);
    });

TEST(Newton, ConvergesInOneStepOnAConvexQuadratic) {
    // Common practice, no published source: the Newton step on a quadratic is exact.
    const FunctionObjective f = problems::convexQuadratic();
    solve::Run run = solve("newton", f, point(2, -1));
    EXPECT_EQ(run.termination, Termination::GradientTolerance) << run.message;
    EXPECT_EQ(run.iterations(), 1);
    EXPECT_EQ(run.trace[0].stepKind, StepKind::Newton);
    EXPECT_DOUBLE_EQ(run.trace[0].stepLength, 1.0);
    EXPECT_NEAR(run.trace[0].predictedDecrease, run.trace[0].actualDecrease, 1e-12);
    EXPECT_EQ(run.evaluations.hessian, 2);
}

TEST(NelderMead, FindsTheQuadraticsMinimiserFromValuesAlone) {
    const FunctionObjective f = problems::convexQuadratic();
    StoppingRules rules;
    rules.maxIterations = 1000;
    solve::Run run = solve("nelder-mead", f, point(2, -1), {}, rules);
    EXPECT_EQ(run.termination, Termination::SimplexSizeBelow) << run.message;
    EXPECT_NE(run.message.find("simplex size"), std::string::npos);
    EXPECT_NEAR(run.x[0], 0.2, 1e-6);
    EXPECT_NEAR(run.x[1], 0.4, 1e-6);
    EXPECT_EQ(run.evaluations.gradient, 0);
    EXPECT_EQ(run.evaluations.hessian, 0);
    EXPECT_FALSE(run.trace[1].note.empty());
    EXPECT_EQ(run.trace[1].stepKind, StepKind::Simplex);
}

TEST(NelderMead, EveryRecordShowsTheGradientAtItsOwnPoint) {
    // The shown gradient is recomputed only when the best vertex moves; every record, the start
    // record included (the best vertex of the start simplex need not be the start point), must
    // carry the exact gradient at its x. Gradient by hand (common practice, no published source).
    const FunctionObjective f = problems::rosenbrock();
    StoppingRules rules;
    rules.maxIterations = 200;
    // From (1.5, 1.8) the relative start simplex's vertex (1.5, 2.34) is better than the start
    // (f = 1.06 against 20.5).
    solve::Run run = solve("nelder-mead", f, point(1.5, 1.8), {}, rules);
    ASSERT_GE(run.trace.size(), 50u);
    EXPECT_NE(run.trace.front().x, point(1.5, 1.8));
    int kept = 0;
    for (std::size_t k = 0; k < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        Vector g;
        f.valueGradient(r.x, g);
        EXPECT_EQ(r.gradient, g) << "record " << k;
        EXPECT_EQ(r.gradientNorm, g.norm()) << "record " << k;
        if (k > 0 && r.x == run.trace[k - 1].x) ++kept;
    }
    EXPECT_GT(kept, 0);  // some steps keep the best vertex, so the reuse is exercised
    EXPECT_EQ(run.evaluations.gradient, 0);
}

TEST(NelderMead, DimensionScaledMovesAlsoSolveRosenbrock) {
    const FunctionObjective f = problems::rosenbrock();
    StoppingRules rules;
    rules.maxIterations = 2000;
    for (const char* scaled : {"false", "true"}) {
        solve::Run run = solve("nelder-mead", f, point(-1.2, 1), {{"dimension_scaled_moves", scaled}}, rules);
        EXPECT_EQ(run.termination, Termination::SimplexSizeBelow) << run.message;
        EXPECT_EQ(std::string(toString(run.termination)), "simplex-size-below");
        EXPECT_NEAR(run.x[0], 1, 1e-6) << scaled;
        EXPECT_NEAR(run.x[1], 1, 1e-6) << scaled;
    }
}

// The option's former name (docs/names.md) is read as the current one: the same run, step for step.
// Four variables: for n = 2 the dimension-scaled moves equal the classic ones (Gao & Han 2012).
TEST(NelderMead, ReadsTheFormerNameOfDimensionScaledMoves) {
    const FormulaObjective f("(a - 1)^2 + 2*(b + 1)^2 + 3*(c - 2)^2 + (d - a)^2 + 0.5*(b - c)^2", {"a", "b", "c", "d"});
    const Vector start = (Vector(4) << 1.5, 0.5, -1, 2).finished();
    StoppingRules rules;
    rules.maxIterations = 2000;
    const solve::Run current = solve("nelder-mead", f, start, {{"dimension_scaled_moves", "true"}}, rules);
    const solve::Run former = solve("nelder-mead", f, start, {{"adaptive", "true"}}, rules);
    const solve::Run plain = solve("nelder-mead", f, start, {}, rules);
    ASSERT_EQ(former.iterations(), current.iterations()) << former.message;
    EXPECT_EQ(former.x, current.x);
    EXPECT_NE(plain.iterations(), current.iterations());  // the option does change the run
    const solve::Run both =
        solve("nelder-mead", f, start, {{"adaptive", "true"}, {"dimension_scaled_moves", "true"}}, rules);
    EXPECT_EQ(both.termination, Termination::Failed);
    EXPECT_NE(both.message.find("former name adaptive"), std::string::npos) << both.message;
}

class RobustMethodsOnRosenbrock : public ::testing::TestWithParam<const char*> {};

TEST_P(RobustMethodsOnRosenbrock, ReachTheMinimumFromTheStandardStart) {
    // Start (-1.2, 1), minimiser (1, 1), f* = 0: Moré, Garbow & Hillstrom (1981), problem 1.
    const FunctionObjective f = problems::rosenbrock();
    StoppingRules rules;
    rules.maxIterations = 5000;
    solve::Run run = solve(GetParam(), f, point(-1.2, 1), {}, rules);
    EXPECT_EQ(run.termination, Termination::GradientTolerance) << GetParam() << ": " << run.message;
    EXPECT_NEAR(run.x[0], 1, 1e-6);
    EXPECT_NEAR(run.x[1], 1, 1e-6);
    EXPECT_LT(run.value, 1e-14);
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum);
}

INSTANTIATE_TEST_SUITE_P(Solve, RobustMethodsOnRosenbrock,
                         ::testing::Values("damped-newton", "modified-newton", "saddle-free-newton", "bfgs", "lbfgs",
                                           "cg-polak-ribiere", "cg-fletcher-reeves"),
                         [](const ::testing::TestParamInfo<const char*>& param) {
                             std::string name = param.param;
                             for (char& ch : name)
                                 if (ch == '-') ch = '_';
                             return name;
                         });

TEST(Bfgs, FewerIterationsThanGradientDescentOnRosenbrock) {
    const FunctionObjective f = problems::rosenbrock();
    StoppingRules rules;
    rules.maxIterations = 100000;
    solve::Run bfgs = solve("bfgs", f, point(-1.2, 1), {}, rules);
    solve::Run gd = solve("gradient-descent", f, point(-1.2, 1), {}, rules);
    EXPECT_LT(bfgs.iterations(), 60);
    EXPECT_GT(gd.iterations(), 10 * bfgs.iterations());
}

TEST(Bfgs, PreviousDecreaseFirstTrialFollowsEquation360) {
    // Each line search after the first starts from min(1, 1.01 * 2 (f_{k-1} - f_k) / -g_k'd_k)
    // (Nocedal & Wright 2006, eq. 3.60); the first from min(1, 1.01 / |g_0|).
    const FunctionObjective f = problems::rosenbrock();
    solve::Run run = solve("bfgs", f, point(-1.2, 1), {{"first_trial", "previous_decrease"}});
    ASSERT_TRUE(isConvergence(run.termination)) << run.message;
    ASSERT_GT(run.trace.size(), 5u);
    EXPECT_DOUBLE_EQ(run.trace[0].trials.front().alpha, std::min(1.0, 1.01 / run.trace[0].gradientNorm));
    int belowOne = 0;
    for (std::size_t k = 1; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        ASSERT_FALSE(r.trials.empty());
        const Vector direction = r.step / r.stepLength;
        const double expected = stepFromPreviousDecrease(run.trace[k - 1].value - r.value, r.gradient.dot(direction));
        EXPECT_NEAR(r.trials.front().alpha, expected, 1e-9 * expected) << "iteration " << k;
        belowOne += r.trials.front().alpha < 1;
    }
    EXPECT_GT(belowOne, 0);  // the rule is not alpha = 1 in disguise
}

TEST(Bfgs, UnitFirstTrialByDefault) {
    const FunctionObjective f = problems::rosenbrock();
    solve::Run run = solve("bfgs", f, point(-1.2, 1));
    for (std::size_t k = 1; k + 1 < run.trace.size(); ++k) EXPECT_EQ(run.trace[k].trials.front().alpha, 1.0);
}

TEST(BfgsUpdate, SkipsWhenCurvatureIsNotPositive) {
    Matrix h = Matrix::Identity(2, 2);
    std::string note;
    EXPECT_FALSE(updateInverseBfgs(h, point(1, 0), point(-1, 0), false, note));
    EXPECT_EQ(h, Matrix::Identity(2, 2));
    EXPECT_NE(note.find("BFGS update skipped: y's = -1 <= 0"), std::string::npos) << note;
    EXPECT_FALSE(updateInverseBfgs(h, point(1, 0), point(0, 1), false, note));  // y's = 0
}

TEST(BfgsUpdate, SatisfiesTheSecantEquationAndStaysSymmetricPositiveDefinite) {
    Matrix h = Matrix::Identity(2, 2);
    std::string note;
    const Vector s = point(0.3, -0.2), y = point(1.0, 0.4);  // y's = 0.22 > 0
    ASSERT_TRUE(updateInverseBfgs(h, s, y, true, note));
    EXPECT_NEAR((h * y - s).norm(), 0, 1e-14);  // H+ y = s (Nocedal & Wright eq. 6.7 for the inverse)
    EXPECT_NEAR((h - h.transpose()).norm(), 0, 1e-15);
    EXPECT_EQ(Eigen::LLT<Matrix>(h).info(), Eigen::Success);
}

// Pairs with positive curvature y's > 0, as L-BFGS keeps them, in a ring of `memory` columns.
struct RingOfPairs {
    Matrix s, y;
    std::vector<double> rho;
    RingOfPairs(int n, int memory, unsigned seed) : s(n, memory), y(n, memory), rho(static_cast<std::size_t>(memory)) {
        std::srand(seed);
        s.setRandom();
        // y = D s with a positive diagonal D, different per pair: y's > 0 always.
        y = s.cwiseProduct((Matrix::Random(n, memory).array() + 1.5).matrix());
        for (int c = 0; c < memory; ++c) rho[static_cast<std::size_t>(c)] = 1.0 / y.col(c).dot(s.col(c));
    }
};

TEST(LbfgsTwoLoop, TwoVariablePathGivesTheBitsOfTheGeneralLoop) {
    // The fast path keeps the iterate in registers but does the same operations in the same order.
    for (unsigned seed = 1; seed <= 50; ++seed) {
        const RingOfPairs ring(2, 7, seed);
        for (double r : ring.rho) ASSERT_GT(r, 0);
        const Vector g = Vector::Random(2);
        for (int count : {0, 1, 3, 7})
            for (int newest : {0, 4, 6}) {
                Vector fast, general;
                std::vector<double> alphaFast(7), alphaGeneral(7);
                lbfgsTwoLoop(ring.s, ring.y, ring.rho, count, newest, g, fast, alphaFast);
                lbfgsTwoLoopGeneral(ring.s, ring.y, ring.rho, count, newest, g, general, alphaGeneral);
                ASSERT_EQ(fast.size(), 2);
                EXPECT_EQ(fast[0], general[0]) << "seed " << seed << " count " << count << " newest " << newest;
                EXPECT_EQ(fast[1], general[1]) << "seed " << seed << " count " << count << " newest " << newest;
                if (count == 0) {
                    EXPECT_EQ(fast, Vector(-g));  // no pairs: steepest descent
                }
            }
    }
}

TEST(LbfgsTwoLoop, SatisfiesTheSecantEquationForTheNewestPair) {
    // H y = s for the newest pair (s, y): the secant equation every BFGS update keeps
    // (Nocedal & Wright 2006, eq. 6.7 for the inverse), so the direction for g = y is -s.
    for (int n : {2, 3, 6}) {
        const RingOfPairs ring(n, 5, 7u + static_cast<unsigned>(n));
        for (int newest : {0, 3}) {
            Vector d;
            std::vector<double> alpha(5);
            const Vector g = ring.y.col(newest);
            lbfgsTwoLoop(ring.s, ring.y, ring.rho, 5, newest, g, d, alpha);
            EXPECT_NEAR((d + ring.s.col(newest)).norm(), 0, 1e-12 * ring.s.col(newest).norm()) << "n = " << n;
        }
    }
}

TEST(Bfgs, RecordsSkippedUpdatesWithArmijoSteps) {
    // Backtracking alone does not enforce y's > 0; on Himmelblau from a point near the
    // maximum some accepted steps cross to falling slope, and the note must say so.
    const FunctionObjective f = problems::himmelblau();
    StoppingRules rules;
    rules.maxIterations = 200;
    bool sawSkip = false;
    for (const Vector& start : {point(-0.3, -0.9), point(0, 0), point(-1, 1), point(1, -1)}) {
        solve::Run run = solve("bfgs", f, start, {{"line_search", "armijo"}}, rules);
        for (const IterationRecord& r : run.trace)
            sawSkip = sawSkip || r.note.text().find("BFGS update skipped") != std::string::npos;
    }
    EXPECT_TRUE(sawSkip);
}

TEST(ModifiedNewton, RecordsTheShiftWhereTheHessianIsIndefinite) {
    const FunctionObjective f = problems::himmelblau();
    // Near the local maximum (-0.270845, -0.923039) the Hessian is negative definite.
    solve::Run run = solve("modified-newton", f, point(-0.3, -0.9));
    ASSERT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_EQ(run.trace[0].stepKind, StepKind::ModifiedNewton);
    EXPECT_EQ(run.trace[0].dampingName, "tau");
    EXPECT_GT(run.trace[0].damping, 0);
    EXPECT_NE(run.trace[0].note.text().find("added tau"), std::string::npos);
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum);
    EXPECT_LT(run.value, 1e-14);  // Himmelblau's minima have f = 0
}

TEST(DampedNewton, FallsBackToSteepestDescentAndSaysSo) {
    // At (-0.3, -0.9), near Himmelblau's maximum, H is negative definite, so the Newton
    // direction points uphill.
    const FunctionObjective f = problems::himmelblau();
    solve::Run run = solve("damped-newton", f, point(-0.3, -0.9));
    ASSERT_GE(run.trace.size(), 2u);
    EXPECT_EQ(run.trace[0].stepKind, StepKind::Gradient);
    EXPECT_NE(run.trace[0].note.text().find("fell back to steepest descent"), std::string::npos) << run.trace[0].note.text();
    EXPECT_LT(run.trace[1].value, run.trace[0].value);
}

TEST(Newton, FailsCleanlyOnASingularHessian) {
    // f = x^4 + y^2 at x = 0: the Hessian diag(0, 2) is singular.
    FunctionObjective f({"x", "y"}, [](const Vector& v) { return std::pow(v[0], 4) + v[1] * v[1]; },
                        [](const Vector& v, Vector& g) {
                            g[0] = 4 * std::pow(v[0], 3);
                            g[1] = 2 * v[1];
                        },
                        [](const Vector& v, Matrix& h) { h << 12 * v[0] * v[0], 0, 0, 2; });
    solve::Run run = solve("newton", f, point(0, 1));
    EXPECT_EQ(run.termination, Termination::Failed);
    EXPECT_NE(run.message.find("Hessian is singular"), std::string::npos) << run.message;
}

TEST(Adam, FollowsKingmaAndBaWithBiasCorrection) {
    // With bias correction the first Adam step has length step_size in every coordinate:
    // m1/(1-b1) = g, sqrt(v1/(1-b2)) = |g| (Kingma & Ba 2015, Section 2; epsilon negligible).
    const FunctionObjective f = problems::rosenbrock();
    StoppingRules rules;
    rules.maxIterations = 1;
    solve::Run run = solve("adam", f, point(-1.2, 1), {{"step_size", "0.01"}}, rules);
    ASSERT_EQ(run.trace.size(), 2u);
    EXPECT_NEAR(std::abs(run.trace[0].step[0]), 0.01, 1e-9);
    EXPECT_NEAR(std::abs(run.trace[0].step[1]), 0.01, 1e-9);
}

TEST(Momentum, HeavyBallStepsCombineGradientAndPreviousStep) {
    const FunctionObjective f = problems::convexQuadratic();
    StoppingRules rules;
    rules.maxIterations = 2;
    solve::Run run = solve("momentum", f, point(2, -1), {{"step_size", "0.1"}, {"momentum", "0.5"}}, rules);
    ASSERT_EQ(run.trace.size(), 3u);
    const Vector expected = 0.5 * run.trace[0].step - 0.1 * run.trace[1].gradient;  // Polyak (1964)
    EXPECT_NEAR((run.trace[1].step - expected).norm(), 0, 1e-14);
    EXPECT_EQ(run.trace[1].dampingName, "momentum");
}

TEST(QuasiNewton, RecordsTheModelsPredictedDecrease) {
    const FunctionObjective f = problems::rosenbrock();
    for (const char* method : {"bfgs", "lbfgs"}) {
        solve::Run run = solve(method, f, point(-1.2, 1));
        ASSERT_TRUE(isConvergence(run.termination)) << run.message;
        for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
            const IterationRecord& r = run.trace[k];
            EXPECT_GT(r.predictedDecrease, 0) << method << " iteration " << k;
            EXPECT_GT(r.actualDecrease, 0) << method << " iteration " << k;
        }
    }
}

TEST(Lbfgs, RecordsHowManyPairsItHolds) {
    const FunctionObjective f = problems::rosenbrock();
    solve::Run run = solve("lbfgs", f, point(-1.2, 1), {{"memory", "3"}});
    ASSERT_GE(run.trace.size(), 6u);
    EXPECT_EQ(run.trace[0].dampingName, "pairs");
    EXPECT_EQ(run.trace[0].damping, 0);
    double most = 0;
    for (const IterationRecord& r : run.trace)
        if (!std::isnan(r.damping)) most = std::max(most, r.damping);
    EXPECT_EQ(most, 3);  // never more than the memory
}

TEST(ConjugateGradient, RestartsEveryNStepsAndSaysSo) {
    const FunctionObjective f = problems::rosenbrock();
    solve::Run run = solve("cg-fletcher-reeves", f, point(-1.2, 1), {{"restart_every", "3"}});
    ASSERT_GE(run.trace.size(), 5u);
    EXPECT_EQ(run.trace[0].stepKind, StepKind::Gradient);
    EXPECT_EQ(run.trace[1].stepKind, StepKind::ConjugateGradient);
    EXPECT_EQ(run.trace[3].stepKind, StepKind::Gradient);
    EXPECT_NE(run.trace[3].note.text().find("restart after 3 steps"), std::string::npos) << run.trace[3].note.text();
    EXPECT_EQ(run.trace[1].dampingName, "beta");
}

TEST(ConjugateGradient, DescentTestMakesEveryNextDirectionSufficientlyDownhill) {
    // With the descent test sigma, each step is one whose following PR+ direction d+ satisfies
    // g+'d+ <= -sigma |g+|^2 (Gilbert & Nocedal 1992); c2 = 0.4 without orthogonality restarts
    // leaves room for it to bite on Rosenbrock.
    const FunctionObjective f = problems::rosenbrock();
    const double sigma = 0.01;
    solve::Run run = solve("cg-polak-ribiere", f, point(-1.2, 1),
                           {{"curvature", "0.4"}, {"restart_orthogonality", "0"}, {"descent_test", "0.01"}});
    ASSERT_TRUE(isConvergence(run.termination)) << run.message;
    int labelled = 0;
    for (std::size_t k = 1; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        const Vector direction = r.step / r.stepLength;
        EXPECT_LE(r.gradient.dot(direction), -sigma * r.gradient.squaredNorm()) << "iteration " << k;
        for (const LineSearchTrial& t : run.trace[k - 1].trials) labelled += t.failed == "descent test";
    }
    EXPECT_GE(labelled, 1);  // the test rejected at least one Wolfe step
}

TEST(ConjugateGradient, PolakRibierePlusNeverTakesANegativeBeta) {
    const FunctionObjective f = problems::himmelblau();
    for (const Vector& start : {point(-0.3, -0.9), point(0.1, 2.8), point(-4, 4)}) {
        solve::Run run = solve("cg-polak-ribiere", f, start);
        EXPECT_TRUE(isConvergence(run.termination)) << run.message;
        for (const IterationRecord& r : run.trace)
            if (!std::isnan(r.damping)) {
                EXPECT_GE(r.damping, 0);
            }
    }
}

TEST(Nesterov, StepsFollowTheLookAheadForm) {
    // x_{k+1} - x_k = b^2 v_k - (1 + b) a g_k with v_{k+1} = b v_k - a g_k, v_0 = 0
    // (Bengio, Boulanger-Lewandowski & Pascanu 2013, the form of Nesterov 1983 used here).
    const FunctionObjective f = problems::convexQuadratic();
    StoppingRules rules;
    rules.maxIterations = 3;
    const double a = 0.1, b = 0.5;
    solve::Run run = solve("nesterov", f, point(2, -1), {{"step_size", "0.1"}, {"momentum", "0.5"}}, rules);
    ASSERT_EQ(run.trace.size(), 4u);
    Vector v = Vector::Zero(2);
    for (int k = 0; k < 3; ++k) {
        const Vector& g = run.trace[static_cast<std::size_t>(k)].gradient;
        const Vector expected = b * b * v - (1 + b) * a * g;
        EXPECT_NEAR((run.trace[static_cast<std::size_t>(k)].step - expected).norm(), 0, 1e-14) << k;
        v = b * v - a * g;
    }
}

TEST(DampedNewton, SteepestDescentFallbackStartsFromAStepOfLengthAtMostOne) {
    // Near Himmelblau's maximum the gradient is large; a first trial alpha = 1 along -g would
    // jump far. The fallback's first trial is a step of length at most 1 (N&W eq. 3.60 later on).
    const FunctionObjective f = problems::himmelblau();
    solve::Run run = solve("damped-newton", f, point(-0.3, -0.9));
    ASSERT_GE(run.trace.size(), 2u);
    ASSERT_EQ(run.trace[0].stepKind, StepKind::Gradient);
    ASSERT_FALSE(run.trace[0].trials.empty());
    const double firstTrialLength = run.trace[0].trials.front().alpha * run.trace[0].gradient.norm();
    EXPECT_LE(firstTrialLength, 1.0 + 1e-12);
}

TEST(NelderMead, RelativeStartSimplexScalesEachCoordinate) {
    // Vertex i+1 = x0 with x_i multiplied by 1 + initial_size, or zero_size when x_i = 0
    // (common practice, no published source). The first record holds the best vertex.
    const FunctionObjective f = problems::convexQuadratic();
    StoppingRules rules;
    rules.maxIterations = 1;
    const MethodInfo* info = findMethod("nelder-mead");
    ASSERT_NE(info, nullptr);
    const double size = findOption(info->options, "initial_size")->defaultValue;
    const double zero = findOption(info->options, "zero_size")->defaultValue;
    for (const Vector& start : {point(2, -1), point(0, 3)}) {
        solve::Run relative = solve("nelder-mead", f, start, {}, rules);
        const double fStart = f.value(start);
        Vector a = start, b = start;
        a[0] = start[0] != 0 ? (1 + size) * start[0] : zero;
        b[1] = start[1] != 0 ? (1 + size) * start[1] : zero;
        const double best = std::min({fStart, f.value(a), f.value(b)});
        EXPECT_DOUBLE_EQ(relative.trace[0].value, best);
        solve::Run absolute = solve("nelder-mead", f, start, {{"start_simplex", "absolute"}}, rules);
        a = start, b = start;
        a[0] += size * std::max(1.0, std::abs(start[0]));
        b[1] += size * std::max(1.0, std::abs(start[1]));
        EXPECT_DOUBLE_EQ(absolute.trace[0].value, std::min({fStart, f.value(a), f.value(b)}));
    }
}

TEST(ConjugateGradient, PolakRibiereRestartsPeriodicallyOnlyWhenAsked) {
    const FunctionObjective f = problems::rosenbrock();
    const solve::Run plain = solve("cg-polak-ribiere", f, point(-1.2, 1));
    for (const IterationRecord& r : plain.trace) EXPECT_EQ(r.note.text().find("restart after"), std::string::npos) << r.note.text();
    const solve::Run periodic =
        solve("cg-polak-ribiere", f, point(-1.2, 1), {{"periodic_restart", "true"}, {"restart_every", "3"}});
    bool sawPeriodic = false;
    for (const IterationRecord& r : periodic.trace) sawPeriodic = sawPeriodic || r.note.text().find("restart after 3 steps") != std::string::npos;
    EXPECT_TRUE(sawPeriodic);
}

TEST(Lbfgs, RingBufferGivesTheTwoLoopDirectionAfterTheMemoryWrapsAround) {
    // With memory 2 the newest pairs overwrite the oldest; each direction must still be the
    // two-loop recursion (Nocedal & Wright Alg. 7.4) over the last two accepted (s, y) pairs.
    const FunctionObjective f = problems::rosenbrock();
    solve::Run run = solve("lbfgs", f, point(-1.2, 1), {{"memory", "2"}});
    ASSERT_GE(run.trace.size(), 8u);
    std::vector<Vector> s, y;
    for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        const IterationRecord& next = run.trace[k + 1];
        // step = x_{k+1} - x_k loses digits once it is tiny against x: compare while it is not
        // (a wrong pair order would differ in the leading digits).
        if (!s.empty() && r.note.empty() && r.step.norm() > 1e-6 * (1 + r.x.norm())) {
            // Reference two-loop over the stored pairs (oldest first).
            Vector q = r.gradient;
            std::vector<double> alpha(s.size());
            for (std::size_t i = s.size(); i-- > 0;) {
                alpha[i] = s[i].dot(q) / y[i].dot(s[i]);
                q -= alpha[i] * y[i];
            }
            q *= s.back().dot(y.back()) / y.back().squaredNorm();
            for (std::size_t i = 0; i < s.size(); ++i) q += (alpha[i] - y[i].dot(q) / y[i].dot(s[i])) * s[i];
            const Vector direction = -q;
            const Vector step = r.step / r.stepLength;
            EXPECT_NEAR((step - direction).norm() / direction.norm(), 0, 1e-7) << "iteration " << k;
        }
        const Vector sk = next.x - r.x, yk = next.gradient - r.gradient;
        if (yk.dot(sk) > 1e-12 * sk.norm() * yk.norm()) {
            s.push_back(sk);
            y.push_back(yk);
            if (s.size() > 2) {
                s.erase(s.begin());
                y.erase(y.begin());
            }
        }
    }
}

TEST(Solve, MovingTheSolverInGivesTheSameRunAsSolvingByReference) {
    const FunctionObjective f = problems::rosenbrock();
    SolverOrError a = makeSolver("bfgs", f, point(-1.2, 1));
    SolverOrError b = makeSolver("bfgs", f, point(-1.2, 1));
    ASSERT_TRUE(a.solver && b.solver);
    const solve::Run byReference = solve(*a.solver);
    const solve::Run byMove = solve(std::move(b.solver));
    EXPECT_EQ(byMove.trace.size(), byReference.trace.size());
    EXPECT_EQ(byMove.termination, byReference.termination);
    EXPECT_EQ(byMove.x, byReference.x);
    EXPECT_EQ(a.solver->run().trace.size(), byReference.trace.size()) << "solving by reference leaves the run in place";
}

}  // namespace
}  // namespace sw::solve
