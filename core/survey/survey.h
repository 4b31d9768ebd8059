#pragma once
// Surveys of a region: every critical point in a box (the critical-point map), and, for a
// method with its settings, which critical point a run from each cell of a grid over a plane
// ends at (the basins of attraction). Qt-free and MPI-free; results are plain structures that
// the command line, the window and reports turn into JSON, pictures and tables.
//
// The work is split into independent pieces (one per start, one per grid cell) whose results
// are pure functions of their index, assembled in index order. So the same result comes out
// on one thread, on many threads, or from pieces computed in several processes (the MPI
// driver in app/ computes ranges of indices in each process and assembles on one).
//
// Method (docs/survey.md has the details and sources):
//   - starts: a deterministically scrambled Halton sequence in the box (Halton 1960; the
//     reverse-radix "RR2" digit permutation of Vandewoestyne & Cools 2006), plus the centres
//     of the cells of a grid over the plane where both plotted gradient components change sign;
//   - from each start, Levenberg–Marquardt on the system grad f = 0 (Jacobian = Hessian),
//     damping mu = (|g| / g_scale)^2 * lambda_max^2 (Yamashita & Fukushima 2001), globalised
//     by Armijo backtracking on 1/2 |g|^2 (Dennis & Schnabel 1983, sec. 6.3), iterated until
//     1/2 |g|^2 stops decreasing (refined to rounding);
//   - duplicates merged within mergeTolerance of the box's width per variable; degenerate
//     points that lie along each other's flat directions are joined into one continuum;
//   - classified by the Hessian's eigenvalues; completeness from how often each point was hit
//     (Good 1953 / Chao 1984).

#include "core/objective/objective.h"
#include "core/solve/options.h"
#include "core/solve/record.h"

#include <atomic>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

