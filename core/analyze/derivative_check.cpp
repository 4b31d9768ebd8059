// A finite-difference check of an objective's derivatives: a diagnostic for hand-written
// objectives and a guard in tests (Saddlewise's own derivatives are exact, not estimated).
#include "core/analyze/analyze.h"

#include <cmath>
#include <cstdio>
#include <limits>

namespace sw::analyze {

DerivativeCheck checkDerivatives(const Objective& objective, const Vector& x, double tolerance) {
    DerivativeCheck check;
    const int n = objective.dimension();
    objective.valueGradientHessian(x, check.gradient, check.hessian);
    check.gradientEstimate.resize(n);
    check.hessianEstimate.resize(n, n);

    // Central differences: error O(h^2) from truncation plus O(eps/h) from rounding, balanced
    // at h ~ eps^(1/3) (Nocedal & Wright 2006, sec. 8.1).
    const double base = std::cbrt(std::numeric_limits<double>::epsilon());
    Vector plus = x, minus = x, gradientPlus, gradientMinus;
    for (int i = 0; i < n; ++i) {
        const double h = base * std::max(1.0, std::abs(x(i)));
        plus(i) = x(i) + h;
        minus(i) = x(i) - h;
        const double step = plus(i) - minus(i);  // the step actually represented
        const double fPlus = objective.valueGradient(plus, gradientPlus);
        const double fMinus = objective.valueGradient(minus, gradientMinus);
        check.gradientEstimate(i) = (fPlus - fMinus) / step;
        check.hessianEstimate.col(i) = (gradientPlus - gradientMinus) / step;
        plus(i) = minus(i) = x(i);
    }
    check.hessianEstimate = (0.5 * (check.hessianEstimate + check.hessianEstimate.transpose())).eval();

    auto relative = [](double exact, double estimate) {
        if (!std::isfinite(exact) || !std::isfinite(estimate)) return std::numeric_limits<double>::infinity();
        return std::abs(exact - estimate) / std::max({1.0, std::abs(exact), std::abs(estimate)});
    };
    for (int i = 0; i < n; ++i) {
        const double e = relative(check.gradient(i), check.gradientEstimate(i));
        if (check.worstGradientIndex < 0 || e > check.gradientError) {
            check.gradientError = e;
            check.worstGradientIndex = i;
        }
        for (int j = 0; j < n; ++j) {
            const double h = relative(check.hessian(i, j), check.hessianEstimate(i, j));
            if (check.worstHessianRow < 0 || h > check.hessianError) {
                check.hessianError = h;
                check.worstHessianRow = i;
                check.worstHessianColumn = j;
            }
        }
    }
    check.passed = check.gradientError <= tolerance && check.hessianError <= tolerance;

    const std::vector<std::string> names = objective.variableNames();
    auto name = [&](int k) { return k >= 0 && k < static_cast<int>(names.size()) ? names[k] : std::to_string(k); };
    char text[320];
    if (n == 0) {
        std::snprintf(text, sizeof text, "nothing to check: the objective has no variables");
    } else if (check.passed) {
        std::snprintf(text, sizeof text,
                      "derivatives agree with central differences (worst relative error: gradient %.2g, Hessian %.2g; "
                      "tolerance %.2g)",
                      check.gradientError, check.hessianError, tolerance);
    } else if (check.gradientError > tolerance) {
        const int i = check.worstGradientIndex;
        std::snprintf(text, sizeof text,
                      "gradient component %s is %.10g but central differences give %.10g (relative error %.2g > %.2g)",
                      name(i).c_str(), check.gradient(i), check.gradientEstimate(i), check.gradientError, tolerance);
    } else {
        const int i = check.worstHessianRow, j = check.worstHessianColumn;
        std::snprintf(text, sizeof text,
                      "Hessian entry (%s, %s) is %.10g but central differences of the gradient give %.10g "
                      "(relative error %.2g > %.2g)",
                      name(i).c_str(), name(j).c_str(), check.hessian(i, j), check.hessianEstimate(i, j),
                      check.hessianError, tolerance);
    }
    check.message = text;
    return check;
}

}  // namespace sw::analyze
