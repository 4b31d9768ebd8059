// The threshold branches of the trace rules, at their edges: records built by hand so that one
// number sits exactly on a documented threshold (rules.h) and then just past it. The real-run
// tests in rules_test.cpp reach these rules through the solver's own endings
// (line-search-failed, trust-region-collapsed); these reach the other branch, where the run
// ended for another reason but its records show the collapse. Thresholds: common practice, no
// published source (as rules.h says).
#include "core/diagnose/diagnose.h"
#include "core/diagnose/rules.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::diagnose {
namespace {

using solve::IterationRecord;
using solve::StepKind;
using solve::Termination;

Vector vec(double a, double b) {
    Vector x(2);
    x << a, b;
    return x;
}

// A smooth bowl; the records below walk along x = (3 - 0.01 k, 1) with |g| = 1, far from its
// minimum, so no kink test fires and the end is not critical.
const FormulaObjective& bowl() {
    static const FormulaObjective f("x^2 + 4*y^2", {"x", "y"});
    return f;
}

IterationRecord record(int k) {
    IterationRecord r;
    r.iteration = k;
    r.x = vec(3 - 0.01 * k, 1);
    r.value = bowl().value(r.x);
    r.gradient = vec(-1, 0);
    r.gradientNorm = 1;
    r.step = vec(0.01, 0);
    r.stepNorm = 0.01;
    r.stepKind = StepKind::Gradient;
    return r;
}

// The run's end is its last record, and it stopped at its iteration limit.
solve::Run ended(solve::Run run) {
    run.x = run.trace.back().x;
    run.value = run.trace.back().value;
    run.gradientNorm = run.trace.back().gradientNorm;
    return run;
}

// One rule applied to a hand-built run, with the facts the diagnosis would gather.
std::optional<Finding> applied(std::optional<Finding> (*rule)(const RunFacts&), const solve::Run& run) {
    solve::StoppingRules rules;
    rules.maxIterations = run.iterations();
    const RunSetup setup{run.methodId, {}, rules, run.trace.front().x};
    return rule(gatherFacts(run, bowl(), setup));
}

// A run of `records` line-search steps that ended at the iteration limit: every search accepted
// alpha = 1 on its first trial except the last `searches`, which needed `trials` trials each and
// ended on `lastAlpha`.
solve::Run lineSearchRun(int records, int searches, int trials, double lastAlpha) {
    solve::Run run;
    run.methodId = "gradient-descent";
    run.termination = Termination::IterationLimit;
    for (int k = 0; k < records; ++k) {
        IterationRecord r = record(k);
        const bool slow = k >= records - searches;
        r.stepLength = slow ? lastAlpha : 1.0;
        const int count = slow ? trials : 1;
        for (int t = 0; t < count; ++t) {
            solve::LineSearchTrial trial;
            trial.alpha = std::pow(0.5, t);
            trial.value = r.value + (t + 1 == count ? -1e-12 : 1.0);
            trial.accepted = t + 1 == count;
            if (!trial.accepted) trial.failed = "sufficient decrease";
            r.trials.push_back(trial);
        }
        run.trace.push_back(r);
    }
    return ended(run);
}

std::optional<Finding> lineSearchFinding(const solve::Run& run) { return applied(ruleLineSearchCollapse, run); }

TEST(LineSearchCollapseThreshold, FiresWhenEnoughSearchesNeedManyTrialsAndTheStepShrankToItsBound) {
    using namespace thresholds;
    // Exactly on every threshold: kCollapsedSearches searches of kManyTrials trials, and the last
    // alpha at kCollapsedStep times the median (1).
    const auto f = lineSearchFinding(lineSearchRun(20, kCollapsedSearches, kManyTrials, kCollapsedStep));
    ASSERT_TRUE(f.has_value());
    EXPECT_TRUE(f->isProblem());
    EXPECT_EQ(f->number("searches_with_many_trials"), kCollapsedSearches);
    EXPECT_EQ(f->number("most_trials"), kManyTrials);
    EXPECT_EQ(f->number("last_step_length"), kCollapsedStep);
    EXPECT_EQ(f->number("median_step_length"), 1.0);
    EXPECT_EQ(f->iterations.notable, (std::vector<int>{17, 18, 19}));
    EXPECT_NE(f->message.find("The line searches collapsed"), std::string::npos) << f->message;
    // A smooth objective with no kink along the step: the remedy is a method without a line search.
    ASSERT_TRUE(f->remedy.has_value());
    EXPECT_EQ(f->remedy->change.method, "trust-region-exact");
}

TEST(LineSearchCollapseThreshold, SilentJustPastEachThreshold) {
    using namespace thresholds;
    // One trial fewer than "many".
    EXPECT_FALSE(lineSearchFinding(lineSearchRun(20, kCollapsedSearches, kManyTrials - 1, kCollapsedStep)));
    // One search fewer than the count that makes a collapse.
    EXPECT_FALSE(lineSearchFinding(lineSearchRun(20, kCollapsedSearches - 1, kManyTrials, kCollapsedStep)));
    // The last step a little longer than the bound.
    EXPECT_FALSE(lineSearchFinding(lineSearchRun(20, kCollapsedSearches, kManyTrials, 1.01 * kCollapsedStep)));
}

TEST(LineSearchCollapseThreshold, SilentOnARunThatConvergedHealthily) {
    // The same records with a converged ending at a minimum: the rule only explains runs that
    // did not end well (the line-search-failed ending aside).
    solve::Run run = lineSearchRun(20, thresholds::kCollapsedSearches, thresholds::kManyTrials, thresholds::kCollapsedStep);
    run.termination = Termination::GradientTolerance;
    run.endPoint.critical = true;
    run.endPoint.kind = solve::PointKind::Minimum;
    EXPECT_FALSE(lineSearchFinding(run));
}

// A trust-region run ended at the iteration limit: radii halve from 1 down to `lastRadius`, and
// of the window's steps, `rejected` (the last ones) were rejected.
solve::Run trustRegionRun(int records, double lastRadius, int rejected) {
    solve::Run run;
    run.methodId = "trust-region-exact";
    run.termination = Termination::IterationLimit;
    const double shrink = std::pow(lastRadius, 1.0 / (records - 1));
    for (int k = 0; k < records; ++k) {
        IterationRecord r = record(k);
        r.stepKind = StepKind::Boundary;
        r.trustRadius = k + 1 == records ? lastRadius : std::pow(shrink, k);
        r.ratio = -0.5;
        r.accepted = k >= records - rejected ? false : true;
        run.trace.push_back(r);
    }
    return ended(run);
}

std::optional<Finding> radiusFinding(const solve::Run& run) { return applied(ruleRadiusCollapse, run); }

TEST(RadiusCollapseThreshold, FiresWhenTheRadiusShrankToItsBoundWithHalfTheStepsRejected) {
    // 20 records, all in the window; 10 of the 20 steps rejected (exactly half), the last radius
    // kRadiusShrink of the largest (1).
    const auto f = radiusFinding(trustRegionRun(20, thresholds::kRadiusShrink, 10));
    ASSERT_TRUE(f.has_value());
    EXPECT_TRUE(f->isProblem());
    EXPECT_EQ(f->number("last_radius"), thresholds::kRadiusShrink);
    EXPECT_EQ(f->number("largest_radius"), 1.0);
    EXPECT_EQ(f->number("rejected_steps"), 10);
    EXPECT_EQ(f->number("window_steps"), 20);
    EXPECT_EQ(f->iterations.notable.size(), 10u);
    EXPECT_NE(f->message.find("10 of the last 20 steps were rejected"), std::string::npos) << f->message;
}

TEST(RadiusCollapseThreshold, SilentJustPastEachThreshold) {
    // The radius a little larger than the bound.
    EXPECT_FALSE(radiusFinding(trustRegionRun(20, 1.01 * thresholds::kRadiusShrink, 10)));
    // One rejection fewer than half.
    EXPECT_FALSE(radiusFinding(trustRegionRun(20, thresholds::kRadiusShrink, 9)));
}

TEST(RadiusCollapseThreshold, CubicRegularisationCountsOneOverSigmaAsItsRadius) {
    // Adaptive cubic regularisation keeps no radius; its sigma grows as the region shrinks.
    solve::Run run = trustRegionRun(20, thresholds::kRadiusShrink, 12);
    run.methodId = "cubic-regularization";
    for (IterationRecord& r : run.trace) {
        r.damping = 1.0 / r.trustRadius;
        r.dampingName = "sigma";
        r.trustRadius = solve::kNaN;
    }
    const auto f = radiusFinding(run);
    ASSERT_TRUE(f.has_value());
    EXPECT_NEAR(f->number("last_radius"), thresholds::kRadiusShrink, 1e-18);
}

// ---- budget-exhausted: the estimate of the iterations still needed, checked against a rerun.

// Fixed-step gradient descent on a quadratic converges linearly with the factor
// max |1 - alpha lambda_i| per iteration (Nocedal & Wright 2006, sec. 3.3; here lambda = 1 and
// 10, alpha = 0.15: factors 0.85 and 0.5, so 0.85 rules after a few steps). Stopped after 25
// iterations, then run again without the limit.
struct LinearRun {
    FormulaObjective f{"0.5*x^2 + 5*y^2", {"x", "y"}};
    solve::OptionValues options{{"line_search", "fixed"}, {"step_size", "0.15"}};
    solve::StoppingRules rules;
    solve::Run stopped, full;
    LinearRun() {
        rules.maxIterations = 25;
        stopped = solve::solve("gradient-descent", f, vec(2, 1), options, rules);
        solve::StoppingRules unlimited = rules;
        unlimited.maxIterations = 100000;
        full = solve::solve("gradient-descent", f, vec(2, 1), options, unlimited);
    }
    Findings findings(bool remedies) const {
        return diagnose::diagnose(stopped, f, RunSetup{"gradient-descent", options, rules, vec(2, 1)}, remedies);
    }
};

TEST(BudgetExhaustedEstimate, MatchesARerunWithoutTheLimitOnALinearlyConvergingRun) {
    const LinearRun r;
    ASSERT_EQ(r.stopped.termination, Termination::IterationLimit);
    ASSERT_EQ(r.full.termination, Termination::GradientTolerance);
    const Findings found = r.findings(false);
    const Finding* budget = findById(found, FindingId::BudgetExhausted);
    ASSERT_NE(budget, nullptr);
    EXPECT_NEAR(budget->number("rate"), 0.85, 1e-3);
    const double more = budget->number("more_iterations");
    // The estimate is within two iterations of what the rerun took (it counts fractional
    // iterations; the solver stops at the first whole one under the tolerance).
    EXPECT_NEAR(25 + more, r.full.iterations(), 2.0) << "estimated " << more << " more after 25";
}

TEST(BudgetExhaustedEstimate, TheRaisedLimitOfTheRemedyIsEnoughOnALinearlyConvergingRun) {
    const LinearRun r;
    const Findings found = r.findings(true);
    const Finding* budget = findById(found, FindingId::BudgetExhausted);
    ASSERT_NE(budget, nullptr);
    ASSERT_TRUE(budget->remedy && budget->remedy->outcome);
    EXPECT_EQ(budget->remedy->change.kind, Change::Kind::RaiseIterationLimit);
    EXPECT_TRUE(budget->remedy->outcome->helped) << budget->remedy->outcome->text;
    // 1.25 times the estimate: room to spare, not a blind large number.
    EXPECT_GE(budget->remedy->change.maxIterations, r.full.iterations());
    EXPECT_LE(budget->remedy->change.maxIterations, 1.3 * r.full.iterations() + 10);
}

}  // namespace
}  // namespace sw::diagnose
