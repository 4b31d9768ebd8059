// What one evaluation costs on the solver's path: the objective at a single point, as value
// only, value + gradient, and value + gradient + Hessian, through FormulaObjective (compiled
// expression program) and through the same derivatives written by hand in C++. Solvers call
// these once or twice per iteration, so the interpreter's cost per call stays visible here.
//
//   bench_solve_eval [benchmark flags]
//
// Problems (numbers and formulas of Moré, Garbow & Hillstrom (1981), as written in
// tests/reference/solve/published_problems.h), evaluated at the paper's start points:
//   1 Rosenbrock, 5 Beale, 6 Jennrich-Sampson (10 residuals), 7 helical valley,
//   8 Bard (15 residuals), 14 Wood.
// Hand-written C++ value and value + gradient for Rosenbrock, Jennrich-Sampson, helical valley
// and Bard (Rosenbrock also with its Hessian); each is checked against the formula at the
// start point before it is timed (the benchmark stops with an error if they disagree).

#include "core/objective/formula_objective.h"
#include "tests/reference/solve/published_problems.h"

#include <benchmark/benchmark.h>

#include <cmath>
#include <map>
#include <memory>
#include <numbers>
#include <string>

namespace {

const sw::reference::PublishedProblem& problem(int number) {
    static const std::vector<sw::reference::PublishedProblem> all = sw::reference::publishedProblems();
    for (const auto& p : all)
        if (p.number == number) return p;
    return all.front();
}

const sw::FormulaObjective& objective(int number) {
    static std::map<int, std::unique_ptr<sw::FormulaObjective>> made;
    auto& f = made[number];
    if (!f) f = std::make_unique<sw::FormulaObjective>(problem(number).formula, problem(number).variables);
    return *f;
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
BENCHMARK(BM_FormulaValue)->Arg(1)->Arg(5)->Arg(6)->Arg(7)->Arg(8)->Arg(14);

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
BENCHMARK(BM_FormulaValueGradient)->Arg(1)->Arg(5)->Arg(6)->Arg(7)->Arg(8)->Arg(14);

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
BENCHMARK(BM_FormulaValueGradientHessian)->Arg(1)->Arg(5)->Arg(6)->Arg(7)->Arg(8)->Arg(14);

// ---- written by hand -----------------------------------------------------------------------------
// Differentiated by hand from the residuals in published_problems.h; f = sum r_i^2, g = 2 J'r.

// Rosenbrock: f = 100 (x2 - x1^2)^2 + (1 - x1)^2; g = (-400 x1 (x2 - x1^2) - 2 (1 - x1), 200 (x2 - x1^2));
// H = [[1200 x1^2 - 400 x2 + 2, -400 x1], [-400 x1, 200]].
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

// Jennrich-Sampson: r_i = 2 + 2i - (exp(i x1) + exp(i x2)), i = 1..10; dr_i/dx_k = -i exp(i x_k).
double jennrichSampsonValueGradient(const sw::Vector& x, sw::Vector* g) {
    double f = 0, g0 = 0, g1 = 0;
    for (int i = 1; i <= 10; ++i) {
        const double e1 = std::exp(i * x[0]), e2 = std::exp(i * x[1]);
        const double r = 2 + 2 * i - (e1 + e2);
        f += r * r;
        g0 -= 2 * r * i * e1;
        g1 -= 2 * r * i * e2;
    }
    if (g) {
        g->resize(2);
        (*g)[0] = g0;
        (*g)[1] = g1;
    }
    return f;
}

// Helical valley: theta = (atan(x2/x1) + pi (1 - sign(x1))/2) / (2 pi), r1 = 10 (x3 - 10 theta),
// r2 = 10 (sqrt(x1^2 + x2^2) - 1), r3 = x3; dtheta/dx1 = -x2 / (2 pi rho^2), dtheta/dx2 = x1 / (2 pi rho^2).
double helicalValleyValueGradient(const sw::Vector& x, sw::Vector* g) {
    constexpr double pi = std::numbers::pi;
    const double sign = x[0] > 0 ? 1.0 : (x[0] < 0 ? -1.0 : 0.0);
    const double theta = (std::atan(x[1] / x[0]) + pi * (1 - sign) / 2) / (2 * pi);
    const double rho2 = x[0] * x[0] + x[1] * x[1], rho = std::sqrt(rho2);
    const double r1 = 10 * (x[2] - 10 * theta), r2 = 10 * (rho - 1), r3 = x[2];
    if (g) {
        g->resize(3);
        (*g)[0] = 2 * (r1 * 100 * x[1] / (2 * pi * rho2) + r2 * 10 * x[0] / rho);
        (*g)[1] = 2 * (-r1 * 100 * x[0] / (2 * pi * rho2) + r2 * 10 * x[1] / rho);
        (*g)[2] = 2 * (10 * r1 + r3);
    }
    return r1 * r1 + r2 * r2 + r3 * r3;
}

// Bard: r_i = y_i - (x1 + u_i / (v_i x2 + w_i x3)), u = i, v = 16 - i, w = min(u, v);
// dr/dx1 = -1, dr/dx2 = u v / d^2, dr/dx3 = u w / d^2 with d = v x2 + w x3.
double bardValueGradient(const sw::Vector& x, sw::Vector* g) {
    static constexpr double y[] = {0.14, 0.18, 0.22, 0.25, 0.29, 0.32, 0.35, 0.39, 0.37, 0.58, 0.73, 0.96, 1.34, 2.10, 4.39};
    double f = 0, g0 = 0, g1 = 0, g2 = 0;
    for (int i = 1; i <= 15; ++i) {
        const double u = i, v = 16 - i, w = std::min(u, v);
        const double d = v * x[1] + w * x[2];
        const double r = y[i - 1] - (x[0] + u / d);
        f += r * r;
        const double q = 2 * r * u / (d * d);
        g0 -= 2 * r;
        g1 += q * v;
        g2 += q * w;
    }
    if (g) {
        g->resize(3);
        (*g)[0] = g0;
        (*g)[1] = g1;
        (*g)[2] = g2;
    }
    return f;
}

using HandWritten = double (*)(const sw::Vector&, sw::Vector*);
HandWritten handWritten(int number) {
    switch (number) {
    case 1: return [](const sw::Vector& x, sw::Vector* g) { return g ? rosenbrockValueGradient(x, *g) : rosenbrockValue(x); };
    case 6: return jennrichSampsonValueGradient;
    case 7: return helicalValleyValueGradient;
    case 8: return bardValueGradient;
    default: return nullptr;
    }
}

// The hand-written code must compute what the formula computes (to rounding) before its time means anything.
bool handWrittenAgrees(int number, benchmark::State& state) {
    const sw::Vector x = point(number) * 1.01;
    sw::Vector g, gFormula;
    const double f = handWritten(number)(x, &g);
    const double fFormula = objective(number).valueGradient(x, gFormula);
    auto close = [](double a, double b) { return std::abs(a - b) <= 1e-10 * std::max(1.0, std::abs(b)); };
    bool ok = close(f, fFormula);
    for (Eigen::Index i = 0; i < g.size(); ++i) ok = ok && close(g[i], gFormula[i]);
    if (!ok) state.SkipWithError("the hand-written code disagrees with the formula");
    return ok;
}

void BM_HandWrittenValue(benchmark::State& state) {
    const int number = static_cast<int>(state.range(0));
    if (!handWrittenAgrees(number, state)) return;
    const HandWritten f = handWritten(number);
    sw::Vector x = point(number);
    for (auto _ : state) {
        double v = f(x, nullptr);
        benchmark::DoNotOptimize(v);
        x[0] += 1e-12;
    }
    state.SetLabel(problem(number).name);
}
BENCHMARK(BM_HandWrittenValue)->Arg(1)->Arg(6)->Arg(7)->Arg(8);

void BM_HandWrittenValueGradient(benchmark::State& state) {
    const int number = static_cast<int>(state.range(0));
    if (!handWrittenAgrees(number, state)) return;
    const HandWritten f = handWritten(number);
    sw::Vector x = point(number), g(x.size());
    for (auto _ : state) {
        double v = f(x, &g);
        benchmark::DoNotOptimize(v);
        benchmark::DoNotOptimize(g.data());
        x[0] += 1e-12;
    }
    state.SetLabel(problem(number).name);
}
BENCHMARK(BM_HandWrittenValueGradient)->Arg(1)->Arg(6)->Arg(7)->Arg(8);

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

// ---- the programs alone (no objective wrapper) ---------------------------------------------------

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
    state.SetLabel(problem(number).name + ", " + std::to_string(program.instructionCount()) + " instructions, " +
                   std::to_string(program.singlePointInstructionCount()) + " after fusion");
}
BENCHMARK(BM_ProgramFull)->Arg(1)->Arg(5)->Arg(6)->Arg(7)->Arg(8)->Arg(14);

}  // namespace

BENCHMARK_MAIN();
