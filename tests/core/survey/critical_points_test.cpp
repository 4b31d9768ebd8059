// The critical-point map: published critical points found completely from the default
// settings, degenerate cases reported as degenerate, determinism, pieces, bad input.
#include "core/objective/formula_objective.h"
#include "core/survey/survey.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>

namespace {

using sw::FormulaObjective;
using sw::Vector;
using sw::solve::PointKind;
using namespace sw::survey;

Region box2(double x0, double x1, double y0, double y1) {
    Region r;
    r.lower = Vector(2);
    r.upper = Vector(2);
    r.lower << x0, y0;
    r.upper << x1, y1;
    r.held = Vector::Zero(2);
    return r;
}

// The map's point of `kind` nearest (x, y), or nullptr when none is within `tolerance`.
const CriticalPoint* near(const CriticalMap& map, PointKind kind, double x, double y, double tolerance) {
    for (const CriticalPoint& p : map.points)
        if (p.kind == kind && std::abs(p.x[0] - x) <= tolerance && std::abs(p.x[1] - y) <= tolerance) return &p;
    return nullptr;
}

const char* kHimmelblau = "(x^2 + y - 11)^2 + (x + y^2 - 7)^2";

TEST(CriticalPoints, HimmelblauHasItsFourMinimaFourSaddlesAndOneMaximum) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-5, 5, -5, 5));
    ASSERT_EQ(map.points.size(), 9u);
    EXPECT_EQ(map.count(PointKind::Minimum), 4);
    EXPECT_EQ(map.count(PointKind::Saddle), 4);
    EXPECT_EQ(map.count(PointKind::Maximum), 1);
    // Minima, f = 0: Himmelblau (1972), Applied Nonlinear Programming (value from memory of the
    // published table, to 6 decimals).
    for (auto [x, y] : {std::pair{3.0, 2.0}, {-2.805118, 3.131312}, {-3.779310, -3.283186}, {3.584428, -1.848126}}) {
        const CriticalPoint* p = near(map, PointKind::Minimum, x, y, 1e-6);
        ASSERT_NE(p, nullptr) << x << ", " << y;
        EXPECT_NEAR(p->value, 0.0, 1e-20);
    }
    // The local maximum (-0.270845, -0.923039), f = 181.617: Himmelblau (1972) (value from memory).
    const CriticalPoint* peak = near(map, PointKind::Maximum, -0.270845, -0.923039, 1e-6);
    ASSERT_NE(peak, nullptr);
    EXPECT_NEAR(peak->value, 181.617, 5e-4);
    EXPECT_EQ(peak->index, 2);
    // The saddles: reference computed with SymPy 1.11.1 (resultant roots polished by nsolve at 30
    // digits; tests/reference/survey/sympy_critical.py checks every point live).
    for (auto [x, y] : {std::pair{0.08667750455539636, 2.884254701174776}, {-3.0730257507643897, -0.08135304428796751},
                        {3.385154183607021, 0.07385187983774928}, {-0.12796134673068008, -1.9537149802445763}}) {
        const CriticalPoint* p = near(map, PointKind::Saddle, x, y, 1e-12);
        ASSERT_NE(p, nullptr) << x << ", " << y;
        EXPECT_EQ(p->index, 1);
    }
    for (const CriticalPoint& p : map.points) {
        EXPECT_LE(p.gradientNorm, 1e-10) << "refined to rounding";
        EXPECT_GE(p.hits, 1);
        EXPECT_EQ(p.foundBy, "search");
    }
    EXPECT_EQ(map.lowDiscrepancyStarts, 256);
    EXPECT_GT(map.signChangeStarts, 0);
    EXPECT_EQ(map.starts, map.lowDiscrepancyStarts + map.signChangeStarts);
    EXPECT_EQ(map.converged + map.outside + map.stalled + map.leftBox + map.nonFinite, map.starts);
    EXPECT_TRUE(map.likelyComplete);
    EXPECT_EQ(map.foundOnce, 0);
}

