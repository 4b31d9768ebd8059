#pragma once
// The solver engine: one interface for every method, stepped one iteration at a time.
//
//   auto solver = makeSolver("bfgs", objective, x0, options, rules);   // checks first
//   solver->begin();                 // evaluates the start; may finish at once
//   while (!solver->finished()) solver->step();
//   const Run& run = solver->run();
//
// solve() is that loop. No exceptions inside the loop: problems end the run with a
// Termination and a message. Invalid input is rejected by makeSolver with a sentence.

#include "core/solve/options.h"
#include "core/solve/record.h"

#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace sw::solve {

struct MethodInfo {
    std::string id;           // kebab-case published name, e.g. "trust-region-dogleg"
    std::string family;       // "first-order", "newton", "trust-region", "quasi-newton", "conjugate-gradient", "derivative-free", "least-squares"
    std::string summary;      // one line
    bool needsGradient = true;
    bool needsHessian = false;
    bool needsResiduals = false;  // Gauss-Newton, Levenberg-Marquardt
    std::vector<OptionSpec> options;
};

class Solver {
public:
    virtual ~Solver() = default;
    virtual const MethodInfo& info() const = 0;
    virtual void begin() = 0;
    // One iteration; appends one record. Does nothing once finished.
    virtual void step() = 0;
    virtual bool finished() const = 0;
    // Ends the run with Termination::StoppedByCaller (safe to call between steps).
    virtual void stop() = 0;
    virtual const Run& run() const = 0;
    // Hands the run over without copying its records; run() is empty afterwards. For callers
    // that are done with the solver (solve() below); the default copies.
    virtual Run takeRun() { return run(); }
};

// Result of makeSolver: a solver, or the sentence saying why not.
struct SolverOrError {
    std::unique_ptr<Solver> solver;
    std::string error;
};

// Every registered method, in display order.
const std::vector<MethodInfo>& methods();
const MethodInfo* findMethod(const std::string& id);
// What kind of step a record took, in a word for a table whose rows already name the method:
// "" when the kind only restates the method (a BFGS step of BFGS), the simplex move of
// Nelder-Mead ("reflect"), "damped"/"undamped" for Levenberg-Marquardt, "steepest-descent
// fallback" for a gradient step a Newton-type method fell back to, else the kind's id. The
// window's Steps table and the command line's trace both use it.
std::string stepKindWord(const std::string& methodId, const IterationRecord& record);
// "a, b, c" list of ids, for error messages.
std::string methodIdList();

// Checks id, options, stopping rules, start dimension and finiteness; the objective must
// outlive the solver. Errors read like "unknown method 'bfgss'; known: ...".
SolverOrError makeSolver(const std::string& methodId, const Objective& objective, const Vector& start,
                         const OptionValues& options = {}, const StoppingRules& rules = {});

// Loops a solver to the end. `observer` (optional) is called after every step with the
// run so far; returning false stops the run (StoppedByCaller).
using Observer = std::function<bool(const Run&)>;
Run solve(Solver& solver, const Observer& observer = {});
// The same for a solver the caller is done with: the run is moved out, not copied.
Run solve(std::unique_ptr<Solver> solver, const Observer& observer = {});

// Convenience: makeSolver + solve; on a rejected input returns a finished Run whose
// termination is Failed and whose message is the error.
Run solve(const std::string& methodId, const Objective& objective, const Vector& start,
          const OptionValues& options = {}, const StoppingRules& rules = {});

}  // namespace sw::solve
