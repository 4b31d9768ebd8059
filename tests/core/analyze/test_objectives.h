#pragma once
// Small hand-written objectives for the analysis tests (exact derivatives written out).
#include "core/objective/function_objective.h"

#include <cmath>
#include <memory>

namespace sw::analyze::testing {

// f = a x^2 + b y^2 (a bowl when a, b > 0, a saddle when the signs differ).
inline std::unique_ptr<FunctionObjective> quadratic(double a, double b) {
    return std::make_unique<FunctionObjective>(
        std::vector<std::string>{"x", "y"}, [=](const Vector& v) { return a * v(0) * v(0) + b * v(1) * v(1); },
        [=](const Vector& v, Vector& g) { g << 2 * a * v(0), 2 * b * v(1); },
        [=](const Vector&, Matrix& h) { h << 2 * a, 0, 0, 2 * b; }, "a x^2 + b y^2");
}

// A curved, steep-walled valley: f = 100 (y - x^2)^2 + (1 - x)^2.
inline std::unique_ptr<FunctionObjective> curvedValley() {
    return std::make_unique<FunctionObjective>(
        std::vector<std::string>{"x", "y"},
        [](const Vector& v) { return 100 * std::pow(v(1) - v(0) * v(0), 2) + std::pow(1 - v(0), 2); },
        [](const Vector& v, Vector& g) {
            g << -400 * v(0) * (v(1) - v(0) * v(0)) - 2 * (1 - v(0)), 200 * (v(1) - v(0) * v(0));
        },
        [](const Vector& v, Matrix& h) { h << 1200 * v(0) * v(0) - 400 * v(1) + 2, -400 * v(0), -400 * v(0), 200; },
        "curved valley");
}

}  // namespace sw::analyze::testing
