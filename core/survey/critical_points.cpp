// The critical-point map: starts, refinement of grad f = 0 from each, merging, classification,
// continua of degenerate points, and the completeness estimate. See survey.h for the method.
#include "core/survey/survey.h"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <numeric>
#include <stdexcept>
#include <thread>
#include <tuple>

namespace sw::survey {

namespace {

// Armijo constant for the backtracking on 1/2 |g|^2 (Dennis & Schnabel 1983, sec. 6.3: 1e-4).
constexpr double kArmijo = 1e-4;
constexpr int kMaxBacktracks = 40;
// A step below this fraction of the box's width in every variable ends the refinement: the
// point is then known far below any merge tolerance (degenerate points converge only linearly).
constexpr double kStepFloor = 1e-13;
// Degenerate points within this scaled distance may be joined into one continuum.
constexpr double kLinkDistance = 0.15;

std::string numberText(double v) { return solve::shortNumber(v, 6); }

std::string nameOf(const std::vector<std::string>& names, int i) {
    return i >= 0 && i < static_cast<int>(names.size()) ? names[static_cast<std::size_t>(i)]
                                                        : "variable " + std::to_string(i + 1);
}

int kindRank(const CriticalPoint& p) {
    switch (p.kind) {
        case solve::PointKind::Minimum:
            return 0;
        case solve::PointKind::Saddle:
            return 1;
        case solve::PointKind::Maximum:
            return 2;
        case solve::PointKind::Degenerate:
            return 3;
        default:
            return 4;
    }
}

// Disjoint sets for joining degenerate points.
struct Components {
    std::vector<int> parent;
    explicit Components(int n) : parent(static_cast<std::size_t>(n)) { std::iota(parent.begin(), parent.end(), 0); }
    int find(int a) {
        while (parent[static_cast<std::size_t>(a)] != a) a = parent[static_cast<std::size_t>(a)] = parent[static_cast<std::size_t>(parent[static_cast<std::size_t>(a)])];
        return a;
    }
    void join(int a, int b) {
        a = find(a);
        b = find(b);
        if (a != b) parent[static_cast<std::size_t>(std::max(a, b))] = std::min(a, b);
    }
};

}  // namespace

const char* toString(StartOutcome::Status status) {
    switch (status) {
        case StartOutcome::Status::Converged:
            return "converged";
        case StartOutcome::Status::Stalled:
            return "stalled";
        case StartOutcome::Status::LeftBox:
            return "left-box";
        case StartOutcome::Status::NonFinite:
            return "non-finite";
        case StartOutcome::Status::Cancelled:
            return "cancelled";
    }
    return "?";
}

const char* kindName(const CriticalPoint& point) { return solve::toString(point.kind); }

const char* kindWords(const CriticalPoint& point) {
    switch (point.kind) {
        case solve::PointKind::Minimum: return "local minimum";
        case solve::PointKind::Maximum: return "local maximum";
        default: return solve::toString(point.kind);
    }
}

std::string Region::check(int dimension, const std::vector<std::string>& names) const {
    if (dimension < 1) return "the objective has no variables";
    if (lower.size() != dimension || upper.size() != dimension)
        return "the box has " + std::to_string(std::min(lower.size(), upper.size())) + " ranges but the objective has " +
               std::to_string(dimension) + " variables";
    for (int i = 0; i < dimension; ++i) {
        if (!std::isfinite(lower[i]) || !std::isfinite(upper[i]))
            return "the box is not finite in " + nameOf(names, i);
        if (!(lower[i] < upper[i]))
            return "the box has no interior in " + nameOf(names, i) + ": lower " + numberText(lower[i]) +
                   " is not below upper " + numberText(upper[i]);
        // The cells and merge tolerances work in fractions of the width: it must be resolvable.
        if (!std::isfinite(upper[i] - lower[i]))  // both ends finite, the width is not
            return "the box in " + nameOf(names, i) + " is too wide: its width (" + numberText(lower[i]) + " to " +
                   numberText(upper[i]) + ") is beyond the largest number; the survey works in fractions of the width";
        if (!(upper[i] - lower[i] > 1e-9 * std::max(std::abs(lower[i]), std::abs(upper[i]))))
            return "the box in " + nameOf(names, i) + " is too narrow for its position (" + numberText(lower[i]) +
                   " to " + numberText(upper[i]) + "); its width must be above 1e-9 of its magnitude";
    }
    if (dimension >= 2) {
        if (xVariable < 0 || xVariable >= dimension || yVariable < 0 || yVariable >= dimension ||
            xVariable == yVariable)
            return "the plane needs two different variables of the " + std::to_string(dimension);
        if (held.size() != dimension)
            return "the held point has " + std::to_string(held.size()) + " values but the objective has " +
                   std::to_string(dimension) + " variables";
        for (int i = 0; i < dimension; ++i)
            if (i != xVariable && i != yVariable && !std::isfinite(held[i]))
                return "the held value of " + nameOf(names, i) + " is not finite";
    }
    return "";
}

std::string CriticalSettings::check() const {
    if (starts < 1 || starts > 10'000'000) return "starts must be 1 to 10000000 (got " + std::to_string(starts) + ")";
    if (signChangeGrid < 0 || signChangeGrid > 4000)
        return "the sign-change grid must be 0 (off) to 4000 cells per side (got " + std::to_string(signChangeGrid) + ")";
    if (maxSignChangeStarts < 0) return "the sign-change start limit must be >= 0";
    if (maxIterations < 1 || maxIterations > 100000)
        return "the refinement's iteration limit must be 1 to 100000 (got " + std::to_string(maxIterations) + ")";
    if (!(mergeTolerance > 0 && mergeTolerance < 0.1))
        return "the merge tolerance must be in (0, 0.1) (got " + numberText(mergeTolerance) + ")";
    if (!(zeroTolerance > 0 && zeroTolerance < 1))
        return "the zero-eigenvalue tolerance must be in (0, 1) (got " + numberText(zeroTolerance) + ")";
    if (!(acceptTolerance > 0 && acceptTolerance < 1))
        return "the acceptance tolerance must be in (0, 1) (got " + numberText(acceptTolerance) + ")";
    return "";
}

int CriticalMap::count(solve::PointKind kind) const {
    return static_cast<int>(std::count_if(points.begin(), points.end(), [&](const CriticalPoint& p) { return p.kind == kind; }));
}

bool forEachIndex(long begin, long end, const Control& control, const std::function<void(long)>& work) {
    const long count = end - begin;
    if (count <= 0) return !control.cancelled();
    int threads = control.threads > 0 ? control.threads : static_cast<int>(std::thread::hardware_concurrency());
    threads = static_cast<int>(std::clamp<long>(threads, 1, count));
    // Chunks small enough to balance uneven pieces (runs near basin boundaries take longer),
    // large enough that the shared counter is not contended.
    const long chunk = std::clamp<long>(count / (static_cast<long>(threads) * 64), 1, 256);
    std::atomic<long> next{begin}, done{0};
    std::atomic<bool> stop{false};
    std::exception_ptr failure;
    std::mutex failureMutex;
    auto loop = [&](bool reports) {
        try {
            while (!stop.load(std::memory_order_relaxed)) {
                if (control.cancelled()) {
                    stop = true;
                    break;
                }
                const long a = next.fetch_add(chunk);
                if (a >= end) break;
                const long b = std::min(a + chunk, end);
                for (long i = a; i < b; ++i) work(i);
                const long finished = done.fetch_add(b - a) + (b - a);
                if (reports && control.progress) control.progress(static_cast<double>(finished) / count);
            }
        } catch (...) {
            const std::lock_guard<std::mutex> lock(failureMutex);
            if (!failure) failure = std::current_exception();
            stop = true;
        }
    };
    std::vector<std::thread> pool;
    for (int t = 1; t < threads; ++t) pool.emplace_back(loop, false);
    loop(true);
    for (std::thread& t : pool) t.join();
    if (failure) std::rethrow_exception(failure);
    const bool complete = !stop.load() && !control.cancelled();
    if (complete && control.progress) control.progress(1.0);
    return complete;
}

// ---------------------------------------------------------------- CriticalSearch

CriticalSearch::CriticalSearch(const Objective& objective, Region region, CriticalSettings settings,
                               const Control& control)
    : objective_(objective), region_(std::move(region)), settings_(settings) {
    const int n = objective_.dimension();
    const std::vector<std::string> names = objective_.variableNames();
    if (n >= 2 && region_.held.size() == 0) region_.held = Vector::Zero(n);
    std::string problem = region_.check(n, names);
    if (problem.empty()) problem = settings_.check();
    if (n > 64 && problem.empty()) problem = "the search supports up to 64 variables (got " + std::to_string(n) + ")";
    if (!problem.empty()) throw std::invalid_argument(problem);

    // Low-discrepancy starts in the box.
    for (int k = 1; k <= settings_.starts; ++k) {
        const std::vector<double> u = haltonPoint(k, n);
        Vector x(n);
        for (int i = 0; i < n; ++i) x[i] = region_.lower[i] + u[static_cast<std::size_t>(i)] * region_.width(i);
        starts_.push_back(std::move(x));
        sources_.push_back(StartSource::LowDiscrepancy);
    }
    lowDiscrepancy_ = settings_.starts;

    // Scales for the tolerances: how large |g| and the curvature typically are in this box.
    std::vector<double> gradientNorms(starts_.size(), solve::kNaN), curvatures(starts_.size(), solve::kNaN);
    forEachIndex(0, static_cast<long>(starts_.size()), Control{nullptr, {}, control.threads}, [&](long k) {
        Vector g;
        Matrix h;
        objective_.valueGradientHessian(starts_[static_cast<std::size_t>(k)], g, h);
        if (!g.allFinite() || !h.allFinite()) return;
        gradientNorms[static_cast<std::size_t>(k)] = g.norm();
        const Eigen::SelfAdjointEigenSolver<Matrix> eigen(h, Eigen::EigenvaluesOnly);
        if (eigen.info() == Eigen::Success) curvatures[static_cast<std::size_t>(k)] = eigen.eigenvalues().cwiseAbs().maxCoeff();
    });
    auto rms = [](const std::vector<double>& values) {
        double sum = 0;
        long count = 0;
        for (double v : values)
            if (std::isfinite(v)) {
                sum += v * v;
                ++count;
            }
        return count > 0 ? std::sqrt(sum / static_cast<double>(count)) : 0.0;
    };
    gradientScale_ = rms(gradientNorms);
    hessianScale_ = rms(curvatures);
    if (!(gradientScale_ > 0) || !std::isfinite(gradientScale_)) gradientScale_ = 1;
    if (!(hessianScale_ > 0) || !std::isfinite(hessianScale_)) hessianScale_ = 1;

    // Centres of the plane's grid cells where both plotted gradient components change sign.
    const int m = settings_.signChangeGrid;
    if (n >= 2 && m > 0) {
        const int xv = region_.xVariable, yv = region_.yVariable;
        const long corners = static_cast<long>(m + 1) * (m + 1);
        std::vector<double> gx(static_cast<std::size_t>(corners)), gy(static_cast<std::size_t>(corners));
        auto cornerX = [&](int i) { return region_.lower[xv] + region_.width(xv) * i / m; };
        auto cornerY = [&](int j) { return region_.lower[yv] + region_.width(yv) * j / m; };
        forEachIndex(0, corners, Control{nullptr, {}, control.threads}, [&](long k) {
            Vector x = region_.held;
            x[xv] = cornerX(static_cast<int>(k % (m + 1)));
            x[yv] = cornerY(static_cast<int>(k / (m + 1)));
            Vector g;
            objective_.valueGradient(x, g);
            gx[static_cast<std::size_t>(k)] = g[xv];
            gy[static_cast<std::size_t>(k)] = g[yv];
        });
        auto changes = [&](const std::vector<double>& v, int i, int j) {
            double lo = std::numeric_limits<double>::infinity(), hi = -lo;
            for (int dj = 0; dj <= 1; ++dj)
                for (int di = 0; di <= 1; ++di) {
                    const double c = v[static_cast<std::size_t>((j + dj) * (m + 1) + i + di)];
                    if (!std::isfinite(c)) return false;
                    lo = std::min(lo, c);
                    hi = std::max(hi, c);
                }
            return lo <= 0 && hi >= 0;
        };
        std::vector<std::pair<int, int>> cells;
        for (int j = 0; j < m; ++j)
            for (int i = 0; i < m; ++i)
                if (changes(gx, i, j) && changes(gy, i, j)) cells.emplace_back(i, j);
        // A flat region (a valley floor, a constant stretch) can mark thousands of cells: keep an
        // evenly spread subset.
        const std::size_t keep = std::min<std::size_t>(cells.size(), static_cast<std::size_t>(settings_.maxSignChangeStarts));
        for (std::size_t k = 0; k < keep; ++k) {
            const auto [i, j] = cells[k * cells.size() / keep];
            Vector x = region_.held;
            x[xv] = region_.lower[xv] + region_.width(xv) * (i + 0.5) / m;
            x[yv] = region_.lower[yv] + region_.width(yv) * (j + 0.5) / m;
            starts_.push_back(std::move(x));
            sources_.push_back(StartSource::SignChange);
        }
    }
}

bool CriticalSearch::insideBox(const Vector& x) const {
    for (Eigen::Index i = 0; i < x.size(); ++i) {
        const double slack = settings_.mergeTolerance * region_.width(static_cast<int>(i));
        if (!(x[i] >= region_.lower[i] - slack && x[i] <= region_.upper[i] + slack)) return false;
    }
    return true;
}

double CriticalSearch::scaledDistance(const Vector& a, const Vector& b) const {
    double d = 0;
    for (Eigen::Index i = 0; i < a.size(); ++i) d = std::max(d, std::abs(a[i] - b[i]) / region_.width(static_cast<int>(i)));
    return d;
}

StartOutcome CriticalSearch::run(std::size_t i) const { return refine(starts_.at(i)); }

// Levenberg-Marquardt on grad f = 0 with the Hessian as Jacobian (symmetric, so one
// eigendecomposition gives every damped step): p = -V diag(l / (l^2 + mu)) V' g with
// mu = (|g| / g_scale)^2 * max|l|^2, which vanishes like |g|^2 near a root (Yamashita &
// Fukushima 2001: quadratic convergence at nonsingular roots, and under a local error bound also
// at non-isolated ones, e.g. a valley of minima; at a degenerate isolated root such as x^4 it
// stays far below l^2, so the step is Newton's and converges linearly), and is large far from
// any root, where the step turns toward -grad(1/2 |g|^2) = -H g. Armijo backtracking on 1/2 |g|^2 (Dennis &
// Schnabel 1983, Alg. A6.3.1). Iterates until 1/2 |g|^2 cannot be decreased any more, or the
// step falls below kStepFloor of the box: refined to rounding.
StartOutcome CriticalSearch::refine(const Vector& start) const {
    StartOutcome out;
    const int n = objective_.dimension();
    Vector x = start, g, trialG;
    Matrix h;
    objective_.valueGradientHessian(x, g, h);
    if (!g.allFinite() || !h.allFinite()) {
        out.status = StartOutcome::Status::NonFinite;
        out.x = x;
        return out;
    }
    Eigen::SelfAdjointEigenSolver<Matrix> eigen(n);
    Vector coefficients(n), step(n), trial(n);
    double phi = 0.5 * g.squaredNorm();
    int iteration = 0;
    for (; iteration < settings_.maxIterations && phi > 0; ++iteration) {
        eigen.compute(h);
        if (eigen.info() != Eigen::Success) break;
        const Vector& lambda = eigen.eigenvalues();
        const double largest = lambda.cwiseAbs().maxCoeff();
        if (!(largest > 0)) break;  // H = 0 with g != 0: nothing points anywhere
        const double relative = g.norm() / gradientScale_;
        const double mu = relative * relative * largest * largest;
        coefficients.noalias() = eigen.eigenvectors().transpose() * g;
        double slope = 0;  // directional derivative of 1/2|g|^2 along the step: (Hg)'p
        for (int k = 0; k < n; ++k) {
            const double l = lambda[k];
            const double factor = l / (l * l + mu);
            slope -= l * coefficients[k] * coefficients[k] * factor;
            coefficients[k] *= -factor;
        }
        step.noalias() = eigen.eigenvectors() * coefficients;
        if (!(slope < 0) || !step.allFinite()) break;
        double alpha = 1;
        bool accepted = false;
        for (int b = 0; b < kMaxBacktracks; ++b, alpha *= 0.5) {
            trial = x + alpha * step;
            objective_.valueGradient(trial, trialG);
            if (trialG.allFinite()) {
                const double trialPhi = 0.5 * trialG.squaredNorm();
                if (trialPhi <= phi + kArmijo * alpha * slope && trialPhi < phi) {
                    accepted = true;
                    break;
                }
            }
        }
        if (!accepted) break;  // 1/2|g|^2 cannot go lower along the step: rounding reached
        bool tiny = true;
        for (int i = 0; i < n; ++i) tiny = tiny && std::abs(alpha * step[i]) <= kStepFloor * region_.width(i);
        x.swap(trial);
        objective_.valueGradientHessian(x, g, h);
        if (!g.allFinite() || !h.allFinite()) {
            out.status = StartOutcome::Status::NonFinite;
            out.x = x;
            out.iterations = iteration + 1;
            return out;
        }
        phi = 0.5 * g.squaredNorm();
        for (int i = 0; i < n; ++i)
            if (x[i] < region_.lower[i] - region_.width(i) || x[i] > region_.upper[i] + region_.width(i)) {
                out.status = StartOutcome::Status::LeftBox;
                out.x = x;
                out.iterations = iteration + 1;
                out.gradientNorm = g.norm();
                return out;
            }
        if (tiny) {
            ++iteration;
            break;
        }
    }
    out.x = x;
    out.iterations = iteration;
    out.gradientNorm = g.norm();
    out.status = out.gradientNorm <= settings_.acceptTolerance * gradientScale_ ? StartOutcome::Status::Converged
                                                                               : StartOutcome::Status::Stalled;
    return out;
}

CriticalPoint CriticalSearch::classify(const Vector& x) const {
    CriticalPoint p;
    p.x = x;
    Vector g;
    Matrix h;
    p.value = objective_.valueGradientHessian(x, g, h);
    p.gradientNorm = g.norm();
    const int n = objective_.dimension();
    p.eigenvalues = Vector::Constant(n, solve::kNaN);
    p.lowestEigenvector = Vector::Zero(n);
    if (!h.allFinite()) return p;
    const Eigen::SelfAdjointEigenSolver<Matrix> eigen(h);
    if (eigen.info() != Eigen::Success) return p;
    p.eigenvalues = eigen.eigenvalues();
    p.lowestEigenvector = eigen.eigenvectors().col(0);
    // Zero relative to the largest curvature here; and all zero when the Hessian itself is
    // negligible against the box's typical curvature (a monkey saddle refined to 1e-13).
    const double largest = p.eigenvalues.cwiseAbs().maxCoeff();
    const bool vanishing = largest <= settings_.zeroTolerance * hessianScale_;
    const double zero = settings_.zeroTolerance * largest;
    int negative = 0, zeros = 0;
    for (int k = 0; k < n; ++k) {
        const double l = p.eigenvalues[k];
        if (vanishing || std::abs(l) <= zero)
            ++zeros;
        else if (l < 0)
            ++negative;
    }
    p.index = negative;
    p.zeroEigenvalues = zeros;
    if (zeros > 0)
        p.kind = solve::PointKind::Degenerate;
    else if (negative == 0)
        p.kind = solve::PointKind::Minimum;
    else if (negative == n)
        p.kind = solve::PointKind::Maximum;
    else
        p.kind = solve::PointKind::Saddle;
    return p;
}

bool CriticalSearch::runRange(std::size_t begin, std::size_t end, std::vector<StartOutcome>& outcomes,
                              const Control& control) const {
    outcomes.assign(end - begin, StartOutcome{StartOutcome::Status::Cancelled, {}, solve::kNaN, 0});
    return forEachIndex(static_cast<long>(begin), static_cast<long>(end), control,
                        [&](long i) { outcomes[static_cast<std::size_t>(i) - begin] = run(static_cast<std::size_t>(i)); });
}

CriticalMap CriticalSearch::find(const Control& control) const {
    std::vector<StartOutcome> outcomes;
    const bool complete = runRange(0, starts_.size(), outcomes, control);
    CriticalMap map = assemble(outcomes);
    map.cancelled = !complete;
    return map;
}

CriticalMap CriticalSearch::assemble(const std::vector<StartOutcome>& outcomes) const {
    if (outcomes.size() != starts_.size())
        throw std::invalid_argument("assemble: " + std::to_string(outcomes.size()) + " outcomes for " +
                                    std::to_string(starts_.size()) + " starts");
    CriticalMap map;
    map.variables = objective_.variableNames();
    map.region = region_;
    map.settings = settings_;
    map.starts = static_cast<int>(starts_.size());
    map.lowDiscrepancyStarts = lowDiscrepancy_;
    map.signChangeStarts = map.starts - lowDiscrepancy_;
    map.gradientScale = gradientScale_;
    map.hessianScale = hessianScale_;

    // Merge in start order: the first start to reach a point fixes where it is stored.
    std::vector<Vector> distinct;
    std::vector<int> hits;
    for (const StartOutcome& o : outcomes) {
        switch (o.status) {
            case StartOutcome::Status::Converged:
                break;
            case StartOutcome::Status::Stalled:
                ++map.stalled;
                continue;
            case StartOutcome::Status::LeftBox:
                ++map.leftBox;
                continue;
            case StartOutcome::Status::NonFinite:
                ++map.nonFinite;
                continue;
            case StartOutcome::Status::Cancelled:
                map.cancelled = true;
                continue;
        }
        if (!insideBox(o.x)) {
            ++map.outside;
            continue;
        }
        ++map.converged;
        bool merged = false;
        for (std::size_t k = 0; k < distinct.size() && !merged; ++k)
            if (scaledDistance(distinct[k], o.x) <= settings_.mergeTolerance) {
                ++hits[k];
                merged = true;
            }
        if (!merged) {
            distinct.push_back(o.x);
            hits.push_back(1);
        }
    }

    std::vector<CriticalPoint> classified(distinct.size());
    forEachIndex(0, static_cast<long>(distinct.size()), Control{}, [&](long k) {
        classified[static_cast<std::size_t>(k)] = classify(distinct[static_cast<std::size_t>(k)]);
        classified[static_cast<std::size_t>(k)].hits = hits[static_cast<std::size_t>(k)];
    });

    // Degenerate points that lie along each other's flat directions form one continuum: two are
    // joined when they are within kLinkDistance and the refinement from their midpoint lands
    // close to that midpoint on a degenerate point (the set of critical points runs between
    // them). Two isolated degenerate points fail this: from their midpoint it lands on one of them.
    std::vector<int> degenerate;
    for (std::size_t k = 0; k < classified.size(); ++k)
        if (classified[k].kind == solve::PointKind::Degenerate) degenerate.push_back(static_cast<int>(k));
    // Pairs within the link distance, shortest first (as Kruskal's algorithm takes edges): a
    // pair already in one component needs no check, so a continuum of m members costs about m
    // refinements, not m^2.
    Components components(static_cast<int>(degenerate.size()));
    std::vector<std::tuple<double, int, int>> pairs;
    for (std::size_t a = 0; a < degenerate.size(); ++a)
        for (std::size_t b = a + 1; b < degenerate.size(); ++b) {
            const double d = scaledDistance(distinct[static_cast<std::size_t>(degenerate[a])],
                                            distinct[static_cast<std::size_t>(degenerate[b])]);
            if (d <= kLinkDistance) pairs.emplace_back(d, static_cast<int>(a), static_cast<int>(b));
        }
    std::sort(pairs.begin(), pairs.end());
    for (const auto& [d, a, b] : pairs) {
        if (components.find(a) == components.find(b)) continue;
        const Vector& pa = distinct[static_cast<std::size_t>(degenerate[static_cast<std::size_t>(a)])];
        const Vector& pb = distinct[static_cast<std::size_t>(degenerate[static_cast<std::size_t>(b)])];
        const Vector middle = 0.5 * (pa + pb);
        const StartOutcome o = refine(middle);
        if (o.status != StartOutcome::Status::Converged) continue;
        // Euclidean distances in box-scaled coordinates.
        Vector scaledGap(middle.size()), scaledLanding(middle.size());
        for (Eigen::Index i = 0; i < middle.size(); ++i) {
            scaledGap[i] = (pa[i] - pb[i]) / region_.width(static_cast<int>(i));
            scaledLanding[i] = (o.x[i] - middle[i]) / region_.width(static_cast<int>(i));
        }
        if (scaledLanding.norm() > 0.25 * scaledGap.norm()) continue;
        if (classify(o.x).kind != solve::PointKind::Degenerate) continue;
        components.join(a, b);
    }

    std::vector<char> absorbed(classified.size(), 0);
    for (std::size_t a = 0; a < degenerate.size(); ++a) {
        const int root = components.find(static_cast<int>(a));
        if (root != static_cast<int>(a)) continue;
        std::vector<int> members;
        for (std::size_t b = 0; b < degenerate.size(); ++b)
            if (components.find(static_cast<int>(b)) == root) members.push_back(degenerate[b]);
        if (members.size() < 2) continue;
        int lowest = members.front();
        for (int k : members)
            if (classified[static_cast<std::size_t>(k)].value < classified[static_cast<std::size_t>(lowest)].value) lowest = k;
        CriticalPoint entry = classified[static_cast<std::size_t>(lowest)];
        entry.continuum = true;
        entry.members = static_cast<int>(members.size());
        entry.hits = 0;
        entry.memberLower = entry.memberUpper = entry.x;
        for (int k : members) {
            const CriticalPoint& m = classified[static_cast<std::size_t>(k)];
            entry.hits += m.hits;
            entry.memberLower = entry.memberLower.cwiseMin(m.x);
            entry.memberUpper = entry.memberUpper.cwiseMax(m.x);
            entry.memberPoints.push_back(m.x);
            if (k != lowest) absorbed[static_cast<std::size_t>(k)] = 1;
        }
        classified[static_cast<std::size_t>(lowest)] = std::move(entry);
    }
    for (std::size_t k = 0; k < classified.size(); ++k)
        if (!absorbed[k]) map.points.push_back(std::move(classified[k]));

    std::stable_sort(map.points.begin(), map.points.end(), [](const CriticalPoint& a, const CriticalPoint& b) {
        if (kindRank(a) != kindRank(b)) return kindRank(a) < kindRank(b);
        if (a.index != b.index) return a.index < b.index;
        if (a.value != b.value) return a.value < b.value;
        for (Eigen::Index i = 0; i < a.x.size(); ++i)
            if (a.x[i] != b.x[i]) return a.x[i] < b.x[i];
        return false;
    });

    for (const CriticalPoint& p : map.points) {
        if (p.hits == 1) ++map.foundOnce;
        if (p.hits == 2) ++map.foundTwice;
    }
    map.estimatedMissing = map.foundOnce * (map.foundOnce - 1.0) / (2.0 * (map.foundTwice + 1.0));
    map.likelyComplete = map.foundOnce == 0 && !map.cancelled;
    return map;
}

CriticalMap findCriticalPoints(const Objective& objective, const Region& region, const CriticalSettings& settings,
                               const Control& control) {
    const auto started = std::chrono::steady_clock::now();
    CriticalMap map = CriticalSearch(objective, region, settings, control).find(control);
    map.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
    return map;
}

int matchPoint(const CriticalMap& map, const Vector& x) {
    auto distance = [&](const Vector& a, const Vector& b) {
        double d = 0;
        for (Eigen::Index i = 0; i < a.size(); ++i)
            d = std::max(d, std::abs(a[i] - b[i]) / (map.region.upper[i] - map.region.lower[i]));
        return d;
    };
    int best = -1;
    double bestDistance = std::numeric_limits<double>::infinity();
    for (std::size_t k = 0; k < map.points.size(); ++k) {
        const CriticalPoint& p = map.points[k];
        if (p.continuum) continue;
        const double d = distance(p.x, x);
        if (d <= map.settings.mergeTolerance && d < bestDistance) {
            best = static_cast<int>(k);
            bestDistance = d;
        }
    }
    if (best >= 0) return best;
    for (std::size_t k = 0; k < map.points.size(); ++k) {
        const CriticalPoint& p = map.points[k];
        if (!p.continuum) continue;
        for (const Vector& member : p.memberPoints) {
            const double d = distance(member, x);
            if (d <= kLinkDistance && d < bestDistance) {
                best = static_cast<int>(k);
                bestDistance = d;
            }
        }
    }
    return best;
}

}  // namespace sw::survey
