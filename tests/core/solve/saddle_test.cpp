// Saddle behaviour: pure Newton walks onto a saddle and says so; saddle-free Newton leaves it.
#include "core/solve/method.h"
#include "tests/core/solve/solve_test_problems.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::solve {
namespace {

using problems::point;

TEST(Newton, ConvergesToTheSaddleOfXSquaredMinusYSquared) {
    // f = x^2 - y^2 has its only critical point, a saddle of index 1, at the origin
    // (common practice, no published source). The Newton step lands on it at once.
    const FunctionObjective f = problems::saddle();
    solve::Run run = solve("newton", f, point(0.3, -0.2));
    ASSERT_EQ(run.termination, Termination::GradientTolerance) << run.message;
    EXPECT_NEAR(run.x.norm(), 0, 1e-12);
    EXPECT_EQ(run.endPoint.kind, PointKind::Saddle);
    EXPECT_EQ(run.endPoint.index, 1);
    EXPECT_NE(run.endPoint.description.find("saddle of index 1"), std::string::npos);
    EXPECT_NE(run.trace[0].note.text().find("indefinite"), std::string::npos) << run.trace[0].note.text();
}

TEST(SaddleFreeNewton, LeavesTheSaddleOfXSquaredMinusYSquared) {
    const FunctionObjective f = problems::saddle();
    StoppingRules rules;
    rules.maxIterations = 20;
    solve::Run run = solve("saddle-free-newton", f, point(0.3, -0.2), {}, rules);
    EXPECT_NEAR(run.x[0], 0, 1e-12);          // the positive-curvature direction is solved exactly
    EXPECT_GT(std::abs(run.x[1]), 1e3);       // the negative one is followed away from the saddle
    EXPECT_LT(run.value, -1e6);
    EXPECT_NE(run.trace[0].note.text().find("flipped negative eigenvalues -2"), std::string::npos) << run.trace[0].note.text();
}

TEST(Newton, ConvergesToASaddleOfHimmelblauFromNearby) {
    // Himmelblau's function has a saddle near (0.086678, 2.884255) (value from memory).
    const FunctionObjective f = problems::himmelblau();
    solve::Run run = solve("newton", f, point(0.1, 2.8));
    ASSERT_EQ(run.termination, Termination::GradientTolerance) << run.message;
    EXPECT_NEAR(run.x[0], 0.086678, 1e-5);
    EXPECT_NEAR(run.x[1], 2.884255, 1e-5);
    EXPECT_EQ(run.endPoint.kind, PointKind::Saddle);
    EXPECT_EQ(run.endPoint.index, 1);
}

TEST(SaddleFreeNewton, LeavesHimmelblausSaddleForAMinimum) {
    const FunctionObjective f = problems::himmelblau();
    solve::Run run = solve("saddle-free-newton", f, point(0.1, 2.8));
    ASSERT_EQ(run.termination, Termination::GradientTolerance) << run.message;
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum) << run.endPoint.description;
    EXPECT_LT(run.value, 1e-14);  // all four minima have f = 0 (value from memory)
}

TEST(ClassifyPoint, NamesMinimumSaddleMaximumAndDegenerate) {
    Matrix h(2, 2);
    h << 2, 0, 0, 3;
    EXPECT_EQ(classifyPoint(h).kind, PointKind::Minimum);
    h << -2, 0, 0, 3;
    EndPoint saddle = classifyPoint(h);
    EXPECT_EQ(saddle.kind, PointKind::Saddle);
    EXPECT_EQ(saddle.index, 1);
    EXPECT_DOUBLE_EQ(saddle.eigenvalues[0], -2);
    h << -2, 0, 0, -3;
    EXPECT_EQ(classifyPoint(h).kind, PointKind::Maximum);
    EXPECT_EQ(classifyPoint(h).index, 2);
    h << 1e-12, 0, 0, 3;
    EndPoint flat = classifyPoint(h);
    EXPECT_EQ(flat.kind, PointKind::Degenerate);
    EXPECT_NE(flat.description.find("within 3e-08 of zero"), std::string::npos) << flat.description;
    h << 1, 0, 0, std::nan("");
    EXPECT_EQ(classifyPoint(h).kind, PointKind::Unknown);
}

}  // namespace
}  // namespace sw::solve
