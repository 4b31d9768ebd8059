// The observed convergence rate: ACOC order (Cordero & Torregrosa 2007) and the gradient-norm
// factor, on sequences with a known rate and on real runs whose rate the theory gives.
#include "core/diagnose/rate.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::diagnose {
namespace {

// A run of f = x^2 (one variable) through the points x_k = errors[k]: gradient 2 x_k, steps
// x_{k+1} - x_k. Iteration numbers as given (gaps allowed).
solve::Run runThrough(const std::vector<double>& errors, std::vector<int> iterations = {}) {
    solve::Run run;
    if (iterations.empty())
        for (std::size_t k = 0; k < errors.size(); ++k) iterations.push_back(static_cast<int>(k));
    for (std::size_t k = 0; k < errors.size(); ++k) {
        solve::IterationRecord r;
        r.iteration = iterations[k];
        r.x = Vector::Constant(1, errors[k]);
        r.value = errors[k] * errors[k];
        r.gradient = Vector::Constant(1, 2 * errors[k]);
        r.gradientNorm = std::abs(2 * errors[k]);
        if (k + 1 < errors.size()) {
            r.step = Vector::Constant(1, errors[k + 1] - errors[k]);
            r.stepNorm = std::abs(errors[k + 1] - errors[k]);
            r.stepKind = solve::StepKind::Newton;
            r.stepLength = 1;
        }
        run.trace.push_back(r);
    }
    run.termination = solve::Termination::GradientTolerance;
    run.x = run.trace.back().x;
    return run;
}

TEST(Rate, ALinearSequenceHasItsFactor) {
    std::vector<double> e;
    for (int k = 0; k < 25; ++k) e.push_back(std::pow(0.5, k));
    const RateEstimate r = estimateRate(runThrough(e));
    EXPECT_EQ(r.kind, RateEstimate::Kind::Linear);
    EXPECT_NEAR(r.factor, 0.5, 1e-12);
    EXPECT_NEAR(r.order, 1.0, 1e-9);  // ACOC of a linear sequence is 1
    EXPECT_NEAR(r.iterationsToReach(1.0, 1e-3), std::log(1e-3) / std::log(0.5), 1e-9);
}

TEST(Rate, AQuadraticSequenceHasOrderTwo) {
    std::vector<double> e = {0.5};
    while (e.back() > 1e-60) e.push_back(e.back() * e.back());
    const RateEstimate r = estimateRate(runThrough(e));
    EXPECT_EQ(r.kind, RateEstimate::Kind::Quadratic);
    EXPECT_NEAR(r.order, 2.0, 0.1);
}

TEST(Rate, AnOrderOneAndAHalfSequenceIsSuperlinear) {
    std::vector<double> e = {0.5};
    while (e.back() > 1e-40) e.push_back(std::pow(e.back(), 1.5));
    const RateEstimate r = estimateRate(runThrough(e));
    EXPECT_EQ(r.kind, RateEstimate::Kind::Superlinear);
    EXPECT_NEAR(r.order, 1.5, 0.1);
}

TEST(Rate, AThinnedTraceKeepsItsFactorPerIteration) {
    // Every 10th record of 0.9^k plus the last: the factor is per iteration, not per record.
    std::vector<double> e;
    std::vector<int> k;
    for (int i = 0; i <= 200; ++i)
        if (i % 10 == 0 || i == 197) {
            e.push_back(std::pow(0.9, i));
            k.push_back(i);
        }
    const RateEstimate r = estimateRate(runThrough(e, k));
    EXPECT_EQ(r.kind, RateEstimate::Kind::Linear);
    EXPECT_NEAR(r.factor, 0.9, 1e-9);
    EXPECT_TRUE(std::isnan(r.order));  // no contiguous steps: no ACOC
}

TEST(Rate, AFlatSequenceIsSublinear) {
    std::vector<double> e(20, 1.0);
    for (std::size_t k = 0; k < e.size(); ++k) e[k] = 1.0 + 1e-9 * static_cast<double>(k % 2);
    const RateEstimate r = estimateRate(runThrough(e));
    EXPECT_EQ(r.kind, RateEstimate::Kind::Sublinear);
}

TEST(Rate, TooFewRecordsGiveNoEstimate) {
    EXPECT_EQ(estimateRate(runThrough({1.0, 0.5})).kind, RateEstimate::Kind::Unknown);
}

// Newton converges quadratically near a minimiser with a positive definite Hessian (Nocedal &
// Wright 2006, Thm 3.5); BFGS superlinearly (Thm 6.6); steepest descent linearly (Thm 3.3).
TEST(Rate, RealRunsShowTheRatesTheTheoryGives) {
    const FormulaObjective rosenbrock("100*(y-x^2)^2+(1-x)^2", {"x", "y"});
    Vector start(2);
    start << -1.2, 1.0;
    solve::StoppingRules rules;
    rules.gradientTolerance = 1e-12;
    EXPECT_EQ(estimateRate(solve::solve("damped-newton", rosenbrock, start, {}, rules)).kind,
              RateEstimate::Kind::Quadratic);
    const RateEstimate bfgs = estimateRate(solve::solve("bfgs", rosenbrock, start, {}, rules));
    EXPECT_TRUE(bfgs.kind == RateEstimate::Kind::Superlinear || bfgs.kind == RateEstimate::Kind::Quadratic)
        << toString(bfgs.kind);
    // Steepest descent on 0.5 (x^2 + 10 y^2): linear, no faster than N&W Thm 3.3's bound for the
    // error in f, ((k - 1)/(k + 1))^2 with k = 10, allowing for the gradient norm's own rate.
    const FormulaObjective bowl("0.5*(x^2 + 10*y^2)", {"x", "y"});
    Vector p(2);
    p << 10.0, 1.0;
    const RateEstimate sd = estimateRate(solve::solve("gradient-descent", bowl, p, {{"line_search", "wolfe"}}, rules));
    EXPECT_EQ(sd.kind, RateEstimate::Kind::Linear);
    EXPECT_GT(sd.factor, 0.3);
    EXPECT_LT(sd.factor, 1.0);
}

}  // namespace
}  // namespace sw::diagnose
