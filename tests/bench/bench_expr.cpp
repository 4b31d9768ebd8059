// Speed of the expression engine (a benchmark, not a test; see scripts/bench_expr).
//
// The scenario: value, gradient and Hessian of a landscape with transcendental terms on a
// 1000 x 1000 grid, computed four ways on the same machine:
//   ours      - DerivativeSet program through evaluateGrid (both cores);
//   native    - the same formula and derivatives written by hand in C++ (-O2), both cores;
//   muparser  - muParser's own bulk evaluation of our printed derivative formulas;
//   (NumPy on SymPy-lambdified derivatives runs in tests/bench/bench_expr_numpy.py.)
#include "core/expr/expr.h"
#include "tests/bench/bench_landscape_formula.h"

#include <benchmark/benchmark.h>
#include <muParser.h>

#include <cmath>
#include <thread>
#include <vector>

namespace {

const char* kFormula = sw::bench::kLandscapeFormula;
constexpr int kGrid = 1000;
constexpr double kLo = -3, kHi = 3;

double coordinate(int i) { return kLo + (kHi - kLo) * i / (kGrid - 1); }

inline void handWritten(double x, double y, double* out) { sw::bench::landscapeByHand(x, y, out); }

void nativeGrid(std::vector<std::vector<double>>& outputs, int threads) {
    auto rows = [&](int first, int last) {
        double o[6];
        for (int r = first; r < last; ++r) {
            const double y = coordinate(r);
            for (int c = 0; c < kGrid; ++c) {
                handWritten(coordinate(c), y, o);
                const std::size_t k = static_cast<std::size_t>(r) * kGrid + c;
                for (int q = 0; q < 6; ++q) outputs[q][k] = o[q];
            }
        }
    };
    std::vector<std::thread> pool;
    for (int t = 0; t < threads; ++t) pool.emplace_back(rows, kGrid * t / threads, kGrid * (t + 1) / threads);
    for (auto& t : pool) t.join();
}

int threadCount() { return std::max(1, static_cast<int>(std::thread::hardware_concurrency())); }

void BM_GridOurs(benchmark::State& state) {
    sw::expr::DerivativeSet set(kFormula, {"x", "y"}, 2);
    sw::expr::GridSpec grid;
    grid.xMin = grid.yMin = kLo;
    grid.xMax = grid.yMax = kHi;
    grid.nx = grid.ny = kGrid;
    std::vector<std::vector<double>> out;
    const int threads = static_cast<int>(state.range(0));
    for (auto _ : state) {
        sw::expr::evaluateGrid(set.program(), grid, out, threads);
        benchmark::DoNotOptimize(out.data());
    }
    state.counters["points_per_s"] = benchmark::Counter(double(kGrid) * kGrid, benchmark::Counter::kIsIterationInvariantRate);
    state.counters["instructions"] = static_cast<double>(set.program().instructionCount());
}
BENCHMARK(BM_GridOurs)->Arg(1)->Arg(0)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_GridNative(benchmark::State& state) {
    std::vector<std::vector<double>> out(6, std::vector<double>(static_cast<std::size_t>(kGrid) * kGrid));
    const int threads = state.range(0) > 0 ? static_cast<int>(state.range(0)) : threadCount();
    for (auto _ : state) {
        nativeGrid(out, threads);
        benchmark::DoNotOptimize(out.data());
    }
    state.counters["points_per_s"] = benchmark::Counter(double(kGrid) * kGrid, benchmark::Counter::kIsIterationInvariantRate);
}
BENCHMARK(BM_GridNative)->Arg(1)->Arg(0)->Unit(benchmark::kMillisecond)->UseRealTime();

// muParser's bulk mode: every variable is an array of all grid points; one parser per
// output formula (our printed derivative formulas).
void BM_GridMuParserBulk(benchmark::State& state) {
    sw::expr::DerivativeSet set(kFormula, {"x", "y"}, 2);
    std::vector<std::string> texts{set.function().toText()};
    for (const auto& g : set.gradient()) texts.push_back(g.toText());
    for (const auto& h : set.hessianUpper()) texts.push_back(h.toText());
    const std::size_t n = static_cast<std::size_t>(kGrid) * kGrid;
    std::vector<double> xs(n), ys(n);
    for (int r = 0; r < kGrid; ++r)
        for (int c = 0; c < kGrid; ++c) {
            xs[static_cast<std::size_t>(r) * kGrid + c] = coordinate(c);
            ys[static_cast<std::size_t>(r) * kGrid + c] = coordinate(r);
        }
    std::vector<mu::Parser> parsers(texts.size());
    std::vector<std::vector<double>> out(texts.size(), std::vector<double>(n));
    for (std::size_t k = 0; k < texts.size(); ++k) {
        parsers[k].DefineVar("x", xs.data());
        parsers[k].DefineVar("y", ys.data());
        parsers[k].DefineConst("pi", 3.14159265358979323846);
        parsers[k].DefineConst("e", 2.71828182845904523536);
        parsers[k].SetExpr(texts[k]);
    }
    for (auto _ : state) {
        for (std::size_t k = 0; k < texts.size(); ++k) parsers[k].Eval(out[k].data(), static_cast<int>(n));
        benchmark::DoNotOptimize(out.data());
    }
    state.counters["points_per_s"] = benchmark::Counter(double(n), benchmark::Counter::kIsIterationInvariantRate);
}
BENCHMARK(BM_GridMuParserBulk)->Unit(benchmark::kMillisecond)->UseRealTime();

// The solver path: value, gradient and Hessian at one point.
void BM_SinglePoint(benchmark::State& state) {
    sw::expr::DerivativeSet set(kFormula, {"x", "y"}, 2);
    auto ws = set.program().makeWorkspace();
    double in[2] = {0.3, -0.7}, out[6];
    for (auto _ : state) {
        set.program().evaluate(in, out, ws);
        benchmark::DoNotOptimize(out);
        in[0] += 1e-9;
    }
}
BENCHMARK(BM_SinglePoint);

void BM_SinglePointNative(benchmark::State& state) {
    double x = 0.3, out[6];
    for (auto _ : state) {
        handWritten(x, -0.7, out);
        benchmark::DoNotOptimize(out);
        x += 1e-9;
    }
}
BENCHMARK(BM_SinglePointNative);

// Parse, differentiate twice and compile.
void BM_ParseDeriveCompile(benchmark::State& state) {
    for (auto _ : state) {
        sw::expr::DerivativeSet set(kFormula, {"x", "y"}, 2);
        benchmark::DoNotOptimize(set.program().instructionCount());
    }
}
BENCHMARK(BM_ParseDeriveCompile)->Unit(benchmark::kMicrosecond);

// The hand-written reference must be right for the comparison to mean anything.
void BM_CheckNativeAgainstOurs(benchmark::State& state) {
    sw::expr::DerivativeSet set(kFormula, {"x", "y"}, 2);
    auto ws = set.program().makeWorkspace();
    double worst = 0;
    for (auto _ : state) {
        worst = 0;
        for (int i = 0; i < kGrid; i += 7)
            for (int j = 0; j < kGrid; j += 11) {
                double in[2] = {coordinate(i), coordinate(j)}, ours[6], native[6];
                set.program().evaluate(in, ours, ws);
                handWritten(in[0], in[1], native);
                for (int q = 0; q < 6; ++q)
                    worst = std::max(worst, std::fabs(ours[q] - native[q]) / std::max(1.0, std::fabs(native[q])));
            }
    }
    state.counters["max_relative_difference"] = worst;
    if (worst > 1e-12) state.SkipWithError("hand-written derivatives disagree with ours");
}
BENCHMARK(BM_CheckNativeAgainstOurs)->Iterations(1);

}  // namespace

BENCHMARK_MAIN();
