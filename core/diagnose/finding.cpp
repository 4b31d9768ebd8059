#include "core/diagnose/finding.h"

#include <algorithm>
#include <cmath>

namespace sw::diagnose {

const char* toString(FindingId id) {
    switch (id) {
        case FindingId::SaddleEnd: return "saddle-end";
        case FindingId::MaximumEnd: return "maximum-end";
        case FindingId::FlatDirection: return "flat-direction";
        case FindingId::NarrowValley: return "narrow-valley";
        case FindingId::PoorScaling: return "poor-scaling";
        case FindingId::UphillNewton: return "uphill-newton";
        case FindingId::LineSearchCollapse: return "line-search-collapse";
        case FindingId::RadiusCollapse: return "radius-collapse";
        case FindingId::Stagnation: return "stagnation";
        case FindingId::Divergence: return "divergence";
        case FindingId::NonFinite: return "non-finite";
        case FindingId::BudgetExhausted: return "budget-exhausted";
        case FindingId::MethodFailed: return "method-failed";
        case FindingId::ConvergenceRate: return "convergence-rate";
    }
    // Unreachable for a valid enum value; a corrupted value still gets a known id.
    return "method-failed";
}

const std::vector<FindingId>& allFindingIds() {
    static const std::vector<FindingId> ids = [] {
        std::vector<FindingId> list;
        for (int i = 0; i < kFindingIdCount; ++i) list.push_back(static_cast<FindingId>(i));
        return list;
    }();
    return ids;
}

const FindingInfo& describe(FindingId id) {
    static const std::vector<FindingInfo> table = {
        {FindingId::SaddleEnd, "ended on a saddle",
         "The end is a critical point (|g| <= max(1e-4, sqrt(gtol)) (1 + |f|)) whose Hessian has k >= 1 negative "
         "eigenvalues and at least one positive one (an eigenvalue counts as zero within 1e-8 max(1, max|lambda|)).",
         "second-order necessary condition for a minimum: Nocedal & Wright (2006), Theorem 2.3"},
        {FindingId::MaximumEnd, "ended on a maximum",
         "The end is a critical point whose Hessian eigenvalues are all negative.",
         "second-order sufficient condition for a maximum: Nocedal & Wright (2006), Theorem 2.4 applied to -f"},
        {FindingId::FlatDirection, "a flat direction at the end",
         "At a critical end with no negative eigenvalue, the Jacobi-scaled Hessian D H D (unit diagonal) has "
         "smallest/largest eigenvalue <= 1e-8, or the Hessian's smallest |eigenvalue| is <= 1e-8 max(1, largest) and "
         "<= 1e-8. A problem for data fits (a parameter combination not determined by the data), a note otherwise.",
         "common practice (sqrt(eps) relative rank tolerance), no published source"},
        {FindingId::NarrowValley, "zig-zag in a narrow valley",
         "The Hessian at the last iterate is positive definite with condition number >= 100; over the last 30 records "
         ">= 60 % of successive steps cross the valley (the steep eigenvector) in opposite directions; gradient-norm "
         "factor per iteration >= 0.9 (not superlinear).",
         "steepest descent's linear rate ((k-1)/(k+1))^2: Nocedal & Wright (2006), Theorem 3.3; thresholds common "
         "practice, no published source"},
        {FindingId::PoorScaling, "variables on very different scales",
         "The run did not converge or converged at a factor >= 0.9; the Hessian's diagonal spans >= 1e4, and diagonal "
         "scaling lowers its condition number >= 100-fold. Remedy: rerun in x = D u, D_i the power of ten nearest "
         "H_ii^-1/2.",
         "diagonal scaling: Gill, Murray & Wright (1981), Practical Optimization, sec. 8.7; thresholds common practice, "
         "no published source"},
        {FindingId::UphillNewton, "an uphill Newton step",
         "A record with step kind newton whose step p has g'p > 0 (only possible when the Hessian is not positive "
         "definite).",
         "descent-direction condition g'p < 0: Nocedal & Wright (2006), sec. 3.1"},
        {FindingId::LineSearchCollapse, "line searches collapse",
         "The run ended with line-search-failed, or (not converged) >= 3 searches in the last 30 records needed >= 10 "
         "trials and the last accepted step length is <= 1e-3 times the run's median; a note at a kink minimum.",
         "common practice, no published source"},
        {FindingId::RadiusCollapse, "trust region collapses",
         "The run ended with trust-region-collapsed, or (not converged) the last radius is <= 1e-6 times the largest "
         "and at least half the last 30 steps were rejected (cubic regularisation: 1/sigma as the radius).",
         "common practice, no published source"},
        {FindingId::Stagnation, "stalled without converging",
         "The end is not a critical point and the best f fell by <= 1e-10 (1 + |f|) between the halves of the last 30 "
         "records, or the run stopped on its step or function tolerance there; a note where f rises in every direction "
         "tried (the kink minimum of a non-smooth f).",
         "common practice, no published source"},
        {FindingId::Divergence, "diverges or drifts to infinity",
         "f rose to >= f_min + 1e6 (1 + |f_min|) (rising in >= 80 % of the last moves, or ending non-finite); or |x| "
         "grew by >= 5 (1 + |x_0|), growing in >= 80 % of the last moves, while the curvature along the drift faded to "
         "<= 1e-3 of its earlier value or to rounding (an asymptote or an endless slope). Not for a run that converged "
         "to a non-degenerate minimum.",
         "common practice, no published source"},
        {FindingId::NonFinite, "a non-finite value",
         "The run ended with non-finite, or a record holds a NaN or an infinity in f, x or the gradient.",
         "IEEE 754 non-finite values; common practice, no published source"},
        {FindingId::BudgetExhausted, "stopped by a limit while progressing",
         "The run ended at the iteration or evaluation limit while the best f still fell by more than 1e-10 (1 + |f|) "
         "or the gradient norm still shrank over the last 30 records; the iterations still needed are estimated from "
         "the observed gradient-norm factor.",
         "linear rate from the ratio of successive gradient norms; common practice, no published source"},
        {FindingId::MethodFailed, "the run ended by an error",
         "The run ended with failed: its input was rejected, or the method broke down.", "not a numerical rule"},
        {FindingId::ConvergenceRate, "observed convergence rate",
         "On every finished run with enough steps: order q from the last 3 to 5 shrinking steps (ACOC), gradient-norm "
         "factor from the last 12 records; with a last ratio <= 0.1, q >= 1.8 quadratic, q >= 1.2 superlinear; "
         "factor < 0.999 linear, else sublinear.",
         "ACOC: Cordero & Torregrosa (2007), Appl. Math. Comput. 190, 686-698"},
    };
    for (const FindingInfo& info : table)
        if (info.id == id) return info;
    return table.back();
}

const char* toString(Severity severity) { return severity == Severity::Problem ? "problem" : "note"; }

const char* toString(Change::Kind kind) {
    switch (kind) {
        case Change::Kind::SwitchMethod: return "switch-method";
        case Change::Kind::SetOptions: return "set-options";
        case Change::Kind::RescaleVariables: return "rescale-variables";
        case Change::Kind::RaiseIterationLimit: return "raise-iteration-limit";
        case Change::Kind::StartPoint: return "start-point";
    }
    return "switch-method";
}

const Evidence* Finding::find(const std::string& name) const {
    for (const Evidence& e : evidence)
        if (e.name == name) return &e;
    return nullptr;
}

double Finding::number(const std::string& name) const {
    const Evidence* e = find(name);
    return e ? e->value : solve::kNaN;
}

void sortFindings(Findings& findings) {
    std::stable_sort(findings.begin(), findings.end(), [](const Finding& a, const Finding& b) {
        if (a.severity != b.severity) return a.severity == Severity::Problem;
        return static_cast<int>(a.id) < static_cast<int>(b.id);
    });
}

bool hasProblem(const Findings& findings) {
    return std::any_of(findings.begin(), findings.end(), [](const Finding& f) { return f.isProblem(); });
}

const Finding* findById(const Findings& findings, FindingId id) {
    for (const Finding& f : findings)
        if (f.id == id) return &f;
    return nullptr;
}

}  // namespace sw::diagnose
