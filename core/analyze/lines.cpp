// f and its first-order pictures along a line x + t d (the slice view).
#include "core/analyze/analyze.h"

namespace sw::analyze {

std::vector<double> linspace(double tMin, double tMax, int count) {
    std::vector<double> ts;
    if (count <= 0) return ts;
    ts.reserve(count);
    if (count == 1) {
        ts.push_back(tMin);
        return ts;
    }
    for (int k = 0; k < count; ++k) ts.push_back(tMin + (tMax - tMin) * k / (count - 1));
    ts.back() = tMax;
    return ts;
}

std::vector<double> valuesAlong(const Objective& objective, const Vector& x, const Vector& direction,
                                const std::vector<double>& ts) {
    std::vector<double> values;
    values.reserve(ts.size());
    Vector point(x.size());
    for (double t : ts) {
        point = x + t * direction;
        values.push_back(objective.value(point));
    }
    return values;
}

std::vector<double> sufficientDecreaseLine(double value, const Vector& gradient, const Vector& direction,
                                           const std::vector<double>& ts, double c1) {
    // Armijo condition f(x + t d) <= f(x) + c1 t g'd (Nocedal & Wright 2006, eq. 3.4).
    const double slope = gradient.dot(direction);
    std::vector<double> line;
    line.reserve(ts.size());
    for (double t : ts) line.push_back(value + c1 * t * slope);
    return line;
}

}  // namespace sw::analyze
