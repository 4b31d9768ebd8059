// The rules, one function per finding. Thresholds and their sources are in rules.h.
#include "core/diagnose/rules.h"

#include "core/objective/fit_objective.h"
#include "core/solve/solver.h"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <numeric>

namespace sw::diagnose {

namespace {

using solve::IterationRecord;
using solve::kNaN;
using solve::PointKind;
using solve::Run;
using solve::StepKind;
using solve::Termination;

constexpr double kDegrees = 180.0 / 3.14159265358979323846;

std::string num(double v, int digits = 3) { return solve::shortNumber(v, digits); }

// A count for a sentence: a whole number in full ("2481", not "2.48e+03"), huge ones short.
std::string countText(double v) {
    if (!std::isfinite(v)) return num(v);
    return std::abs(v) < 1e7 ? std::to_string(std::llround(v)) : num(v, 3);
}

// A ratio for a sentence: whole below 10^4 ("210"), two digits above ("5.3e+06").
std::string ratioText(double v) { return std::isfinite(v) && std::abs(v) < 1e4 ? countText(v) : num(v, 2); }

// A per-iteration factor: near 1 the difference from 1 is what matters (0.999994, not 1).
std::string factorText(double v) { return solve::shortNumber(v, v > 0.99 && v < 1.01 ? 6 : 3); }

double median(std::vector<double> values) {
    values.erase(std::remove_if(values.begin(), values.end(), [](double v) { return !std::isfinite(v); }),
                 values.end());
    if (values.empty()) return kNaN;
    const std::size_t mid = values.size() / 2;
    std::nth_element(values.begin(), values.begin() + static_cast<std::ptrdiff_t>(mid), values.end());
    double m = values[mid];
    if (values.size() % 2 == 0) {
        const double lower = *std::max_element(values.begin(), values.begin() + static_cast<std::ptrdiff_t>(mid));
        m = 0.5 * (m + lower);
    }
    return m;
}

Evidence ev(std::string name, double value, std::string unit, std::string meaning) {
    return {std::move(name), value, std::move(unit), std::move(meaning)};
}

std::string variableName(const std::vector<std::string>& names, Eigen::Index i) {
    const auto k = static_cast<std::size_t>(i);
    return k < names.size() ? names[k] : "x" + std::to_string(i + 1);
}

// Evidence entries "<prefix>_<name>" for each component of a unit direction.
void addDirection(Finding& f, const std::string& prefix, const Vector& direction, const std::vector<std::string>& names,
                  const std::string& meaning) {
    for (Eigen::Index i = 0; i < direction.size() && i < 8; ++i)
        f.evidence.push_back(ev(prefix + "_" + variableName(names, i), direction[i], "", meaning));
}

// A direction's sign is arbitrary; show it with its largest component positive.
Vector canonicalSign(Vector v) {
    Eigen::Index largest = 0;
    v.cwiseAbs().maxCoeff(&largest);
    if (v.size() > 0 && v[largest] < 0) v = -v;
    return v;
}

std::string pointList(const Vector& v, const std::vector<std::string>& names) {
    std::string text;
    for (Eigen::Index i = 0; i < v.size() && i < 6; ++i)
        text += (i ? ", " : "") + variableName(names, i) + " " + num(v[i], 2);
    if (v.size() > 6) text += ", ...";
    return "(" + text + ")";
}

const IterationRecord& lastRecord(const Run& run) { return run.trace.back(); }

bool hasStep(const IterationRecord& r) { return r.step.size() > 0 && r.stepKind != StepKind::None; }

double relativeGradientSmall(const RunFacts& facts) {
    return std::max(1e-4, std::sqrt(facts.setup->rules.gradientTolerance));
}

// The end is a critical point by the solver's own test (solver.cpp classifyEndPoint).
bool endIsCritical(const RunFacts& facts) {
    const Run& run = *facts.run;
    const double gn = run.gradientNorm;
    if (!std::isfinite(gn)) return false;
    return gn <= relativeGradientSmall(facts) * (1.0 + std::abs(run.value));
}

bool methodIs(const RunFacts& facts, std::initializer_list<const char*> ids) {
    for (const char* id : ids)
        if (facts.run->methodId == id) return true;
    return false;
}

// Methods whose steps use negative curvature (or guard against it) by construction.
bool curvatureAware(const RunFacts& facts) {
    return methodIs(facts, {"saddle-free-newton", "trust-region-exact", "trust-region-cg", "cubic-regularization",
                            "trust-region-dogleg", "modified-newton"});
}

// An option's number (options were checked before the run; a bad one gives the fallback).
double optionValue(const std::string& text, double fallback) {
    char* end = nullptr;
    const double v = std::strtod(text.c_str(), &end);
    return end && *end == '\0' && std::isfinite(v) ? v : fallback;
}

bool fixedStepMethod(const RunFacts& facts) {
    if (methodIs(facts, {"momentum", "nesterov", "adam"})) return true;
    if (facts.run->methodId != "gradient-descent") return false;
    auto it = facts.setup->options.find("line_search");
    return it != facts.setup->options.end() && it->second == "fixed";
}

// A method switch to the first candidate that is registered, differs from the run's method and
// suits the objective (no least-squares method without residuals).
std::optional<Change> switchMethod(const RunFacts& facts, std::initializer_list<const char*> candidates,
                                   const std::string& why) {
    for (const char* id : candidates) {
        const solve::MethodInfo* info = solve::findMethod(id);
        if (!info || facts.run->methodId == id) continue;
        if (info->needsResiduals && !facts.objective->hasResiduals()) continue;
        Change c;
        c.kind = Change::Kind::SwitchMethod;
        c.method = id;
        c.text = "switch to " + std::string(id) + (why.empty() ? "" : " (" + why + ")");
        return c;
    }
    return std::nullopt;
}

void setRemedy(Finding& f, std::optional<Change> change) {
    if (change) f.remedy = Remedy{std::move(*change), std::nullopt};
}

IterationSpan spanAt(int iteration) { return {iteration, iteration, iteration, {}}; }

IterationSpan windowSpan(const RunFacts& facts, int focus = -1) {
    const Run& run = *facts.run;
    IterationSpan s;
    s.first = run.trace[facts.windowBegin].iteration;
    s.last = run.trace.back().iteration;
    s.focus = focus >= 0 ? focus : s.last;
    return s;
}

// The gradient descends along the first eigenvector with a negative eigenvalue from the end:
// f(x + t v) ~ f + t g'v + t^2 lambda / 2 decreases for either sign of v.
std::vector<Vector> negativeDirections(const Curvature& c, int most = 2) {
    std::vector<Vector> list;
    for (Eigen::Index i = 0; i < c.eigenvalues.size() && static_cast<int>(list.size()) < most; ++i)
        if (c.eigenvalues[i] < -c.tolerance) list.push_back(canonicalSign(c.eigenvectors.col(i)));
    return list;
}

// How much the best f fell from the first half of the window to the second (a crawl or an
// oscillation that still goes down counts as progress; a plateau does not).
struct Progress {
    double fall = 0;
    int span = 0;  // iterations in the window
};

Progress windowProgress(const RunFacts& facts) {
    const Run& run = *facts.run;
    Progress p;
    std::vector<const IterationRecord*> finite;
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i)
        if (std::isfinite(run.trace[i].value)) finite.push_back(&run.trace[i]);
    if (finite.size() < 2) return p;
    p.span = finite.back()->iteration - finite.front()->iteration;
    const std::size_t half = finite.size() / 2;
    double early = finite.front()->value, late = finite.back()->value;
    for (std::size_t i = 0; i < half; ++i) early = std::min(early, finite[i]->value);
    for (std::size_t i = half; i < finite.size(); ++i) late = std::min(late, finite[i]->value);
    p.fall = early - late;
    return p;
}

}  // namespace

// ---------------------------------------------------------------------------------------

