#include "core/analyze/analyze.h"
#include "test_objectives.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::analyze {
namespace {

// Verdicts follow from the signs of the Hessian's eigenvalues: common practice, no
// published source (any text on second-order optimality conditions).

Vector point(double x, double y) {
    return (Vector(2) << x, y).finished();
}

TEST(QuadraticModel, APositiveDefiniteHessianIsABowlWhoseNewtonPointIsTheMinimiser) {
    auto bowl = testing::quadratic(1, 4);  // minimiser at the origin
    const QuadraticModel model = quadraticModel(*bowl, point(1, -2));
    EXPECT_EQ(model.shape, Shape::Bowl);
    EXPECT_EQ(model.verdict.rfind("bowl: ", 0), 0u) << model.verdict;
    ASSERT_TRUE(model.hasNewtonPoint);
    EXPECT_NEAR(model.newtonPoint(0), 0, 1e-14);
    EXPECT_NEAR(model.newtonPoint(1), 0, 1e-14);
    EXPECT_DOUBLE_EQ(model.eigenvalues(0), 2);
    EXPECT_DOUBLE_EQ(model.eigenvalues(1), 8);
    EXPECT_DOUBLE_EQ(model.conditionNumber, 4);
    // The model of a quadratic is the function itself.
    const Vector p = point(0.3, 0.7);
    EXPECT_NEAR(model.at(p), bowl->value(model.center + p), 1e-12);
}

TEST(QuadraticModel, MixedSignsAreASaddle) {
    auto saddle = testing::quadratic(1, -1);
    const QuadraticModel model = quadraticModel(*saddle, point(0.5, 0.25));
    EXPECT_EQ(model.shape, Shape::Saddle);
    EXPECT_NE(model.reason.find("up along 1 direction and down along 1 direction"), std::string::npos) << model.reason;
    ASSERT_TRUE(model.hasNewtonPoint);
    // The Newton point of x^2 - y^2 is the saddle point at the origin.
    EXPECT_NEAR(model.newtonPoint.norm(), 0, 1e-14);
}

TEST(QuadraticModel, ANegativeDefiniteHessianIsADome) {
    auto dome = testing::quadratic(-2, -3);
    const QuadraticModel model = quadraticModel(*dome, point(1, 1));
    EXPECT_EQ(model.shape, Shape::Dome);
    EXPECT_NE(model.reason.find("uphill"), std::string::npos);
}

TEST(QuadraticModel, ANearZeroEigenvalueWithTheRestPositiveIsAFlatDirection) {
    auto trough = testing::quadratic(1, 1e-12);  // eigenvalues 2 and 2e-12 (relative 1e-12 < 1e-8)
    const QuadraticModel model = quadraticModel(*trough, point(1, 1));
    EXPECT_EQ(model.shape, Shape::FlatDirection);
    EXPECT_FALSE(model.hasNewtonPoint);
    EXPECT_NE(model.reason.find("counts as zero"), std::string::npos) << model.reason;
    // With a looser tolerance the same curvature is just small, not zero.
    EXPECT_EQ(quadraticModel(*trough, point(1, 1), 1e-14).shape, Shape::Bowl);
}

TEST(QuadraticModel, ANearZeroEigenvalueWithANegativeOneIsARidge) {
    auto ridge = testing::quadratic(-1, 0);
    const QuadraticModel model = quadraticModel(*ridge, point(1, 1));
    EXPECT_EQ(model.shape, Shape::Ridge);
    EXPECT_FALSE(model.hasNewtonPoint);
}

TEST(QuadraticModel, AtTheStartOfACurvedValleyTheModelIsASaddle) {
    // f = 100 (y - x^2)^2 + (1 - x)^2 at (0, 1): H = [[-398, 0], [0, 200]], mixed signs.
    auto valley = testing::curvedValley();
    const QuadraticModel model = quadraticModel(*valley, point(0, 1));
    EXPECT_EQ(model.shape, Shape::Saddle);
    EXPECT_DOUBLE_EQ(model.eigenvalues(0), -398);
    EXPECT_DOUBLE_EQ(model.eigenvalues(1), 200);
    // Eigenvectors are unit columns matching the eigenvalues.
    const Vector v0 = model.eigenvectors.col(0);
    EXPECT_NEAR((model.hessian * v0 - model.eigenvalues(0) * v0).norm(), 0, 1e-10);
}

TEST(QuadraticModel, ModelAlongALineMatchesTheModelAtThosePoints) {
    auto valley = testing::curvedValley();
    const QuadraticModel model = quadraticModel(*valley, point(-1.2, 1));
    const Vector d = point(0.3, -0.4);
    const auto ts = linspace(-1, 2, 7);
    const auto along = model.along(d, ts);
    ASSERT_EQ(along.size(), 7u);
    for (std::size_t k = 0; k < ts.size(); ++k) EXPECT_NEAR(along[k], model.at(ts[k] * d), 1e-9);
}

TEST(QuadraticModel, NonFiniteDerivativesGiveNoVerdict) {
    FunctionObjective broken(
        {"x", "y"}, [](const Vector&) { return 1.0; }, [](const Vector&, Vector& g) { g << std::nan(""), 0; },
        [](const Vector&, Matrix& h) { h.setIdentity(); });
    const QuadraticModel model = quadraticModel(broken, point(0, 0));
    EXPECT_EQ(model.shape, Shape::Unknown);
    EXPECT_FALSE(model.finite);
    EXPECT_FALSE(model.hasNewtonPoint);
}

}  // namespace
}  // namespace sw::analyze
