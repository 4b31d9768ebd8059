#include "core/analyze/analyze.h"
#include "test_objectives.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::analyze {
namespace {

Field fieldOf(const Objective& objective, const Box& box, int n) {
    Field field;
    EXPECT_TRUE(sampleField(objective, Vector::Zero(objective.dimension()), 0, 1, box, n, n, field));
    return field;
}

// Expected shape: common practice, no published source (the level set of x^2 + y^2 = r^2 is
// the circle of radius r; linear interpolation on a grid of spacing h is accurate to O(h^2)).
TEST(ContourLines, LevelsOfACircularBowlAreClosedRingsOfTheRightRadius) {
    auto bowl = testing::quadratic(1, 1);
    const Field field = fieldOf(*bowl, {-2, 2, -2, 2}, 161);  // h = 0.025
    const auto sets = contourLines(field, {0.25, 1.0, 2.25});
    ASSERT_EQ(sets.size(), 3u);
    const double radii[] = {0.5, 1.0, 1.5};
    for (int k = 0; k < 3; ++k) {
        ASSERT_EQ(sets[k].lines.size(), 1u) << "level " << sets[k].level;
        const Polyline& ring = sets[k].lines[0];
        EXPECT_TRUE(ring.closed);
        ASSERT_GT(ring.x.size(), 20u);
        EXPECT_DOUBLE_EQ(ring.x.front(), ring.x.back());  // closed rings repeat their first point
        EXPECT_DOUBLE_EQ(ring.y.front(), ring.y.back());
        for (std::size_t p = 0; p < ring.x.size(); ++p)
            EXPECT_NEAR(std::hypot(ring.x[p], ring.y[p]), radii[k], 2e-3) << "point " << p;
    }
}

TEST(ContourLines, ALevelThatLeavesTheBoxGivesOpenLines) {
    // x^2 + y^2 = 4 on [0,3]x[-3,3]: the right half of a circle, cut by the box edge x = 0.
    auto bowl = testing::quadratic(1, 1);
    Field field;
    ASSERT_TRUE(sampleField(*bowl, Vector::Zero(2), 0, 1, {0, 3, -3, 3}, 61, 121, field));
    const auto sets = contourLines(field, {4.0});
    ASSERT_EQ(sets[0].lines.size(), 1u);
    const Polyline& arc = sets[0].lines[0];
    EXPECT_FALSE(arc.closed);
    EXPECT_NEAR(arc.x.front(), 0.0, 1e-12);
    EXPECT_NEAR(arc.x.back(), 0.0, 1e-12);
    EXPECT_NEAR(std::abs(arc.y.front()), 2.0, 1e-2);
}

TEST(ContourLines, SaddleCellIsSettledByItsCentreValue) {
    // One cell with corners 1 (0,0), 0 (1,0), 1 (1,1), 0 (0,1); level 0.5.
    Field field;
    field.box = {0, 1, 0, 1};
    field.nx = field.ny = 2;
    field.values = {1, 0, 0, 1};  // (0,0)=1, (1,0)=0, (0,1)=0, (1,1)=1
    field.finiteMin = 0;
    field.finiteMax = 1;

    // Centre 0.5 >= 0.5 counts as above: the high corners join, so each low corner is cut off.
    auto sets = contourLines(field, {0.5});
    ASSERT_EQ(sets[0].lines.size(), 2u);
    for (const Polyline& line : sets[0].lines) {
        ASSERT_EQ(line.x.size(), 2u);
        const double mx = 0.5 * (line.x[0] + line.x[1]), my = 0.5 * (line.y[0] + line.y[1]);
        // Each segment's midpoint lies near a low corner: (1,0) or (0,1).
        EXPECT_TRUE((mx > 0.5 && my < 0.5) || (mx < 0.5 && my > 0.5)) << mx << ", " << my;
    }

    // Lower the centre below the level: the low corners join and the high corners are cut off.
    field.values = {1, 0.2, 0.2, 0.7};  // centre 0.525
    sets = contourLines(field, {0.6});  // 1 and 0.7 above, 0.2 below; centre 0.525 < 0.6
    ASSERT_EQ(sets[0].lines.size(), 2u);
    for (const Polyline& line : sets[0].lines) {
        const double mx = 0.5 * (line.x[0] + line.x[1]), my = 0.5 * (line.y[0] + line.y[1]);
        EXPECT_TRUE((mx < 0.5 && my < 0.5) || (mx > 0.5 && my > 0.5)) << mx << ", " << my;
    }
}

TEST(ContourLines, TheLevelOfASaddlePointGivesCrossingLinesWithoutGaps) {
    // x^2 - y^2 = 0.01 on a grid: two open branches, each crossing the whole box.
    auto saddle = testing::quadratic(1, -1);
    const Field field = fieldOf(*saddle, {-1, 1, -1, 1}, 41);
    const auto sets = contourLines(field, {0.01});
    ASSERT_EQ(sets[0].lines.size(), 2u);
    for (const Polyline& branch : sets[0].lines) {
        EXPECT_FALSE(branch.closed);
        // Both ends lie on the box boundary.
        EXPECT_NEAR(std::max(std::abs(branch.x.front()), std::abs(branch.y.front())), 1.0, 1e-12);
        EXPECT_NEAR(std::max(std::abs(branch.x.back()), std::abs(branch.y.back())), 1.0, 1e-12);
        EXPECT_GT(branch.x.size(), 30u);
    }
}

TEST(ContourLines, CellsWithANonFiniteCornerAreSkipped) {
    // f = x^2 + y^2 but undefined (NaN) for x < 0: the ring of radius 1 becomes a half ring.
    FunctionObjective halfBowl(
        {"x", "y"}, [](const Vector& v) { return v(0) < 0 ? std::nan("") : v.squaredNorm(); },
        [](const Vector& v, Vector& g) { g = 2 * v; },
        [](const Vector&, Matrix& h) { h = 2 * Matrix::Identity(2, 2); });
    Field field;
    ASSERT_TRUE(sampleField(halfBowl, Vector::Zero(2), 0, 1, {-2, 2, -2, 2}, 81, 81, field));
    EXPECT_GT(field.nonFiniteCells, 0);
    const auto sets = contourLines(field, {1.0});
    ASSERT_EQ(sets[0].lines.size(), 1u);
    const Polyline& arc = sets[0].lines[0];
    EXPECT_FALSE(arc.closed);
    for (std::size_t p = 0; p < arc.x.size(); ++p) {
        EXPECT_GE(arc.x[p], 0.0);
        EXPECT_NEAR(std::hypot(arc.x[p], arc.y[p]), 1.0, 5e-3);
    }
}

TEST(ContourLines, NonFiniteLevelsAndEmptyFieldsGiveNothing) {
    Field empty;
    EXPECT_TRUE(contourLines(empty, {1.0}).empty());
    auto bowl = testing::quadratic(1, 1);
    const Field field = fieldOf(*bowl, {-1, 1, -1, 1}, 11);
    EXPECT_TRUE(contourLines(field, {std::nan("")}).empty());
    const auto above = contourLines(field, {100.0});
    ASSERT_EQ(above.size(), 1u);
    EXPECT_TRUE(above[0].lines.empty());
}

}  // namespace
}  // namespace sw::analyze
