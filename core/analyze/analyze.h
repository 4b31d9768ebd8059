#pragma once
// Analysis of an objective around its runs: sampled fields over a box, contour lines
// (marching squares), the local quadratic model and its one-line verdict.
// Draft interface: implementers may add to it; keep what is here (views use it).

#include "core/objective/objective.h"
#include "core/solve/record.h"

#include <atomic>
#include <functional>
#include <string>
#include <vector>

namespace sw::analyze {

struct Box {
    double xMin = -1, xMax = 1, yMin = -1, yMax = 1;
};

// f over an nx x ny grid of two chosen variables, the others held at `held`.
struct Field {
    Box box;
    int nx = 0, ny = 0;
    int xVariable = 0, yVariable = 1;
    std::vector<double> values;           // nx*ny, row-major, x fastest: values[j*nx + i]
    double finiteMin = 0, finiteMax = 0;  // over finite cells only
    long nonFiniteCells = 0;
    // Grid coordinates as expr::gridCoordinate gives them (exact ends; no overflow for a box
    // of finite ends however wide, e.g. -1e308 to 1e308).
    double x(int i) const;
    double y(int j) const;
    double at(int i, int j) const { return values[static_cast<std::size_t>(j) * nx + i]; }
};

// Progress in [0,1]; cancel is polled between rows.
struct Control {
    const std::atomic<bool>* cancel = nullptr;
    std::function<void(double)> progress;
};
// Returns false when cancelled (field then incomplete). Uses every hardware thread (the
// calling thread works too, and is the only one that calls `progress`). A compiled formula
// (FormulaObjective) is sampled a row at a time by block evaluation; any other objective
// point by point with Objective::value (a fit objective sums over its rows per cell).
// Throws std::invalid_argument for a bad box, grid (< 2 x 2), variable pair or held point.
bool sampleField(const Objective& objective, const Vector& held, int xVariable, int yVariable, const Box& box, int nx,
                 int ny, Field& field, const Control& control = {});

struct Polyline {
    std::vector<double> x, y;
    bool closed = false;
};
struct ContourSet {
    double level = 0;
    std::vector<Polyline> lines;
};

// Levels that show both the valley floor and the walls: spaced in log(f - fmin + eps) when
// the range spans decades, else evenly. `count` levels, ascending.
// The rule (levels.cpp): d = f - fmin over finite cells above fmin; when its 90th percentile
// is >= 20 times its 10th, levels are log-spaced in d from its 2nd to its 98th percentile;
// otherwise evenly spaced strictly between fmin and fmax. Empty for a constant or empty field.
// Above 65,536 cells the percentiles are taken over a regular subsample of the cells.
std::vector<double> chooseLevels(const Field& field, int count);
// Whether chooseLevels picks log spacing for this field (also a hint for a log colour scale).
bool levelsAreLogSpaced(const Field& field);
// Marching squares with saddle-cell disambiguation by the cell centre; NaN cells are skipped.
// One ContourSet per finite level, in order. Closed rings have closed = true and repeat their
// first point at the end; open lines end on the box edge or at a non-finite region.
std::vector<ContourSet> contourLines(const Field& field, const std::vector<double>& levels);

// The shape of a quadratic model, from the signs of the Hessian's eigenvalues. An eigenvalue
// counts as zero when |lambda| <= zeroTolerance * max(1, max|lambda|) (relative to the largest).
//   Bowl:          all eigenvalues > 0 (the model has a unique minimiser, the Newton point)
//   Dome:          all eigenvalues < 0 (the Newton point is the model's maximiser)
//   Saddle:        both signs, none zero (the Newton point is a saddle of the model)
//   FlatDirection: some zero, the rest >= 0 (a trough: the model does not curve along the floor)
//   Ridge:         some zero and some < 0 (flat along one direction, curving down across it)
//   Unknown:       non-finite derivatives at the point
enum class Shape { Unknown, Bowl, Dome, Saddle, FlatDirection, Ridge };
const char* toString(Shape shape);  // "bowl", "dome", "saddle", "flat direction", "ridge", "unknown"

// The quadratic model m(p) = f + g'p + 1/2 p'Hp at x.
struct QuadraticModel {
    Vector center;
    double value = 0;
    Vector gradient;
    Matrix hessian;
    Vector eigenvalues;                // ascending
    Matrix eigenvectors;               // columns, matching eigenvalues
    bool hasNewtonPoint = false;       // H nonsingular
    Vector newtonPoint;                // x - H^{-1} g (the model's stationary point), in x coordinates
    std::string verdict;               // "bowl", "saddle", "ridge", "flat direction", "dome" + a short reason
    double at(const Vector& p) const;  // m(p), p a displacement from center

