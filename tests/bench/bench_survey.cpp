// Speed of the surveys (issue 11): critical-point maps, 200 x 200 basin maps of the two-valve
// sample for the methods the window shows side by side, and, in the same run, one run from one
// start as `saddlewise minimize` does it (makeSolver + solve), so the time per basin start
// compares with the time of a single minimize. scripts/bench_survey adds the program's own
// `minimize` and `basins` commands, timed as processes, and prints the table of
// docs/BENCHMARKS.md.
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "core/survey/survey.h"

#include <benchmark/benchmark.h>

#include <ctime>

namespace {

using namespace sw;

const char* kTwoValve = "(valve_a^2 - 1)^2 + (valve_b^2 - 1)^2 + 0.5*valve_a*valve_b";
const char* kHimmelblau = "(valve_a^2 + valve_b - 11)^2 + (valve_a + valve_b^2 - 7)^2";

const FormulaObjective& twoValve() {
    static const FormulaObjective objective(kTwoValve, {"valve_a", "valve_b"});
    return objective;
}

survey::Region square(double half) {
    survey::Region r;
    r.lower = Vector::Constant(2, -half);
    r.upper = Vector::Constant(2, half);
    r.held = Vector::Zero(2);
    return r;
}

double processSeconds() {
    timespec t{};
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
    return static_cast<double>(t.tv_sec) + 1e-9 * static_cast<double>(t.tv_nsec);
}

void BM_CriticalMapTwoValve(benchmark::State& state) {
    survey::Control control;
    control.threads = static_cast<int>(state.range(0));
    int points = 0;
    for (auto _ : state) points = static_cast<int>(survey::findCriticalPoints(twoValve(), square(1.6), {}, control).points.size());
    state.counters["points"] = points;
}
BENCHMARK(BM_CriticalMapTwoValve)->Arg(1)->Arg(0)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_CriticalMapHimmelblau(benchmark::State& state) {
    static const FormulaObjective f(kHimmelblau, {"valve_a", "valve_b"});
    int points = 0;
    for (auto _ : state) points = static_cast<int>(survey::findCriticalPoints(f, square(5)).points.size());
    state.counters["points"] = points;
}
BENCHMARK(BM_CriticalMapHimmelblau)->Unit(benchmark::kMillisecond)->UseRealTime();

// A 200 x 200 basin map, one method. Arguments: method (index into kMethods), threads (0: all).
const char* kMethods[] = {"newton", "saddle-free-newton", "trust-region-exact", "bfgs", "gradient-descent"};

void BM_BasinMap200(benchmark::State& state) {
    const char* method = kMethods[state.range(0)];
    state.SetLabel(method);
    survey::BasinSettings settings;
    settings.grid = 200;
    survey::Control control;
    control.threads = static_cast<int>(state.range(1));
    double cpu = 0;
    long cells = 0;
    for (auto _ : state) {
        const double before = processSeconds();
        const survey::BasinSurvey s = survey::mapBasins(twoValve(), square(1.6), {{"", method, {}}}, settings, {}, control);
        cpu += processSeconds() - before;
        cells += s.maps[0].total();
    }
    state.counters["us_per_start_wall"] = benchmark::Counter(
        static_cast<double>(cells), benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
    state.counters["us_per_start_cpu"] = cpu / static_cast<double>(std::max(1L, cells)) * 1e6;
}
BENCHMARK(BM_BasinMap200)
    ->ArgsProduct({{0, 1, 2, 3, 4}, {1, 0}})
    ->ArgNames({"method", "threads"})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime()
    ->MinTime(0.5);

// One run from one start, as `saddlewise minimize` does for each method (the start is the
// sample's, beside the pass near (0.13, 0.99)). Records kept, spectra computed as minimize does.
void BM_MinimizeOneStart(benchmark::State& state) {
    const char* method = kMethods[state.range(0)];
    state.SetLabel(method);
    Vector start(2);
    start << 0.3, 1.1;
    int iterations = 0;
    for (auto _ : state) {
        solve::SolverOrError made = solve::makeSolver(method, twoValve(), start);
        const solve::Run run = solve::solve(std::move(made.solver));
        iterations = run.iterations();
        benchmark::DoNotOptimize(run.value);
    }
    state.counters["iterations"] = iterations;
}
BENCHMARK(BM_MinimizeOneStart)->DenseRange(0, 4)->ArgName("method")->Unit(benchmark::kMicrosecond);

}  // namespace

BENCHMARK_MAIN();
