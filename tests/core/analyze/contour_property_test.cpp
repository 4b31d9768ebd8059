#include "core/analyze/analyze.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>

namespace sw::analyze {
namespace {

// Invariants of marching squares on random fields with holes (common practice, no published
// source): every vertex lies on a grid edge at the level (by linear interpolation along that
// edge); consecutive vertices lie in one cell; closed rings end where they start; an open
// line ends on the box boundary or next to a non-finite grid value.
TEST(ContourLines, RandomFieldsWithHolesKeepTheMarchingSquaresInvariants) {
    std::mt19937 random(20261201);
    std::uniform_real_distribution<double> uniform(-1, 1);
    for (int trial = 0; trial < 40; ++trial) {
        Field field;
        field.box = {-1, 2, 0, 1.5};
        field.nx = 7 + trial % 11;
        field.ny = 5 + trial % 13;
        field.values.resize(static_cast<std::size_t>(field.nx) * field.ny);
        for (double& v : field.values) v = uniform(random) < -0.85 ? std::nan("") : uniform(random);
        const double dx = (field.box.xMax - field.box.xMin) / (field.nx - 1);
        const double dy = (field.box.yMax - field.box.yMin) / (field.ny - 1);

        auto gridIndex = [](double coordinate, double lo, double step) { return (coordinate - lo) / step; };
        auto nearInteger = [](double v) { return std::abs(v - std::round(v)) < 1e-9; };
        auto finiteAt = [&](int i, int j) {
            return i >= 0 && j >= 0 && i < field.nx && j < field.ny && std::isfinite(field.at(i, j));
        };

        for (double level : {-0.5, 0.0, 0.3}) {
            const std::vector<ContourSet> sets = contourLines(field, {level});
            for (const Polyline& line : sets[0].lines) {
                ASSERT_GE(line.x.size(), 2u);
                for (std::size_t p = 0; p < line.x.size(); ++p) {
                    const double gi = gridIndex(line.x[p], field.box.xMin, dx);
                    const double gj = gridIndex(line.y[p], field.box.yMin, dy);
                    // On a vertical grid line (integer gi) or a horizontal one (integer gj).
                    ASSERT_TRUE(nearInteger(gi) || nearInteger(gj)) << gi << ", " << gj;
                    double a, b, t;
                    if (nearInteger(gi) && !nearInteger(gj)) {
                        const int i = static_cast<int>(std::round(gi)), j = static_cast<int>(std::floor(gj));
                        a = field.at(i, j), b = field.at(i, j + 1), t = gj - j;
                    } else if (nearInteger(gj)) {
                        const int j = static_cast<int>(std::round(gj)),
                                  i = std::min(static_cast<int>(std::floor(gi)), field.nx - 2);
                        a = field.at(i, j), b = field.at(i + 1, j), t = gi - i;
                    } else {
                        continue;
                    }
                    EXPECT_NEAR(a + t * (b - a), level, 1e-9);
                    if (p > 0) {
                        EXPECT_LE(std::abs(line.x[p] - line.x[p - 1]), dx * (1 + 1e-9));
                        EXPECT_LE(std::abs(line.y[p] - line.y[p - 1]), dy * (1 + 1e-9));
                    }
                }
                if (line.closed) {
                    EXPECT_EQ(line.x.front(), line.x.back());
                    EXPECT_EQ(line.y.front(), line.y.back());
                    continue;
                }
                for (std::size_t end : {std::size_t{0}, line.x.size() - 1}) {
                    const double gi = gridIndex(line.x[end], field.box.xMin, dx);
                    const double gj = gridIndex(line.y[end], field.box.yMin, dy);
                    const bool onBoundary = std::abs(gi) < 1e-9 || std::abs(gj) < 1e-9 ||
                                            std::abs(gi - (field.nx - 1)) < 1e-9 ||
                                            std::abs(gj - (field.ny - 1)) < 1e-9;
                    // Next to a hole: one of the (up to 6) grid values of the two cells sharing this edge is NaN.
                    bool nearHole = false;
                    const int i0 = static_cast<int>(std::floor(gi + 1e-9)),
                              j0 = static_cast<int>(std::floor(gj + 1e-9));
                    for (int di = -1; di <= 1; ++di)
                        for (int dj = -1; dj <= 1; ++dj)
                            if (i0 + di >= 0 && j0 + dj >= 0 && i0 + di < field.nx && j0 + dj < field.ny)
                                nearHole = nearHole || !finiteAt(i0 + di, j0 + dj);
                    EXPECT_TRUE(onBoundary || nearHole) << "trial " << trial << " ends at " << gi << ", " << gj;
                }
            }
        }
    }
}

}  // namespace
}  // namespace sw::analyze
