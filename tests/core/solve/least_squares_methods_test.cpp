// Gauss-Newton and Levenberg-Marquardt on small residual problems written by hand.
// Sources: Rosenbrock's function in residual form, f* = 0 at (1, 1), from Moré, Garbow &
// Hillstrom (1981), problem 1; the linear least-squares solution from Eigen's QR (common
// practice, no published source); the rest are properties of the methods' definitions.
#include "core/objective/function_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <Eigen/QR>

#include <cmath>
#include <functional>

using namespace sw;
using solve::findMethod;
using solve::isConvergence;
using solve::IterationRecord;
using solve::MethodInfo;
using solve::OptionValues;
using solve::SolverOrError;
using solve::StepKind;
using solve::StoppingRules;
using solve::makeSolver;

namespace {

using ResidualFn = std::function<void(const Vector&, Vector&, Matrix*)>;

// An objective defined by its residuals: f = 1/2 |r|^2, gradient J'r, Hessian J'J (the
// methods under test use only r and J).
FunctionObjective residualObjective(std::vector<std::string> names, int m, ResidualFn fn) {
    auto value = [fn, m](const Vector& x) {
        Vector r(m);
        fn(x, r, nullptr);
        return 0.5 * r.squaredNorm();
    };
    auto gradient = [fn, m](const Vector& x, Vector& g) {
        Vector r(m);
        Matrix j(m, x.size());
        fn(x, r, &j);
        g = j.transpose() * r;
    };
    auto hessian = [fn, m](const Vector& x, Matrix& h) {
        Vector r(m);
        Matrix j(m, x.size());
        fn(x, r, &j);
        h = j.transpose() * j;
    };
    FunctionObjective f(std::move(names), value, gradient, hessian, "residual test problem");
    f.setResiduals(m, [fn](const Vector& x, Vector& r, Matrix* j) { fn(x, r, j); });
    return f;
}

FunctionObjective rosenbrock() {
    // r1 = 10 (x2 - x1^2), r2 = 1 - x1 (Moré, Garbow & Hillstrom 1981, problem 1)
    return residualObjective({"x", "y"}, 2, [](const Vector& x, Vector& r, Matrix* j) {
        r.resize(2);
        r << 10.0 * (x[1] - x[0] * x[0]), 1.0 - x[0];
        if (j) {
            j->resize(2, 2);
            *j << -20.0 * x[0], 10.0, -1.0, 0.0;
        }
    });
}

Vector point(double a, double b) {
    Vector v(2);
    v << a, b;
    return v;
}

StoppingRules fitRules() {
    StoppingRules r;
    r.maxIterations = 500;
    r.gradientTolerance = 0;
    return r;
}

}  // namespace

TEST(LeastSquaresMethods, AreRegisteredAndNeedResiduals) {
    for (const char* id : {"levenberg-marquardt", "gauss-newton"}) {
        const MethodInfo* info = findMethod(id);
        ASSERT_NE(info, nullptr) << id;
        EXPECT_TRUE(info->needsResiduals);
        EXPECT_EQ(info->family, "least-squares");
    }
}

TEST(LevenbergMarquardt, SolvesRosenbrockFromTheStandardStart) {
    FunctionObjective f = rosenbrock();
    solve::Run run = solve::solve("levenberg-marquardt", f, point(-1.2, 1.0), {}, fitRules());
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_NEAR(run.x[0], 1.0, 1e-10);  // minimiser (1, 1), Moré, Garbow & Hillstrom (1981), problem 1
    EXPECT_NEAR(run.x[1], 1.0, 1e-10);
    EXPECT_LT(run.value, 1e-20);
}

TEST(LevenbergMarquardt, RecordsDampingRatioAndJacobianFactsInEveryStep) {
    FunctionObjective f = rosenbrock();
    solve::Run run = solve::solve("levenberg-marquardt", f, point(-1.2, 1.0), {}, fitRules());
    ASSERT_GT(run.trace.size(), 2u);
    for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
        const IterationRecord& r = run.trace[k];
        EXPECT_EQ(r.dampingName, "lambda");
        EXPECT_GE(r.damping, 0.0);
        EXPECT_FALSE(std::isnan(r.ratio));
        EXPECT_EQ(r.jacobianRank, 2);
        EXPECT_GE(r.jacobianCondition, 1.0);
        EXPECT_GT(r.trustRadius, 0.0);
        EXPECT_EQ(r.stepKind, StepKind::LevenbergMarquardt);
    }
}