Curvature curvatureAt(const Objective& objective, const Vector& x) {
    Curvature c;
    if (x.size() == 0 || !x.allFinite() || x.size() > 300) return c;
    Vector g;
    objective.valueGradientHessian(x, g, c.hessian);
    if (c.hessian.rows() != x.size() || !c.hessian.allFinite()) return c;
    const Matrix symmetric = 0.5 * (c.hessian + c.hessian.transpose());
    Eigen::SelfAdjointEigenSolver<Matrix> solver(symmetric);
    if (solver.info() != Eigen::Success) return c;
    c.eigenvalues = solver.eigenvalues();
    c.eigenvectors = solver.eigenvectors();
    const double largest = c.eigenvalues.cwiseAbs().maxCoeff();
    c.tolerance = thresholds::kZeroEigenvalue * std::max(1.0, largest);
    for (double l : c.eigenvalues) {
        if (std::abs(l) <= c.tolerance) ++c.zero;
        else if (l < 0) ++c.negative;
        else ++c.positive;
    }
    const double smallest = c.eigenvalues.cwiseAbs().minCoeff();
    c.condition = smallest > 0 ? largest / smallest : std::numeric_limits<double>::infinity();

    // Jacobi scaling: unit diagonal wherever the diagonal is positive.
    const Vector diagonal = symmetric.diagonal();
    const double largestDiagonal = diagonal.cwiseAbs().maxCoeff();
    c.jacobiScale.resize(x.size());
    for (Eigen::Index i = 0; i < x.size(); ++i) {
        const double d = diagonal[i] > 0 ? diagonal[i] : largestDiagonal;
        c.jacobiScale[i] = d > 0 ? 1.0 / std::sqrt(d) : 1.0;
    }
    const Matrix scaled = c.jacobiScale.asDiagonal() * symmetric * c.jacobiScale.asDiagonal();
    Eigen::SelfAdjointEigenSolver<Matrix> scaledSolver(scaled);
    if (scaledSolver.info() == Eigen::Success) {
        c.scaledEigenvalues = scaledSolver.eigenvalues();
        c.scaledEigenvectors = scaledSolver.eigenvectors();
        const double big = c.scaledEigenvalues.cwiseAbs().maxCoeff(), small = c.scaledEigenvalues.cwiseAbs().minCoeff();
        c.scaledCondition = small > 0 ? big / small : std::numeric_limits<double>::infinity();
    }
    c.valid = true;
    return c;
}

bool isHealthyEnd(const solve::Run& run) {
    return run.finished() && solve::isConvergence(run.termination) && run.endPoint.critical && run.endPoint.index == 0 &&
           (run.endPoint.kind == PointKind::Minimum || run.endPoint.kind == PointKind::Degenerate);
}

bool looksLikeKinkMinimum(const Objective& objective, const Vector& x) {
    if (x.size() == 0 || !x.allFinite()) return false;
    const double f = objective.value(x);
    if (!std::isfinite(f)) return false;
    const double h = 1e-6 * (1.0 + x.norm());
    const double rounding = 64 * std::numeric_limits<double>::epsilon() * (1.0 + std::abs(f));
    const Eigen::Index n = x.size();
    auto falls = [&](const Vector& d) {
        const double up = objective.value(x + h * d), down = objective.value(x - h * d);
        return (std::isfinite(up) && up < f - rounding) || (std::isfinite(down) && down < f - rounding);
    };
    Vector d = Vector::Zero(n);
    for (Eigen::Index i = 0; i < n; ++i) {
        d.setZero();
        d[i] = 1;
        if (falls(d)) return false;
        if (n <= 10)
            for (Eigen::Index j = i + 1; j < n; ++j) {
                d.setZero();
                d[i] = d[j] = std::sqrt(0.5);
                if (falls(d)) return false;
                d[j] = -d[j];
                if (falls(d)) return false;
            }
    }
    Vector g;
    objective.valueGradient(x, g);
    if (g.size() == n && g.allFinite() && g.norm() > 0 && falls(g / g.norm())) return false;
    return true;
}

bool kinkAcross(const Objective& objective, const Vector& x, const Vector& d) {
    if (x.size() == 0 || d.size() != x.size() || !x.allFinite() || !(d.norm() > 0)) return false;
    const Vector u = d.normalized();
    const double h = 1e-6 * (1.0 + x.norm());
    Vector g;
    Matrix hessian;
    const double f = objective.valueGradientHessian(x, g, hessian);
    const double up = objective.value(x + h * u), down = objective.value(x - h * u);
    if (!std::isfinite(f) || !std::isfinite(up) || !std::isfinite(down)) return false;
    // One-sided slopes; for a smooth f they differ by h d'Hd (plus rounding of f / h).
    const double right = (up - f) / h, left = (f - down) / h;
    const double smooth = hessian.allFinite() ? h * u.dot(hessian * u) : 0.0;
    const double noise = 1e3 * std::numeric_limits<double>::epsilon() * (1.0 + std::abs(f)) / h;
    return std::abs(right - left - smooth) > std::max(1e-3 * (std::abs(right) + std::abs(left)), noise);
}

RunFacts gatherFacts(const solve::Run& run, const Objective& objective, const RunSetup& setup) {
    RunFacts facts;
    facts.run = &run;
    facts.objective = &objective;
    facts.setup = &setup;
    facts.names = objective.variableNames();
    facts.isFit = dynamic_cast<const FitObjective*>(&objective) != nullptr;
    facts.finished = run.finished();
    facts.healthyEnd = isHealthyEnd(run);
    if (!run.trace.empty()) {
        const std::size_t size = run.trace.size();
        facts.windowBegin = size > static_cast<std::size_t>(thresholds::kWindow) ? size - thresholds::kWindow : 0;
        for (std::size_t i = facts.windowBegin; i < size; ++i)
            if (hasStep(run.trace[i])) ++facts.stepsInWindow;
    }
    if (facts.finished && run.x.size() == objective.dimension() && run.x.allFinite())
        facts.end = curvatureAt(objective, run.x);
    facts.rate = estimateRate(run);
    return facts;
}

std::string combinationText(const Vector& direction, const std::vector<std::string>& names) {
    if (direction.size() == 0) return "";
    Eigen::Index largest = 0;
    const double top = direction.cwiseAbs().maxCoeff(&largest);
    if (!(top > 0)) return "";
    const Vector v = direction / direction[largest];  // the largest component becomes +1
    std::string text;
    for (Eigen::Index i = 0; i < v.size(); ++i) {
        const double c = v[i];
        if (std::abs(c) < 0.05) continue;
        const bool first = text.empty();
        const double magnitude = std::abs(c);
        std::string term = std::abs(magnitude - 1) < 5e-3 ? variableName(names, i) : num(magnitude, 2) + " " + variableName(names, i);
        if (first) text = (c < 0 ? "-" : "") + term;
        else text += (c < 0 ? " - " : " + ") + term;
    }
    return text;
}

// ---------------------------------------------------------------------------------------
// non-finite

