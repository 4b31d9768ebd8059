#pragma once
// What a run leaves behind: one IterationRecord per iterate, a termination and its
// message, and the end point classified by the exact Hessian. Views, reports and the
// command line draw only from these values.

#include "core/objective/objective.h"

#include <array>
#include <cmath>
#include <limits>
#include <string>
#include <string_view>
#include <vector>

namespace sw::solve {

inline constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

enum class StepKind {
    None,               // no step (the final record, or a rejected trial point)
    Gradient,           // steepest descent -g (possibly scaled)
    Momentum,           // heavy-ball / Nesterov combination
    Adaptive,           // Adam's per-coordinate scaled step
    Newton,             // -H^{-1} g, full or line-searched
    ModifiedNewton,     // -(H + tau I)^{-1} g
    SaddleFreeNewton,   // -|H|^{-1} g
    NegativeCurvature,  // along a direction d with d'Hd < 0
    Dogleg,             // on the dogleg path between Cauchy and Newton points
    Cauchy,             // the Cauchy point of the trust-region model
    Boundary,           // a trust-region step that stops on the boundary
    Interior,           // a trust-region step strictly inside (unconstrained model minimiser)
    QuasiNewton,        // -B^{-1} g with a BFGS/L-BFGS/SR1 model
    ConjugateGradient,  // nonlinear CG direction
    Simplex,            // Nelder-Mead reflection/expansion/contraction/shrink
    GaussNewton,        // -(J'J)^{-1} J'r
    LevenbergMarquardt, // -(J'J + lambda D)^{-1} J'r
    Cubic,              // cubic-regularisation model minimiser
};
const char* toString(StepKind kind);  // kebab-case, e.g. "negative-curvature"

// v with `digits` significant digits ("1.5e-07", "nan", "inf"); locale-free.
std::string shortNumber(double value, int digits = 6);

// One trial of a line search.
struct LineSearchTrial {
    double alpha = kNaN;
    double value = kNaN;
    double slope = kNaN;  // directional derivative g(x + alpha d)'d; NaN when not evaluated
    bool accepted = false;
    // "" when accepted, else "sufficient decrease", "curvature", "non-finite", ...: always a
    // string literal, so a trial is trivially copyable and a failed trial allocates nothing.
    std::string_view failed;
};

// A record's short readable note. Plain text, followed by up to three deferred parts: a pattern
// (a string literal, kept by pointer) whose numbers are only formatted when text() is called.
// Formatting numbers costs more than a cheap iteration's arithmetic, and most notes are never
// read, so hot loops add parts; anything else may assign or append text.
//   note.add("radius shrinks to {}", radius);   // "{}": 6 significant digits, "{3}": 3
class Note {
public:
    Note() = default;
    Note(const char* text) : text_(text) {}
    Note(std::string text) : text_(std::move(text)) {}
    Note& operator=(const char* text);
    Note& operator=(std::string text);
    // Appends text as it is (deferred parts are formatted first, so the order stays).
    Note& operator+=(std::string_view more);
    // Appends "; " (unless the note is empty) and the pattern with its numbers, deferred.
    void add(const char* pattern, double a = kNaN, double b = kNaN, double c = kNaN);
    bool empty() const { return text_.empty() && parts_ == 0; }
    void clear();
    std::string text() const;
    bool contains(std::string_view what) const { return text().find(what) != std::string::npos; }

private:
    struct Part {
        const char* pattern = nullptr;
        std::array<double, 3> numbers{};
    };
    void render();  // formats the deferred parts into text_
    static void append(std::string& out, const Part& part);
    std::string text_;
    std::array<Part, 3> deferred_{};
    int parts_ = 0;
};

struct EvaluationCounts {
    long value = 0;
    long gradient = 0;
    long hessian = 0;
    long total() const { return value + gradient + hessian; }
};

// Record k describes iterate x_k and the step taken from it toward x_{k+1}.
// The last record of a finished run holds the final point with step kind None.
struct IterationRecord {
    int iteration = 0;
    Vector x;
    double value = kNaN;
    Vector gradient;
    double gradientNorm = kNaN;

    Vector step;                     // x_{k+1} - x_k (empty on the final record)
    StepKind stepKind = StepKind::None;
    double stepLength = kNaN;        // alpha of the line search (1 for full steps)
    double stepNorm = kNaN;
    std::vector<LineSearchTrial> trials;

    double trustRadius = kNaN;       // Delta used for this step
    double ratio = kNaN;             // rho = actual / predicted decrease
    double damping = kNaN;           // tau, lambda, sigma or momentum, named by dampingName
    std::string dampingName;         // "tau", "lambda", "sigma", "mu", ... ("" when unused)
    double predictedDecrease = kNaN; // m(0) - m(p)
    double actualDecrease = kNaN;    // f(x_k) - f(x_k + p)
    bool accepted = true;            // false when a trust-region step was rejected (x_{k+1} = x_k)

    Vector hessianEigenvalues;       // ascending; empty when not computed (n > 50)
    double conditionNumber = kNaN;   // |lambda|max / |lambda|min
    // Degrees between the step and -gradient (NaN without a step), from the stored step and
    // gradient when asked: 2 atan2(|u - v|, |u + v|) for the unit vectors, accurate near 0 and 180.
    double angleToSteepestDescent() const;
    int jacobianRank = -1;           // least-squares methods
    double jacobianCondition = kNaN;

