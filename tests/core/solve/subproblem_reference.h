#pragma once
// An independent extended-precision reference for the trust-region and cubic subproblems,
// for differential tests of core/solve/trust_subproblem.cpp. Shares no code with it: long
// double throughout (x87 extended, 64-bit significand), the eigendecomposition by the cyclic
// Jacobi method (Golub & Van Loan, Matrix Computations, 4th ed., Alg. 8.5.3), and the
// multiplier by bisection (no Newton steps) on the characterisations of the global minimisers:
//   trust region (Moré & Sorensen 1983, Lemma 2.1/Thm 3.1): (B + lambda I) p = -g,
//       B + lambda I positive semidefinite, lambda >= 0, lambda (radius - |p|) = 0;
//   cubic model (Cartis, Gould & Toint 2011, Part I, Thm 3.1): (B + lambda I) p = -g,
//       B + lambda I positive semidefinite, lambda = sigma |p|.
// The bisection is geometric near the pole lambda = -lambda_1, so the nearly hard case (g with
// a tiny part along the lowest eigenvector) is resolved down to long double's range.

#include "core/objective/objective.h"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <vector>

namespace sw::solve::reference {

using Real = long double;
using MatrixL = Eigen::Matrix<Real, Eigen::Dynamic, Eigen::Dynamic>;
using VectorL = Eigen::Matrix<Real, Eigen::Dynamic, 1>;

inline MatrixL widen(const Matrix& m) { return m.cast<Real>(); }
inline VectorL widen(const Vector& v) { return v.cast<Real>(); }

struct Eigensystem {
    VectorL values;   // ascending
    MatrixL vectors;  // columns
};

// Cyclic Jacobi rotations until the off-diagonal part is below long double rounding.
inline Eigensystem jacobiEigen(MatrixL a) {
    const Eigen::Index n = a.rows();
    MatrixL v = MatrixL::Identity(n, n);
    for (int sweep = 0; sweep < 100; ++sweep) {
        Real off = 0, all = 0;
        for (Eigen::Index i = 0; i < n; ++i)
            for (Eigen::Index j = 0; j < n; ++j) {
                all += a(i, j) * a(i, j);
                if (i != j) off += a(i, j) * a(i, j);
            }
        if (off <= 1e-38L * all || off == 0) break;
        for (Eigen::Index p = 0; p < n; ++p)
            for (Eigen::Index q = p + 1; q < n; ++q) {
                if (a(p, q) == 0) continue;
                // Golub & Van Loan Alg. 8.5.1 (symmetric Schur decomposition of the 2 x 2 block).
                const Real tau = (a(q, q) - a(p, p)) / (2 * a(p, q));
                const Real t = (tau >= 0 ? 1 : -1) / (std::fabs(tau) + std::sqrt(1 + tau * tau));
                const Real c = 1 / std::sqrt(1 + t * t), s = t * c;
                for (Eigen::Index k = 0; k < n; ++k) {  // A <- A J
                    const Real akp = a(k, p), akq = a(k, q);
                    a(k, p) = c * akp - s * akq;
                    a(k, q) = s * akp + c * akq;
                }
                for (Eigen::Index k = 0; k < n; ++k) {  // A <- J' A
                    const Real apk = a(p, k), aqk = a(q, k);
                    a(p, k) = c * apk - s * aqk;
                    a(q, k) = s * apk + c * aqk;
                }
                for (Eigen::Index k = 0; k < n; ++k) {  // V <- V J
                    const Real vkp = v(k, p), vkq = v(k, q);
                    v(k, p) = c * vkp - s * vkq;
                    v(k, q) = s * vkp + c * vkq;
                }
            }
    }
    std::vector<Eigen::Index> order(static_cast<std::size_t>(n));
    for (Eigen::Index i = 0; i < n; ++i) order[static_cast<std::size_t>(i)] = i;
    std::sort(order.begin(), order.end(), [&](Eigen::Index x, Eigen::Index y) { return a(x, x) < a(y, y); });
    Eigensystem e{VectorL(n), MatrixL(n, n)};
    for (Eigen::Index k = 0; k < n; ++k) {
        e.values(k) = a(order[static_cast<std::size_t>(k)], order[static_cast<std::size_t>(k)]);
        e.vectors.col(k) = v.col(order[static_cast<std::size_t>(k)]);
    }
    return e;
}

inline Real quadraticModel(const MatrixL& b, const VectorL& g, const VectorL& p) {
    return g.dot(p) + p.dot(b * p) / 2;
}
inline Real cubicModel(const MatrixL& b, const VectorL& g, Real sigma, const VectorL& p) {
    const Real r = p.norm();
    return quadraticModel(b, g, p) + sigma / 3 * r * r * r;
}

struct Solution {
    VectorL step;
    Real lambda = 0;
    Real model = 0;     // model value at the step (m(0) = 0)
    bool hardCase = false;
};

// p(delta) = -sum c_i / (gap_i + delta) q_i with gap_i = lambda_i - lambda_1, delta = lambda + lambda_1.
struct Secular {
    Eigensystem e;
    VectorL c;     // Q'g
    VectorL gap;   // lambda_i - lambda_1 >= 0
    Secular(const MatrixL& b, const VectorL& g) : e(jacobiEigen(b)) {
        c = e.vectors.transpose() * g;
        gap = e.values.array() - e.values(0);
    }
    Real norm(Real delta) const {
        Real s = 0;
        for (Eigen::Index i = 0; i < c.size(); ++i) {
            const Real t = c(i) / (gap(i) + delta);
            s += t * t;
        }
        return std::sqrt(s);
    }
    VectorL step(Real delta) const {
        VectorL k(c.size());
        for (Eigen::Index i = 0; i < c.size(); ++i) k(i) = -c(i) / (gap(i) + delta);
        return e.vectors * k;
    }
    // The step at delta = 0 without the parts whose gap is 0 (the pole), and a unit vector of
    // the lowest eigenspace along -(g's part in it) (the first eigenvector when there is none).
    VectorL partial() const {
        VectorL k = VectorL::Zero(c.size());
        for (Eigen::Index i = 0; i < c.size(); ++i)
            if (gap(i) > 0) k(i) = -c(i) / gap(i);
        return e.vectors * k;
    }
    VectorL lowestDirection() const {
        VectorL k = VectorL::Zero(c.size());
        for (Eigen::Index i = 0; i < c.size(); ++i)
            if (gap(i) == 0) k(i) = -c(i);
        if (k.norm() == 0) return e.vectors.col(0);
        return e.vectors * (k / k.norm());
    }
    // Largest delta in (lo, hi] with f(delta) >= 0 for f decreasing through zero, by bisection,
    // geometric while the bracket spans more than a factor 4 (resolves roots near lo = 0).
    template <class F>
    Real bisect(Real lo, Real hi, F f) const {
        for (int it = 0; it < 20000; ++it) {
            Real mid;
            if (lo <= 0) mid = hi / 16;
            else if (hi / lo > 4) mid = std::sqrt(lo * hi);
            else mid = (lo + hi) / 2;
            if (!(mid > lo && mid < hi)) break;
            if (f(mid) >= 0) lo = mid;
            else hi = mid;
            if (hi - lo <= 1e-19L * hi) break;
        }
        return hi;
    }
};

// The smallest delta the bisection may go down to before the pole is declared unreachable
// (g has no part at all in the lowest eigenspace: the exact hard case).
inline constexpr Real kSmallestDelta = 1e-4500L;

inline Solution trustRegion(const Matrix& bDouble, const Vector& gDouble, double radiusDouble) {
    const MatrixL b = widen(bDouble);
    const VectorL g = widen(gDouble);
    const Real radius = radiusDouble;
    const Secular s(b, g);
    const Real lambda1 = s.e.values(0);
    Solution out;
    if (lambda1 > 0) {
        const VectorL newton = s.step(lambda1);
        if (newton.norm() <= radius) {
            out.step = newton;
            out.model = quadraticModel(b, g, newton);
            return out;
        }
    }
    const Real deltaLo = std::max<Real>(lambda1, 0);  // delta = lambda + lambda_1 with lambda >= max(0, -lambda_1)
    const Real deltaHi = deltaLo + g.norm() / radius + 1;
    auto f = [&](Real delta) { return s.norm(delta) - radius; };
    if (deltaLo == 0 && f(kSmallestDelta) < 0) {
        // Hard case: |p| stays below the radius up to the pole.
        const VectorL partial = s.partial();
        const Real tau = std::sqrt(std::max<Real>(0, radius * radius - partial.squaredNorm()));
        out.step = partial + tau * s.lowestDirection();
        out.lambda = -lambda1;
        out.hardCase = true;
    } else {
        const Real delta = s.bisect(std::max(deltaLo, kSmallestDelta / 2), deltaHi, f);
        out.step = s.step(delta);
        out.lambda = delta - lambda1;
    }
    out.model = quadraticModel(b, g, out.step);
    return out;
}

inline Solution cubic(const Matrix& bDouble, const Vector& gDouble, double sigmaDouble) {
    const MatrixL b = widen(bDouble);
    const VectorL g = widen(gDouble);
    const Real sigma = sigmaDouble;
    const Secular s(b, g);
    const Real lambda1 = s.e.values(0);
    Solution out;
    // lambda = delta - lambda_1 >= max(0, -lambda_1); f = |p| - lambda / sigma decreases in delta.
    const Real deltaLo = std::max<Real>(lambda1, 0);
    auto f = [&](Real delta) { return s.norm(delta) - (delta - lambda1) / sigma; };
    const Real deltaHi = deltaLo + std::sqrt(sigma * g.norm()) + std::fabs(lambda1) + 1;
    if (deltaLo == 0 && f(kSmallestDelta) < 0) {
        const VectorL partial = s.partial();
        const Real wanted = -lambda1 / sigma;
        const Real tau = std::sqrt(std::max<Real>(0, wanted * wanted - partial.squaredNorm()));
        out.step = partial + tau * s.lowestDirection();
        out.lambda = -lambda1;
        out.hardCase = true;
    } else if (deltaLo > 0 && f(deltaLo) <= 0) {
        out.step = VectorL::Zero(g.size());  // g = 0 and B positive definite
    } else {
        const Real delta = s.bisect(std::max(deltaLo, kSmallestDelta / 2), deltaHi, f);
        out.step = s.step(delta);
        out.lambda = delta - lambda1;
    }
    out.model = cubicModel(b, g, sigma, out.step);
    return out;
}

}  // namespace sw::solve::reference
