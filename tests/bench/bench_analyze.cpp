// Speed of the landscape pipeline: sampling a field, choosing levels, tracing contours.
// (Issue 5 asks for a 600 x 600 landscape with contour lines recomputed in <= 50 ms.)
#include "core/analyze/analyze.h"
#include "core/objective/formula_objective.h"
#include "core/objective/function_objective.h"
#include "core/study/study.h"

#include <benchmark/benchmark.h>

#include <cmath>
#include <filesystem>

namespace {

using namespace sw;

// A curved valley with bumps: transcendental terms so the interpreter has real work.
const char* kFormula = "(speed*opening - 2)^2 + 0.01*(speed - opening)^2 + 0.05*sin(3*speed)*cos(2*opening)";

const FormulaObjective& formulaObjective() {
    static const FormulaObjective objective(kFormula, {"speed", "opening"});
    return objective;
}

const FunctionObjective& handWritten() {
    static const FunctionObjective objective(
        {"speed", "opening"},
        [](const Vector& v) {
            const double s = v(0), o = v(1);
            return (s * o - 2) * (s * o - 2) + 0.01 * (s - o) * (s - o) + 0.05 * std::sin(3 * s) * std::cos(2 * o);
        },
        [](const Vector&, Vector& g) { g.setZero(); }, [](const Vector&, Matrix& h) { h.setZero(); });
    return objective;
}

const analyze::Box kBox{0.2, 4.0, 0.1, 3.0};

void BM_SampleFieldFormula(benchmark::State& state) {
    const int n = static_cast<int>(state.range(0));
    analyze::Field field;
    for (auto _ : state) analyze::sampleField(formulaObjective(), Vector::Zero(2), 0, 1, kBox, n, n, field);
    state.SetItemsProcessed(state.iterations() * n * n);
}
BENCHMARK(BM_SampleFieldFormula)->Arg(200)->Arg(600)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_SampleFieldPointByPoint(benchmark::State& state) {
    const int n = static_cast<int>(state.range(0));
    analyze::Field field;
    for (auto _ : state) analyze::sampleField(handWritten(), Vector::Zero(2), 0, 1, kBox, n, n, field);
    state.SetItemsProcessed(state.iterations() * n * n);
}
BENCHMARK(BM_SampleFieldPointByPoint)->Arg(200)->Arg(600)->Unit(benchmark::kMillisecond)->UseRealTime();

// The generic path on the same formula: one Objective::value call per cell.
void BM_SampleFieldFormulaPointByPoint(benchmark::State& state) {
    const int n = static_cast<int>(state.range(0));
    const FunctionObjective wrapped(
        {"speed", "opening"}, [](const Vector& v) { return formulaObjective().value(v); },
        [](const Vector&, Vector& g) { g.setZero(); }, [](const Vector&, Matrix& h) { h.setZero(); });
    analyze::Field field;
    for (auto _ : state) analyze::sampleField(wrapped, Vector::Zero(2), 0, 1, kBox, n, n, field);
    state.SetItemsProcessed(state.iterations() * n * n);
}
BENCHMARK(BM_SampleFieldFormulaPointByPoint)->Arg(200)->Arg(600)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_ChooseLevels(benchmark::State& state) {
    const int n = static_cast<int>(state.range(0));
    analyze::Field field;
    analyze::sampleField(formulaObjective(), Vector::Zero(2), 0, 1, kBox, n, n, field);
    for (auto _ : state) benchmark::DoNotOptimize(analyze::chooseLevels(field, 14).data());
}
BENCHMARK(BM_ChooseLevels)->Arg(200)->Arg(600)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_LevelsAndContours(benchmark::State& state) {
    const int n = static_cast<int>(state.range(0));
    analyze::Field field;
    analyze::sampleField(formulaObjective(), Vector::Zero(2), 0, 1, kBox, n, n, field);
    std::size_t points = 0;
    for (auto _ : state) {
        const auto levels = analyze::chooseLevels(field, 14);
        const auto sets = analyze::contourLines(field, levels);
        for (const auto& set : sets)
            for (const auto& line : set.lines) points += line.x.size();
        benchmark::DoNotOptimize(points);
    }
}
BENCHMARK(BM_LevelsAndContours)->Arg(200)->Arg(600)->Unit(benchmark::kMillisecond)->UseRealTime();

// The whole landscape recompute: sample + levels + contours.
void BM_Landscape600(benchmark::State& state) {
    analyze::Field field;
    for (auto _ : state) {
        analyze::sampleField(formulaObjective(), Vector::Zero(2), 0, 1, kBox, 600, 600, field);
        const auto sets = analyze::contourLines(field, analyze::chooseLevels(field, 14));
        benchmark::DoNotOptimize(sets.data());
    }
}
BENCHMARK(BM_Landscape600)->Unit(benchmark::kMillisecond)->UseRealTime();

// A data-fit landscape: every cell is a sum over the table's rows (the sensor sample, 121 rows).
void BM_SampleFieldSensorFit(benchmark::State& state) {
    const int n = static_cast<int>(state.range(0));
    // Benchmarks get no source-folder macro: find samples/ from this file's own path.
    const std::string path =
        (std::filesystem::path(__FILE__).parent_path().parent_path().parent_path() / "samples" / "sensor-warmup.json")
            .string();
    const study::Study study = study::loadFile(path);
    const auto objective = study::makeObjective(study, study::directoryOf(path));
    const analyze::Box box{1, 30, 0, 30};
    analyze::Field field;
    for (auto _ : state) analyze::sampleField(*objective, study.start(), 2, 1, box, n, n, field);
    state.SetItemsProcessed(state.iterations() * n * n);
}
BENCHMARK(BM_SampleFieldSensorFit)->Arg(150)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_QuadraticModel(benchmark::State& state) {
    const Vector x = (Vector(2) << 1.3, 0.9).finished();
    for (auto _ : state) benchmark::DoNotOptimize(analyze::quadraticModel(formulaObjective(), x).verdict.size());
}
BENCHMARK(BM_QuadraticModel)->Unit(benchmark::kMicrosecond);

}  // namespace

BENCHMARK_MAIN();
