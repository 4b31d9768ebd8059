#pragma once
// Findings: what Saddlewise concludes about a run, in plain data. A finding names a
// condition from a fixed list (FindingId: an id outside the list cannot be built), says how
// serious it is, which iterations show it, the measured numbers behind it, one sentence for
// the modeler, and, where one exists, a remedy: a change described both as text and as data
// (a method switch, an option change, a rescaling of x, an iteration limit, a start point)
// and, once the change was tried by a rerun from the same start, what happened.
//
// Severity: `problem` means the result should not be taken as it stands (not at a minimum,
// stopped early, broke down, or a fitted combination of parameters is not determined);
// `note` means the result stands and this is how the run behaved (a crawl that still got
// there, the observed convergence rate).
//
// Nothing here depends on how findings are shown: the command line, the window's findings
// panel and reports all read these values. The rules themselves are in rules.h, the reruns in
// remedy.h, the one call that does everything in diagnose.h.

#include "core/solve/record.h"
#include "core/solve/options.h"

#include <memory>
#include <optional>
#include <string>
#include <vector>

namespace sw::diagnose {

// Every finding Saddlewise can report. toString gives the kebab-case id users see; there is
// no conversion from arbitrary text, so an unknown id never reaches a user.
enum class FindingId {
    SaddleEnd,           // ended where the Hessian has k negative eigenvalues
    MaximumEnd,          // ended where every eigenvalue is negative
    FlatDirection,       // an eigenvalue ~ 0 at the end (for fits: a combination the data do not determine)
    NarrowValley,        // ill-conditioned curvature, zig-zag steps, a slow linear rate
    PoorScaling,         // variables whose curvatures lie many decades apart
    UphillNewton,        // a Newton step that was not a descent direction (indefinite Hessian)
    LineSearchCollapse,  // step lengths shrinking, many trials per line search
    RadiusCollapse,      // the trust radius shrinking toward zero
    Stagnation,          // f no longer changes but the gradient is not small
    Divergence,          // f or |x| growing without bound, or a drift to infinity along a flat valley
    NonFinite,           // a NaN or an infinity appeared
    BudgetExhausted,     // stopped by a limit while still making progress
    MethodFailed,        // the run ended by an error (rejected input or a method breakdown)
    ConvergenceRate,     // the observed rate of the last iterations (a note)
};
inline constexpr int kFindingIdCount = 14;
const char* toString(FindingId id);
// Every id, in the order of the enum (tests and docs walk this).
const std::vector<FindingId>& allFindingIds();

// What each finding means and the rule behind it, for help texts and tests (the thresholds
// themselves are in rules.h; docs/findings.md has the full table).
struct FindingInfo {
    FindingId id;
    const char* title;   // a few words, e.g. "ended on a saddle"
    const char* rule;    // the rule in one or two sentences, with its thresholds
    const char* source;  // a publication, or "common practice, no published source"
};
const FindingInfo& describe(FindingId id);

enum class Severity { Problem, Note };
const char* toString(Severity severity);  // "problem", "note"

// A measured number: its name (snake_case, stable: JSON keys), value, unit ("" for a pure
// number, e.g. "degrees", "iterations") and what it means, in a few words.
struct Evidence {
    std::string name;
    double value = solve::kNaN;
    std::string unit;
    std::string meaning;
};

// The iterations that show a finding: a range [first, last], the iteration a view should
// select (focus), and the single iterations worth pointing at (e.g. each uphill step). The
// numbers are record iteration numbers, which may have gaps in a thinned trace.
struct IterationSpan {
    int first = -1;
    int last = -1;
    int focus = -1;
    std::vector<int> notable;
};

// What a view may draw for a finding: a point (full n-vector) and directions at it (e.g. the
// escape directions at a saddle, the flat direction at the end), each scaled to unit length.
struct Mark {
    Vector point;
    std::vector<Vector> directions;
    bool empty() const { return point.size() == 0; }
};

// A change to try, as data. Exactly the fields of its kind are used.
struct Change {
    enum class Kind {
        SwitchMethod,         // run `method` (with `options`) instead
        SetOptions,           // same method, `options` merged over the run's own
        RescaleVariables,     // same method on x = D u, D = diag(scale); the result is mapped back to x
        RaiseIterationLimit,  // same method with maxIterations = `maxIterations`
        StartPoint,           // same method from `start`
    };
    Kind kind = Kind::SwitchMethod;
    std::string method;            // SwitchMethod
    solve::OptionValues options;   // SwitchMethod (the new method's), SetOptions (merged)
    Vector scale;           // RescaleVariables: D, one factor per variable
    int maxIterations = 0;         // RaiseIterationLimit
    Vector start;           // StartPoint
    std::string text;              // the change in words, e.g. "switch to saddle-free-newton"
};
const char* toString(Change::Kind kind);  // "switch-method", "set-options", "rescale-variables", ...

// What a rerun with the change did.
struct Outcome {
    solve::Termination termination = solve::Termination::Running;
    double value = solve::kNaN;
    double gradientNorm = solve::kNaN;  // in the original variables
    Vector x;                    // in the original variables
    solve::PointKind endKind = solve::PointKind::Unknown;
    int endIndex = 0;                   // negative eigenvalues at the end
    bool endCritical = false;
    int iterations = 0;
    solve::EvaluationCounts evaluations;
    bool helped = false;
    std::string text;                   // one sentence: what happened and whether it helped
    // The rerun itself (trace in the original variables), for views that draw its path.
    std::shared_ptr<const solve::Run> run;
};

struct Remedy {
    Change change;
    std::optional<Outcome> outcome;  // empty until tried (or when reruns were skipped)
};

struct Finding {
    FindingId id = FindingId::ConvergenceRate;
    Severity severity = Severity::Note;
    IterationSpan iterations;
    std::vector<Evidence> evidence;  // in the order a reader should see them
    std::string message;             // one plain sentence for a modeler
    std::optional<Remedy> remedy;    // empty when no remedy applies
    Mark mark;

    bool isProblem() const { return severity == Severity::Problem; }
    // The evidence of that name, or nullptr.
    const Evidence* find(const std::string& name) const;
    double number(const std::string& name) const;  // NaN when absent
};

// Findings of one run, problems first, then in the order of FindingId.
using Findings = std::vector<Finding>;
void sortFindings(Findings& findings);
bool hasProblem(const Findings& findings);
const Finding* findById(const Findings& findings, FindingId id);

}  // namespace sw::diagnose
