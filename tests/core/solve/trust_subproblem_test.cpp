// Unit tests of the trust-region and cubic subproblem solvers (core/solve/trust_subproblem.h).
// The optimality conditions checked here are those of Moré & Sorensen (1983), Thm 3.1
// (trust region) and Cartis, Gould & Toint (2011), Part I, Thm 3.1 (cubic model).

#include "core/solve/trust_subproblem.h"

#include <gtest/gtest.h>

#include <Eigen/Eigenvalues>

#include <cmath>
#include <random>

namespace sw::solve {
namespace {

Matrix randomSymmetric(std::mt19937& rng, int n, double shift) {
    std::normal_distribution<double> normal(0.0, 1.0);
    Matrix a(n, n);
    for (int i = 0; i < n; ++i)
        for (int j = 0; j < n; ++j) a(i, j) = normal(rng);
    Matrix b = 0.5 * (a + a.transpose());
    b += shift * Matrix::Identity(n, n);
    return b;
}

Vector randomVector(std::mt19937& rng, int n) {
    std::normal_distribution<double> normal(0.0, 1.0);
    Vector v(n);
    for (int i = 0; i < n; ++i) v(i) = normal(rng);
    return v;
}

Matrix randomPositiveDefinite(std::mt19937& rng, int n) {
    Matrix a = randomSymmetric(rng, n, 0.0);
    return a * a.transpose() + 0.1 * Matrix::Identity(n, n);
}

double smallestEigenvalue(const Matrix& b) {
    Eigen::SelfAdjointEigenSolver<Matrix> es(b);
    return es.eigenvalues()(0);
}

// Largest model decrease over random points of the ball (uniform directions, radii to the
// boundary) as an independent lower bound on the global optimum.
double bestSampledDecrease(std::mt19937& rng, const Vector& g, const Matrix& b, double radius, int samples) {
    std::uniform_real_distribution<double> uniform(0.0, 1.0);
    double best = 0;
    for (int s = 0; s < samples; ++s) {
        Vector d = randomVector(rng, static_cast<int>(g.size()));
        d.normalize();
        const double r = radius * std::pow(uniform(rng), 0.25);
        best = std::max(best, quadraticModelDecrease(g, b, r * d));
        best = std::max(best, quadraticModelDecrease(g, b, radius * d));
    }
    return best;
}

TEST(Dogleg, StaysInsideTheTrustRegion) {
    std::mt19937 rng(7);
    for (int trial = 0; trial < 200; ++trial) {
        const int n = 1 + trial % 6;
        const Matrix b = (trial % 3 == 0) ? randomSymmetric(rng, n, 0.0) : randomPositiveDefinite(rng, n);
        const Vector g = randomVector(rng, n);
        const double radius = std::pow(10.0, (trial % 7) - 3);
        const SubproblemResult r = doglegStep(g, b, radius);
        EXPECT_LE(r.step.norm(), radius * (1 + 1e-12)) << "trial " << trial;
        EXPECT_GT(r.predictedDecrease, 0) << "trial " << trial;
    }
}

TEST(Dogleg, TakesTheNewtonPointWhenItFitsInside) {
    Matrix b(2, 2);
    b << 4, 1, 1, 3;
    const Vector g = Vector::Constant(2, 1.0);
    const SubproblemResult r = doglegStep(g, b, 10.0);
    const Vector newton = -b.ldlt().solve(g);
    EXPECT_EQ(r.kind, StepKind::Interior);
    EXPECT_NEAR((r.step - newton).norm(), 0, 1e-14);
}

TEST(Dogleg, TakesTheCauchyPointAlongMinusGradientWhenItLiesOutside) {
    Matrix b(2, 2);
    b << 1, 0, 0, 100;
    Vector g(2);
    g << 3, 4;
    const double radius = 0.01;  // Cauchy step length |g|^3 / g'Bg = 125 / 1609 >> 0.01
    const SubproblemResult r = doglegStep(g, b, radius);
    EXPECT_EQ(r.kind, StepKind::Cauchy);
    EXPECT_NEAR(r.step.norm(), radius, 1e-15);
    EXPECT_NEAR((r.step + radius * g.normalized()).norm(), 0, 1e-15);
}

TEST(Dogleg, PointLiesOnTheSegmentFromTheCauchyToTheNewtonPoint) {
    Matrix b(2, 2);
    b << 1, 0, 0, 10;
    Vector g(2);
    g << 1, 1;
    const Vector newton = -b.ldlt().solve(g);                         // (-1, -0.1)
    const Vector cauchy = -(g.squaredNorm() / g.dot(b * g)) * g;    // -(2/11)(1, 1)
    const double radius = 0.5 * (cauchy.norm() + newton.norm());
    const SubproblemResult r = doglegStep(g, b, radius);
    ASSERT_EQ(r.kind, StepKind::Dogleg);
    EXPECT_NEAR(r.step.norm(), radius, 1e-12);
    // Collinear with the segment: the 2-D cross product of (p - pC) and (pN - pC) vanishes.
    const Vector u = r.step - cauchy, v = newton - cauchy;
    EXPECT_NEAR(u(0) * v(1) - u(1) * v(0), 0, 1e-12);
    const double t = u.dot(v) / v.squaredNorm();
    EXPECT_GT(t, 0);
    EXPECT_LT(t, 1);
    // Along the dogleg path the model decreases monotonically (Nocedal & Wright 2006, Lemma 4.2).
    EXPECT_GT(r.predictedDecrease, quadraticModelDecrease(g, b, cauchy));
}

TEST(Dogleg, ShiftsAnIndefiniteHessianAndStillDecreasesTheModel) {
    Matrix b(2, 2);
    b << -2, 0, 0, 1;
    Vector g(2);
    g << 0.5, 1;
    const SubproblemResult r = doglegStep(g, b, 1.0);
    EXPECT_GT(r.multiplier, 2.0);  // tau must exceed -lambda_min
    EXPECT_LE(r.step.norm(), 1.0 + 1e-12);
    EXPECT_GT(r.predictedDecrease, 0);
    EXPECT_NE(r.note.text().find("not positive definite"), std::string::npos);
}

TEST(Steihaug, StopsOnNegativeCurvatureAndGoesToTheBoundary) {
    Matrix b(2, 2);
    b << 1, 0, 0, -2;
    Vector g(2);
    g << 1, 1;  // first direction -g has curvature 1 - 2 = -1 < 0
    const SubproblemResult r = steihaugStep(g, b, 2.0);
    EXPECT_EQ(r.kind, StepKind::NegativeCurvature);
    EXPECT_EQ(r.innerIterations, 1);
    EXPECT_NEAR(r.step.norm(), 2.0, 1e-12);
    EXPECT_NEAR((r.step + 2.0 * g.normalized()).norm(), 0, 1e-12);
    EXPECT_GT(r.predictedDecrease, 0);
}

TEST(Steihaug, StopsOnNegativeCurvatureFoundAfterTheFirstIteration) {
    Matrix b(2, 2);
    b << 10, 0, 0, -1;
    Vector g(2);
    g << 1, 0.5;  // -g has positive curvature 9.75; the next conjugate direction has negative curvature
    const SubproblemResult r = steihaugStep(g, b, 5.0);
    EXPECT_EQ(r.kind, StepKind::NegativeCurvature);
    EXPECT_EQ(r.innerIterations, 2);
    EXPECT_NEAR(r.step.norm(), 5.0, 1e-12);
    EXPECT_GT(r.predictedDecrease, quadraticModelDecrease(g, b, -(g.squaredNorm() / g.dot(b * g)) * g));
}

TEST(Steihaug, ConvergesInsideToNearlyTheNewtonStep) {
    std::mt19937 rng(11);
    const Matrix b = randomPositiveDefinite(rng, 5);
    const Vector g = 1e-4 * randomVector(rng, 5);
    const SubproblemResult r = steihaugStep(g, b, 1e3);
    const Vector newton = -b.ldlt().solve(g);
    EXPECT_EQ(r.kind, StepKind::Interior);
    // Residual test |r| <= |g|^1.5 gives a relative error of at most cond(B) * |g|^0.5.
    EXPECT_LE((r.step - newton).norm(), 1e-6 * newton.norm() * 1e3);
}

TEST(Steihaug, StopsOnTheBoundaryWhenTheIterateLeaves) {
    std::mt19937 rng(5);
    for (int trial = 0; trial < 100; ++trial) {
        const int n = 2 + trial % 5;
        const Matrix b = randomPositiveDefinite(rng, n);
        const Vector g = randomVector(rng, n);
        const double radius = 1e-2;
        const SubproblemResult r = steihaugStep(g, b, radius);
        EXPECT_LE(r.step.norm(), radius * (1 + 1e-12));
        EXPECT_GT(r.predictedDecrease, 0);
        if (r.kind == StepKind::Boundary) {
            EXPECT_NEAR(r.step.norm(), radius, 1e-12 * radius);
        }
    }
}

TEST(ExactTrustRegion, ReturnsTheNewtonStepWhenItFits) {
    Matrix b(2, 2);
    b << 2, 0.5, 0.5, 1;
    Vector g(2);
    g << 0.1, -0.2;
    const SubproblemResult r = exactTrustRegionStep(g, b, 1.0);
    EXPECT_EQ(r.kind, StepKind::Interior);
    EXPECT_EQ(r.multiplier, 0);
    EXPECT_NEAR((r.step + b.ldlt().solve(g)).norm(), 0, 1e-14);
}

TEST(ExactTrustRegion, FindsTheBoundaryMultiplierForAPositiveDefiniteModel) {
    std::mt19937 rng(23);
    for (int trial = 0; trial < 100; ++trial) {
        const int n = 1 + trial % 6;
        const Matrix b = randomPositiveDefinite(rng, n);
        const Vector g = randomVector(rng, n);
        const double radius = 0.5 * b.ldlt().solve(g).norm();  // the Newton step is twice too long
        const SubproblemResult r = exactTrustRegionStep(g, b, radius);
        SCOPED_TRACE("trial " + std::to_string(trial));
        EXPECT_EQ(r.kind, StepKind::Boundary);
        EXPECT_GT(r.multiplier, 0);
        EXPECT_NEAR(r.step.norm(), radius, 1e-10 * radius);
        EXPECT_LE(((b + r.multiplier * Matrix::Identity(n, n)) * r.step + g).norm(), 1e-9 * std::max(1.0, g.norm()));
    }
}

TEST(ExactTrustRegion, SatisfiesTheMoreSorensenConditionsOnRandomIndefiniteModels) {
    std::mt19937 rng(3);
    for (int trial = 0; trial < 200; ++trial) {
        const int n = 1 + trial % 8;
        const Matrix b = randomSymmetric(rng, n, (trial % 4) - 2.0);
        const Vector g = randomVector(rng, n);
        const double radius = std::pow(10.0, (trial % 5) - 2);
        const SubproblemResult r = exactTrustRegionStep(g, b, radius);
        const double lambda = r.multiplier;
        SCOPED_TRACE("trial " + std::to_string(trial));
        // Moré & Sorensen (1983), Thm 3.1: (B + lambda I) p = -g, lambda >= 0,
        // lambda (radius - |p|) = 0, B + lambda I positive semidefinite.
        EXPECT_GE(lambda, 0);
        EXPECT_LE(r.step.norm(), radius * (1 + 1e-12));
        EXPECT_LE(((b + lambda * Matrix::Identity(n, n)) * r.step + g).norm(), 1e-9 * std::max(1.0, g.norm()));
        EXPECT_LE(lambda * (radius - r.step.norm()), 1e-9 * std::max(1.0, lambda * radius));
        EXPECT_GE(smallestEigenvalue(b) + lambda, -1e-9);
        // And no sampled point of the ball does better.
        EXPECT_GE(r.predictedDecrease, bestSampledDecrease(rng, g, b, radius, 200) * (1 - 1e-12) - 1e-12);
    }
}

TEST(ExactTrustRegion, SolvesTheHardCaseAlongTheNegativeEigenvector) {
    // Hard case: lambda_min = -2 with eigenvector e1, and g orthogonal to e1.
    Matrix b = Eigen::Vector3d(-2, 1, 3).asDiagonal();
    Vector g(3);
    g << 0, 1, 1;
    const double radius = 2.0;
    const SubproblemResult r = exactTrustRegionStep(g, b, radius);
    EXPECT_TRUE(r.hardCase);
    EXPECT_EQ(r.kind, StepKind::NegativeCurvature);
    EXPECT_DOUBLE_EQ(r.multiplier, 2.0);
    // p = -(B + 2I)^+ g + tau e1 = (tau, -1/3, -1/5), |p| = radius.
    EXPECT_NEAR(r.step(1), -1.0 / 3.0, 1e-14);
    EXPECT_NEAR(r.step(2), -1.0 / 5.0, 1e-14);
    EXPECT_NEAR(std::abs(r.step(0)), std::sqrt(4.0 - 1.0 / 9.0 - 1.0 / 25.0), 1e-12);
    EXPECT_NEAR(r.step.norm(), radius, 1e-12);
    std::mt19937 rng(1);
    EXPECT_GE(r.predictedDecrease, bestSampledDecrease(rng, g, b, radius, 20000) - 1e-12);
}

TEST(ExactTrustRegion, LeavesAStationaryPointAlongNegativeCurvature) {
    Matrix b(2, 2);
    b << 2, 0, 0, -2;  // the saddle of x^2 - y^2 at the origin
    const Vector g = Vector::Zero(2);
    const SubproblemResult r = exactTrustRegionStep(g, b, 0.5);
    EXPECT_TRUE(r.hardCase);
    EXPECT_NEAR(std::abs(r.step(1)), 0.5, 1e-15);
    EXPECT_NEAR(r.step(0), 0, 1e-15);
    EXPECT_NEAR(r.predictedDecrease, 0.25, 1e-15);  // -(1/2)(-2)(0.5)^2
}

TEST(ExactTrustRegion, HandlesTheNearlyHardCase) {
    Matrix b = Eigen::Vector3d(-2, 1, 3).asDiagonal();
    Vector g(3);
    g << 1e-9, 1, 1;
    const double radius = 2.0;
    const SubproblemResult r = exactTrustRegionStep(g, b, radius);
    EXPECT_NEAR(r.step.norm(), radius, 1e-9);
    EXPECT_NEAR(r.multiplier, 2.0, 1e-6);
    std::mt19937 rng(2);
    EXPECT_GE(r.predictedDecrease, bestSampledDecrease(rng, g, b, radius, 20000) - 1e-12);
}

TEST(CubicStep, SatisfiesTheCartisGouldTointConditions) {
    std::mt19937 rng(13);
    for (int trial = 0; trial < 200; ++trial) {
        const int n = 1 + trial % 7;
        const Matrix b = randomSymmetric(rng, n, (trial % 4) - 2.0);
        const Vector g = randomVector(rng, n);
        const double sigma = std::pow(10.0, (trial % 5) - 2);
        const SubproblemResult r = cubicStep(g, b, sigma);
        const double lambda = r.multiplier;
        SCOPED_TRACE("trial " + std::to_string(trial));
        EXPECT_EQ(r.kind, StepKind::Cubic);
        // Cartis, Gould & Toint (2011), Part I, Thm 3.1: (B + lambda I) p = -g with
        // lambda = sigma |p| and B + lambda I positive semidefinite.
        EXPECT_LE(((b + lambda * Matrix::Identity(n, n)) * r.step + g).norm(), 1e-9 * std::max(1.0, g.norm()));
        EXPECT_NEAR(lambda, sigma * r.step.norm(), 1e-9 * std::max(1.0, lambda));
        EXPECT_GE(smallestEigenvalue(b) + lambda, -1e-9);
        EXPECT_GT(r.predictedDecrease, 0);
        // Global: better than random points at a range of lengths.
        for (int s = 0; s < 100; ++s) {
            Vector d = randomVector(rng, n);
            const double len = 3.0 * r.step.norm() * (s + 1) / 100.0;
            EXPECT_GE(r.predictedDecrease, cubicModelDecrease(g, b, sigma, len * d.normalized()) - 1e-12);
        }
    }
}

TEST(CubicStep, SolvesTheHardCase) {
    Matrix b = Eigen::Vector3d(-2, 1, 3).asDiagonal();
    Vector g(3);
    g << 0, 1, 1;
    const double sigma = 0.5;  // lambda = 2 means |p| = 4 > |(B + 2I)^+ g|
    const SubproblemResult r = cubicStep(g, b, sigma);
    EXPECT_TRUE(r.hardCase);
    EXPECT_DOUBLE_EQ(r.multiplier, 2.0);
    EXPECT_NEAR(r.step.norm(), 4.0, 1e-12);
    EXPECT_NEAR(r.step(1), -1.0 / 3.0, 1e-14);
    EXPECT_GT(r.predictedDecrease, 0);
}

TEST(CubicStep, DecreasesTheModelMoreThanTheCauchyStepOfTheSameModel) {
    std::mt19937 rng(17);
    for (int trial = 0; trial < 50; ++trial) {
        const Matrix b = randomSymmetric(rng, 4, 0.0);
        const Vector g = randomVector(rng, 4);
        const double sigma = 1.0;
        const SubproblemResult r = cubicStep(g, b, sigma);
        // Best step along -g (a one-dimensional scan): the global minimiser must beat it.
        double bestAlongGradient = 0;
        for (int s = 1; s <= 2000; ++s)
            bestAlongGradient = std::max(bestAlongGradient, cubicModelDecrease(g, b, sigma, -(s * 1e-3) * g.normalized()));
        EXPECT_GE(r.predictedDecrease, bestAlongGradient - 1e-12);
    }
}

}  // namespace
}  // namespace sw::solve
