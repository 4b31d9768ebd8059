// Fit speed: our Levenberg-Marquardt on a 4-parameter model (two decaying exponentials) over
// 100,000 rows, for the side-by-side comparison with scipy.optimize.least_squares run by
// scripts/bench_fit (which generates the data, times SciPy through
// tests/bench/bench_fit_scipy.py and prints the table). Also: one residual + Jacobian pass,
// one value + gradient + Hessian pass, and loading a million-row CSV file.
//
//   bench_fit --data FILE.csv [benchmark flags]   FILE has columns t, y (from the script);
//                                                 without it the same data are made here
// Two settings of our levenberg-marquardt, each matched to a SciPy run by the script:
//   "MinpackUnitScaling": scaling = none, initial_radius_factor = 100, function, step and
//     orthogonality tolerances 1e-12 -- what scipy least_squares(method='lm', x_scale=1.0,
//     ftol = xtol = gtol = 1e-12) asks of MINPACK's lmder (diag = 1, factor = 100).
//   "JacobianScaling" (our defaults but the tolerances): scaling = jacobian,
//     initial_radius_factor = 1, the same three tolerances -- matched with x_scale='jac'
//     (MINPACK's own column scaling; factor 100 there).

#include "core/objective/fit_objective.h"
#include "core/objective/table.h"
#include "core/solve/solver.h"

#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <memory>
#include <random>
#include <string>