std::optional<Finding> ruleNonFinite(const RunFacts& facts) {
    const Run& run = *facts.run;
    int firstBad = -1;
    std::size_t badIndex = 0;
    for (std::size_t i = 0; i < run.trace.size(); ++i) {
        const IterationRecord& r = run.trace[i];
        if (!std::isfinite(r.value) || (r.gradient.size() > 0 && !r.gradient.allFinite()) || !r.x.allFinite()) {
            firstBad = r.iteration;
            badIndex = i;
            break;
        }
    }
    if (run.termination != Termination::NonFinite && firstBad < 0) return std::nullopt;
    Finding f;
    f.id = FindingId::NonFinite;
    f.severity = Severity::Problem;
    const int at = firstBad >= 0 ? firstBad : (run.trace.empty() ? 0 : lastRecord(run).iteration);
    f.iterations = spanAt(at);
    f.evidence.push_back(ev("iteration", at, "iteration", "where the first non-finite result appeared"));
    // The last record before it with everything finite.
    const IterationRecord* lastGood = nullptr;
    const std::size_t limit = firstBad >= 0 ? badIndex : run.trace.size();
    for (std::size_t i = 0; i < limit; ++i)
        if (std::isfinite(run.trace[i].value) && run.trace[i].x.allFinite()) lastGood = &run.trace[i];
    if (lastGood) {
        f.evidence.push_back(ev("last_finite_value", lastGood->value, "f", "f at the last finite iterate"));
        f.evidence.push_back(ev("last_finite_x_norm", lastGood->x.norm(), "", "|x| at the last finite iterate"));
        f.evidence.push_back(ev("last_finite_iteration", lastGood->iteration, "iteration", "the last finite iterate"));
        f.mark.point = lastGood->x;
    }
    // Which output went non-finite first: the record's own numbers, else the solver's message
    // (the evaluator names the first one: "value is inf", "gradient component x is nan",
    // "Hessian entry (x, y) is inf", "Jacobian entry (...)").
    const std::string& said = run.termination == Termination::NonFinite ? run.message : std::string();
    bool valueBad = said.find("value is ") != std::string::npos, gradientBad = said.find("gradient component") != std::string::npos,
         hessianBad = said.find("Hessian entry") != std::string::npos, jacobianBad = said.find("Jacobian entry") != std::string::npos,
         xBad = false;
    if (firstBad >= 0) {
        const IterationRecord& r = run.trace[badIndex];
        valueBad = valueBad || !std::isfinite(r.value);
        gradientBad = gradientBad || (r.gradient.size() > 0 && !r.gradient.allFinite());
        xBad = !r.x.allFinite();
    }
    struct Output {
        const char* key;    // evidence name: non_finite_<key>
        const char* words;  // as the message names it
        bool bad;
    };
    const Output outputs[] = {{"value", "f", valueBad},
                              {"gradient", "the gradient", gradientBad},
                              {"hessian", "the Hessian", hessianBad},
                              {"jacobian", "the Jacobian", jacobianBad},
                              {"x", "the iterate x", xBad}};
    std::string which;
    for (const Output& o : outputs) {
        f.evidence.push_back(ev(std::string("non_finite_") + o.key, o.bad ? 1 : 0, "",
                                std::string("1: ") + o.words + " was not finite"));
        if (o.bad) which += (which.empty() ? "" : ", ") + std::string(o.words);
    }
    const std::string what = !said.empty() ? said : "a non-finite value at iteration " + std::to_string(at);
    f.message = "The run met a non-finite value (" + what + ")" + (which.empty() ? "" : "; not finite: " + which) +
                ": the objective is undefined or overflows where the method stepped.";
    if (fixedStepMethod(facts)) {
        Change c;
        c.kind = Change::Kind::SetOptions;
        const auto it = facts.setup->options.find("step_size");
        const double current = it != facts.setup->options.end() ? optionValue(it->second, 1e-3) : 1e-3;
        c.options["step_size"] = solve::shortNumber(current / 10, 6);
        c.text = "take a step size ten times smaller (step_size = " + c.options["step_size"] + ")";
        f.remedy = Remedy{c, std::nullopt};
    } else if (!methodIs(facts, {"trust-region-exact", "trust-region-cg", "trust-region-dogleg", "cubic-regularization"})) {
        setRemedy(f, switchMethod(facts, {"trust-region-exact"}, "a trust region rejects non-finite trial points and shrinks"));
    }
    return f;
}

// ---------------------------------------------------------------------------------------
// method-failed

std::optional<Finding> ruleMethodFailed(const RunFacts& facts) {
    const Run& run = *facts.run;
    if (run.termination != Termination::Failed) return std::nullopt;
    Finding f;
    f.id = FindingId::MethodFailed;
    f.severity = Severity::Problem;
    const int at = run.trace.empty() ? 0 : lastRecord(run).iteration;
    f.iterations = spanAt(at);
    f.evidence.push_back(ev("iterations", run.iterations(), "iterations", "iterations before the error"));
    const std::string why = run.message.empty() ? "no reason was given" : run.message;
    if (run.trace.empty()) {
        f.message = "The run could not start: " + why + ".";
        const solve::MethodInfo* info = solve::findMethod(run.methodId);
        if (info && info->needsResiduals && !facts.objective->hasResiduals())
            setRemedy(f, switchMethod(facts, {"trust-region-exact", "bfgs"}, "it needs only the gradient and Hessian"));
    } else {
        f.message = "The method broke down after " + std::to_string(run.iterations()) + " iterations: " + why + ".";
        f.mark.point = lastRecord(run).x;
        setRemedy(f, switchMethod(facts, {"trust-region-exact", "bfgs"}, "a robust method"));
    }
    return f;
}

// ---------------------------------------------------------------------------------------
// saddle-end, maximum-end

namespace {

std::optional<Change> escapeRemedy(const RunFacts& facts, const Vector& direction, double curvature) {
    // Newton-type methods are drawn to any critical point: switch to one that uses negative
    // curvature. A method that does so already only stops at a saddle when it started on it
    // exactly: restart it a little way along the escape direction.
    if (!curvatureAware(facts)) {
        if (auto c = switchMethod(facts, {"trust-region-exact", "saddle-free-newton"}, "it steps along negative curvature"))
            return c;
    }
    const Run& run = *facts.run;
    // Far enough that the quadratic model drops f by about 1e-3 (1 + |f|): f + t^2 lambda / 2.
    const double drop = 1e-3 * (1.0 + std::abs(run.value));
    double t = std::sqrt(2.0 * drop / std::max(std::abs(curvature), 1e-300));
    t = std::min(t, 0.1 * (1.0 + run.x.norm()));
    Change c;
    c.kind = Change::Kind::StartPoint;
    c.start = run.x + t * direction;
    c.text = "start again from the end point moved " + num(t) + " along the escape direction";
    return c;
}

}  // namespace

std::optional<Finding> ruleSaddleEnd(const RunFacts& facts) {
    const Curvature& c = facts.end;
    if (!c.valid || c.negative == 0 || c.negative == static_cast<int>(c.eigenvalues.size())) return std::nullopt;
    if (!endIsCritical(facts)) return std::nullopt;
    const Run& run = *facts.run;
    Finding f;
    f.id = FindingId::SaddleEnd;
    f.severity = Severity::Problem;
    f.iterations = spanAt(lastRecord(run).iteration);
    const std::vector<Vector> escape = negativeDirections(c);
    f.evidence.push_back(ev("negative_eigenvalues", c.negative, "", "k: Hessian eigenvalues below zero at the end"));
    f.evidence.push_back(ev("smallest_eigenvalue", c.eigenvalues[0], "curvature", "most negative curvature"));
    f.evidence.push_back(ev("largest_eigenvalue", c.eigenvalues[c.eigenvalues.size() - 1], "curvature", "largest curvature"));
    f.evidence.push_back(ev("gradient_norm", run.gradientNorm, "", "|∇f| at the end (small: a critical point)"));
    f.evidence.push_back(ev("value", run.value, "f", "f at the saddle"));
    addDirection(f, "escape", escape.front(), facts.names, "unit direction along which f decreases");
    // Every escape direction of a saddle of index k >= 2 (up to four), each with its curvature.
    const std::size_t shown = std::min<std::size_t>(escape.size(), 4);
    for (std::size_t j = 1; j < shown; ++j) {
        f.evidence.push_back(ev("eigenvalue_" + std::to_string(j + 1), c.eigenvalues[static_cast<Eigen::Index>(j)],
                                "curvature", "negative curvature number " + std::to_string(j + 1)));
        addDirection(f, "escape" + std::to_string(j + 1), escape[j], facts.names,
                     "unit direction of negative curvature number " + std::to_string(j + 1));
    }
    f.mark.point = run.x;
    f.mark.directions = escape;
    std::string others;
    for (std::size_t j = 1; j < shown; ++j)
        others += (j + 1 == shown && j > 1 ? " and " : ", ") + pointList(escape[j], facts.names) + " (curvature " +
                  num(c.eigenvalues[static_cast<Eigen::Index>(j)]) + ")";
    if (escape.size() > shown) others += ", and " + std::to_string(escape.size() - shown) + " more";
    f.message = "The run ended on a saddle point, not a minimum: the Hessian there has " + std::to_string(c.negative) +
                " negative eigenvalue" + (c.negative > 1 ? "s" : "") + " (smallest " + num(c.eigenvalues[0]) +
                "), so f still decreases along " + pointList(escape.front(), facts.names) + others + ".";
    setRemedy(f, escapeRemedy(facts, escape.front(), c.eigenvalues[0]));
    return f;
}

std::optional<Finding> ruleMaximumEnd(const RunFacts& facts) {
    const Curvature& c = facts.end;
    if (!c.valid || c.negative == 0 || c.negative != static_cast<int>(c.eigenvalues.size())) return std::nullopt;
    if (!endIsCritical(facts)) return std::nullopt;
    const Run& run = *facts.run;
    Finding f;
    f.id = FindingId::MaximumEnd;
    f.severity = Severity::Problem;
    f.iterations = spanAt(lastRecord(run).iteration);
    const std::vector<Vector> escape = negativeDirections(c);
    f.evidence.push_back(ev("negative_eigenvalues", c.negative, "", "every eigenvalue is below zero"));
    f.evidence.push_back(ev("smallest_eigenvalue", c.eigenvalues[0], "curvature", "most negative curvature"));
    f.evidence.push_back(ev("largest_eigenvalue", c.eigenvalues[c.eigenvalues.size() - 1], "curvature",
                            "least negative curvature"));
    f.evidence.push_back(ev("gradient_norm", run.gradientNorm, "", "|∇f| at the end (small: a critical point)"));
    f.evidence.push_back(ev("value", run.value, "f", "f at the maximum"));
    addDirection(f, "escape", escape.front(), facts.names, "unit direction of fastest descent by curvature");
    f.mark.point = run.x;
    f.mark.directions = escape;
    f.message = "The run ended on a local maximum: every eigenvalue of the Hessian there is negative (largest " +
                num(c.eigenvalues[c.eigenvalues.size() - 1]) + "), so f decreases in every direction from it.";
    setRemedy(f, escapeRemedy(facts, escape.front(), c.eigenvalues[0]));
    return f;
}

