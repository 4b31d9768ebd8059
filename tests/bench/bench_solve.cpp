// Per-solve time of our methods on published problems, for the side-by-side comparison
// with scipy.optimize.minimize run by scripts/bench_solve (which also times SciPy through
// tests/bench/bench_solve_scipy.py and prints the table). Each benchmark is one complete
// solve (makeSolver + begin + steps to the end) on a FormulaObjective built once; the
// iteration count and final value are reported as counters.
//
//   bench_solve --problems-json   prints the problems and method pairs as JSON and exits
//   bench_solve [benchmark flags] runs the benchmarks

#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "tests/reference/solve/published_problems.h"

#include <benchmark/benchmark.h>
#include <nlohmann/json.hpp>

#include <cstring>
#include <iostream>
#include <memory>
#include <string>
#include <vector>

namespace {

using sw::reference::PublishedProblem;

// Our method id and the SciPy method of the same family.
struct MethodPair {
    const char* ours;
    const char* scipy;
};
const MethodPair kPairs[] = {
    {"bfgs", "BFGS"},
    {"lbfgs", "L-BFGS-B"},
    {"trust-region-exact", "trust-exact"},
    {"trust-region-cg", "trust-ncg"},
    {"trust-region-dogleg", "dogleg"},
    {"cg-polak-ribiere", "CG"},
    {"nelder-mead", "Nelder-Mead"},
};

// Problems from Moré, Garbow & Hillstrom (1981) by number: Rosenbrock (1), Beale (5),
// Jennrich-Sampson (6), helical valley (7), Bard (8), Wood (14).
const int kProblems[] = {1, 5, 6, 7, 8, 14};

sw::solve::StoppingRules benchRules() {
    sw::solve::StoppingRules rules;
    rules.maxIterations = 5000;
    rules.gradientTolerance = 1e-8;
    rules.spectrumMaxDimension = 0;  // no diagnostic eigenvalues: time the method's own work
    return rules;
}

std::vector<PublishedProblem> benchProblems() {
    std::vector<PublishedProblem> chosen;
    for (const PublishedProblem& p : sw::reference::publishedProblems())
        for (int n : kProblems)
            if (p.number == n) chosen.push_back(p);
    return chosen;
}

void printProblemsJson() {
    nlohmann::json out;
    out["gtol"] = benchRules().gradientTolerance;
    // Nelder-Mead stops on its own simplex test; SciPy gets the same (xatol, fatol) as ours.
    if (const sw::solve::MethodInfo* nm = sw::solve::findMethod("nelder-mead")) {
        for (const sw::solve::OptionSpec& o : nm->options) {
            if (o.name == "simplex_size_below") out["simplex_size_below"] = o.defaultValue;
            if (o.name == "value_spread_below") out["value_spread_below"] = o.defaultValue;
        }
    }
    for (const MethodPair& m : kPairs) out["pairs"].push_back({{"ours", m.ours}, {"scipy", m.scipy}});
    for (const PublishedProblem& p : benchProblems())
        out["problems"].push_back(
            {{"name", p.name}, {"number", p.number}, {"variables", p.variables}, {"formula", p.formula}, {"start", p.start}});
    std::cout << out.dump(1) << "\n";
}

void solveOnce(benchmark::State& state, std::shared_ptr<sw::FormulaObjective> objective, sw::Vector start,
               std::string method) {
    const sw::solve::StoppingRules rules = benchRules();
    sw::solve::Run last;
    for (auto _ : state) {
        sw::solve::SolverOrError made = sw::solve::makeSolver(method, *objective, start, {}, rules);
        if (!made.solver) {
            state.SkipWithError(made.error.c_str());
            return;
        }
        last = sw::solve::solve(std::move(made.solver));  // moves the run out (no copy of the trace)
        benchmark::ClobberMemory();  // (DoNotOptimize on a double lvalue garbles it with GCC 12 and benchmark 1.7)
    }
    state.counters["solver_iterations"] = last.iterations();
    state.counters["final_value"] = last.value;
    state.counters["evaluations"] = static_cast<double>(last.evaluations.total());
    state.SetLabel(toString(last.termination));
}

}  // namespace

int main(int argc, char** argv) {
    for (int i = 1; i < argc; ++i)
        if (std::strcmp(argv[i], "--problems-json") == 0) {
            printProblemsJson();
            return 0;
        }
    for (const PublishedProblem& p : benchProblems()) {
        auto objective = std::make_shared<sw::FormulaObjective>(p.formula, p.variables);
        const sw::Vector start = Eigen::Map<const sw::Vector>(p.start.data(), static_cast<Eigen::Index>(p.start.size()));
        for (const MethodPair& m : kPairs) {
            if (!sw::solve::findMethod(m.ours)) continue;
            const std::string name = std::string(m.ours) + "/" + p.name;
            benchmark::RegisterBenchmark(name.c_str(), solveOnce, objective, start, std::string(m.ours))
                ->Unit(benchmark::kMicrosecond);
        }
    }
    benchmark::Initialize(&argc, argv);
    if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
    benchmark::RunSpecifiedBenchmarks();
    benchmark::Shutdown();
    return 0;
}