namespace {

std::string gDataPath;

const char* kModel = "a1*exp(-k1*t) + a2*exp(-k2*t)";
const std::vector<double> kStart = {1.0, 1.0, 1.0, 0.1};

std::shared_ptr<const sw::Table> data() {
    static const std::shared_ptr<const sw::Table> table = [] {
        if (!gDataPath.empty()) return std::make_shared<const sw::Table>(sw::readTable(gDataPath));
        // Same model as the script: a1=3, k1=0.8, a2=1.5, k2=0.15, t in [0, 20], noise sd 0.01.
        auto t = std::make_shared<sw::Table>();
        t->columnNames = {"t", "y"};
        t->columns.assign(2, {});
        std::mt19937_64 gen(20261201);
        std::normal_distribution<double> noise(0.0, 0.01);
        for (int i = 0; i < 100000; ++i) {
            const double ti = 20.0 * i / 99999.0;
            t->columns[0].push_back(ti);
            t->columns[1].push_back(3.0 * std::exp(-0.8 * ti) + 1.5 * std::exp(-0.15 * ti) + noise(gen));
        }
        return std::shared_ptr<const sw::Table>(t);
    }();
    return table;
}

std::unique_ptr<sw::FitObjective> objective(int threads = 0) {
    sw::FitDefinition d;
    d.threads = threads;
    d.model = kModel;
    d.response = "y";
    d.parameters = {"a1", "k1", "a2", "k2"};
    return std::make_unique<sw::FitObjective>(data(), d);
}

sw::Vector start() { return Eigen::Map<const sw::Vector>(kStart.data(), static_cast<Eigen::Index>(kStart.size())); }

sw::solve::OptionValues settings(bool unitScaling) {
    sw::solve::OptionValues options{{"reduction_below", "1e-12"},
                                    {"scaled_radius_below", "1e-12"},
                                    {"column_cosine_below", "1e-12"}};
    if (unitScaling) {
        options["scaling"] = "none";
        options["initial_radius_factor"] = "100";
    }
    return options;
}

void runLevenbergMarquardt(benchmark::State& state, bool unitScaling, bool diagnostics, int threads = 0) {
    auto f = objective(threads);
    sw::solve::StoppingRules rules;
    rules.maxIterations = 1000;
    rules.gradientTolerance = 0;
    rules.spectrumMaxDimension = diagnostics ? 50 : 0;
    const sw::solve::OptionValues options = settings(unitScaling);
    sw::solve::Run run;
    for (auto _ : state) {
        run = sw::solve::solve("levenberg-marquardt", *f, start(), options, rules);
        benchmark::DoNotOptimize(run.x.data());
    }
    state.counters["solver_iterations"] = run.iterations();
    state.counters["jacobians"] = static_cast<double>(run.evaluations.gradient);
    state.counters["residual_passes"] = static_cast<double>(run.evaluations.value);
    state.counters["rss"] = 2.0 * run.value;
    state.counters["converged"] = sw::solve::isConvergence(run.termination) ? 1 : 0;
    for (int j = 0; j < 4; ++j) state.counters["x" + std::to_string(j)] = run.x[j];
}

void BM_LevenbergMarquardtMinpackUnitScaling(benchmark::State& state) { runLevenbergMarquardt(state, true, false); }
BENCHMARK(BM_LevenbergMarquardtMinpackUnitScaling)->Unit(benchmark::kMillisecond);

void BM_LevenbergMarquardtJacobianScaling(benchmark::State& state) { runLevenbergMarquardt(state, false, false); }
BENCHMARK(BM_LevenbergMarquardtJacobianScaling)->Unit(benchmark::kMillisecond);

// One thread: its CPU time is comparable with SciPy's (single-threaded) process time even on
// a busy machine.
void BM_LevenbergMarquardtMinpackUnitScalingOneThread(benchmark::State& state) {
    runLevenbergMarquardt(state, true, false, 1);
}
BENCHMARK(BM_LevenbergMarquardtMinpackUnitScalingOneThread)->Unit(benchmark::kMillisecond);

void BM_LevenbergMarquardtJacobianScalingOneThread(benchmark::State& state) {
    runLevenbergMarquardt(state, false, false, 1);
}
BENCHMARK(BM_LevenbergMarquardtJacobianScalingOneThread)->Unit(benchmark::kMillisecond);

// The default-scaled run with the per-iteration diagnostics the window shows (exact Hessian
// spectrum at every iterate).
void BM_LevenbergMarquardtWithDiagnostics(benchmark::State& state) { runLevenbergMarquardt(state, false, true); }
BENCHMARK(BM_LevenbergMarquardtWithDiagnostics)->Unit(benchmark::kMillisecond);

// One pass over the rows giving R, Q'r and |r|^2 (what each iteration costs), at two points in
// turn so the objective's last-point cache never answers.
void BM_LeastSquaresFactor(benchmark::State& state) {
    auto f = objective();
    sw::Vector x0 = start(), x1 = start();
    x1[1] += 1e-3;
    sw::Matrix r;
    sw::Vector qtr;
    double rss = 0;
    bool flip = false;
    for (auto _ : state) {
        f->leastSquaresFactor(flip ? x1 : x0, r, qtr, rss);
        flip = !flip;
        benchmark::DoNotOptimize(r.data());
    }
}
BENCHMARK(BM_LeastSquaresFactor)->Unit(benchmark::kMillisecond);

void BM_ResidualsAndJacobian(benchmark::State& state) {
    auto f = objective();
    sw::Vector r;
    sw::Matrix j;
    for (auto _ : state) {
        f->residuals(start(), r, &j);
        benchmark::DoNotOptimize(j.data());
    }
    state.counters["rows"] = static_cast<double>(r.size());
}
BENCHMARK(BM_ResidualsAndJacobian)->Unit(benchmark::kMillisecond);

void BM_ValueGradientHessian(benchmark::State& state) {
    auto f = objective();
    sw::Vector x0 = start(), x1 = start();
    x1[1] += 1e-3;  // two points in turn: the last-point cache never answers
    sw::Vector g;
    sw::Matrix h;
    bool flip = false;
    for (auto _ : state) {
        benchmark::DoNotOptimize(f->valueGradientHessian(flip ? x1 : x0, g, h));
        flip = !flip;
    }
}
BENCHMARK(BM_ValueGradientHessian)->Unit(benchmark::kMillisecond);

void BM_ReadMillionRowCsv(benchmark::State& state) {
    const std::string path = "/tmp/saddlewise_bench_fit_million.csv";
    {
        std::ofstream out(path);
        out << "time,signal,weight\n";
        char line[96];
        for (int i = 0; i < 1000000; ++i) {
            std::snprintf(line, sizeof line, "%.6f,%.9e,%d\n", i * 0.001, std::sin(i * 1e-3) * 1.7, 1 + i % 3);
            out << line;
        }
    }
    std::size_t rows = 0;
    for (auto _ : state) rows = sw::readTable(path).rowCount();
    state.counters["rows"] = static_cast<double>(rows);
    std::remove(path.c_str());
}
BENCHMARK(BM_ReadMillionRowCsv)->Unit(benchmark::kMillisecond)->Iterations(3);

}  // namespace

int main(int argc, char** argv) {
    for (int i = 1; i < argc; ++i)
        if (std::strcmp(argv[i], "--data") == 0 && i + 1 < argc) {
            gDataPath = argv[i + 1];
            for (int k = i; k + 2 <= argc; ++k) argv[k] = argv[k + 2];
            argc -= 2;
            break;
        }
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    benchmark::RunSpecifiedBenchmarks();
    benchmark::Shutdown();
    return 0;
}