// ---------------------------------------------------------------------------------------
// flat-direction

std::optional<Finding> ruleFlatDirection(const RunFacts& facts) {
    const Curvature& c = facts.end;
    if (!c.valid || c.negative > 0 || c.scaledEigenvalues.size() == 0 || !endIsCritical(facts)) return std::nullopt;
    // Flat in the variables' own units (an eigenvalue ~ 0, as the end-point classification
    // sees it), or flat once the units are taken out (D H D with unit diagonal: a combination of
    // variables that cancels, whatever their scales).
    const double top = c.eigenvalues.cwiseAbs().maxCoeff();
    Eigen::Index plainIndex = 0;
    const double plainRatio = top > 0 ? c.eigenvalues.cwiseAbs().minCoeff(&plainIndex) / top : 0.0;
    const double scaledTop = c.scaledEigenvalues.cwiseAbs().maxCoeff();
    Eigen::Index scaledIndex = 0;
    const double scaledRatio = scaledTop > 0 ? c.scaledEigenvalues.cwiseAbs().minCoeff(&scaledIndex) / scaledTop : 0.0;
    if (!(top > 0)) return std::nullopt;
    // (The plain test also asks the eigenvalue to be small in f's own units: a badly scaled
    // variable, e.g. one near 1e6, has a small eigenvalue relative to the largest but is not flat.)
    const bool plainFlat = plainRatio <= thresholds::kFlatRatio && top * plainRatio <= thresholds::kFlatRatio;
    const bool scaledFlat = scaledRatio <= thresholds::kFlatRatio;
    if (!plainFlat && !scaledFlat) return std::nullopt;
    const Run& run = *facts.run;
    Vector direction;
    if (scaledFlat) {
        // x = D u: a change along the scaled eigenvector is a change D u in x.
        direction = c.jacobiScale.asDiagonal() * c.scaledEigenvectors.col(scaledIndex);
    } else {
        direction = c.eigenvectors.col(plainIndex);
    }
    direction.normalize();
    direction = canonicalSign(direction);
    const double ratio = scaledFlat ? scaledRatio : plainRatio;
    const double curvature = direction.dot(c.hessian * direction);
    Finding f;
    f.id = FindingId::FlatDirection;
    f.severity = facts.isFit ? Severity::Problem : Severity::Note;
    f.iterations = spanAt(lastRecord(run).iteration);
    f.evidence.push_back(ev("eigenvalue_ratio", plainRatio, "", "smallest / largest |eigenvalue| of the Hessian"));
    f.evidence.push_back(ev("scaled_eigenvalue_ratio", scaledRatio, "",
                            "the same for the Hessian scaled to unit diagonal"));
    f.evidence.push_back(ev("curvature_along_direction", curvature, "curvature", "d'Hd along the unit flat direction"));
    f.evidence.push_back(ev("largest_eigenvalue", c.eigenvalues[c.eigenvalues.size() - 1], "curvature",
                            "largest curvature at the end"));
    addDirection(f, "direction", direction, facts.names, "unit direction along which f is flat");
    f.mark.point = run.x;
    f.mark.directions = {direction};
    const std::string combination = combinationText(direction, facts.names);
    if (facts.isFit)
        f.message = "The parameter combination " + combination +
                    " is not determined by the data: moving the parameters together along it leaves the loss flat "
                    "(relative curvature " + num(ratio) + "), so their fitted values along it are arbitrary.";
    else
        f.message = "f is flat at the end along " + pointList(direction, facts.names) + " (relative curvature " +
                    num(ratio) + "): the end point is one of a line or trough of nearly equal values.";
    return f;
}

// ---------------------------------------------------------------------------------------
// narrow-valley

namespace {

struct ZigZag {
    double alternation = kNaN;   // share of successive step pairs whose across-valley parts have opposite signs
    double acrossShare = kNaN;   // median |v's| / |s|: how much of a step crosses the valley
    double medianAngle = kNaN;   // median angle between successive steps
    int pairs = 0;
};

// Zig-zag across a valley whose steep direction is v (the eigenvector of the largest
// eigenvalue where the run is now): successive steps' components along v change sign.
ZigZag measureZigZag(const RunFacts& facts, const Curvature& here) {
    const Run& run = *facts.run;
    ZigZag z;
    const Vector across = here.eigenvectors.col(here.eigenvectors.cols() - 1);
    std::vector<double> angles, shares;
    int alternations = 0;
    const IterationRecord* previous = nullptr;
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i) {
        const IterationRecord& r = run.trace[i];
        if (!hasStep(r) || !r.accepted || !(r.stepNorm > 0) || r.step.size() != across.size()) {
            // A rejected trust-region trial leaves the last real step standing; a missing record
            // (thinned trace) breaks the chain.
            if (r.accepted) previous = nullptr;
            continue;
        }
        const double component = across.dot(r.step);
        shares.push_back(std::abs(component) / r.stepNorm);
        if (previous) {
            const bool adjacent = r.iteration - previous->iteration == 1 || !run.trace[i - 1].accepted;
            if (adjacent) {
                const double c = previous->step.dot(r.step) / (previous->stepNorm * r.stepNorm);
                angles.push_back(std::acos(std::clamp(c, -1.0, 1.0)) * kDegrees);
                if (component * across.dot(previous->step) < 0) ++alternations;
                ++z.pairs;
            }
        }
        previous = &r;
    }
    if (z.pairs > 0) z.alternation = static_cast<double>(alternations) / z.pairs;
    z.acrossShare = median(shares);
    z.medianAngle = median(angles);
    return z;
}

// Median condition number over the window's records; from the Hessian at the last iterate when
// the records carry no spectrum (n above the records' limit, or spectra switched off).
double windowCondition(const RunFacts& facts) {
    const Run& run = *facts.run;
    std::vector<double> conditions;
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i)
        if (std::isfinite(run.trace[i].conditionNumber)) conditions.push_back(run.trace[i].conditionNumber);
    if (!conditions.empty()) return median(conditions);
    const Curvature c = facts.end.valid ? facts.end : curvatureAt(*facts.objective, run.trace.back().x);
    return c.valid ? c.condition : kNaN;
}

}  // namespace

