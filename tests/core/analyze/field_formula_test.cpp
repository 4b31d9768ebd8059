#include "core/analyze/analyze.h"
#include "core/objective/formula_objective.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::analyze {
namespace {

// The formula fast path (one block evaluation per row) must give exactly what the
// objective gives point by point.
TEST(SampleField, AFormulaFieldEqualsTheFormulaPointByPoint) {
    const FormulaObjective objective("(1 - a)^2 + 30*(b - a^2)^2 + 0.1*sin(3*c)*a + k*b", {"a", "b", "c"},
                                     {{"k", 0.25}});
    const Vector held = (Vector(3) << 0.4, -0.3, 0.7).finished();
    Field field;
    ASSERT_TRUE(sampleField(objective, held, 2, 0, {-2, 2, -1.5, 1.5}, 37, 29, field));
    Vector p = held;
    for (int j = 0; j < field.ny; ++j)
        for (int i = 0; i < field.nx; ++i) {
            p(2) = field.x(i);
            p(0) = field.y(j);
            EXPECT_NEAR(field.at(i, j), objective.value(p), 1e-13 * (1 + std::abs(objective.value(p))))
                << "cell " << i << ", " << j;
        }
}

TEST(SampleField, ABoxFromMinus1e308To1e308HasFiniteCoordinatesAndValues) {
    // The width 2e308 overflows; the grid must not (issue 17's sample sibling: the window's
    // landscape and the report's figures). Exact ends and a centre of 0 by symmetry.
    const FormulaObjective objective("x/1e300 + y", {"x", "y"});
    Field field;
    ASSERT_TRUE(sampleField(objective, Vector::Zero(2), 0, 1, {-1e308, 1e308, -1, 1}, 5, 3, field));
    EXPECT_EQ(field.x(0), -1e308);
    EXPECT_EQ(field.x(4), 1e308);
    EXPECT_EQ(field.x(2), 0.0);
    EXPECT_EQ(field.nonFiniteCells, 0);
    for (int i = 0; i < field.nx; ++i) EXPECT_TRUE(std::isfinite(field.x(i))) << i;
    EXPECT_DOUBLE_EQ(field.at(4, 2), 1e8 + 1);
}

TEST(SampleField, AFormulaFieldCountsNonFiniteCells) {
    const FormulaObjective objective("sqrt(x) + log(y)", {"x", "y"});
    Field field;
    ASSERT_TRUE(sampleField(objective, Vector::Zero(2), 0, 1, {-1, 1, -1, 1}, 5, 5, field));
    // sqrt(x) is NaN for x < 0 (2 columns); log(y) is NaN for y < 0 and -inf at y = 0.
    // Finite: x in {0, 0.5, 1} and y in {0.5, 1}: 6 cells.
    EXPECT_EQ(field.nonFiniteCells, 25 - 6);
    EXPECT_DOUBLE_EQ(field.finiteMax, 1.0);
    EXPECT_NEAR(field.finiteMin, std::log(0.5), 1e-15);
}

}  // namespace
}  // namespace sw::analyze