namespace sw::survey {

// The box searched, in every variable, and the plane that grid-based pieces use: the two
// plotted variables, with the others held.
struct Region {
    Vector lower, upper;     // size n each; lower < upper, finite
    int xVariable = 0;       // the plane (needs n >= 2 for basins and for sign-change starts)
    int yVariable = 1;
    Vector held;             // size n; the plane's two coordinates are ignored
    // "" when usable for an objective of `dimension` variables, else a sentence naming the
    // problem (e.g. "the box has no interior in y: lower 2 is not below upper 2").
    std::string check(int dimension, const std::vector<std::string>& names = {}) const;
    double width(int i) const { return upper[i] - lower[i]; }
};

// Progress in [0, 1] is reported from the calling thread only; cancel is polled per piece.
struct Control {
    const std::atomic<bool>* cancel = nullptr;
    std::function<void(double)> progress;
    int threads = 0;  // 0: every hardware thread
    bool cancelled() const { return cancel && cancel->load(std::memory_order_relaxed); }
};

// ---- Low-discrepancy points ----

// Point `index` (>= 1) of the n-dimensional Halton sequence in [0,1)^n, bases the first n
// primes, each digit permuted by the RR2 permutation of its base (Vandewoestyne & Cools 2006),
// which keeps the higher dimensions from the strong correlations of the plain sequence.
// Supports n <= 64.
std::vector<double> haltonPoint(long index, int dimension);
// The permutation of the digits 0..base-1 (RR2): bit-reversed k-bit integers below base.
std::vector<int> reverseRadixPermutation(int base);

// ---- Critical points ----

struct CriticalSettings {
    int starts = 256;               // Halton starts in the box
    int signChangeGrid = 64;        // cells per side of the plane's sign-change grid (0: none)
    int maxSignChangeStarts = 4096; // at most this many sign-change cells are used (evenly thinned)
    int maxIterations = 100;        // per start
    double mergeTolerance = 1e-6;   // two points are one when every |x_a - x_b| <= this * box width
    double zeroTolerance = 1e-8;    // an eigenvalue is zero when |lambda| <= this * max|lambda| there
    double acceptTolerance = 1e-6;  // a refined point is critical when |g| <= this * g_scale
    std::string check() const;      // "" or a sentence naming the setting and its range
};

enum class StartSource : std::uint8_t { LowDiscrepancy, SignChange };

// What one start gave (a pure function of the start point).
struct StartOutcome {
    enum class Status : std::uint8_t { Converged, Stalled, LeftBox, NonFinite, Cancelled };
    Status status = Status::Stalled;
    Vector x;               // where the iteration ended (refined point when Converged)
    double gradientNorm = solve::kNaN;
    int iterations = 0;
};
const char* toString(StartOutcome::Status status);

struct CriticalPoint {
    Vector x;
    double value = solve::kNaN;
    solve::PointKind kind = solve::PointKind::Unknown;
    int index = 0;               // number of negative eigenvalues (beyond the zero tolerance)
    int zeroEigenvalues = 0;     // how many count as zero
    Vector eigenvalues;          // ascending
    Vector lowestEigenvector;    // unit vector of the smallest eigenvalue (a saddle's escape direction)
    double gradientNorm = solve::kNaN;
    int hits = 0;                // starts that ended here (0 for points first met by a basin map)
    std::string foundBy = "search";  // "search", or "basins" when a basin run ended on a point the search missed
    // A set of degenerate critical points that join along their flat directions (a valley of
    // minima, a ridge of maxima) is one entry: x is its member of lowest value.
    bool continuum = false;
    int members = 1;             // distinct refined points in the continuum
    Vector memberLower, memberUpper;  // the members' bounding box (continuum only)
    std::vector<Vector> memberPoints; // the members themselves (continuum only; for matching)
};
const char* kindName(const CriticalPoint& point);  // "minimum", "saddle", "maximum", "degenerate" (JSON ids)
// The kind for people: "local minimum", "saddle", "local maximum", "degenerate" (a critical
// point's class is a local test; the JSON `kind` keeps the short ids, docs/names.md).
const char* kindWords(const CriticalPoint& point);

struct CriticalMap {
    std::vector<std::string> variables;
    Region region;
    CriticalSettings settings;
    // Ordered: minima (ascending value), saddles (by index, then value), maxima, degenerate.
    std::vector<CriticalPoint> points;
    int starts = 0;                 // all starts used
    int lowDiscrepancyStarts = 0;
    int signChangeStarts = 0;
    int converged = 0;              // starts that reached a critical point in the box
    int outside = 0;                // reached a critical point outside the box
    int stalled = 0;                // 1/2|g|^2 stopped decreasing away from a critical point
    int leftBox = 0;                // went far out of the box (beyond one box width)
    int nonFinite = 0;
    double gradientScale = 0;       // root mean square of |g| over the Halton starts
    double hessianScale = 0;        // root mean square of max|lambda| over the Halton starts
    // Completeness: points (continua count once) reached by exactly one / two starts, and the
    // bias-corrected Chao (1984) estimate f1 (f1 - 1) / (2 (f2 + 1)) of points not yet found.
    int foundOnce = 0;
    int foundTwice = 0;
    double estimatedMissing = 0;
    bool likelyComplete = false;    // every point was reached by at least two starts
    bool cancelled = false;
    double seconds = 0;
    int count(solve::PointKind kind) const;
};

// A critical-point search in pieces: starts() lists every start (deterministic); run(i)
// refines start i; assemble() merges outcomes given in start order. find() does it all on
// the threads of `control`.
class CriticalSearch {
public:
    // Throws std::invalid_argument with a sentence for a bad region or settings.
    CriticalSearch(const Objective& objective, Region region, CriticalSettings settings = {},
                   const Control& control = {});
    const std::vector<Vector>& starts() const { return starts_; }
    StartSource source(std::size_t i) const { return sources_[i]; }
    StartOutcome run(std::size_t i) const;
    StartOutcome refine(const Vector& start) const;  // the same iteration from any point
    // Outcomes of every start, in order (size == starts().size()).
    CriticalMap assemble(const std::vector<StartOutcome>& outcomes) const;
    // Classification of one refined point (value, kind, eigenvalues, ...); hits = 0.
    CriticalPoint classify(const Vector& x) const;
    // Outcomes of starts [begin, end) with the control's threads; false when cancelled.
    bool runRange(std::size_t begin, std::size_t end, std::vector<StartOutcome>& outcomes,
                  const Control& control) const;
    CriticalMap find(const Control& control = {}) const;

