// Contour levels that show both the valley floor and the walls.
//
// Rule (common practice, no published source): let d = f - fmin over the finite cells that
// lie above the minimum, and q10, q90 its 10th and 90th percentiles. When q90 / q10 >= 20
// (the heights span more than about 1.3 decades, as in a steep-walled curved valley), the
// levels are spaced evenly in log d from the 2nd to the 98th percentile of d, so the floor
// gets as many lines as the walls. Otherwise (a bowl-like field, where d is roughly uniform
// over the box) they are spaced evenly between fmin and fmax, excluding both ends. On a field
// of more than 65,536 cells the percentiles come from a regular subsample (see planLevels).
#include "core/analyze/analyze.h"

#include <algorithm>
#include <cmath>

namespace sw::analyze {

namespace {

// The p-quantiles of values (reordered in place), interpolated between order statistics,
// for ascending ps. nth_element keeps this linear in the number of cells (a full sort
// dominated a 600 x 600 landscape); each quantile after the first partitions only what lies
// above the one before it, so four quantiles cost about two passes, not four.
std::vector<double> quantiles(std::vector<double>& values, const std::vector<double>& ps) {
    std::vector<double> result;
    std::size_t begin = 0;  // everything before `begin` is <= every value from `begin` on
    for (double p : ps) {
        const double position = p * static_cast<double>(values.size() - 1);
        const auto below = std::max(begin, static_cast<std::size_t>(std::floor(position)));
        const double t = position - static_cast<double>(below);
        std::nth_element(values.begin() + static_cast<std::ptrdiff_t>(begin),
                         values.begin() + static_cast<std::ptrdiff_t>(below), values.end());
        const double low = values[below];
        begin = below;
        if (t <= 0 || below + 1 >= values.size()) {
            result.push_back(low);
            continue;
        }
        // Everything past `below` is >= low; the next order statistic is their minimum.
        const double high = *std::min_element(values.begin() + static_cast<std::ptrdiff_t>(below) + 1, values.end());
        result.push_back(low + t * (high - low));
    }
    return result;
}

}  // namespace

namespace {

struct LevelPlan {
    bool logSpaced = false;
    double lo = 0, hi = 0;  // 2nd and 98th percentiles of f - fmin (cells above fmin)
};

LevelPlan planLevels(const Field& field) {
    LevelPlan plan;
    // Levels only need the percentiles to a few digits: a large field gives them from a
    // regular subsample of at most ~65k cells (every stride-th cell), which keeps this step
    // well under the cost of tracing the contours.
    constexpr std::size_t kMaxCells = 65536;
    const std::size_t stride = (field.values.size() + kMaxCells - 1) / kMaxCells;
    std::vector<double> heights;
    heights.reserve(std::min(field.values.size(), kMaxCells));
    for (std::size_t k = 0; k < field.values.size(); k += stride) {
        const double v = field.values[k];
        if (std::isfinite(v) && v > field.finiteMin) heights.push_back(v - field.finiteMin);
    }
    if (heights.size() < 10) return plan;
    const std::vector<double> q = quantiles(heights, {0.02, 0.10, 0.90, 0.98});
    const double q10 = q[1], q90 = q[2];
    plan.lo = q[0];
    plan.hi = q[3];
    plan.logSpaced = q10 > 0 && q90 / q10 >= 20 && plan.lo > 0 && plan.hi > plan.lo;
    return plan;
}

}  // namespace

bool levelsAreLogSpaced(const Field& field) {
    return planLevels(field).logSpaced;
}

std::vector<double> chooseLevels(const Field& field, int count) {
    std::vector<double> levels;
    if (count <= 0) return levels;
    const double fmin = field.finiteMin, fmax = field.finiteMax;
    if (static_cast<long>(field.values.size()) == field.nonFiniteCells || !(fmax > fmin)) return levels;

    const LevelPlan plan = planLevels(field);
    levels.reserve(count);
    if (plan.logSpaced) {
        const double logLo = std::log(plan.lo), logHi = std::log(plan.hi);
        for (int k = 0; k < count; ++k) {
            const double t = count == 1 ? 0.5 : static_cast<double>(k) / (count - 1);
            levels.push_back(fmin + std::exp(logLo + t * (logHi - logLo)));
        }
    } else {
        for (int k = 0; k < count; ++k) levels.push_back(fmin + (fmax - fmin) * (k + 1) / (count + 1));
    }
    // Rounding can make neighbouring levels equal on a nearly flat field: keep them distinct.
    levels.erase(std::unique(levels.begin(), levels.end()), levels.end());
    return levels;
}

}  // namespace sw::analyze