std::optional<Finding> ruleNarrowValley(const RunFacts& facts) {
    if (facts.stepsInWindow < thresholds::kMinWindow) return std::nullopt;
    const RateEstimate& rate = facts.rate;
    // Slow but converging: a factor of 1 or more is no valley's crawl (the run is not getting
    // anywhere, or is blowing up, which divergence and stagnation name).
    if (!(rate.factor >= thresholds::kSlowRate) || !(rate.factor < 1)) return std::nullopt;
    if (rate.kind == RateEstimate::Kind::Quadratic || rate.kind == RateEstimate::Kind::Superlinear) return std::nullopt;
    const Run& run = *facts.run;
    // A valley has a floor: the curvature where the run is now must be positive definite, and
    // ill-conditioned.
    const Curvature here = facts.end.valid ? facts.end : curvatureAt(*facts.objective, run.trace.back().x);
    if (!here.valid || here.negative > 0 || here.zero > 0 || !(here.condition >= thresholds::kValleyCondition))
        return std::nullopt;
    const ZigZag z = measureZigZag(facts, here);
    if (z.pairs < thresholds::kMinWindow / 2 || !(z.alternation >= thresholds::kZigZagAlternation)) return std::nullopt;
    const double condition = windowCondition(facts);
    Finding f;
    f.id = FindingId::NarrowValley;
    f.severity = facts.healthyEnd ? Severity::Note : Severity::Problem;
    f.iterations = windowSpan(facts);
    const double kappa = std::isfinite(condition) ? condition : here.condition;
    const double bound = (kappa - 1) / (kappa + 1);
    f.evidence.push_back(ev("condition_number", kappa, "", "median Hessian condition number over the window"));
    f.evidence.push_back(ev("zig_zag_fraction", z.alternation, "",
                            "share of successive steps that cross the valley in opposite directions"));
    f.evidence.push_back(ev("across_share", z.acrossShare, "", "median share of a step spent crossing the valley"));
    f.evidence.push_back(ev("median_step_angle", z.medianAngle, "degrees", "median turn between successive steps"));
    f.evidence.push_back(ev("rate", rate.factor, "per iteration", "observed factor of the gradient norm"));
    f.evidence.push_back(ev("steepest_descent_bound", bound, "per iteration",
                            "(k-1)/(k+1): steepest descent's worst factor at this conditioning"));
    f.evidence.push_back(ev("window_iterations", rate.last - rate.first, "iterations", "iterations the rate is measured over"));
    // The valley floor: the eigenvector of the smallest eigenvalue where the run is now.
    f.mark.point = run.trace.back().x;
    f.mark.directions = {canonicalSign(here.eigenvectors.col(0))};
    const double perDecade = rate.factor < 1 ? std::log(0.1) / std::log(rate.factor) : kNaN;
    f.message = "The run zig-zags across a narrow valley: the curvature across it is about " + ratioText(kappa) +
                " times that along it, " + countText(100 * z.alternation) +
                " % of successive steps cross it in opposite directions, and the gradient norm shrinks only by a factor " +
                factorText(rate.factor) + " per iteration" +
                (std::isfinite(perDecade) ? " (" + countText(std::ceil(perDecade)) + " iterations per decade)" : std::string()) + ".";
    const solve::MethodInfo* info = solve::findMethod(run.methodId);
    if (info && !info->needsHessian && run.methodId != "bfgs" && run.methodId != "lbfgs")
        setRemedy(f, switchMethod(facts, {"bfgs"}, "it learns the valley's curvature from successive gradients"));
    else
        setRemedy(f, switchMethod(facts, {"trust-region-exact"}, "it uses the exact curvature"));
    return f;
}

// ---------------------------------------------------------------------------------------
// poor-scaling

std::optional<Finding> rulePoorScaling(const RunFacts& facts) {
    const Run& run = *facts.run;
    if (run.trace.empty()) return std::nullopt;
    // Hurt: did not converge, or got there only at a slow linear rate.
    const bool slow = (facts.rate.kind == RateEstimate::Kind::Linear || facts.rate.kind == RateEstimate::Kind::Sublinear) &&
                      facts.rate.factor >= thresholds::kSlowRate;
    const bool converged = solve::isConvergence(run.termination) && endIsCritical(facts);
    if (!facts.finished || (converged && !slow)) return std::nullopt;
    // The diagonal where the run ended (or started, when the end is not usable).
    Curvature c = facts.end;
    if (!c.valid) c = curvatureAt(*facts.objective, run.trace.front().x);
    if (!c.valid) return std::nullopt;
    const Vector diagonal = c.hessian.diagonal();
    if ((diagonal.array() <= 0).any()) return std::nullopt;
    const double spread = diagonal.maxCoeff() / diagonal.minCoeff();
    if (!(spread >= thresholds::kScalingSpread)) return std::nullopt;
    if (!(c.condition >= thresholds::kScalingGain * c.scaledCondition)) return std::nullopt;
    Finding f;
    f.id = FindingId::PoorScaling;
    f.severity = facts.healthyEnd ? Severity::Note : Severity::Problem;
    f.iterations = windowSpan(facts);
    Eigen::Index flattest = 0, steepest = 0;
    diagonal.minCoeff(&flattest);
    diagonal.maxCoeff(&steepest);
    f.evidence.push_back(ev("diagonal_spread", spread, "", "largest / smallest diagonal entry of the Hessian"));
    f.evidence.push_back(ev("condition_number", c.condition, "", "Hessian condition number"));
    f.evidence.push_back(ev("scaled_condition_number", c.scaledCondition, "", "condition number after diagonal scaling"));
    // Factors: powers of ten near diag(H)^-1/2, so the scaled diagonal lies within [0.1, 10].
    Change change;
    change.kind = Change::Kind::RescaleVariables;
    change.scale.resize(diagonal.size());
    std::string factors;
    for (Eigen::Index i = 0; i < diagonal.size(); ++i) {
        change.scale[i] = std::pow(10.0, std::round(-0.5 * std::log10(diagonal[i])));
        factors += (i ? ", " : "") + variableName(facts.names, i) + " = " + num(change.scale[i], 3) + " u" +
                   std::to_string(i + 1);
        f.evidence.push_back(ev("scale_" + variableName(facts.names, i), change.scale[i], "",
                                "rescaling factor: this variable in units of this size"));
    }
    change.text = "rescale the variables: " + factors;
    f.remedy = Remedy{change, std::nullopt};
    f.mark.point = run.trace.back().x;
    f.message = "The variables are on very different scales: the curvature along " + variableName(facts.names, steepest) +
                " is " + ratioText(spread) + " times that along " + variableName(facts.names, flattest) +
                ", which alone raises the Hessian's condition number to " + ratioText(c.condition) + " from " +
                num(c.scaledCondition, 2) + " in rescaled variables.";
    return f;
}

// ---------------------------------------------------------------------------------------
// uphill-newton

std::optional<Finding> ruleUphillNewton(const RunFacts& facts) {
    const Run& run = *facts.run;
    std::vector<int> uphill;
    const IterationRecord* first = nullptr;
    double firstSlope = kNaN;
    for (const IterationRecord& r : run.trace) {
        if (r.stepKind != StepKind::Newton || !hasStep(r) || r.gradient.size() != r.step.size()) continue;
        const double slope = r.gradient.dot(r.step);
        if (!(slope > 0)) continue;
        uphill.push_back(r.iteration);
        if (!first) {
            first = &r;
            firstSlope = slope;
        }
    }
    if (!first) return std::nullopt;
    Finding f;
    f.id = FindingId::UphillNewton;
    f.severity = facts.healthyEnd ? Severity::Note : Severity::Problem;
    f.iterations.first = uphill.front();
    f.iterations.last = uphill.back();
    f.iterations.focus = uphill.front();
    f.iterations.notable = uphill;
    double smallest = kNaN;
    if (first->hessianEigenvalues.size() > 0) {
        smallest = first->hessianEigenvalues[0];
    } else {
        const Curvature c = curvatureAt(*facts.objective, first->x);
        if (c.valid) smallest = c.eigenvalues[0];
    }
    f.evidence.push_back(ev("uphill_steps", static_cast<double>(uphill.size()), "steps", "Newton steps with g'p > 0"));
    f.evidence.push_back(ev("first_iteration", first->iteration, "iteration", "the first uphill step"));
    f.evidence.push_back(ev("directional_derivative", firstSlope, "", "g'p of the first uphill step (> 0: uphill)"));
    f.evidence.push_back(ev("angle_to_steepest_descent", first->angleToSteepestDescent(), "degrees",
                            "above 90: the step points uphill"));
    f.evidence.push_back(ev("smallest_eigenvalue", smallest, "curvature", "at the first uphill step (< 0: indefinite)"));
    f.mark.point = first->x;
    if (first->stepNorm > 0) f.mark.directions = {first->step / first->stepNorm};
    f.message = "At iteration " + std::to_string(first->iteration) +
                " the Newton step pointed uphill (" + num(first->angleToSteepestDescent(), 3) +
                " degrees from steepest descent) because the Hessian there is indefinite (smallest eigenvalue " +
                num(smallest) + "); " +
                (uphill.size() > 1 ? std::to_string(uphill.size()) + " steps in all went uphill."
                                   : "pure Newton heads for any critical point of its model, saddles included.");
    setRemedy(f, switchMethod(facts, {"saddle-free-newton", "trust-region-exact"}, "it turns negative curvature into descent"));
    return f;
}

// ---------------------------------------------------------------------------------------
// line-search-collapse