    const Objective& objective() const { return objective_; }
    const Region& region() const { return region_; }
    const CriticalSettings& settings() const { return settings_; }
    double gradientScale() const { return gradientScale_; }
    double hessianScale() const { return hessianScale_; }
    bool insideBox(const Vector& x) const;
    // Max over variables of |a_i - b_i| / width_i.
    double scaledDistance(const Vector& a, const Vector& b) const;

private:
    const Objective& objective_;
    Region region_;
    CriticalSettings settings_;
    std::vector<Vector> starts_;
    std::vector<StartSource> sources_;
    int lowDiscrepancy_ = 0;
    double gradientScale_ = 1;
    double hessianScale_ = 1;
};

// Convenience: CriticalSearch(objective, region, settings).find(control).
CriticalMap findCriticalPoints(const Objective& objective, const Region& region,
                               const CriticalSettings& settings = {}, const Control& control = {});

// Index of the map's point that x (a refined critical point) is, or -1: an isolated point
// within the merge tolerance, or a continuum with a member within its link distance.
int matchPoint(const CriticalMap& map, const Vector& x);

// ---- Basins of attraction ----

// One method with its settings, as a lineup entry.
struct BasinMethod {
    std::string label;  // shown in titles; the method id when empty
    std::string methodId;
    solve::OptionValues options;
};

// Where a run from a cell ended: a point of the map (index >= 0), or one of these.
enum BasinCode : int {
    kCellLimit = -1,     // iteration or evaluation limit
    kCellDiverged = -2,  // non-finite values, or ran beyond ten box widths
    kCellFailed = -3,    // the method broke down, or stopped away from any critical point
    kCellOutside = -4,   // converged to a critical point outside the box
    kCellNotRun = -5,    // cancelled before this cell ran (only in cancelled maps)
};
const char* basinCodeName(int code);  // "limit", "diverged", "failed", "outside", "not-run"

struct BasinSettings {
    int grid = 200;                  // N: cells per side; runs = N * N per method
    solve::StoppingRules rules;      // per run
    // Memory guard: N * N * methods may not exceed this (each cell keeps a point index and an
    // iteration count; the runs themselves are not kept).
    long maxCells = 16'000'000;
    // Memory per cell, measured (docs/survey.md: peak resident size of `saddlewise basins` at a
    // 1500 x 1500 grid, one method, less the process at a 10 x 10 grid): the run outcomes, the
    // map and the counts; the JSON document's two arrays of numbers add the rest.
    static constexpr long kBytesPerCell = 110;
    static constexpr long kBytesPerCellJson = 150;
    static constexpr int kMaxGrid = 4000;
    std::string check(std::size_t methodCount) const;
};

// What one cell's run gave (a pure function of the cell and the map): a point of the map it
// ended on (matched within the merge tolerance), a failure code, or kCellUnmatched with the
// refined critical point it reached, which assemble() matches or adds to the map in cell order.
inline constexpr int kCellUnmatched = -10;
struct CellOutcome {
    int code = kCellFailed;
    int iterations = 0;
    Vector x;                   // the refined critical point when code == kCellUnmatched
};

struct BasinMap {
    BasinMethod method;
    std::vector<int> cells;        // N*N, cells[j*N + i], i along the plane's x; a point index or a BasinCode
    std::vector<int> iterations;   // N*N, iterations of each cell's run
    std::vector<long> pointCounts; // per point of the survey's map
    long limit = 0, diverged = 0, failed = 0, outside = 0, notRun = 0;
    int maxIterations = 0;         // over the cells (for shading)
    double seconds = 0;
    long total() const;            // sum of every count (== N*N)
};

struct BasinSurvey {
    std::vector<std::string> variables;
    Region region;
    int grid = 0;
    solve::StoppingRules rules;
    CriticalMap map;               // the critical-point map, with points the basins added
    std::vector<BasinMap> maps;    // one per method, in the order asked
    bool cancelled = false;
    double seconds = 0;            // everything, the critical-point map included
    // Cell centres: symmetric about the box's centre to the last bit (a mirror-symmetric
    // function gives a mirror-symmetric map).
    double cellX(int i) const;
    double cellY(int j) const;
};

// Basin maps in pieces, like CriticalSearch: cellCount() cells per method; run(m, c, map) runs
// method m from cell c and matches its end to the map; assemble() completes the matching in
// cell order (points the map lacked join it there).
class BasinSearch {
public:
    // Throws std::invalid_argument with a sentence: bad region, bad grid (naming the memory
    // limit), unknown method, options the method refuses, a method that needs what the
    // objective lacks (residual form).
    BasinSearch(const Objective& objective, Region region, std::vector<BasinMethod> methods,
                BasinSettings settings = {}, CriticalSettings criticalSettings = {});
    long cellCount() const { return static_cast<long>(settings_.grid) * settings_.grid; }
    const std::vector<BasinMethod>& methods() const { return methods_; }
    Vector cellStart(long cell) const;
    CellOutcome run(std::size_t method, long cell, const CriticalMap& map) const;
    bool runRange(std::size_t method, long begin, long end, const CriticalMap& map,
                  std::vector<CellOutcome>& outcomes, const Control& control) const;
    // `outcomes[m]` holds method m's cells in order; `map` is the critical-point map to match.
    BasinSurvey assemble(CriticalMap map, const std::vector<std::vector<CellOutcome>>& outcomes) const;
    const CriticalSearch& critical() const { return critical_; }
    const BasinSettings& settings() const { return settings_; }
    // Everything on this process's threads: the map, every method's cells, matching.
    BasinSurvey find(const Control& control = {}) const;

private:
    const Objective& objective_;
    Region region_;
    std::vector<BasinMethod> methods_;
    BasinSettings settings_;
    CriticalSearch critical_;
};

// Convenience: BasinSearch(...).find(control).
BasinSurvey mapBasins(const Objective& objective, const Region& region, const std::vector<BasinMethod>& methods,
                      const BasinSettings& settings = {}, const CriticalSettings& criticalSettings = {},
                      const Control& control = {});

// ---- Runs spread over threads ----

// Calls work(i) for every i in [begin, end) on `threads` threads (0: hardware), each index
// once, the calling thread included; progress(fraction) from the calling thread. Returns
// false when cancelled (some indices then never ran).
bool forEachIndex(long begin, long end, const Control& control, const std::function<void(long)>& work);

}  // namespace sw::survey
