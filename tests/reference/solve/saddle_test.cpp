// Saddle behaviour: pure Newton started near a saddle converges to it (Newton's iteration
// is attracted by every non-degenerate critical point), while saddle-free Newton and the
// trust-region methods, which use negative curvature, leave it.
//
// Sources: f = x^2 - y^2 has its only critical point, a saddle with Hessian eigenvalues
// (-2, 2), at the origin (worked by hand). The saddles of Himmelblau's function
// (x^2 + y - 11)^2 + (x + y^2 - 7)^2 are COMPUTED here (Newton on the gradient from a grid
// of seeds, classified by the exact Hessian), not taken from a publication; its four
// minima have f = 0 (value from memory; re-checked below by the same computation).

#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <Eigen/Eigenvalues>

#include <cmath>
#include <cstdio>
#include <vector>

namespace sw::reference {
namespace {

using RunResult = sw::solve::Run;
using sw::solve::PointKind;

const char* const kHimmelblau = "(x^2 + y - 11)^2 + (x + y^2 - 7)^2";
const char* const kLeavers[] = {"saddle-free-newton", "trust-region-dogleg", "trust-region-cg", "trust-region-exact",
                                "cubic-regularization"};

Vector point(double a, double b) {
    Vector v(2);
    v << a, b;
    return v;
}

RunResult run(const std::string& method, const Objective& f, const Vector& start, int maxIterations = 200) {
    sw::solve::StoppingRules rules;
    rules.maxIterations = maxIterations;
    sw::solve::SolverOrError made = sw::solve::makeSolver(method, f, start, {}, rules);
    EXPECT_TRUE(made.solver) << made.error;
    if (!made.solver) return {};
    return sw::solve::solve(*made.solver);
}

// Critical points of an objective in a box: Newton's method on the gradient from a grid of
// seeds; kept when |g| < 1e-12 and distinct. Each comes with its Hessian eigenvalues.
struct CriticalPoint {
    Vector x;
    Vector eigenvalues;
    int index() const { return static_cast<int>((eigenvalues.array() < 0).count()); }
};

std::vector<CriticalPoint> criticalPoints(const Objective& f, double lo, double hi, int seeds) {
    std::vector<CriticalPoint> found;
    for (int i = 0; i < seeds; ++i)
        for (int j = 0; j < seeds; ++j) {
            Vector x = point(lo + (hi - lo) * (i + 0.5) / seeds, lo + (hi - lo) * (j + 0.5) / seeds);
            Vector g;
            Matrix h;
            for (int it = 0; it < 50; ++it) {
                f.valueGradientHessian(x, g, h);
                const Vector dx = h.fullPivLu().solve(g);
                if (!dx.allFinite()) break;
                x -= dx;
                if (dx.norm() < 1e-14) break;
            }
            f.valueGradientHessian(x, g, h);
            if (!x.allFinite() || g.norm() > 1e-9) continue;
            bool known = false;
            for (const CriticalPoint& c : found) known |= (c.x - x).norm() < 1e-6;
            if (known) continue;
            Eigen::SelfAdjointEigenSolver<Matrix> es(h);
            found.push_back({x, es.eigenvalues()});
        }
    return found;
}

TEST(Saddle, PureNewtonConvergesToTheSaddleOfXSquaredMinusYSquared) {
    const FormulaObjective f("x^2 - y^2", {"x", "y"});
    const RunResult r = run("newton", f, point(0.1, 0.05));
    EXPECT_TRUE(sw::solve::isConvergence(r.termination)) << r.message;
    EXPECT_NEAR(r.x.norm(), 0, 1e-12);
    EXPECT_EQ(r.endPoint.kind, PointKind::Saddle) << r.endPoint.description;
    EXPECT_EQ(r.endPoint.index, 1);
    ASSERT_EQ(r.endPoint.eigenvalues.size(), 2);
    EXPECT_NEAR(r.endPoint.eigenvalues[0], -2.0, 1e-12);  // worked by hand: Hessian diag(2, -2)
    EXPECT_NEAR(r.endPoint.eigenvalues[1], 2.0, 1e-12);
}

TEST(Saddle, CurvatureAwareMethodsLeaveTheSaddleOfXSquaredMinusYSquared) {
    // x^2 - y^2 has no minimum: leaving the saddle means f falls without bound, checked as
    // f < -1e3 after at most 200 iterations, with x driven to 0 and |y| growing.
    const FormulaObjective f("x^2 - y^2", {"x", "y"});
    for (const char* method : kLeavers) {
        const RunResult r = run(method, f, point(0.1, 0.05));
        SCOPED_TRACE(method);
        EXPECT_LT(r.value, -1e3) << r.message;
        EXPECT_GT(std::abs(r.x[1]), 30.0);
        // The Hessian is the same everywhere, so only the gradient tells the end from the saddle.
        EXPECT_GT(r.gradientNorm, 60.0) << r.endPoint.description;
    }
}

TEST(Saddle, HimmelblauHasFourComputedMinimaFourSaddlesAndOneMaximum) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    const std::vector<CriticalPoint> points = criticalPoints(f, -6, 6, 24);
    int minima = 0, saddles = 0, maxima = 0;
    for (const CriticalPoint& c : points) {
        minima += c.index() == 0;
        saddles += c.index() == 1;
        maxima += c.index() == 2;
        if (c.index() == 0) {
            EXPECT_NEAR(f.value(c.x), 0.0, 1e-20);
        }
    }
    EXPECT_EQ(minima, 4);
    EXPECT_EQ(saddles, 4);
    EXPECT_EQ(maxima, 1);
}

TEST(Saddle, OnHimmelblauNewtonFindsEachComputedSaddleWhileCurvatureAwareMethodsReachAMinimum) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    const std::vector<CriticalPoint> points = criticalPoints(f, -6, 6, 24);
    int checked = 0;
    for (const CriticalPoint& saddle : points) {
        if (saddle.index() != 1) continue;
        ++checked;
        const Vector start = saddle.x + point(0.01, -0.01);
        std::printf("computed saddle of Himmelblau's function at (%.9f, %.9f), eigenvalues (%.6g, %.6g); start (%.6f, %.6f)\n",
                    saddle.x[0], saddle.x[1], saddle.eigenvalues[0], saddle.eigenvalues[1], start[0], start[1]);
        SCOPED_TRACE("saddle near (" + std::to_string(saddle.x[0]) + ", " + std::to_string(saddle.x[1]) + ")");

        const RunResult newton = run("newton", f, start);
        EXPECT_TRUE(sw::solve::isConvergence(newton.termination)) << newton.message;
        EXPECT_LT((newton.x - saddle.x).norm(), 1e-9);
        EXPECT_EQ(newton.endPoint.kind, PointKind::Saddle) << newton.endPoint.description;
        EXPECT_EQ(newton.endPoint.index, 1);

        for (const char* method : kLeavers) {
            const RunResult r = run(method, f, start);
            SCOPED_TRACE(method);
            EXPECT_TRUE(sw::solve::isConvergence(r.termination)) << r.message;
            EXPECT_EQ(r.endPoint.kind, PointKind::Minimum) << r.endPoint.description;
            EXPECT_LT(r.value, 1e-12);  // every minimum of Himmelblau's function has f = 0
            EXPECT_GT((r.x - saddle.x).norm(), 0.5);
        }
    }
    EXPECT_EQ(checked, 4);
}

}  // namespace
}  // namespace sw::reference