std::optional<Finding> ruleLineSearchCollapse(const RunFacts& facts) {
    const Run& run = *facts.run;
    const bool failed = run.termination == Termination::LineSearchFailed;
    if (!failed && (facts.healthyEnd || !facts.finished)) return std::nullopt;
    std::vector<double> alphas;
    for (const IterationRecord& r : run.trace)
        if (!r.trials.empty() && std::isfinite(r.stepLength) && r.stepLength > 0) alphas.push_back(r.stepLength);
    int manyTrials = 0, mostTrials = 0, searches = 0;
    const IterationRecord* lastSearch = nullptr;
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i) {
        const IterationRecord& r = run.trace[i];
        if (r.trials.empty()) continue;
        ++searches;
        lastSearch = &r;
        const int trials = static_cast<int>(r.trials.size());
        mostTrials = std::max(mostTrials, trials);
        if (trials >= thresholds::kManyTrials) ++manyTrials;
    }
    const double typical = median(alphas);
    const double lastAlpha = lastSearch ? lastSearch->stepLength : kNaN;
    const bool collapsed = manyTrials >= thresholds::kCollapsedSearches && std::isfinite(lastAlpha) &&
                           lastAlpha <= thresholds::kCollapsedStep * typical;
    if (!failed && !collapsed) return std::nullopt;
    Finding f;
    f.id = FindingId::LineSearchCollapse;
    f.severity = Severity::Problem;
    f.iterations = windowSpan(facts, lastSearch ? lastSearch->iteration : -1);
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i)
        if (static_cast<int>(run.trace[i].trials.size()) >= thresholds::kManyTrials)
            f.iterations.notable.push_back(run.trace[i].iteration);
    f.evidence.push_back(ev("searches_with_many_trials", manyTrials, "searches",
                            "line searches in the window with >= " + std::to_string(thresholds::kManyTrials) + " trials"));
    f.evidence.push_back(ev("most_trials", mostTrials, "trials", "the most trials one search needed"));
    f.evidence.push_back(ev("last_step_length", lastAlpha, "", "alpha accepted by the last search"));
    f.evidence.push_back(ev("median_step_length", typical, "", "median accepted alpha over the run"));
    if (lastSearch)
        f.evidence.push_back(ev("angle_to_steepest_descent", lastSearch->angleToSteepestDescent(), "degrees",
                                "near 90: the direction barely descends"));
    if (lastSearch) {
        f.mark.point = lastSearch->x;
        if (lastSearch->stepNorm > 0) f.mark.directions = {lastSearch->step / lastSearch->stepNorm};
    }
    const Vector& where = lastSearch ? lastSearch->x : run.trace.back().x;
    if (looksLikeKinkMinimum(*facts.objective, where)) {
        f.severity = Severity::Note;
        f.message = std::string(failed ? "The line search gave up" : "The line searches collapsed") +
                    " (alpha down to " + num(lastAlpha) + ", up to " + std::to_string(mostTrials) +
                    " trials per search) at a point where f rises in every direction tried: it looks like the minimum "
                    "of a non-smooth objective (a kink from abs, min or max), where the gradient never becomes small.";
        return f;
    }
    // Trials whose f was not finite: the search backed off from overflow or from outside the
    // objective's domain, not from a kink.
    int nonFiniteTrials = 0, lastTrials = 0;
    if (lastSearch)
        for (const solve::LineSearchTrial& t : lastSearch->trials) {
            ++lastTrials;
            nonFiniteTrials += !std::isfinite(t.value);
        }
    if (lastTrials > 0)
        f.evidence.push_back(ev("non_finite_trials", nonFiniteTrials, "trials",
                                "trials of the last search where f was not finite"));
    const std::string gave = failed ? "The line search gave up" : "The line searches collapsed";
    if (lastTrials > 0 && nonFiniteTrials * 2 >= lastTrials) {
        const double g = lastSearch->gradientNorm;
        f.message = gave + ": " + std::to_string(nonFiniteTrials) + " of the last search's " + std::to_string(lastTrials) +
                    " trial points gave a value that is not finite (|∇f| = " + num(g) +
                    " there), so the steps overflow f or leave the region where it is defined; the scale of the "
                    "objective or its variables, not a kink, stops the run.";
    } else if (alphas.empty()) {
        f.message = gave + " before any step was accepted: no step length along the first direction lowered f enough "
                    "in " + std::to_string(mostTrials) + " trials; a kink (abs, min, max) at the start, a wrong gradient "
                    "or rounding usually causes this.";
    } else {
        f.message = gave + ": steps shrank to alpha = " + num(lastAlpha) + " (median " + num(typical) + ") with up to " +
                    std::to_string(mostTrials) +
                    " trials per search, so f hardly falls along the chosen directions; a kink (abs, min, max) or "
                    "rounding usually causes this.";
    }
    const bool kink = lastSearch && lastSearch->stepNorm > 0 && kinkAcross(*facts.objective, where, lastSearch->step);
    const solve::MethodInfo* info = solve::findMethod(run.methodId);
    if (kink || (info && info->family == "trust-region"))
        setRemedy(f, switchMethod(facts, {"nelder-mead"}, "f has a kink here and it needs no derivatives"));
    else
        setRemedy(f, switchMethod(facts, {"trust-region-exact", "nelder-mead"}, "no line search: the region adapts"));
    return f;
}

// ---------------------------------------------------------------------------------------
// radius-collapse

std::optional<Finding> ruleRadiusCollapse(const RunFacts& facts) {
    const Run& run = *facts.run;
    const bool collapsedEnd = run.termination == Termination::TrustRegionCollapsed;
    if (!collapsedEnd && (facts.healthyEnd || !facts.finished)) return std::nullopt;
    // The radius, or 1/sigma for cubic regularisation (its region's size).
    auto radiusOf = [](const IterationRecord& r) {
        if (std::isfinite(r.trustRadius)) return r.trustRadius;
        if (r.dampingName == "sigma" && r.damping > 0) return 1.0 / r.damping;
        return kNaN;
    };
    double largest = 0, last = kNaN, lastRatio = kNaN;
    int lastIteration = -1;
    for (const IterationRecord& r : run.trace) {
        const double radius = radiusOf(r);
        if (!std::isfinite(radius)) continue;
        largest = std::max(largest, radius);
        last = radius;
        lastRatio = r.ratio;
        lastIteration = r.iteration;
    }
    if (!std::isfinite(last)) return std::nullopt;
    int rejected = 0, steps = 0;
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i) {
        if (!hasStep(run.trace[i])) continue;
        ++steps;
        if (!run.trace[i].accepted) ++rejected;
    }
    const bool shrunk = last <= thresholds::kRadiusShrink * largest && steps > 0 && 2 * rejected >= steps;
    if (!collapsedEnd && !shrunk) return std::nullopt;
    Finding f;
    f.id = FindingId::RadiusCollapse;
    f.severity = Severity::Problem;
    f.iterations = windowSpan(facts, lastIteration);
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i)
        if (hasStep(run.trace[i]) && !run.trace[i].accepted) f.iterations.notable.push_back(run.trace[i].iteration);
    f.evidence.push_back(ev("last_radius", last, "", "trust radius at the end"));
    f.evidence.push_back(ev("largest_radius", largest, "", "largest trust radius in the run"));
    f.evidence.push_back(ev("rejected_steps", rejected, "steps", "rejected steps in the window"));
    f.evidence.push_back(ev("window_steps", steps, "steps", "steps in the window"));
    f.evidence.push_back(ev("last_ratio", lastRatio, "", "actual / predicted decrease of the last step"));
    f.mark.point = run.trace.back().x;
    if (looksLikeKinkMinimum(*facts.objective, run.trace.back().x)) {
        f.severity = Severity::Note;
        f.message = "The trust region shrank to " + num(last) + " (largest " + num(largest) +
                    ") at a point where f rises in every direction tried: it looks like the minimum of a non-smooth "
                    "objective (a kink from abs, min or max), where the quadratic model cannot fit f.";
        return f;
    }
    f.message = "The trust region shrank to " + num(last) + " (largest " + num(largest) + "): " + std::to_string(rejected) +
                " of the last " + std::to_string(steps) +
                " steps were rejected because f did not fall as the quadratic model predicted (last ratio " +
                num(lastRatio) + "), which points to a kink in the objective or a poor curvature model.";
    if (run.methodId == "sr1")
        setRemedy(f, switchMethod(facts, {"trust-region-exact"}, "the exact Hessian instead of an SR1 model"));
    else
        setRemedy(f, switchMethod(facts, {"nelder-mead"}, "it relies on no model of f"));
    return f;
}

// ---------------------------------------------------------------------------------------
// divergence

