#pragma once
// Internal plumbing shared by method implementations (not for views or the command line:
// they use solver.h). A method is a MethodState that turns the current State into the
// next one, one iteration per call; the framework (solver.cpp) owns the loop, the records'
// common fields, the stopping rules and the end-point classification.

#include "core/solve/solver.h"

#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace sw::solve {

// Counted access to the objective. Every call is counted; a non-finite result is
// remembered (which output, which iteration) so the framework can end the run cleanly.
class Evaluator {
public:
    Evaluator(const Objective& objective, long maxEvaluations);
    const Objective& objective() const { return objective_; }
    int dimension() const { return objective_.dimension(); }

    double value(const Vector& x);
    double gradient(const Vector& x, Vector& g);                    // counts one gradient (value comes free)
    double hessian(const Vector& x, Vector& g, Matrix& h);          // counts one Hessian (value, gradient free)
    double residuals(const Vector& x, Vector& r, Matrix* jacobian); // counts one value (+ one gradient with J); returns 0.5|r|^2
    // The objective's leastSquaresFactor (R, Q'r, |r|^2 of r(x) without the m x n Jacobian);
    // counts one value and one gradient like residuals() with J, sets value = 0.5|r|^2. Returns
    // false (nothing counted) when the objective does not offer it.
    bool leastSquaresFactor(const Vector& x, Matrix& r, Vector& qtr, double& value);

    const EvaluationCounts& counts() const { return counts_; }
    bool overBudget() const { return counts_.total() >= maxEvaluations_; }
    // The first non-finite result seen, e.g. "gradient component y is nan"; "" when none.
    const std::string& nonFinite() const { return nonFinite_; }
    bool sawNonFinite() const { return !nonFinite_.empty(); }
    // Where the first non-finite result was seen.
    const Vector& nonFinitePoint() const { return nonFinitePoint_; }
    void clearNonFinite() { nonFinite_.clear(); }  // for methods that back off from a bad trial point

private:
    void checkFinite(const Vector& x, double f, const Vector* g, const Matrix* h);
    const std::vector<std::string>& names();
    const Objective& objective_;
    long maxEvaluations_;
    EvaluationCounts counts_;
    std::string nonFinite_;
    Vector nonFinitePoint_;
    std::vector<std::string> names_;
};

// The current iterate. hessian is filled when the method's info says needsHessian
// (and kept current by the method after each step).
struct State {
    Vector x;
    double value = kNaN;
    Vector gradient;
    Matrix hessian;
    bool hasHessian = false;
    int iteration = 0;
    // Absolute floor for "within rounding of f" tests: min(1, |f(x0)|), so a problem of
    // ordinary size keeps the floor 1 and f scaled by 1e-150 gets a floor of its own size.
    double valueFloor = 1.0;
};

struct StepOutcome {
    Termination termination = Termination::Running;  // Running to go on
    std::string message;                              // when ending: a readable sentence
};

class MethodState {
public:
    virtual ~MethodState() = default;
    // Called once after the framework evaluated the start (x, value, gradient, and the
    // Hessian when needsHessian). May adjust nothing; may fill record 0's note.
    virtual void start(Evaluator& /*eval*/, State& /*state*/) {}
    // Takes one step from `state`: fills the step fields of `record` (step, stepKind,
    // stepLength, trials, trustRadius, ratio, damping, note, accepted...) and moves `state`
    // to x_{k+1} with its value, gradient (and Hessian when needsHessian). A rejected
    // trust-region step leaves state.x unchanged and sets record.accepted = false.
    virtual StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) = 0;
    // Derivative-free methods report their own convergence measure (e.g. simplex size):
    // the termination kind of that test when converged (and say why), else Running.
    virtual Termination ownConvergence(std::string* /*why*/) const { return Termination::Running; }
};

using MethodFactory = std::function<std::unique_ptr<MethodState>(const OptionValues&)>;

struct MethodRegistration {
    MethodInfo info;
    MethodFactory make;   // called only with options that passed checkOptions(info.options, ...)
    // Optional cross-option check beyond ranges; "" when fine.
    std::function<std::string(const OptionValues&)> check;
};

// Each method family file provides its registrations; registry.cpp lists the families.
std::vector<MethodRegistration> firstOrderMethods();          // first_order.cpp
std::vector<MethodRegistration> newtonMethods();              // newton.cpp
std::vector<MethodRegistration> trustRegionMethods();         // trust_region.cpp
std::vector<MethodRegistration> quasiNewtonMethods();         // quasi_newton.cpp
std::vector<MethodRegistration> conjugateGradientMethods();   // conjugate_gradient.cpp
std::vector<MethodRegistration> derivativeFreeMethods();      // nelder_mead.cpp
std::vector<MethodRegistration> leastSquaresMethods();        // least_squares.cpp

const std::vector<MethodRegistration>& registrations();       // registry.cpp
const MethodRegistration* findRegistration(const std::string& id);

// Small shared helpers (solver_util.cpp).
// Symmetric eigenvalues ascending; condition = max|l| / min|l| (inf when min is 0).
void spectrum(const Matrix& h, Vector& eigenvalues, double& condition);
// Option spec builders for the method registrations.
OptionSpec realOption(std::string name, std::string description, double defaultValue, double lower, double upper,
                      bool lowerOpen, bool upperOpen);
OptionSpec integerOption(std::string name, std::string description, int defaultValue, int lower, int upper);
OptionSpec choiceOption(std::string name, std::string description, std::vector<std::string> choices,
                        int defaultIndex);
OptionSpec flagOption(std::string name, std::string description, bool defaultValue);
// The spec with a former name added (read, never written; docs/names.md).
OptionSpec formerlyNamed(OptionSpec spec, std::string formerName);
// shortNumber (record.h) formats numbers for notes and messages.
// "(x=1, y=2)" with the objective's variable names (at most 8 shown).
std::string pointText(const Vector& x, const std::vector<std::string>& names);

}  // namespace sw::solve
