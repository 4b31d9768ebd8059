// Backtracking (Armijo) and strong Wolfe (Moré-Thuente) line searches: the conditions hold on
// acceptance, every trial is recorded, and failures say why.
#include "core/solve/line_search.h"
#include "tests/core/solve/solve_test_problems.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::solve {
namespace {

using problems::point;

struct Probe {
    FunctionObjective objective;
    Vector x;
    double f;
    Vector g;
    Vector d;
};

Probe rosenbrockProbe() {
    Probe p{problems::rosenbrock(), point(-1.2, 1), 0, Vector(), Vector()};
    p.f = p.objective.valueGradient(p.x, p.g);
    p.d = -p.g;
    return p;
}

TEST(ArmijoBacktracking, AcceptedStepSatisfiesSufficientDecrease) {
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchSettings s;
    LineSearchResult r = backtrackingArmijo(eval, p.x, p.f, p.g, p.d, s);
    ASSERT_TRUE(r.success) << r.message;
    EXPECT_LE(r.value, p.f + s.sufficientDecrease * r.alpha * p.g.dot(p.d));
    EXPECT_NEAR((r.x - (p.x + r.alpha * p.d)).norm(), 0, 1e-15);
    EXPECT_EQ(r.value, p.objective.value(r.x));
    ASSERT_EQ(r.gradient.size(), 2);
}

TEST(ArmijoBacktracking, RecordsEveryTrialAndWhichConditionFailed) {
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchResult r = backtrackingArmijo(eval, p.x, p.f, p.g, p.d, LineSearchSettings{});
    ASSERT_TRUE(r.success);
    ASSERT_GE(r.trials.size(), 2u);  // a unit step along -g (|g| ~ 233) is far too long
    for (std::size_t i = 0; i + 1 < r.trials.size(); ++i) {
        EXPECT_FALSE(r.trials[i].accepted);
        EXPECT_EQ(r.trials[i].failed, "sufficient decrease");
        EXPECT_DOUBLE_EQ(r.trials[i + 1].alpha, 0.5 * r.trials[i].alpha);
    }
    EXPECT_TRUE(r.trials.back().accepted);
    EXPECT_DOUBLE_EQ(r.trials.back().alpha, r.alpha);
    // Trials read values only; one gradient at the accepted point.
    EXPECT_EQ(eval.counts().value, static_cast<long>(r.trials.size()));
    EXPECT_EQ(eval.counts().gradient, 1);
}

TEST(ArmijoBacktracking, FailsWithTheLastTrialsWhenNoStepDecreases) {
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchSettings s;
    s.maxTrials = 3;
    LineSearchResult r = backtrackingArmijo(eval, p.x, p.f, p.g, p.d, s);
    EXPECT_FALSE(r.success);
    EXPECT_EQ(r.trials.size(), 3u);
    EXPECT_NE(r.message.find("no step with sufficient decrease in 3 trials"), std::string::npos) << r.message;
    EXPECT_NE(r.message.find("alpha=0.25"), std::string::npos) << r.message;
}

TEST(ArmijoBacktracking, RefusesAnAscentDirection) {
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchResult r = backtrackingArmijo(eval, p.x, p.f, p.g, p.g, LineSearchSettings{});
    EXPECT_FALSE(r.success);
    EXPECT_NE(r.message.find("not a descent direction"), std::string::npos);
    EXPECT_EQ(eval.counts().total(), 0);
}

TEST(StrongWolfe, AcceptedStepSatisfiesBothConditions) {
    // Several directions and first trials, long and short, on Rosenbrock and Himmelblau.
    for (const FunctionObjective& f : {problems::rosenbrock(), problems::himmelblau()}) {
        for (const Vector& x : {point(-1.2, 1), point(0.5, -0.3), point(2.5, 2.5)}) {
            Vector g;
            const double f0 = f.valueGradient(x, g);
            for (double initial : {1e-4, 1e-2, 1.0, 30.0}) {
                Evaluator eval(f, 1000);
                LineSearchSettings s;
                s.initialStep = initial;
                const Vector d = -g;
                LineSearchResult r = strongWolfe(eval, x, f0, g, d, s);
                ASSERT_TRUE(r.success) << r.message;
                ASSERT_TRUE(r.curvatureMet) << r.message;
                EXPECT_LE(r.value, f0 + s.sufficientDecrease * r.alpha * g.dot(d));
                EXPECT_LE(std::abs(r.gradient.dot(d)), s.curvature * std::abs(g.dot(d)) + 1e-12);
                EXPECT_TRUE(r.trials.back().accepted);
                EXPECT_EQ(static_cast<long>(r.trials.size()), eval.counts().gradient);
            }
        }
    }
}

TEST(StrongWolfe, GoesOnPastAWolfeStepThatFailsTheExtraCondition) {
    // Along -g on Rosenbrock from (-1.2, 1) the first Wolfe step is far from the minimiser along
    // the line; asking for a nearly flat slope there (|g+'d| <= 0.01 |g'd|, stricter than c2 = 0.9)
    // makes the search go on past Wolfe points and label them.
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchSettings s;
    const double slope0 = p.g.dot(p.d);
    s.extraCondition = [&](const Vector& next) { return std::abs(next.dot(p.d)) <= 0.01 * std::abs(slope0); };
    s.extraConditionName = "flat slope";
    LineSearchResult r = strongWolfe(eval, p.x, p.f, p.g, p.d, s);
    ASSERT_TRUE(r.success) << r.message;
    ASSERT_TRUE(r.curvatureMet) << r.message;
    EXPECT_LE(std::abs(r.gradient.dot(p.d)), 0.01 * std::abs(slope0));
    EXPECT_LE(r.value, p.f + s.sufficientDecrease * r.alpha * slope0);
    int labelled = 0;
    for (const LineSearchTrial& t : r.trials) labelled += t.failed == "flat slope";
    EXPECT_GE(labelled, 1) << describeTrials(r.trials, 10);

    Evaluator plainEval(p.objective, 1000);
    LineSearchSettings plain;
    LineSearchResult without = strongWolfe(plainEval, p.x, p.f, p.g, p.d, plain);
    ASSERT_TRUE(without.success);
    EXPECT_LT(without.trials.size(), r.trials.size());
}

TEST(StrongWolfe, TightCurvatureStillConvergesOnAOneDimensionalQuadratic) {
    // phi(a) = (a - 3)^2 along d = 1 from x = 0: the exact minimiser a = 3 (worked by hand,
    // common practice, no published source). With c2 = 1e-3 only points very near 3 pass.
    FunctionObjective f({"x"}, [](const Vector& v) { return (v[0] - 3) * (v[0] - 3); },
                        [](const Vector& v, Vector& g) { g[0] = 2 * (v[0] - 3); },
                        [](const Vector&, Matrix& h) { h(0, 0) = 2; });
    Vector x = Vector::Zero(1), g, d = Vector::Ones(1);
    const double f0 = f.valueGradient(x, g);
    Evaluator eval(f, 1000);
    LineSearchSettings s;
    s.curvature = 1e-3;
    s.initialStep = 0.1;
    LineSearchResult r = strongWolfe(eval, x, f0, g, d, s);
    ASSERT_TRUE(r.success && r.curvatureMet) << r.message;
    EXPECT_NEAR(r.alpha, 3.0, 3e-3);
    EXPECT_LE(r.trials.size(), 10u);
}

TEST(StrongWolfe, RecordsSlopesAndFailedConditions) {
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchResult r = strongWolfe(eval, p.x, p.f, p.g, p.d, LineSearchSettings{});
    ASSERT_TRUE(r.success);
    ASSERT_GE(r.trials.size(), 2u);
    for (const LineSearchTrial& t : r.trials) {
        EXPECT_FALSE(std::isnan(t.slope));
        if (!t.accepted) {
            EXPECT_TRUE(t.failed == "sufficient decrease" || t.failed == "curvature") << t.failed;
        }
    }
    EXPECT_EQ(r.trials.front().failed, "sufficient decrease");
}

TEST(StrongWolfe, BacksOffFromNonFiniteTrials) {
    // -log(x) + x from x = 2 (g = 0.5): downhill is -x, and a first trial of 5 lands at x = -3 where log is NaN.
    const FunctionObjective f = problems::logBarrier();
    Vector x(1), g, d(1);
    x << 2;
    d << -1;
    const double f0 = f.valueGradient(x, g);
    Evaluator eval(f, 1000);
    LineSearchSettings s;
    s.initialStep = 5;
    LineSearchResult r = strongWolfe(eval, x, f0, g, d, s);
    ASSERT_TRUE(r.success) << r.message;
    EXPECT_EQ(r.trials.front().failed, "non-finite");
    EXPECT_GT(r.x[0], 0);
    EXPECT_FALSE(eval.sawNonFinite());
}

TEST(StrongWolfe, FailsAndSaysSoWhenTrialsRunOut) {
    Probe p = rosenbrockProbe();
    Evaluator eval(p.objective, 1000);
    LineSearchSettings s;
    s.maxTrials = 1;
    LineSearchResult r = strongWolfe(eval, p.x, p.f, p.g, p.d, s);
    EXPECT_FALSE(r.success);
    EXPECT_NE(r.message.find("strong Wolfe"), std::string::npos) << r.message;
    EXPECT_NE(r.message.find("last trials: alpha=1"), std::string::npos) << r.message;
}

TEST(FirstTrialStep, ExpectsTheLastDecreaseAgainCappedAtOne) {
    // Nocedal & Wright (2006) eq. 3.60 with min(1, 1.01 alpha0): 1.01 * 2 * 0.5 / 4 = 0.2525.
    EXPECT_DOUBLE_EQ(stepFromPreviousDecrease(0.5, -4.0), 1.01 * 0.25);
    EXPECT_DOUBLE_EQ(stepFromPreviousDecrease(10.0, -4.0), 1.0);
}

TEST(FirstTrialStep, FallsBackToOneWhenTheGuessIsNotAPositiveNumber) {
    EXPECT_DOUBLE_EQ(stepFromPreviousDecrease(0.0, -4.0), 1.0);
    EXPECT_DOUBLE_EQ(stepFromPreviousDecrease(kNaN, -4.0), 1.0);
    EXPECT_DOUBLE_EQ(stepFromPreviousDecrease(-1.0, -4.0), 1.0);
}

TEST(FirstTrialStep, BeforeTheFirstStepIsAboutUnitLengthAlongSteepestDescent) {
    const Vector g = point(3, 4);  // |g| = 5, d = -g, g'd = -25
    EXPECT_DOUBLE_EQ(firstStepFromGradient(g, g.dot(-g)), 1.01 / 5);
    const Vector small = point(0.3, 0.4);
    EXPECT_DOUBLE_EQ(firstStepFromGradient(small, small.dot(-small)), 1.0);
}

TEST(LineSearchSettings, CurvatureMustExceedSufficientDecrease) {
    LineSearchSettings s;
    s.sufficientDecrease = 0.5;
    s.curvature = 0.4;
    EXPECT_NE(s.check().find("curvature must be in (sufficient_decrease, 1)"), std::string::npos);
    s.curvature = 0.9;
    EXPECT_EQ(s.check(), "");
}

}  // namespace
}  // namespace sw::solve