std::optional<Finding> ruleDivergence(const RunFacts& facts) {
    const Run& run = *facts.run;
    if (run.trace.size() < 2) return std::nullopt;
    // A run that converged to a proper (non-degenerate) minimum did not diverge, however far it went.
    if (facts.healthyEnd && run.endPoint.kind == PointKind::Minimum) return std::nullopt;
    const IterationRecord& first = run.trace.front();
    // The last record with finite numbers (a run may end on a non-finite one).
    const IterationRecord* last = nullptr;
    for (auto it = run.trace.rbegin(); it != run.trace.rend(); ++it)
        if (std::isfinite(it->value) && it->x.allFinite()) {
            last = &*it;
            break;
        }
    if (!last || last == &first) return std::nullopt;
    double fMin = first.value;
    for (const IterationRecord& r : run.trace)
        if (std::isfinite(r.value)) fMin = std::min(fMin, r.value);
    const double x0 = first.x.norm(), x1 = last->x.norm();

    // Over the window: in how many moves did |x| grow, and did f rise?
    int moves = 0, grew = 0, fRose = 0;
    const IterationRecord* previous = nullptr;
    const IterationRecord* windowFirst = nullptr;
    std::vector<const IterationRecord*> finite;
    for (std::size_t i = facts.windowBegin; i < run.trace.size(); ++i) {
        const IterationRecord& r = run.trace[i];
        if (!std::isfinite(r.value) || !r.x.allFinite()) continue;
        if (!windowFirst) windowFirst = &r;
        finite.push_back(&r);
        if (previous && r.x != previous->x) {
            ++moves;
            if (r.x.norm() > previous->x.norm()) ++grew;
            if (r.value > previous->value) ++fRose;
        }
        previous = &r;
    }
    const bool nonFiniteEnd = run.termination == Termination::NonFinite;
    const bool blewUp = last->value >= fMin + thresholds::kBlowUp * (1.0 + std::abs(fMin)) &&
                        (nonFiniteEnd || (moves > 0 && fRose >= thresholds::kDriftMonotone * moves));
    const bool xGrowing = moves >= thresholds::kMinWindow / 2 && grew >= thresholds::kDriftMonotone * moves;
    const bool farOut = x1 - x0 >= thresholds::kDriftGrowth * (1.0 + x0);
    // A drift to infinity levels off: the curvature along the drift fades (an asymptote) or is
    // nil (a slope that never ends). A crawl toward a far minimum keeps its curvature.
    // The drift's direction from the window's second half (early steps may still be settling
    // other variables).
    bool flatAlongDrift = false;
    Vector drift;
    const IterationRecord* middle = finite.empty() ? nullptr : finite[finite.size() / 2];
    if (windowFirst && middle && last->x != middle->x) {
        drift = (last->x - middle->x).normalized();
        const Curvature atEnd = curvatureAt(*facts.objective, last->x);
        const Curvature atStart = curvatureAt(*facts.objective, windowFirst->x);
        if (atEnd.valid && atStart.valid) {
            const double endCurvature = drift.dot(atEnd.hessian * drift);
            const double startCurvature = drift.dot(atStart.hessian * drift);
            // Nil to rounding (relative to the largest curvature), or faded since the window began.
            const double nil = 64 * std::numeric_limits<double>::epsilon() *
                               std::max(1.0, atEnd.eigenvalues.cwiseAbs().maxCoeff());
            flatAlongDrift = std::abs(endCurvature) <= nil ||
                             std::abs(endCurvature) <= thresholds::kDriftFading * std::abs(startCurvature);
            // Other variables may still oscillate across the drift: judge by the end Hessian's
            // eigenvector closest to it (|cos| >= 0.9).
            for (Eigen::Index i = 0; i < atEnd.eigenvalues.size() && !flatAlongDrift; ++i) {
                const Vector v = atEnd.eigenvectors.col(i);
                if (std::abs(v.dot(drift)) < 0.9) continue;
                const double there = std::abs(atEnd.eigenvalues[i]), before = std::abs(v.dot(atStart.hessian * v));
                flatAlongDrift = there <= nil || there <= thresholds::kDriftFading * before;
            }
        }
    }
    const bool drifted = farOut && ((xGrowing && flatAlongDrift) || nonFiniteEnd);
    if (!blewUp && !drifted) return std::nullopt;

    Finding f;
    f.id = FindingId::Divergence;
    f.severity = Severity::Problem;
    f.iterations = windowSpan(facts, last->iteration);
    f.evidence.push_back(ev("x_norm_start", x0, "", "|x| at the start"));
    f.evidence.push_back(ev("x_norm_end", x1, "", "|x| at the last finite iterate"));
    f.evidence.push_back(ev("value_start", first.value, "f", "f at the start"));
    f.evidence.push_back(ev("value_end", last->value, "f", "f at the last finite iterate"));
    const int span = windowFirst ? last->iteration - windowFirst->iteration : 0;
    if (span > 0) {
        f.evidence.push_back(ev("x_growth_per_iteration", (x1 - windowFirst->x.norm()) / span, "per iteration",
                                "how fast |x| grows over the window"));
        f.evidence.push_back(ev("value_change_per_iteration", (last->value - windowFirst->value) / span,
                                "f per iteration", "how fast f changes over the window"));
    }
    f.mark.point = last->x;
    if (drift.size() > 0) f.mark.directions = {drift};
    if (blewUp) {
        f.message = "The run diverged: f grew from " + num(fMin) + " to " + num(last->value) +
                    ", so the steps are too long for the curvature here and each one overshoots further.";
        if (fixedStepMethod(facts)) {
            Change c;
            c.kind = Change::Kind::SetOptions;
            const auto it = facts.setup->options.find("step_size");
            const double current = it != facts.setup->options.end() ? optionValue(it->second, 1e-3) : 1e-3;
            c.options["step_size"] = solve::shortNumber(current / 10, 6);
            c.text = "take a step size ten times smaller (step_size = " + c.options["step_size"] + ")";
            f.remedy = Remedy{c, std::nullopt};
        } else {
            setRemedy(f, switchMethod(facts, {"trust-region-exact"}, "its steps stay where the model is trusted"));
        }
        return f;
    }
    // Does f still fall as fast at the end of the window as at its start (a slope without end)?
    bool steadyFall = false;
    if (finite.size() >= 4) {
        const std::size_t half = finite.size() / 2;
        const double early = (finite[half]->value - finite.front()->value) /
                             std::max(1, finite[half]->iteration - finite.front()->iteration);
        const double late = (finite.back()->value - finite[half]->value) /
                            std::max(1, finite.back()->iteration - finite[half]->iteration);
        steadyFall = early < 0 && late <= 0.5 * early;
    }
    if (steadyFall)
        f.message = "f keeps falling at a steady rate as the variables run off to infinity (|x| from " + num(x0) + " to " +
                    num(x1) + ", f from " + num(first.value) + " to " + num(last->value) +
                    "): the objective has no minimum in that direction; bound the variables or check the model.";
    else
        f.message = "The variables drift off to infinity (|x| from " + num(x0) + " to " + num(x1) +
                    ") while f levels off at " + num(last->value) +
                    ": the objective approaches an asymptote along a flat valley instead of having a minimum there.";
    return f;
}

// ---------------------------------------------------------------------------------------
// stagnation

