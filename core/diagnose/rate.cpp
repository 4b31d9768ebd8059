#include "core/diagnose/rate.h"

#include "core/diagnose/rules.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

namespace sw::diagnose {

const char* toString(RateEstimate::Kind kind) {
    switch (kind) {
        case RateEstimate::Kind::Unknown: return "unknown";
        case RateEstimate::Kind::Sublinear: return "sublinear";
        case RateEstimate::Kind::Linear: return "linear";
        case RateEstimate::Kind::Superlinear: return "superlinear";
        case RateEstimate::Kind::Quadratic: return "quadratic";
    }
    return "unknown";
}

double RateEstimate::iterationsToReach(double from, double to) const {
    if (!(factor > 0 && factor < 1) || !(from > 0) || !(to > 0)) return solve::kNaN;
    if (from <= to) return 0;
    return std::log(to / from) / std::log(factor);
}

double logLinearFactor(const std::vector<int>& iterations, const std::vector<double>& values) {
    double sk = 0, sy = 0, skk = 0, sky = 0;
    int count = 0;
    for (std::size_t i = 0; i < values.size() && i < iterations.size(); ++i) {
        if (!(values[i] > 0) || !std::isfinite(values[i])) continue;
        const double k = iterations[i], y = std::log(values[i]);
        sk += k;
        sy += y;
        skk += k * k;
        sky += k * y;
        ++count;
    }
    if (count < 3) return solve::kNaN;
    const double denominator = count * skk - sk * sk;
    if (!(denominator > 0)) return solve::kNaN;
    return std::exp((count * sky - sk * sy) / denominator);
}

namespace {

// Step norms of accepted steps, newest last, with their iteration numbers; a rejected
// trust-region trial did not move x, so it is no step of the sequence x_k.
struct StepSample {
    int iteration;
    double norm;
};

std::vector<StepSample> acceptedSteps(const solve::Run& run) {
    std::vector<StepSample> steps;
    for (const solve::IterationRecord& r : run.trace) {
        if (!r.accepted || !(r.stepNorm > 0) || !std::isfinite(r.stepNorm) || r.step.size() == 0) continue;
        // Steps at the level of rounding carry no rate information.
        const double floor = thresholds::kRoundingSteps * std::numeric_limits<double>::epsilon() * (1.0 + r.x.norm());
        if (r.stepNorm <= floor) continue;
        steps.push_back({r.iteration, r.stepNorm});
    }
    return steps;
}

// True when no record is missing between iterations a < b (thinned traces have gaps; a
// rejected step is present as its own record, so it does not count as a gap).
bool contiguous(const solve::Run& run, int a, int b) {
    int present = 0;
    for (const solve::IterationRecord& r : run.trace)
        if (r.iteration >= a && r.iteration <= b) ++present;
    return present == b - a + 1;
}

}  // namespace

RateEstimate estimateRate(const solve::Run& run, int window) {
    RateEstimate estimate;
    // Linear factor of the gradient norm over the last `window` records.
    std::vector<int> iterations;
    std::vector<double> norms;
    for (auto it = run.trace.rbegin(); it != run.trace.rend() && static_cast<int>(norms.size()) < window; ++it) {
        if (!(it->gradientNorm > 0) || !std::isfinite(it->gradientNorm)) continue;
        iterations.push_back(it->iteration);
        norms.push_back(it->gradientNorm);
    }
    std::reverse(iterations.begin(), iterations.end());
    std::reverse(norms.begin(), norms.end());
    if (norms.size() >= 4) {
        estimate.factor = logLinearFactor(iterations, norms);
        estimate.first = iterations.front();
        estimate.last = iterations.back();
        estimate.samples = static_cast<int>(norms.size());
    }

    // Order from the last accepted steps (ACOC, Cordero & Torregrosa 2007): over the last run of
    // shrinking, contiguous steps (3 to 5 of them), the slope of ln|s_{k+1}| against ln|s_k| by
    // least squares. With three steps this is the ACOC formula itself; more steps steady it.
    const std::vector<StepSample> steps = acceptedSteps(run);
    std::size_t begin = steps.size();
    while (begin > 0 && steps.size() - begin < 5) {
        const std::size_t j = begin - 1;
        if (begin < steps.size() &&
            !(steps[begin].norm < steps[j].norm && contiguous(run, steps[j].iteration, steps[begin].iteration)))
            break;
        begin = j;
    }
    if (steps.size() - begin >= 3) {
        double sx = 0, sy = 0, sxx = 0, sxy = 0;
        const double pairs = static_cast<double>(steps.size() - begin - 1);
        for (std::size_t j = begin; j + 1 < steps.size(); ++j) {
            const double a = std::log(steps[j].norm), b = std::log(steps[j + 1].norm);
            sx += a;
            sy += b;
            sxx += a * a;
            sxy += a * b;
        }
        const double denominator = pairs * sxx - sx * sx;
        if (denominator > 0) estimate.order = (pairs * sxy - sx * sy) / denominator;
    }

    // Ratios of successive gradient norms over contiguous records: superlinear convergence shows
    // them falling toward 0, and any faster-than-linear order needs the last one small.
    std::vector<double> ratios;
    for (std::size_t j = 1; j < norms.size(); ++j)
        if (iterations[j] - iterations[j - 1] == 1 && contiguous(run, iterations[j - 1], iterations[j]))
            ratios.push_back(norms[j] / norms[j - 1]);
    const double lastRatio = ratios.empty() ? solve::kNaN : ratios.back();
    const bool lastSmall = lastRatio <= thresholds::kSuperlinearLastRatio;
    // Superlinear: over the last (up to) six ratios, a least-squares line through log(ratio)
    // against position falls by at least a factor 10 (a fast but linear sequence keeps its ratio).
    bool ratiosFalling = false;
    if (ratios.size() >= 3 && lastSmall) {
        const std::size_t m = std::min<std::size_t>(ratios.size(), 6);
        std::vector<int> position;
        std::vector<double> tail;
        for (std::size_t j = ratios.size() - m; j < ratios.size(); ++j) {
            position.push_back(static_cast<int>(j));
            tail.push_back(ratios[j]);
        }
        const double perStep = logLinearFactor(position, tail);
        ratiosFalling = perStep > 0 && std::log(perStep) * static_cast<double>(m - 1) <= std::log(0.1);
    }

    // An order far above what any method here attains is a lucky last step, not a rate.
    const bool credible = std::isfinite(estimate.order) && estimate.order <= thresholds::kMostCredibleOrder;
    if (std::isfinite(estimate.order) && !credible && lastSmall) {
        estimate.kind = RateEstimate::Kind::Superlinear;
    } else if (credible && estimate.order >= thresholds::kQuadraticOrder && lastSmall) {
        estimate.kind = RateEstimate::Kind::Quadratic;
    } else if ((credible && estimate.order >= thresholds::kSuperlinearOrder && lastSmall) ||
               ratiosFalling) {
        estimate.kind = RateEstimate::Kind::Superlinear;
    } else if (std::isfinite(estimate.factor)) {
        estimate.kind = estimate.factor < thresholds::kSublinearFactor ? RateEstimate::Kind::Linear
                                                                       : RateEstimate::Kind::Sublinear;
    }
    return estimate;
}

}  // namespace sw::diagnose
