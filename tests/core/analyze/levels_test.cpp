#include "core/analyze/analyze.h"
#include "test_objectives.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::analyze {
namespace {

// The level rule is our own (see levels.cpp): common practice, no published source.

TEST(ChooseLevels, ABowlGetsEvenlySpacedLevelsInsideItsRange) {
    auto bowl = testing::quadratic(1, 2);
    Field field;
    ASSERT_TRUE(sampleField(*bowl, Vector::Zero(2), 0, 1, {-1, 1, -1, 1}, 101, 101, field));
    EXPECT_FALSE(levelsAreLogSpaced(field));
    const auto levels = chooseLevels(field, 9);
    ASSERT_EQ(levels.size(), 9u);
    const double step = (field.finiteMax - field.finiteMin) / 10;
    for (int k = 0; k < 9; ++k) EXPECT_NEAR(levels[k], field.finiteMin + (k + 1) * step, 1e-12);
}

TEST(ChooseLevels, ASteepCurvedValleyGetsLevelsOnItsFloorAndItsWalls) {
    auto valley = testing::curvedValley();
    Field field;
    ASSERT_TRUE(sampleField(*valley, Vector::Zero(2), 0, 1, {-2, 2, -1, 3}, 201, 201, field));
    EXPECT_TRUE(levelsAreLogSpaced(field));
    const auto levels = chooseLevels(field, 14);
    ASSERT_EQ(levels.size(), 14u);
    for (std::size_t k = 1; k < levels.size(); ++k) EXPECT_GT(levels[k], levels[k - 1]);
    // Evenly spaced levels would put the lowest near fmax/15 (> 150 here) and miss the floor;
    // these start below 1% of the range and still reach the walls.
    const double range = field.finiteMax - field.finiteMin;
    EXPECT_LT(levels.front() - field.finiteMin, 0.01 * range);
    EXPECT_GT(levels.back() - field.finiteMin, 0.3 * range);
    // Equal ratios between successive heights above the minimum.
    const double r1 = (levels[1] - field.finiteMin) / (levels[0] - field.finiteMin);
    const double r2 = (levels[13] - field.finiteMin) / (levels[12] - field.finiteMin);
    EXPECT_NEAR(r1, r2, 1e-9 * r1);
    // And each level draws something.
    for (const ContourSet& set : contourLines(field, levels)) EXPECT_FALSE(set.lines.empty()) << set.level;
}

TEST(ChooseLevels, AConstantFieldHasNoLevels) {
    Field field;
    field.box = {0, 1, 0, 1};
    field.nx = field.ny = 3;
    field.values.assign(9, 2.5);
    field.finiteMin = field.finiteMax = 2.5;
    EXPECT_TRUE(chooseLevels(field, 10).empty());
    EXPECT_TRUE(chooseLevels(field, 0).empty());
}

}  // namespace
}  // namespace sw::analyze