TEST(LevenbergMarquardt, NeverIncreasesTheSumOfSquaresAndRejectsBadSteps) {
    FunctionObjective f = rosenbrock();
    solve::Run run = solve::solve("levenberg-marquardt", f, point(-1.2, 1.0), {}, fitRules());
    for (std::size_t k = 1; k < run.trace.size(); ++k) EXPECT_LE(run.trace[k].value, run.trace[k - 1].value);
    for (const IterationRecord& r : run.trace)
        if (!r.accepted) {
            EXPECT_LT(r.ratio, 1e-4);
        }
}

TEST(LevenbergMarquardt, DampedStepsStayNearTheTrustRadius) {
    // With lambda > 0 the scaled step length equals the radius within 10% (Moré 1978, Sec. 5);
    // the scaling is unknown here, so check the unscaled step against the radius through a
    // problem whose Jacobian columns have unit norm at the start (scale 1).
    FunctionObjective f = residualObjective({"a", "b"}, 2, [](const Vector& x, Vector& r, Matrix* j) {
        r.resize(2);
        r << x[0] + 0.1 * x[1] * x[1] - 5.0, x[1] - 3.0;
        if (j) {
            j->resize(2, 2);
            *j << 1.0, 0.2 * x[1], 0.0, 1.0;
        }
    });
    OptionValues options{{"initial_radius_factor", "0.001"}};
    solve::Run run = solve::solve("levenberg-marquardt", f, point(0.0, 0.0), options, fitRules());
    const IterationRecord& first = run.trace.front();
    ASSERT_GT(first.damping, 0.0);
    EXPECT_NEAR(first.step.norm(), first.trustRadius, 0.1 * first.trustRadius);
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_NEAR(run.x[1], 3.0, 1e-10);
}

TEST(LevenbergMarquardt, SolvesALinearLeastSquaresProblemLikeQR) {
    // Overdetermined linear system; the answer is the least-squares solution (Eigen QR).
    Matrix a(5, 3);
    a << 1, 0.5, 2, 1, -1, 0.3, 1, 2, -1, 1, 3, 0.5, 1, -2, 1;
    Vector b(5);
    b << 1, 2, 0.5, -1, 3;
    const Vector expected = a.colPivHouseholderQr().solve(b);
    FunctionObjective f = residualObjective({"p", "q", "s"}, 5, [a, b](const Vector& x, Vector& r, Matrix* j) {
        r = a * x - b;
        if (j) *j = a;
    });
    solve::Run run = solve::solve("levenberg-marquardt", f, Vector::Zero(3), {}, fitRules());
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_TRUE(run.x.isApprox(expected, 1e-12)) << run.x.transpose();
}

TEST(GaussNewton, SolvesRosenbrockWithALineSearch) {
    FunctionObjective f = rosenbrock();
    solve::Run run = solve::solve("gauss-newton", f, point(-1.2, 1.0), {}, fitRules());
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_NEAR(run.x[0], 1.0, 1e-10);  // Moré, Garbow & Hillstrom (1981), problem 1
    EXPECT_NEAR(run.x[1], 1.0, 1e-10);
    for (std::size_t k = 0; k + 1 < run.trace.size(); ++k) {
        EXPECT_FALSE(run.trace[k].trials.empty());
        EXPECT_EQ(run.trace[k].jacobianRank, 2);
        EXPECT_LE(run.trace[k + 1].value, run.trace[k].value);
    }
}