    // Added: the same verdict in parts, for views that style them separately.
    Shape shape = Shape::Unknown;
    std::string reason;           // e.g. "curves up along 1 direction and down along 1 (-2 and 2)"
    double zeroTolerance = 1e-8;  // relative tolerance used for "zero" eigenvalues
    double conditionNumber = 0;   // max|lambda| / min|lambda| (inf when one is zero)
    bool finite = false;          // value, gradient and Hessian all finite
    // Model along a line: m(t d) for t in ts (d in x coordinates, a displacement).
    std::vector<double> along(const Vector& direction, const std::vector<double>& ts) const;
};
QuadraticModel quadraticModel(const Objective& objective, const Vector& x, double zeroTolerance = 1e-8);

// ---- Lines through the landscape (slice view) ----

// `count` evenly spaced values of t in [tMin, tMax] (count >= 2; count == 1 gives tMin).
std::vector<double> linspace(double tMin, double tMax, int count);
// f(x + t d) for each t. Non-finite values are returned as they are.
std::vector<double> valuesAlong(const Objective& objective, const Vector& x, const Vector& direction,
                                const std::vector<double>& ts);
// The Armijo sufficient-decrease line f(x) + c1 t g'd at each t.
std::vector<double> sufficientDecreaseLine(double value, const Vector& gradient, const Vector& direction,
                                           const std::vector<double>& ts, double c1 = 1e-4);

// ---- Curvature along a run (curvature view) ----

// Hessian eigenvalues (ascending) and condition number of each iterate of a run. Reuses
// the records' eigenvalues where the solver stored them; computes the rest from the
// objective's exact Hessian (when objective is non-null and n <= maxDimension).
struct SpectrumPoint {
    int iteration = 0;
    Vector eigenvalues;  // ascending; empty when unavailable
    double conditionNumber = solve::kNaN;
    bool negativeCurvature = false;  // smallest eigenvalue < 0 (beyond the zero tolerance)
    bool fromRecord = false;         // true when taken from the solver's record
};
std::vector<SpectrumPoint> spectrumAlong(const solve::Run& run, const Objective* objective, int maxDimension = 50,
                                         double zeroTolerance = 1e-8);

// ---- Derivative check (a diagnostic; derivatives themselves are exact) ----

// Compares the objective's gradient and Hessian with central differences of its value and
// gradient, step h_i = eps^(1/3) * max(1, |x_i|) (Nocedal & Wright 2006, sec. 8.1: the step
// that balances truncation O(h^2) against rounding O(eps/h)).
struct DerivativeCheck {
    Vector gradient, gradientEstimate;
    Matrix hessian, hessianEstimate;
    double gradientError = 0;  // max_i |g_i - est_i| / max(1, |g_i|)
    double hessianError = 0;   // max_ij |H_ij - est_ij| / max(1, |H_ij|)
    int worstGradientIndex = -1;
    int worstHessianRow = -1, worstHessianColumn = -1;
    bool passed = false;  // both errors <= tolerance
    std::string message;  // one line, naming the worst entry
};
DerivativeCheck checkDerivatives(const Objective& objective, const Vector& x, double tolerance = 1e-5);

}  // namespace sw::analyze