std::optional<Finding> ruleStagnation(const RunFacts& facts) {
    const Run& run = *facts.run;
    if (!facts.finished || run.trace.empty() || endIsCritical(facts)) return std::nullopt;
    if (run.termination == Termination::Failed || run.termination == Termination::NonFinite ||
        run.termination == Termination::StoppedByCaller)
        return std::nullopt;
    const IterationRecord& last = run.trace.back();
    const Progress p = windowProgress(facts);
    const double scale = 1.0 + std::abs(last.value);
    const bool flat = p.span >= thresholds::kMinWindow && p.fall <= thresholds::kStagnantChange * scale;
    const bool stoppedOnTolerance = run.termination == Termination::StepTolerance ||
                                    run.termination == Termination::FunctionTolerance;
    if (!flat && !stoppedOnTolerance) return std::nullopt;
    const bool kinkMinimum = looksLikeKinkMinimum(*facts.objective, last.x);
    Finding f;
    f.id = FindingId::Stagnation;
    f.severity = kinkMinimum ? Severity::Note : Severity::Problem;
    f.iterations = windowSpan(facts);
    f.evidence.push_back(ev("value_fall", p.fall / scale, "relative",
                            "how much the best f fell between the window's halves, / (1 + |f|)"));
    f.evidence.push_back(ev("window_iterations", p.span, "iterations", "iterations in the window"));
    f.evidence.push_back(ev("gradient_norm", last.gradientNorm, "", "|∇f| at the end"));
    f.evidence.push_back(ev("relative_gradient", last.gradientNorm / scale, "",
                            "|∇f| / (1 + |f|); above " + num(relativeGradientSmall(facts)) + " is not small"));
    f.evidence.push_back(ev("kink_minimum", kinkMinimum ? 1 : 0, "", "1: f rises in every direction tried from the end"));
    f.mark.point = last.x;
    if (last.gradientNorm > 0 && last.gradient.size() == last.x.size())
        f.mark.directions = {-last.gradient / last.gradientNorm};
    const std::string how = stoppedOnTolerance && !flat
                                ? "The run stopped on its " + std::string(solve::toString(run.termination)) +
                                      " test although the gradient norm is still " + num(last.gradientNorm)
                                : "f has not fallen over the last " + std::to_string(p.span) +
                                      " iterations although the gradient norm is still " + num(last.gradientNorm);
    if (kinkMinimum) {
        f.message = how + ", but f rises in every direction tried from the end: it looks like the minimum of a "
                          "non-smooth objective (a kink from abs, min or max), where the gradient never becomes small.";
        return f;
    }
    f.message = how + ": the run is stuck, not converged.";
    const bool kink = last.gradientNorm > 0 && kinkAcross(*facts.objective, last.x, -last.gradient / last.gradientNorm);
    if (kink)
        setRemedy(f, switchMethod(facts, {"nelder-mead"}, "f has a kink here and it needs no derivatives"));
    else if (!methodIs(facts, {"trust-region-exact"}))
        setRemedy(f, switchMethod(facts, {"trust-region-exact"}, "exact curvature and an adaptive step"));
    else
        setRemedy(f, switchMethod(facts, {"nelder-mead"}, "it relies on no model of f"));
    return f;
}

// ---------------------------------------------------------------------------------------
// budget-exhausted

std::optional<Finding> ruleBudgetExhausted(const RunFacts& facts) {
    const Run& run = *facts.run;
    if (run.termination != Termination::IterationLimit && run.termination != Termination::EvaluationLimit)
        return std::nullopt;
    if (run.trace.empty()) return std::nullopt;
    const IterationRecord& last = run.trace.back();
    const Progress p = windowProgress(facts);
    // Progress: the best f still falls, or the gradient norm still shrinks.
    const bool progressing = p.fall > thresholds::kProgress * (1.0 + std::abs(last.value)) ||
                             facts.rate.factor < thresholds::kSublinearFactor;
    const solve::StoppingRules& rules = facts.setup->rules;
    double target = std::max(rules.gradientTolerance, rules.relativeGradientTolerance * run.trace.front().gradientNorm);
    if (!(target > 0)) target = 1e-8 * run.trace.front().gradientNorm;  // least-squares methods stop on their own tests
    const double more = facts.rate.iterationsToReach(last.gradientNorm, target);
    const bool limitIsIterations = run.termination == Termination::IterationLimit;

    Finding f;
    f.id = FindingId::BudgetExhausted;
    f.severity = Severity::Problem;
    f.iterations = windowSpan(facts);
    f.evidence.push_back(ev("iterations", run.iterations(), "iterations", "iterations done"));
    f.evidence.push_back(ev("value_fall", p.fall, "f", "how much the best f fell between the window's halves"));
    f.evidence.push_back(ev("gradient_norm", last.gradientNorm, "", "|∇f| at the end"));
    f.evidence.push_back(ev("gradient_target", target, "", "the gradient norm the stopping rules ask for"));
    f.evidence.push_back(ev("rate", facts.rate.factor, "per iteration", "observed factor of the gradient norm"));
    f.evidence.push_back(ev("more_iterations", more, "iterations", "estimated iterations still needed at that rate"));
    f.evidence.push_back(ev("progressing", progressing ? 1 : 0, "", "1: f or the gradient norm still improving"));
    f.mark.point = last.x;
    const std::string limit = limitIsIterations ? "iteration limit (" + std::to_string(rules.maxIterations) + ")"
                                                : "evaluation limit (" + std::to_string(rules.maxEvaluations) + ")";
    if (!progressing)
        f.message = "The run stopped at the " + limit + " without progress over its last " + std::to_string(p.span) +
                    " iterations: neither f nor the gradient norm (" + num(last.gradientNorm) + ") improved.";
    else if (std::isfinite(more))
        f.message = "The run stopped at the " + limit + " while still making progress: at the observed rate (factor " +
                    factorText(facts.rate.factor) + " per iteration) it needs about " + countText(std::ceil(more)) +
                    " more iterations to bring the gradient norm from " + num(last.gradientNorm) + " to " + num(target) + ".";
    else
        f.message = "The run stopped at the " + limit + " while f was still falling, but the gradient norm (" +
                    num(last.gradientNorm) + ") is not shrinking, so more iterations alone would not bring it to " +
                    num(target) + ".";
    const double room = thresholds::kMaxRaise * std::max(1, run.iterations());
    if (progressing && limitIsIterations && std::isfinite(more) && more <= room) {
        Change c;
        c.kind = Change::Kind::RaiseIterationLimit;
        const double wanted = std::ceil(1.25 * (run.iterations() + more));
        c.maxIterations = static_cast<int>(std::min<double>(thresholds::kRaiseCap, std::max(wanted, run.iterations() + 10.0)));
        c.text = "raise the iteration limit to " + std::to_string(c.maxIterations);
        f.remedy = Remedy{c, std::nullopt};
    } else {
        const solve::MethodInfo* info = solve::findMethod(run.methodId);
        if (info && !info->needsHessian && run.methodId != "bfgs")
            setRemedy(f, switchMethod(facts, {"bfgs"}, "a faster rate than this method's"));
        else
            setRemedy(f, switchMethod(facts, {"trust-region-exact"}, "a faster rate than this method's"));
    }
    return f;
}

// ---------------------------------------------------------------------------------------
// convergence-rate (a note)

std::optional<Finding> ruleConvergenceRate(const RunFacts& facts) {
    const RateEstimate& rate = facts.rate;
    if (!facts.finished || rate.kind == RateEstimate::Kind::Unknown) return std::nullopt;
    Finding f;
    f.id = FindingId::ConvergenceRate;
    f.severity = Severity::Note;
    f.iterations = {rate.first, rate.last, rate.last, {}};
    // The order estimate is evidence only where it is credible and agrees with the verdict (a
    // linear or stalled run has no order to speak of; a superlinear one's estimate may be noise
    // outside [kSuperlinearOrder, kMostCredibleOrder], and the message then leaves it out too).
    const bool credibleOrder =
        std::isfinite(rate.order) &&
        (rate.kind == RateEstimate::Kind::Quadratic ||
         (rate.kind == RateEstimate::Kind::Superlinear && rate.order >= thresholds::kSuperlinearOrder &&
          rate.order <= thresholds::kMostCredibleOrder));
    if (credibleOrder)
        f.evidence.push_back(ev("order", rate.order, "", "estimated order q (ACOC, Cordero & Torregrosa 2007)"));
    f.evidence.push_back(ev("factor", rate.factor, "per iteration", "gradient-norm factor over the window"));
    f.evidence.push_back(ev("window_iterations", rate.last - rate.first, "iterations", "iterations measured"));
    switch (rate.kind) {
        case RateEstimate::Kind::Quadratic:
            f.message = std::string("The last iterations converged ") +
                        (rate.order > 2.5 ? "quadratically or faster" : "quadratically") + " (estimated order " +
                        num(rate.order, 2) + "): the error roughly squared at each step.";
            break;
        case RateEstimate::Kind::Superlinear:
            f.message = "The last iterations converged superlinearly" +
                        (rate.order >= thresholds::kSuperlinearOrder && rate.order <= thresholds::kMostCredibleOrder
                             ? " (estimated order " + num(rate.order, 2) + ")"
                             : std::string()) +
                        ": the gradient norm fell by ever larger factors.";
            break;
        case RateEstimate::Kind::Linear: {
            const double perDecade = std::log(0.1) / std::log(rate.factor);
            f.message = "The last iterations converged linearly: the gradient norm shrank by a factor " +
                        factorText(rate.factor) + " per iteration, about " + countText(std::ceil(perDecade)) +
                        " iterations per decade.";
            break;
        }
        case RateEstimate::Kind::Sublinear:
            f.message = "Over the last " + std::to_string(rate.last - rate.first) +
                        " iterations the gradient norm did not shrink (factor " + factorText(rate.factor) +
                        " per iteration): no convergence rate to speak of.";
            break;
        case RateEstimate::Kind::Unknown: break;
    }
    return f;
}

}  // namespace sw::diagnose