TEST(GaussNewton, TakesTheMinimumNormDirectionWhenTheJacobianIsRankDeficient) {
    // r = (a + b - 2, 2a + 2b - 4): J has rank 1; every a + b = 2 is a solution.
    FunctionObjective f = residualObjective({"a", "b"}, 2, [](const Vector& x, Vector& r, Matrix* j) {
        r.resize(2);
        r << x[0] + x[1] - 2.0, 2.0 * x[0] + 2.0 * x[1] - 4.0;
        if (j) {
            j->resize(2, 2);
            *j << 1, 1, 2, 2;
        }
    });
    solve::Run run = solve::solve("gauss-newton", f, point(0.0, 0.0), {}, fitRules());
    ASSERT_FALSE(run.trace.empty());
    EXPECT_EQ(run.trace.front().jacobianRank, 1);
    EXPECT_NE(run.trace.front().note.text().find("rank-deficient"), std::string::npos) << run.trace.front().note.text();
    EXPECT_NEAR(run.x[0], 1.0, 1e-12);  // the minimum-norm solution of a + b = 2
    EXPECT_NEAR(run.x[1], 1.0, 1e-12);
}

TEST(LeastSquaresMethods, RefuseObjectivesWithoutResiduals) {
    FunctionObjective f({"x"}, [](const Vector& x) { return x[0] * x[0]; },
                        [](const Vector& x, Vector& g) { g[0] = 2 * x[0]; },
                        [](const Vector&, Matrix& h) { h(0, 0) = 2; });
    SolverOrError made = makeSolver("levenberg-marquardt", f, Vector::Ones(1));
    EXPECT_EQ(made.solver, nullptr);
    EXPECT_FALSE(made.error.empty());
}

TEST(LevenbergMarquardt, SplitsTallJacobiansAcrossThreadsWithoutChangingTheAnswer) {
    // 30,000 rows: the parallel tall-skinny QR path; the answer is still Eigen QR's solution.
    const int m = 30000;
    Matrix a(m, 3);
    Vector b(m);
    for (int i = 0; i < m; ++i) {
        const double t = i / double(m);
        a.row(i) << 1.0, t, std::sin(7.0 * t);
        b[i] = 0.5 + 2.0 * t - std::sin(7.0 * t) + 0.01 * std::cos(1234.5 * i);
    }
    const Vector expected = a.colPivHouseholderQr().solve(b);
    FunctionObjective f = residualObjective({"p", "q", "s"}, m, [a, b](const Vector& x, Vector& r, Matrix* j) {
        r = a * x - b;
        if (j) *j = a;
    });
    solve::Run run = solve::solve("levenberg-marquardt", f, Vector::Zero(3), {}, fitRules());
    EXPECT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_TRUE(run.x.isApprox(expected, 1e-11)) << run.x.transpose() << " vs " << expected.transpose();
}

// One name and one termination id per stopping test (docs/names.md): Levenberg-Marquardt's
// reduction test and its radius test end runs under their own ids, and neither is the general
// relative-step test. A problem with a nonzero residual at its minimum, so "zero-residuals"
// cannot fire. Internal behaviour: no outside reference.
TEST(LevenbergMarquardt, EachStoppingTestEndsWithItsOwnId) {
    FunctionObjective f = residualObjective({"x", "y"}, 3, [](const Vector& x, Vector& r, Matrix* j) {
        r.resize(3);
        r << 10.0 * (x[1] - x[0] * x[0]), 1.0 - x[0], x[0] * x[1] - 0.5;
        if (j) {
            j->resize(3, 2);
            *j << -20.0 * x[0], 10.0, -1.0, 0.0, x[1], x[0];
        }
    });
    const solve::Run byReduction =
        solve::solve("levenberg-marquardt", f, point(-1.2, 1.0), {{"reduction_below", "1e-3"}}, fitRules());
    EXPECT_EQ(std::string(toString(byReduction.termination)), "reduction-below") << byReduction.message;
    const solve::Run byRadius = solve::solve("levenberg-marquardt", f, point(-1.2, 1.0),
                                      {{"scaled_radius_below", "0.5"}, {"reduction_below", "0"}}, fitRules());
    EXPECT_EQ(std::string(toString(byRadius.termination)), "scaled-radius-below") << byRadius.message;
    for (const solve::Run* run : {&byReduction, &byRadius}) {
        EXPECT_TRUE(isConvergence(run->termination));
        EXPECT_NE(std::string(toString(run->termination)), "relative-step-below");
    }
}
