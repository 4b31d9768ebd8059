// What one evaluation costs on the solver's path: the objective at a single point, as value
// only, value + gradient, and value + gradient + Hessian, through FormulaObjective (compiled
// expression program) and through the same derivatives written by hand in C++. Solvers call
// these once or twice per iteration, so the interpreter's cost per call stays visible here.
//
//   bench_solve_eval [benchmark flags]
//
// Problem: Rosenbrock, f = (10 (x2 - x1^2))^2 + (1 - x1)^2, problem 1 of Moré, Garbow &
// Hillstrom (1981); and Wood (their problem 14), four variables, a larger program.

#include "core/objective/formula_objective.h"
#include "tests/reference/solve/published_problems.h"

#include <benchmark/benchmark.h>

#include <string>

namespace {

const sw::reference::PublishedProblem& problem(int number) {
    static const std::vector<sw::reference::PublishedProblem> all = sw::reference::publishedProblems();
    for (const auto& p : all)
        if (p.number == number) return p;
    return all.front();
}

const sw::FormulaObjective& objective(int number) {
    static const sw::FormulaObjective rosenbrock(problem(1).formula, problem(1).variables);
    static const sw::FormulaObjective wood(problem(14).formula, problem(14).variables);
    return number == 1 ? rosenbrock : wood;
}

sw::Vector point(int number) {
    const auto& start = problem(number).start;
    return Eigen::Map<const sw::Vector>(start.data(), static_cast<Eigen::Index>(start.size()));
}

// ---- through the formula -------------------------------------------------------------------------

void BM_FormulaValue(benchmark::State& state) {
    const int number = static_cast<int>(state.range(0));
    const sw::FormulaObjective& f = objective(number);
    sw::Vector x = point(number);
    for (auto _ : state) {
        double v = f.value(x);
        benchmark::DoNotOptimize(v);
        x[0] += 1e-12;
    }
    state.SetLabel(problem(number).name);
}
BENCHMARK(BM_FormulaValue)->Arg(1)->Arg(14);

void BM_FormulaValueGradient(benchmark::State& state) {
    const int number = static_cast<int>(state.range(0));
    const sw::FormulaObjective& f = objective(number);
    sw::Vector x = point(number), g(x.size());
    for (auto _ : state) {
        double v = f.valueGradient(x, g);
        benchmark::DoNotOptimize(v);
        benchmark::DoNotOptimize(g.data());
        x[0] += 1e-12;
    }
    state.SetLabel(problem(number).name);
}
BENCHMARK(BM_FormulaValueGradient)->Arg(1)->Arg(14);

void BM_FormulaValueGradientHessian(benchmark::State& state) {
    const int number = static_cast<int>(state.range(0));
    const sw::FormulaObjective& f = objective(number);
    sw::Vector x = point(number), g(x.size());
    sw::Matrix h(x.size(), x.size());
    for (auto _ : state) {
        double v = f.valueGradientHessian(x, g, h);
        benchmark::DoNotOptimize(v);
        benchmark::DoNotOptimize(h.data());
        x[0] += 1e-12;
    }
    state.SetLabel(problem(number).name);
}
BENCHMARK(BM_FormulaValueGradientHessian)->Arg(1)->Arg(14);

// ---- written by hand (Rosenbrock) ----------------------------------------------------------------
// f = 100 (x2 - x1^2)^2 + (1 - x1)^2; g = (-400 x1 (x2 - x1^2) - 2 (1 - x1), 200 (x2 - x1^2));
// H = [[1200 x1^2 - 400 x2 + 2, -400 x1], [-400 x1, 200]] (differentiated by hand).

double rosenbrockValue(const sw::Vector& x) {
    const double r = x[1] - x[0] * x[0], s = 1 - x[0];
    return 100 * r * r + s * s;
}

double rosenbrockValueGradient(const sw::Vector& x, sw::Vector& g) {
    const double r = x[1] - x[0] * x[0], s = 1 - x[0];
    g.resize(2);
    g[0] = -400 * x[0] * r - 2 * s;
    g[1] = 200 * r;
    return 100 * r * r + s * s;
}

double rosenbrockFull(const sw::Vector& x, sw::Vector& g, sw::Matrix& h) {
    const double v = rosenbrockValueGradient(x, g);
    h.resize(2, 2);
    h(0, 0) = 1200 * x[0] * x[0] - 400 * x[1] + 2;
    h(0, 1) = h(1, 0) = -400 * x[0];
    h(1, 1) = 200;
    return v;
}

void BM_HandWrittenValue(benchmark::State& state) {
    sw::Vector x = point(1);
    for (auto _ : state) {
        double v = rosenbrockValue(x);
        benchmark::DoNotOptimize(v);
        x[0] += 1e-12;
    }
    state.SetLabel("Rosenbrock");
}
BENCHMARK(BM_HandWrittenValue);

void BM_HandWrittenValueGradient(benchmark::State& state) {
    sw::Vector x = point(1), g(2);
    for (auto _ : state) {
        double v = rosenbrockValueGradient(x, g);
        benchmark::DoNotOptimize(v);
        benchmark::DoNotOptimize(g.data());
        x[0] += 1e-12;
    }
    state.SetLabel("Rosenbrock");
}
BENCHMARK(BM_HandWrittenValueGradient);

void BM_HandWrittenValueGradientHessian(benchmark::State& state) {
    sw::Vector x = point(1), g(2);
    sw::Matrix h(2, 2);
    for (auto _ : state) {
        double v = rosenbrockFull(x, g, h);
        benchmark::DoNotOptimize(v);
        benchmark::DoNotOptimize(h.data());
        x[0] += 1e-12;
    }
    state.SetLabel("Rosenbrock");
}
BENCHMARK(BM_HandWrittenValueGradientHessian);

// ---- the program alone (no objective wrapper) ---------------------------------------------------

void BM_ProgramFull(benchmark::State& state) {
    const int number = static_cast<int>(state.range(0));
    const sw::expr::Program& program = objective(number).derivatives().program();
    auto ws = program.makeWorkspace();
    std::vector<double> in(problem(number).start), out(static_cast<std::size_t>(program.outputCount()));
    for (auto _ : state) {
        program.evaluate(in.data(), out.data(), ws);
        benchmark::DoNotOptimize(out.data());
        in[0] += 1e-12;
    }
    state.SetLabel(problem(number).name + ", " + std::to_string(program.instructionCount()) + " instructions");
}
BENCHMARK(BM_ProgramFull)->Arg(1)->Arg(14);

}  // namespace

BENCHMARK_MAIN();
