#include "core/analyze/analyze.h"
#include "test_objectives.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::analyze {
namespace {

// A checker must itself be checked: it passes exact derivatives and catches wrong ones.
// (Central differences with h ~ eps^(1/3): Nocedal & Wright 2006, sec. 8.1.)

TEST(CheckDerivatives, PassesExactDerivativesOfACurvedValley) {
    auto valley = testing::curvedValley();
    for (const Vector& x :
         {(Vector(2) << -1.2, 1).finished(), (Vector(2) << 0.3, -2).finished(), (Vector(2) << 150, 2e4).finished()}) {
        const DerivativeCheck check = checkDerivatives(*valley, x);
        EXPECT_TRUE(check.passed) << check.message;
        EXPECT_LT(check.gradientError, 1e-7);
        EXPECT_LT(check.hessianError, 1e-6);
    }
}

TEST(CheckDerivatives, FailsAGradientWithAWrongFactorAndNamesTheComponent) {
    // d/dy of 100 (y - x^2)^2 is 200 (y - x^2); here it is written as 20 (y - x^2).
    FunctionObjective wrong(
        {"x", "y"}, [](const Vector& v) { return 100 * std::pow(v(1) - v(0) * v(0), 2) + std::pow(1 - v(0), 2); },
        [](const Vector& v, Vector& g) {
            g << -400 * v(0) * (v(1) - v(0) * v(0)) - 2 * (1 - v(0)), 20 * (v(1) - v(0) * v(0));
        },
        [](const Vector& v, Matrix& h) { h << 1200 * v(0) * v(0) - 400 * v(1) + 2, -400 * v(0), -400 * v(0), 200; });
    const DerivativeCheck check = checkDerivatives(wrong, (Vector(2) << -1.2, 1).finished());
    EXPECT_FALSE(check.passed);
    EXPECT_EQ(check.worstGradientIndex, 1);
    EXPECT_NE(check.message.find("gradient component y"), std::string::npos) << check.message;
}

TEST(CheckDerivatives, FailsAHessianWithAWrongSignOffTheDiagonal) {
    auto valley = testing::curvedValley();
    FunctionObjective wrong(
        {"x", "y"}, [&](const Vector& v) { return valley->value(v); },
        [&](const Vector& v, Vector& g) { valley->valueGradient(v, g); },
        [](const Vector& v, Matrix& h) { h << 1200 * v(0) * v(0) - 400 * v(1) + 2, 400 * v(0), 400 * v(0), 200; });
    const DerivativeCheck check = checkDerivatives(wrong, (Vector(2) << -1.2, 1).finished());
    EXPECT_FALSE(check.passed);
    EXPECT_LT(check.gradientError, 1e-7);
    EXPECT_NE(check.message.find("Hessian entry"), std::string::npos) << check.message;
}

}  // namespace
}  // namespace sw::analyze
