#include "core/analyze/analyze.h"
#include "test_objectives.h"

#include <gtest/gtest.h>

#include <atomic>
#include <cmath>
#include <limits>

namespace sw::analyze {
namespace {

TEST(SampleField, HoldsEveryValueOfTheObjectiveOnTheGrid) {
    auto valley = testing::curvedValley();
    Field field;
    ASSERT_TRUE(sampleField(*valley, Vector::Zero(2), 0, 1, {-2, 2, -1, 3}, 101, 81, field));
    ASSERT_EQ(field.values.size(), 101u * 81u);
    double lo = 1e300, hi = -1e300;
    for (int j = 0; j < field.ny; ++j)
        for (int i = 0; i < field.nx; ++i) {
            const Vector p = (Vector(2) << field.x(i), field.y(j)).finished();
            const double expected = valley->value(p);
            EXPECT_DOUBLE_EQ(field.at(i, j), expected);
            lo = std::min(lo, expected);
            hi = std::max(hi, expected);
        }
    EXPECT_DOUBLE_EQ(field.finiteMin, lo);
    EXPECT_DOUBLE_EQ(field.finiteMax, hi);
    EXPECT_EQ(field.nonFiniteCells, 0);
    EXPECT_DOUBLE_EQ(field.x(0), -2.0);
    EXPECT_DOUBLE_EQ(field.x(100), 2.0);
    EXPECT_DOUBLE_EQ(field.y(80), 3.0);
}

TEST(SampleField, HoldsTheOtherVariablesAtTheGivenPoint) {
    // f = x + 10 y + 100 z, plotting z (index 2) against x (index 0) with y held at 0.5.
    FunctionObjective linear(
        {"x", "y", "z"}, [](const Vector& v) { return v(0) + 10 * v(1) + 100 * v(2); },
        [](const Vector&, Vector& g) { g << 1, 10, 100; }, [](const Vector&, Matrix& h) { h.setZero(); });
    Field field;
    const Vector held = (Vector(3) << 7, 0.5, 9).finished();
    ASSERT_TRUE(sampleField(linear, held, 2, 0, {0, 1, -1, 1}, 3, 5, field));
    EXPECT_EQ(field.xVariable, 2);
    EXPECT_EQ(field.yVariable, 0);
    // cell (i, j): z = x(i), x = y(j)
    EXPECT_DOUBLE_EQ(field.at(2, 0), -1 + 5 + 100 * 1.0);
    EXPECT_DOUBLE_EQ(field.at(1, 4), 1 + 5 + 100 * 0.5);
}

TEST(SampleField, RangeCountsOnlyFiniteCells) {
    // +inf along x = 0 and NaN for y > 0.5: the range must come from the finite cells
    // (a plotting library's own rescale would keep a default range here).
    FunctionObjective spiky(
        {"x", "y"},
        [](const Vector& v) {
            if (v(0) == 0) return std::numeric_limits<double>::infinity();
            if (v(1) > 0.5) return std::nan("");
            return v(0) + v(1);
        },
        [](const Vector&, Vector& g) { g.setZero(); }, [](const Vector&, Matrix& h) { h.setZero(); });
    Field field;
    ASSERT_TRUE(sampleField(spiky, Vector::Zero(2), 0, 1, {-1, 1, -1, 1}, 5, 5, field));
    // x in {-1,-0.5,0,0.5,1}; y in {-1,-0.5,0,0.5,1}: NaN for y = 1 (5 cells), inf for x = 0 (4 more).
    EXPECT_EQ(field.nonFiniteCells, 9);
    EXPECT_DOUBLE_EQ(field.finiteMin, -2.0);
    EXPECT_DOUBLE_EQ(field.finiteMax, 1.5);
}

TEST(SampleField, AnAllNonFiniteFieldHasAnEmptyRange) {
    FunctionObjective nowhere(
        {"x", "y"}, [](const Vector&) { return std::nan(""); }, [](const Vector&, Vector& g) { g.setZero(); },
        [](const Vector&, Matrix& h) { h.setZero(); });
    Field field;
    ASSERT_TRUE(sampleField(nowhere, Vector::Zero(2), 0, 1, {-1, 1, -1, 1}, 4, 4, field));
    EXPECT_EQ(field.nonFiniteCells, 16);
    EXPECT_EQ(field.finiteMin, 0.0);
    EXPECT_EQ(field.finiteMax, 0.0);
    EXPECT_TRUE(chooseLevels(field, 10).empty());
}

TEST(SampleField, ReportsProgressUpToOneAndStopsWhenCancelled) {
    auto valley = testing::curvedValley();
    std::vector<double> reports;
    Control control;
    control.progress = [&](double p) { reports.push_back(p); };
    Field field;
    ASSERT_TRUE(sampleField(*valley, Vector::Zero(2), 0, 1, {-2, 2, -1, 3}, 200, 200, field, control));
    ASSERT_FALSE(reports.empty());
    EXPECT_DOUBLE_EQ(reports.back(), 1.0);
    for (std::size_t k = 1; k < reports.size(); ++k) EXPECT_GE(reports[k], reports[k - 1]);

    std::atomic<bool> cancel{true};
    control.cancel = &cancel;
    EXPECT_FALSE(sampleField(*valley, Vector::Zero(2), 0, 1, {-2, 2, -1, 3}, 200, 200, field, control));

    // Cancelling part-way through (from the progress callback) also stops the sampling.
    cancel = false;
    control.progress = [&](double p) {
        if (p > 0.1) cancel = true;
    };
    EXPECT_FALSE(sampleField(*valley, Vector::Zero(2), 0, 1, {-2, 2, -1, 3}, 200, 200, field, control));
}

TEST(SampleField, RejectsABadBoxOrGridWithASentence) {
    auto bowl = testing::quadratic(1, 1);
    Field field;
    EXPECT_THROW(sampleField(*bowl, Vector::Zero(2), 0, 1, {1, -1, -1, 1}, 10, 10, field), std::invalid_argument);
    EXPECT_THROW(sampleField(*bowl, Vector::Zero(2), 0, 1, {-1, 1, -1, 1}, 1, 10, field), std::invalid_argument);
    EXPECT_THROW(sampleField(*bowl, Vector::Zero(2), 0, 0, {-1, 1, -1, 1}, 10, 10, field), std::invalid_argument);
    EXPECT_THROW(sampleField(*bowl, Vector::Zero(3), 0, 1, {-1, 1, -1, 1}, 10, 10, field), std::invalid_argument);
}

}  // namespace
}  // namespace sw::analyze
