#pragma once
// Small hand-written objectives for the solver unit tests, with their derivatives.

#include "core/objective/function_objective.h"

#include <cmath>

namespace sw::solve::problems {

// f = 0.5 x'Ax - b'x with A = [[3, 1], [1, 2]], b = (1, 1): minimiser A^{-1} b = (0.2, 0.4),
// f* = -0.5 b'A^{-1}b = -0.3 (worked by hand; common practice, no published source).
inline FunctionObjective convexQuadratic() {
    return FunctionObjective(
        {"x", "y"},
        [](const Vector& v) { return 1.5 * v[0] * v[0] + v[0] * v[1] + v[1] * v[1] - v[0] - v[1]; },
        [](const Vector& v, Vector& g) {
            g[0] = 3 * v[0] + v[1] - 1;
            g[1] = v[0] + 2 * v[1] - 1;
        },
        [](const Vector&, Matrix& h) { h << 3, 1, 1, 2; }, "convex quadratic");
}

// f = x^2 - y^2: one saddle at the origin, Hessian diag(2, -2), unbounded below.
inline FunctionObjective saddle() {
    return FunctionObjective(
        {"x", "y"}, [](const Vector& v) { return v[0] * v[0] - v[1] * v[1]; },
        [](const Vector& v, Vector& g) {
            g[0] = 2 * v[0];
            g[1] = -2 * v[1];
        },
        [](const Vector&, Matrix& h) { h << 2, 0, 0, -2; }, "x^2 - y^2");
}

// Rosenbrock (1960): 100 (y - x^2)^2 + (1 - x)^2, minimum f* = 0 at (1, 1).
inline FunctionObjective rosenbrock() {
    return FunctionObjective(
        {"x", "y"},
        [](const Vector& v) {
            const double a = v[1] - v[0] * v[0], b = 1 - v[0];
            return 100 * a * a + b * b;
        },
        [](const Vector& v, Vector& g) {
            const double a = v[1] - v[0] * v[0];
            g[0] = -400 * v[0] * a - 2 * (1 - v[0]);
            g[1] = 200 * a;
        },
        [](const Vector& v, Matrix& h) {
            h(0, 0) = 1200 * v[0] * v[0] - 400 * v[1] + 2;
            h(0, 1) = h(1, 0) = -400 * v[0];
            h(1, 1) = 200;
        },
        "Rosenbrock");
}

// Himmelblau (1972): (x^2 + y - 11)^2 + (x + y^2 - 7)^2; four minima with f = 0 (one at (3, 2)),
// a maximum near (-0.270845, -0.923039) and four saddles (value from memory).
inline FunctionObjective himmelblau() {
    return FunctionObjective(
        {"x", "y"},
        [](const Vector& v) {
            const double a = v[0] * v[0] + v[1] - 11, b = v[0] + v[1] * v[1] - 7;
            return a * a + b * b;
        },
        [](const Vector& v, Vector& g) {
            const double a = v[0] * v[0] + v[1] - 11, b = v[0] + v[1] * v[1] - 7;
            g[0] = 4 * v[0] * a + 2 * b;
            g[1] = 2 * a + 4 * v[1] * b;
        },
        [](const Vector& v, Matrix& h) {
            const double a = v[0] * v[0] + v[1] - 11, b = v[0] + v[1] * v[1] - 7;
            h(0, 0) = 4 * a + 8 * v[0] * v[0] + 2;
            h(0, 1) = h(1, 0) = 4 * v[0] + 4 * v[1];
            h(1, 1) = 2 + 4 * b + 8 * v[1] * v[1];
        },
        "Himmelblau");
}

// f = -log(x) + x: defined only for x > 0 (NaN below), minimum f* = 1 at x = 1.
inline FunctionObjective logBarrier() {
    return FunctionObjective(
        {"x"}, [](const Vector& v) { return -std::log(v[0]) + v[0]; },
        [](const Vector& v, Vector& g) { g[0] = -1 / v[0] + 1; },
        [](const Vector& v, Matrix& h) { h(0, 0) = 1 / (v[0] * v[0]); }, "-log(x) + x");
}

inline Vector point(double a, double b) {
    Vector v(2);
    v << a, b;
    return v;
}

}  // namespace sw::solve::problems
