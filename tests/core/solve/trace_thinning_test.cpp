// Thinning of the per-iteration records: a run of any length keeps its trace within the
// stopping rules' memory limit, and keeps what findings need (the first record, the last
// kTraceKeptTail, rejected steps, changes of step kind, non-finite values).
#include "core/objective/formula_objective.h"
#include "core/solve/method.h"

#include <gtest/gtest.h>

#include <set>

namespace sw::solve {
namespace {

// Bytes a record takes (the engine's own estimate is private; this is a lower bound).
std::size_t lowerBoundBytes(const solve::Run& run) {
    std::size_t bytes = 0;
    for (const IterationRecord& r : run.trace) bytes += sizeof(IterationRecord) + 8 * static_cast<std::size_t>(r.x.size());
    return bytes;
}

void expectWellFormed(const solve::Run& run) {
    ASSERT_FALSE(run.trace.empty());
    EXPECT_EQ(run.trace.front().iteration, 0);
    EXPECT_EQ(run.trace.back().iteration, run.iterations());
    EXPECT_EQ(static_cast<long>(run.trace.size()) + run.droppedRecords, run.iterations() + 1L);
    for (std::size_t i = 1; i < run.trace.size(); ++i) EXPECT_LT(run.trace[i - 1].iteration, run.trace[i].iteration);
    // The tail is intact: consecutive iterations.
    const std::size_t tail = std::min(run.trace.size(), kTraceKeptTail);
    for (std::size_t i = run.trace.size() - tail + 1; i < run.trace.size(); ++i)
        EXPECT_EQ(run.trace[i].iteration, run.trace[i - 1].iteration + 1);
}

TEST(TraceThinning, LongRunsStayWithinTheMemoryLimit) {
    // A fixed tiny step never converges within the limit: every iteration makes a record.
    const FormulaObjective f("(x-1)^2 + (y+2)^2", {"x", "y"});
    StoppingRules rules;
    rules.maxIterations = 300000;
    rules.gradientTolerance = 0;
    rules.stepTolerance = 0;
    rules.maxEvaluations = 10000000;
    rules.spectrumMaxDimension = 0;
    rules.traceMemoryLimit = StoppingRules::kMinTraceMemory;
    const solve::Run run = solve("gradient-descent", f, Vector::Zero(2), {{"line_search", "fixed"}, {"step_size", "1e-9"}}, rules);
    ASSERT_EQ(run.termination, Termination::IterationLimit) << run.message;
    EXPECT_EQ(run.iterations(), 300000);
    expectWellFormed(run);
    EXPECT_GT(run.droppedRecords, 290000);
    EXPECT_LE(lowerBoundBytes(run), StoppingRules::kMinTraceMemory);
    EXPECT_GE(run.recordStride, 2);
    // Ordinary records kept between the first and the tail are on the stride, except those
    // added since the last thinning: a run of consecutive iterations just before the tail.
    std::size_t firstOff = run.trace.size() - kTraceKeptTail;
    for (std::size_t i = 1; i + kTraceKeptTail < run.trace.size(); ++i)
        if (!run.trace[i].notable && run.trace[i].iteration % run.recordStride != 0) {
            firstOff = i;
            break;
        }
    for (std::size_t i = firstOff + 1; i < run.trace.size(); ++i)
        EXPECT_EQ(run.trace[i].iteration, run.trace[i - 1].iteration + 1) << "index " << i;
}

TEST(TraceThinning, ShortRunsKeepEveryRecord) {
    const FormulaObjective f("(x-1)^2 + 10*(y+2)^2", {"x", "y"});
    const solve::Run run = solve("bfgs", f, Vector::Zero(2));
    EXPECT_EQ(run.droppedRecords, 0);
    EXPECT_EQ(run.recordStride, 1);
    EXPECT_EQ(static_cast<int>(run.trace.size()), run.iterations() + 1);
}

TEST(TraceThinning, RejectedStepsAndChangesOfStepKindSurvive) {
    // A trust region on Rosenbrock from far away rejects steps and switches between Cauchy,
    // dogleg and interior steps; with the smallest limit and a long run those must stay while
    // plain records go.
    const FormulaObjective f("100*(y-x^2)^2 + (1-x)^2", {"x", "y"});
    StoppingRules unlimited;
    unlimited.maxIterations = 3000;
    unlimited.gradientTolerance = 0;
    unlimited.stepTolerance = 0;
    Vector start(2);
    start << -30, 40;
    const solve::Run full = solve("trust-region-dogleg", f, start, {{"min_radius", "1e-300"}}, unlimited);
    std::set<int> notable;
    for (const IterationRecord& r : full.trace)
        if (r.notable) notable.insert(r.iteration);
    ASSERT_GE(notable.size(), 5u) << "the trial run should reject steps or change step kinds";

    // The same run through a small limit keeps the same notable iterations (they fit).
    StoppingRules limited = unlimited;
    limited.traceMemoryLimit = StoppingRules::kMinTraceMemory;
    limited.spectrumMaxDimension = 0;
    const solve::Run thin = solve("trust-region-dogleg", f, start, {{"min_radius", "1e-300"}}, limited);
    ASSERT_EQ(thin.iterations(), full.iterations());
    expectWellFormed(thin);
    std::set<int> kept;
    for (const IterationRecord& r : thin.trace) kept.insert(r.iteration);
    if (thin.droppedNotableRecords == 0) {
        for (int k : notable) EXPECT_TRUE(kept.count(k)) << "notable iteration " << k << " was dropped";
    }
    for (const IterationRecord& r : full.trace)
        if (!r.accepted) {
            EXPECT_TRUE(r.notable) << "a rejected step is notable (iteration " << r.iteration << ")";
        }
}

TEST(TraceThinning, TheLimitIsCheckedWithTheOtherRules) {
    StoppingRules rules;
    rules.traceMemoryLimit = 1000;
    EXPECT_NE(rules.check().find("trace memory limit"), std::string::npos);
    rules.traceMemoryLimit = StoppingRules::kMinTraceMemory;
    rules.maxIterations = StoppingRules::kMaxIterationLimit + 1;
    EXPECT_NE(rules.check().find("max_iterations"), std::string::npos);
}

}  // namespace
}  // namespace sw::solve
