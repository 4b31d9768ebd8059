// Differential tests of exactTrustRegionStep and cubicStep against the independent long double
// reference in subproblem_reference.h (Jacobi eigendecomposition + bisection; common practice,
// no published source for the comparison itself; the conditions checked are those of Moré &
// Sorensen 1983, Thm 3.1, and Cartis, Gould & Toint 2011, Part I, Thm 3.1).
//
// Seeded random models, n = 2..10, in the classes that make the exact step hard: indefinite,
// positive definite with the Newton step outside, near-singular (lambda_1 = +-1e-14 .. +-1e-6
// of the scale), a repeated lowest eigenvalue, the exact hard case with |p(-lambda_1)| just
// below and just above the radius, and the nearly hard case (g with a part 1e-14 .. 1e-6 of
// its size along the lowest eigenvector). Each model is built in long double as Q diag(l) Q'
// and rounded to double; the reference solves the rounded model.
#include "core/solve/trust_subproblem.h"
#include "tests/core/solve/subproblem_reference.h"

#include <gtest/gtest.h>

#include <array>
#include <cmath>
#include <random>
#include <sstream>
#include <string>

namespace sw::solve {
namespace {

namespace ref = reference;
using ref::Real;

enum class ModelClass { Indefinite, PositiveDefinite, NearSingular, RepeatedLowest, ExactHardCase, NearlyHardCase };
constexpr std::array<ModelClass, 6> kClasses = {ModelClass::Indefinite,     ModelClass::PositiveDefinite,
                                                ModelClass::NearSingular,   ModelClass::RepeatedLowest,
                                                ModelClass::ExactHardCase,  ModelClass::NearlyHardCase};
const char* name(ModelClass c) {
    switch (c) {
        case ModelClass::Indefinite: return "indefinite";
        case ModelClass::PositiveDefinite: return "positive definite";
        case ModelClass::NearSingular: return "near-singular";
        case ModelClass::RepeatedLowest: return "repeated lowest eigenvalue";
        case ModelClass::ExactHardCase: return "exact hard case";
        case ModelClass::NearlyHardCase: return "nearly hard case";
    }
    return "?";
}

struct Model {
    Matrix b;
    Vector g;
    double radius = 1;  // trust region
    double sigma = 1;   // cubic
    std::string describe;
};

// A random orthogonal matrix in long double (modified Gram-Schmidt, twice, on normal entries).
ref::MatrixL randomOrthogonal(std::mt19937_64& rng, int n) {
    std::normal_distribution<double> normal(0.0, 1.0);
    ref::MatrixL q(n, n);
    for (int i = 0; i < n; ++i)
        for (int j = 0; j < n; ++j) q(i, j) = normal(rng);
    for (int pass = 0; pass < 2; ++pass)
        for (int j = 0; j < n; ++j) {
            for (int k = 0; k < j; ++k) q.col(j) -= q.col(k).dot(q.col(j)) * q.col(k);
            q.col(j) /= q.col(j).norm();
        }
    return q;
}

// Builds B = Q diag(eigenvalues) Q' and g = Q c (in long double), rounded to double; the
// radius and sigma are chosen by the class (see the file comment).
Model makeModel(std::mt19937_64& rng, ModelClass kind, int n, int index) {
    std::uniform_real_distribution<double> uniform(0.0, 1.0);
    std::normal_distribution<double> normal(0.0, 1.0);
    const double scale = std::pow(10.0, -2 + 4 * uniform(rng));  // |eigenvalues| up to 1e-2 .. 1e2
    ref::VectorL eigenvalues(n), c(n);
    for (int i = 0; i < n; ++i) eigenvalues(i) = scale * (2 * uniform(rng) - 1);
    for (int i = 0; i < n; ++i) c(i) = normal(rng);
    std::ostringstream describe;
    describe << name(kind) << ", n = " << n << ", model " << index;
    const double tiny[] = {1e-14, 1e-12, 1e-10, 1e-8, 1e-6};
    bool hardCaseRadius = false;
    double hardCaseFactor = 1;
    switch (kind) {
        case ModelClass::Indefinite:
            eigenvalues(0) = -scale * (0.1 + uniform(rng));
            break;
        case ModelClass::PositiveDefinite:
            for (int i = 0; i < n; ++i) eigenvalues(i) = scale * (0.01 + uniform(rng));
            break;
        case ModelClass::NearSingular: {
            const double size = tiny[index % 5] * ((index / 5) % 2 ? -1 : 1);
            for (int i = 1; i < n; ++i) eigenvalues(i) = scale * (0.05 + uniform(rng));
            eigenvalues(0) = size * scale;
            describe << ", lambda_1 = " << size << " x scale";
            break;
        }
        case ModelClass::RepeatedLowest: {
            const int repeats = std::min(n, 2 + index % 2);
            const double lowest = -scale * (0.1 + uniform(rng));
            for (int i = 0; i < repeats; ++i) eigenvalues(i) = lowest;
            for (int i = repeats; i < n; ++i) eigenvalues(i) = lowest + scale * (0.05 + 2 * uniform(rng));
            const bool orthogonal = index % 3 == 0 && repeats < n;  // (g = 0 otherwise)
            if (orthogonal)
                for (int i = 0; i < repeats; ++i) c(i) = 0;  // and g orthogonal to that eigenspace
            describe << ", lowest eigenvalue " << repeats << " times" << (orthogonal ? ", g orthogonal to it" : "");
            break;
        }
        case ModelClass::ExactHardCase: {
            eigenvalues(0) = -scale * (0.1 + uniform(rng));
            for (int i = 1; i < n; ++i) eigenvalues(i) = eigenvalues(0) + scale * (0.05 + 2 * uniform(rng));
            c(0) = 0;
            // |p(-lambda_1)| just below (hard case) and just above (not quite) the radius.
            const double factors[] = {1 + 1e-2, 1 + 1e-6, 1 + 1e-10, 1 - 1e-10, 1 - 1e-6, 1 - 1e-2};
            hardCaseRadius = true;
            hardCaseFactor = factors[index % 6];
            describe << ", radius = |p(-lambda_1)| x " << hardCaseFactor;
            break;
        }
        case ModelClass::NearlyHardCase: {
            eigenvalues(0) = -scale * (0.1 + uniform(rng));
            for (int i = 1; i < n; ++i) eigenvalues(i) = eigenvalues(0) + scale * (0.05 + 2 * uniform(rng));
            const double part = tiny[index % 5];
            c(0) = 0;
            c(0) = part * c.norm() * (index % 2 ? -1 : 1);
            const double factors[] = {2, 1.0001, 0.9999, 0.5};
            hardCaseRadius = true;
            hardCaseFactor = factors[(index / 5) % 4];
            describe << ", g's part along q_1 = " << c(0) / c.norm() << " |g|, radius = |p(-lambda_1)| x "
                     << hardCaseFactor;
            break;
        }
    }
    const ref::MatrixL q = randomOrthogonal(rng, n);
    const ref::MatrixL bl = q * eigenvalues.asDiagonal() * q.transpose();
    const ref::VectorL gl = q * c;
    Model m;
    m.b.resize(n, n);
    for (int i = 0; i < n; ++i)
        for (int j = i; j < n; ++j) m.b(i, j) = m.b(j, i) = static_cast<double>(bl(i, j));
    m.g = gl.cast<double>();
    if (hardCaseRadius) {
        // |p(-lambda_1)| without the lowest eigenvector's part, from the model as built.
        Real partial2 = 0;
        for (int i = 1; i < n; ++i) {
            const Real t = c(i) / (eigenvalues(i) - eigenvalues(0));
            partial2 += t * t;
        }
        const double partial = static_cast<double>(std::sqrt(partial2));
        m.radius = partial * hardCaseFactor;
        m.sigma = static_cast<double>(-eigenvalues(0)) / m.radius;  // the cubic's hard case at the same point
    } else {
        m.radius = std::pow(10.0, -2 + 4 * uniform(rng)) * (static_cast<double>(c.norm()) / scale);
        m.sigma = std::pow(10.0, -3 + 6 * uniform(rng)) * scale / (static_cast<double>(c.norm()) / scale);
    }
    describe << ", scale " << scale << ", radius " << m.radius << ", sigma " << m.sigma;
    m.describe = describe.str();
    return m;
}

constexpr int kModelsPerClassAndSize = 40;

TEST(SubproblemDifferential, ExactTrustRegionStepMatchesTheExtendedPrecisionReference) {
    std::mt19937_64 rng(20261213);
    int checked = 0, hardCases = 0, boundary = 0;
    double worstModel = 0, worstBoundary = 0;
    for (ModelClass kind : kClasses)
        for (int n = 2; n <= 10; ++n)
            for (int k = 0; k < kModelsPerClassAndSize; ++k) {
                const Model m = makeModel(rng, kind, n, k);
                const SubproblemResult ours = exactTrustRegionStep(m.g, m.b, m.radius);
                const ref::Solution reference = ref::trustRegion(m.b, m.g, m.radius);
                const ref::MatrixL b = ref::widen(m.b);
                const ref::VectorL g = ref::widen(m.g);
                ASSERT_TRUE(ours.step.allFinite()) << m.describe;
                const Real model = ref::quadraticModel(b, g, ref::widen(ours.step));
                // Never worse than the reference by more than 1e-10 relative.
                const Real excess = (model - reference.model) / std::fabs(reference.model);
                worstModel = std::max(worstModel, static_cast<double>(excess));
                EXPECT_LE(excess, 1e-10L) << m.describe << ": ours " << static_cast<double>(model) << ", reference "
                                         << static_cast<double>(reference.model) << "; " << ours.note.text();
                const double norm = ours.step.norm();
                EXPECT_LE(norm, m.radius * (1 + 1e-12)) << m.describe;
                // On the boundary whenever the multiplier is positive (ours or the reference's).
                if (ours.multiplier > 0 || reference.lambda > 1e-8L * std::fabs(reference.lambda - ref::jacobiEigen(b).values(0))) {
                    worstBoundary = std::max(worstBoundary, std::abs(norm - m.radius) / m.radius);
                    EXPECT_NEAR(norm, m.radius, 1e-12 * m.radius)
                        << m.describe << ": lambda ours " << ours.multiplier << ", reference "
                        << static_cast<double>(reference.lambda);
                    ++boundary;
                }
                hardCases += ours.hardCase;
                ++checked;
            }
    EXPECT_EQ(checked, 6 * 9 * kModelsPerClassAndSize);
    EXPECT_GT(hardCases, 50);  // the hard-case branch was exercised
    EXPECT_GT(boundary, checked / 2);
    RecordProperty("worst_model_excess", std::to_string(worstModel));
    std::printf("exact trust region: %d models, %d hard cases, %d on the boundary; worst relative model excess %.3g, "
                "worst | |p| - radius | / radius %.3g\n",
                checked, hardCases, boundary, worstModel, worstBoundary);
}

TEST(SubproblemDifferential, CubicStepMatchesTheExtendedPrecisionReference) {
    std::mt19937_64 rng(20261214);
    int checked = 0, hardCases = 0;
    double worstModel = 0, worstMultiplier = 0, worstResidual = 0;
    for (ModelClass kind : kClasses)
        for (int n = 2; n <= 10; ++n)
            for (int k = 0; k < kModelsPerClassAndSize; ++k) {
                const Model m = makeModel(rng, kind, n, k);
                const SubproblemResult ours = cubicStep(m.g, m.b, m.sigma);
                const ref::Solution reference = ref::cubic(m.b, m.g, m.sigma);
                const ref::MatrixL b = ref::widen(m.b);
                const ref::VectorL g = ref::widen(m.g);
                const ref::VectorL p = ref::widen(ours.step);
                ASSERT_TRUE(ours.step.allFinite()) << m.describe;
                const Real model = ref::cubicModel(b, g, m.sigma, p);
                const Real excess = (model - reference.model) / std::fabs(reference.model);
                worstModel = std::max(worstModel, static_cast<double>(excess));
                EXPECT_LE(excess, 1e-10L) << m.describe << ": ours " << static_cast<double>(model) << ", reference "
                                         << static_cast<double>(reference.model) << "; " << ours.note.text();
                // Cartis, Gould & Toint (2011), Part I, Thm 3.1: lambda = sigma |p| ...
                const Real lambda = ours.multiplier, pnorm = p.norm();
                const Real multiplierError = std::fabs(lambda - m.sigma * pnorm) / std::max<Real>(lambda, 1e-300L);
                worstMultiplier = std::max(worstMultiplier, static_cast<double>(multiplierError));
                EXPECT_LE(multiplierError, 1e-10L) << m.describe;
                // ... (B + lambda I) p = -g ...
                const ref::VectorL residual = b * p + lambda * p + g;
                const Real scale = g.norm() + (b.cwiseAbs().maxCoeff() + lambda) * pnorm;
                const Real residualError = residual.norm() / scale;
                worstResidual = std::max(worstResidual, static_cast<double>(residualError));
                EXPECT_LE(residualError, 1e-10L) << m.describe;
                // ... and B + lambda I positive semidefinite.
                const Real lowest = ref::jacobiEigen(b).values(0);
                EXPECT_GE(lowest + lambda, -1e-10L * std::max<Real>(1, std::fabs(lowest))) << m.describe;
                hardCases += ours.hardCase;
                ++checked;
            }
    EXPECT_EQ(checked, 6 * 9 * kModelsPerClassAndSize);
    EXPECT_GT(hardCases, 20);
    std::printf("cubic: %d models, %d hard cases; worst relative model excess %.3g, |lambda - sigma |p|| / lambda %.3g, "
                "residual %.3g\n",
                checked, hardCases, worstModel, worstMultiplier, worstResidual);
}

// The reference itself: on models whose answer is known in closed form it gives that answer
// (so a differential test against it can fail for the right reason).
TEST(SubproblemDifferential, ReferenceSolvesModelsWithKnownAnswers) {
    // B = diag(-1, 2), g = (0, 2): hard case; p(-lambda_1) = -(2 / (2 + 1)) e_2 = (0, -2/3),
    // radius 1: p = (+-sqrt(1 - 4/9), -2/3), lambda = 1. (Worked by hand.)
    Matrix b(2, 2);
    b << -1, 0, 0, 2;
    Vector g(2);
    g << 0, 2;
    const ref::Solution hard = ref::trustRegion(b, g, 1.0);
    EXPECT_TRUE(hard.hardCase);
    EXPECT_NEAR(static_cast<double>(hard.lambda), 1.0, 1e-15);
    EXPECT_NEAR(static_cast<double>(std::fabs(hard.step(0))), std::sqrt(5.0 / 9.0), 1e-15);
    EXPECT_NEAR(static_cast<double>(hard.step(1)), -2.0 / 3.0, 1e-15);
    // B = diag(1, 3), g = (1, 1), radius 10: Newton step (-1, -1/3) inside, lambda = 0.
    b << 1, 0, 0, 3;
    g << 1, 1;
    const ref::Solution inside = ref::trustRegion(b, g, 10.0);
    EXPECT_EQ(inside.lambda, 0);
    EXPECT_NEAR(static_cast<double>(inside.step(1)), -1.0 / 3.0, 1e-18);
    // Same model, radius sqrt(2)/2 ... lambda solves 1/(1+l)^2 + 1/(3+l)^2 = 1/2: l = 1 gives
    // 1/4 + 1/16 = 5/16 < 1/2, so the root is below 1; check the equation holds.
    const ref::Solution boundary = ref::trustRegion(b, g, std::sqrt(0.5));
    const Real l = boundary.lambda;
    EXPECT_NEAR(static_cast<double>(1 / ((1 + l) * (1 + l)) + 1 / ((3 + l) * (3 + l))), 0.5, 1e-15);
    // Cubic, B = 0 (n = 1 as 2 x 2 diag(0, 0)), g = (1, 0), sigma = 1: p = -sqrt(|g| / sigma) e_1.
    b.setZero();
    g << 1, 0;
    const ref::Solution cubic = ref::cubic(b, g, 1.0);
    EXPECT_NEAR(static_cast<double>(cubic.step(0)), -1.0, 1e-17);
    EXPECT_NEAR(static_cast<double>(cubic.lambda), 1.0, 1e-17);
}

// The hard-case sign: with g nearly (not exactly) orthogonal to the lowest eigenvector, the
// hard-case branch moves along the eigenvector in the direction that lowers the model.
TEST(ExactTrustRegion, HardCaseMovesAgainstGsPartAlongTheLowestEigenvector) {
    for (double sign : {1.0, -1.0}) {
        Matrix b(3, 3);
        b << -2, 0, 0, 0, 1, 0, 0, 0, 3;
        Vector g(3);
        g << sign * 1e-15, 1, 1;  // below the orthogonality tolerance 1e-12 |g|
        const SubproblemResult r = exactTrustRegionStep(g, b, 10.0);
        ASSERT_TRUE(r.hardCase) << r.note.text();
        EXPECT_LT(sign * r.step(0), 0) << "moved along +g's part: the model's linear term rises";
        const SubproblemResult flipped = [&] {
            SubproblemResult f = r;
            f.step(0) = -f.step(0);
            return f;
        }();
        EXPECT_GE(quadraticModelDecrease(g, b, r.step), quadraticModelDecrease(g, b, flipped.step));
        const SubproblemResult c = cubicStep(g, b, 0.1);
        ASSERT_TRUE(c.hardCase) << c.note.text();
        EXPECT_LT(sign * c.step(0), 0);
    }
}

// With a repeated lowest eigenvalue, the direction is g's part in the whole eigenspace.
TEST(ExactTrustRegion, HardCaseDirectionIsGsPartInARepeatedLowestEigenspace) {
    Matrix b(3, 3);
    b << -1, 0, 0, 0, -1, 0, 0, 0, 4;
    Vector g(3);
    g << 3e-16, -4e-16, 1;
    const SubproblemResult r = exactTrustRegionStep(g, b, 5.0);
    ASSERT_TRUE(r.hardCase);
    // The part in span(e1, e2) points along -(3, -4)/5.
    const double size = std::hypot(r.step(0), r.step(1));
    EXPECT_NEAR(r.step(0) / size, -0.6, 1e-12);
    EXPECT_NEAR(r.step(1) / size, 0.8, 1e-12);
}

}  // namespace
}  // namespace sw::solve