TEST(CriticalPoints, SixHumpCamelBackHasSixMinimaWithTheTwoGlobalOnes) {
    // Dixon & Szego (1978), "The global optimisation problem": six local minima in
    // [-3, 3] x [-2, 2], the global ones at (0.0898, -0.7126) and (-0.0898, 0.7126) with
    // f* = -1.0316 (value from memory of the published table).
    const FormulaObjective f("(4 - 2.1*x^2 + x^4/3)*x^2 + x*y + (-4 + 4*y^2)*y^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-3, 3, -2, 2));
    EXPECT_EQ(map.count(PointKind::Minimum), 6);
    for (double s : {1.0, -1.0}) {
        const CriticalPoint* p = near(map, PointKind::Minimum, s * 0.0898, -s * 0.7126, 1e-4);
        ASSERT_NE(p, nullptr);
        EXPECT_NEAR(p->value, -1.0316, 1e-4);
    }
    // All 15 critical points: SymPy 1.11.1 (tests/reference/survey compares them one by one).
    EXPECT_EQ(map.points.size(), 15u);
}

TEST(CriticalPoints, ThreeVariablesGiveEveryCombinationOfWells) {
    // sum_i (x_i^2 - 1)^2: each coordinate at -1, 0 or +1, so 27 critical points; index =
    // number of coordinates at 0 (analytic; common practice, no published source).
    const FormulaObjective f("(x^2 - 1)^2 + (y^2 - 1)^2 + (z^2 - 1)^2", {"x", "y", "z"});
    Region r;
    r.lower = Vector::Constant(3, -2);
    r.upper = Vector::Constant(3, 2);
    r.held = Vector::Zero(3);
    const CriticalMap map = findCriticalPoints(f, r);
    ASSERT_EQ(map.points.size(), 27u);
    EXPECT_EQ(map.count(PointKind::Minimum), 8);
    EXPECT_EQ(map.count(PointKind::Saddle), 18);
    EXPECT_EQ(map.count(PointKind::Maximum), 1);
    for (const CriticalPoint& p : map.points) {
        int zeros = 0;
        for (int i = 0; i < 3; ++i) {
            const double c = p.x[i];
            EXPECT_TRUE(std::abs(c) < 1e-12 || std::abs(std::abs(c) - 1) < 1e-12) << c;
            zeros += std::abs(c) < 0.5;
        }
        EXPECT_EQ(p.index, zeros);
    }
}

TEST(CriticalPoints, MonkeySaddleIsOneDegeneratePoint) {
    // x^3 - 3 x y^2: one critical point at the origin with a zero Hessian (analytic).
    const FormulaObjective f("x^3 - 3*x*y^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-1, 1, -1, 1));
    ASSERT_EQ(map.points.size(), 1u);
    const CriticalPoint& p = map.points[0];
    EXPECT_EQ(p.kind, PointKind::Degenerate);
    EXPECT_FALSE(p.continuum);
    EXPECT_EQ(p.zeroEigenvalues, 2);
    EXPECT_LT(std::abs(p.x[0]) + std::abs(p.x[1]), 1e-9);
    EXPECT_EQ(map.count(PointKind::Saddle), 0) << "not a wrong count of saddles";
}

TEST(CriticalPoints, RingValleyIsOneContinuumAroundOneMaximum) {
    // (x^2 + y^2 - 1)^2: every point of the unit circle is a minimum with a zero eigenvalue
    // along the circle; the origin is a maximum (analytic).
    const FormulaObjective f("(x^2 + y^2 - 1)^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-2, 2, -2, 2));
    ASSERT_EQ(map.points.size(), 2u);
    const CriticalPoint* peak = near(map, PointKind::Maximum, 0, 0, 1e-9);
    ASSERT_NE(peak, nullptr);
    EXPECT_NEAR(peak->value, 1.0, 1e-15);
    const CriticalPoint& ring = map.points[0].kind == PointKind::Degenerate ? map.points[0] : map.points[1];
    EXPECT_EQ(ring.kind, PointKind::Degenerate);
    EXPECT_TRUE(ring.continuum);
    EXPECT_GT(ring.members, 20);
    EXPECT_EQ(ring.index, 0) << "a valley of minima: nothing curves down";
    for (int i = 0; i < 2; ++i) {
        EXPECT_LT(ring.memberLower[i], -0.95);
        EXPECT_GT(ring.memberUpper[i], 0.95);
    }
    for (const Vector& m : ring.memberPoints) EXPECT_NEAR(m.norm(), 1.0, 1e-12);
}

TEST(CriticalPoints, StraightValleyIsOneContinuum) {
    // (x - y)^2: the diagonal is a line of minima (analytic).
    const FormulaObjective f("(x - y)^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-1, 1, -1, 1));
    ASSERT_EQ(map.points.size(), 1u);
    EXPECT_EQ(map.points[0].kind, PointKind::Degenerate);
    EXPECT_TRUE(map.points[0].continuum);
    EXPECT_LT(map.points[0].memberLower[0], -0.9);
    EXPECT_GT(map.points[0].memberUpper[0], 0.9);
}

TEST(CriticalPoints, SeparateDegeneratePointsAreNotJoined) {
    // x^4 + (y^2 - 1)^2: critical points (0, -1), (0, 0), (0, 1), each with a zero eigenvalue
    // in x (analytic). They lie within the link distance but nothing critical runs between them.
    const FormulaObjective f("x^4 + (y^2 - 1)^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-4, 4, -4, 4));
    ASSERT_EQ(map.points.size(), 3u);
    for (const CriticalPoint& p : map.points) {
        EXPECT_EQ(p.kind, PointKind::Degenerate);
        EXPECT_FALSE(p.continuum);
        EXPECT_NEAR(p.x[0], 0.0, 1e-6);
    }
    EXPECT_NE(near(map, PointKind::Degenerate, 0, 1, 1e-6), nullptr);
    EXPECT_NE(near(map, PointKind::Degenerate, 0, 0, 1e-6), nullptr);
    EXPECT_NE(near(map, PointKind::Degenerate, 0, -1, 1e-6), nullptr);
}

TEST(CriticalPoints, SameMapOnOneThreadOnTwoAndFromPieces) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    const Region region = box2(-5, 5, -5, 5);
    Control one, two;
    one.threads = 1;
    two.threads = 2;
    const CriticalMap a = findCriticalPoints(f, region, {}, one);
    const CriticalMap b = findCriticalPoints(f, region, {}, two);
    // As an MPI split computes it: two interleaved halves, then one assembly.
    const CriticalSearch search(f, region);
    std::vector<StartOutcome> outcomes(search.starts().size());
    for (std::size_t i = 1; i < outcomes.size(); i += 2) outcomes[i] = search.run(i);
    for (std::size_t i = 0; i < outcomes.size(); i += 2) outcomes[i] = search.run(i);
    const CriticalMap c = search.assemble(outcomes);
    for (const CriticalMap* m : {&b, &c}) {
        ASSERT_EQ(m->points.size(), a.points.size());
        for (std::size_t k = 0; k < a.points.size(); ++k) {
            EXPECT_EQ(m->points[k].x, a.points[k].x) << "bit for bit";
            EXPECT_EQ(m->points[k].hits, a.points[k].hits);
        }
        EXPECT_EQ(m->starts, a.starts);
        EXPECT_EQ(m->foundOnce, a.foundOnce);
    }
}

TEST(CriticalPoints, FewStartsSayTheSearchIsProbablyIncomplete) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    CriticalSettings few;
    few.starts = 4;
    few.signChangeGrid = 0;
    const CriticalMap map = findCriticalPoints(f, box2(-5, 5, -5, 5), few);
    EXPECT_EQ(map.starts, 4);
    EXPECT_LT(map.points.size(), 9u);
    EXPECT_GT(map.foundOnce, 0);
    EXPECT_FALSE(map.likelyComplete);
    EXPECT_GT(map.estimatedMissing, 0.0);
}

TEST(CriticalPoints, PointsOutsideTheBoxAreCountedNotListed) {
    // (x^2 - 1)^2 + y^2 has minima at x = -1, 1 and a saddle at 0; the box holds only x in [0.5, 3].
    const FormulaObjective f("(x^2 - 1)^2 + y^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(0.5, 3, -1, 1));
    ASSERT_EQ(map.points.size(), 1u);
    EXPECT_NEAR(map.points[0].x[0], 1.0, 1e-12);
    EXPECT_GT(map.outside + map.leftBox, 0);
}

TEST(CriticalPoints, CancelledSearchSaysSo) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    std::atomic<bool> cancel{true};
    Control control;
    control.cancel = &cancel;
    const CriticalMap map = findCriticalPoints(f, box2(-5, 5, -5, 5), {}, control);
    EXPECT_TRUE(map.cancelled);
    EXPECT_FALSE(map.likelyComplete);
}

TEST(CriticalPoints, BoxWithoutInteriorIsRefusedNamingTheVariable) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    try {
        findCriticalPoints(f, box2(-5, 5, 2, 2));
        FAIL() << "expected a refusal";
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("no interior in y"), std::string::npos) << e.what();
    }
    Region r = box2(-5, 5, -5, 5);
    r.upper[0] = std::nan("");
    EXPECT_THROW(findCriticalPoints(f, r), std::invalid_argument);
    CriticalSettings bad;
    bad.starts = 0;
    try {
        findCriticalPoints(f, box2(-5, 5, -5, 5), bad);
        FAIL();
    } catch (const std::invalid_argument& e) {
        EXPECT_NE(std::string(e.what()).find("starts must be"), std::string::npos) << e.what();
    }
}

TEST(CriticalPoints, StalledStartsAreNotPoints) {
    // x^2 + exp(y): no critical point anywhere (the gradient in y never vanishes).
    const FormulaObjective f("x^2 + exp(y)", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-1, 1, -1, 1));
    EXPECT_TRUE(map.points.empty());
    EXPECT_EQ(map.converged, 0);
    EXPECT_EQ(map.stalled + map.leftBox + map.nonFinite, map.starts);
}

TEST(CriticalPoints, MatchFindsTheMergedPoint) {
    const FormulaObjective f(kHimmelblau, {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-5, 5, -5, 5));
    Vector x(2);
    x << 3 + 1e-7, 2 - 1e-7;
    const int k = matchPoint(map, x);
    ASSERT_GE(k, 0);
    EXPECT_EQ(map.points[static_cast<std::size_t>(k)].kind, PointKind::Minimum);
    x << 0.5, 0.5;
    EXPECT_EQ(matchPoint(map, x), -1);
}

}  // namespace