    EvaluationCounts evaluations;    // cumulative, including this iteration's work
    Note note;                       // short, readable ("BFGS update skipped: y's <= 0"); note.text()
    // Kept through thinning (see Run::droppedRecords): a rejected step, a change of step kind
    // from the record before, or a non-finite value, gradient or trial.
    bool notable = false;
};

// How a run ended. Each convergence test has its own kind and its own id, named after the
// setting that fires it (docs/names.md lists the former ids).
enum class Termination {
    Running,
    GradientTolerance,   // "gradient-norm-below": |g| <= stopping.gradient_norm_below
    StepTolerance,       // "relative-step-below": |x_{k+1} - x_k| <= stopping.relative_step_below (1 + |x_k|)
    FunctionTolerance,   // "relative-change-below": |f_{k+1} - f_k| <= stopping.relative_change_below (1 + |f_k|)
    GradientRatioBelow,  // "gradient-ratio-below": |g| <= stopping.gradient_ratio_below |g0|
    ReductionBelow,      // "reduction-below": least squares, relative reduction of |r|^2 (actual and
                         //   predicted) <= the method's reduction_below
    ScaledRadiusBelow,   // "scaled-radius-below": Levenberg-Marquardt, radius <= scaled_radius_below |D x|
    ColumnCosineBelow,   // "column-cosine-below": Levenberg-Marquardt, residuals orthogonal to J's columns
    ZeroResiduals,       // "zero-residuals": every residual is exactly zero
    RoundingLimit,       // "rounding-limit": no decrease of f (or improvement of x) is possible in
                         //   double precision
    SimplexSizeBelow,    // "simplex-size-below": Nelder-Mead's simplex and its value spread are small
    IterationLimit,
    EvaluationLimit,
    LineSearchFailed,
    TrustRegionCollapsed,
    NonFinite,
    StoppedByCaller,
    Failed,              // a method-specific breakdown (message says which)
};
const char* toString(Termination t);  // kebab-case, e.g. "gradient-norm-below"
bool isConvergence(Termination t);    // any of the convergence tests above

// NotCritical: the end point failed the stationarity test (see classifyEndPoint), so no class
// is claimed; EndPoint::curvature still says what the Hessian looks like there.
enum class PointKind { Unknown, Minimum, Saddle, Maximum, Degenerate, NotCritical };
const char* toString(PointKind k);    // id for JSON: "minimum", "saddle", ..., "not-critical"
// For people: "local minimum", "saddle", "local maximum", "degenerate point", "not a critical
// point" ("not classified"). The Hessian test at an end point is local, and the words say so.
const char* describe(PointKind k);

struct EndPoint {
    PointKind kind = PointKind::Unknown;
    int index = 0;                    // number of negative eigenvalues
    Vector eigenvalues;               // ascending
    double tolerance = kNaN;          // |lambda| below this counts as zero
    // True only when the point passed the stationarity test with finite numbers; kind is then
    // the class of the critical point. False: kind is NotCritical (or Unknown when nothing
    // could be tested) and reason says why.
    bool critical = false;
    PointKind curvature = PointKind::Unknown;  // the Hessian's own class, critical or not
    // The stationarity measure: the distance from the point to the stationary point of its
    // local quadratic model, |H^+ g| (eigenvalues below 1e-8 max|lambda| count as that floor);
    // unchanged when f is multiplied by a constant. NaN when not computed.
    double stationaryDistance = kNaN;
    double stationaryBound = kNaN;    // the test: stationaryDistance <= this = 1e-3 (1 + |x|)
    std::string reason;               // why not critical ("" when critical)
    std::string description;          // e.g. "saddle of index 1 (eigenvalues -2, 2)"
};

// Classifies a point by the eigenvalues of the symmetric Hessian, as if it were critical
// (kind = curvature; critical is left false: only classifyEndPoint tests stationarity).
// An eigenvalue counts as zero when |lambda| <= relativeTolerance * max|lambda| (relative to
// the Hessian itself, so multiplying f by a constant does not change the class).
EndPoint classifyPoint(const Matrix& hessian, double relativeTolerance = 1e-8);

// The relative distance below which an end point counts as stationary (see EndPoint).
inline constexpr double kStationaryRelativeDistance = 1e-3;

// Classifies a run's end point x (value f, gradient g, exact Hessian H). A class is given only
// when f, g and H are finite and the point is stationary by a test that does not scale with f:
// |H^+ g| <= 1e-3 (1 + |x|) (the local model's stationary point is that close). Otherwise the
// kind is NotCritical (or Unknown when something is not finite) with the reason.
EndPoint classifyEndPoint(const Matrix& hessian, const Vector& x, double value, const Vector& gradient);

struct Run {
    std::string methodId;
    std::string label;               // user's name for this lineup entry (may equal methodId)
    std::vector<IterationRecord> trace;
    Termination termination = Termination::Running;
    std::string message;
    Vector x;
    double value = kNaN;
    double gradientNorm = kNaN;
    EvaluationCounts evaluations;
    EndPoint endPoint;
    // Thinning: when the records would pass the stopping rules' traceMemoryLimit, records in the
    // middle of the trace are dropped. Always kept: the first record, the last
    // kTraceKeptTail records, notable records (IterationRecord::notable; when even they
    // outgrow the limit, every other one), ordinary records whose iteration is a multiple of
    // recordStride, and the records added since the last thinning. A record's own `iteration`
    // field says which iterate it is.
    long droppedRecords = 0;          // 0: the trace is complete
    long recordStride = 1;            // ordinary records kept: every recordStride-th iteration
    long droppedNotableRecords = 0;   // of droppedRecords, how many were notable
    int iterations() const { return trace.empty() ? 0 : trace.back().iteration; }
    bool finished() const { return termination != Termination::Running; }
};

// Records at the end of a trace never dropped by thinning.
inline constexpr std::size_t kTraceKeptTail = 50;

}  // namespace sw::solve
