#include "core/solve/trust_subproblem.h"

#include <Eigen/Cholesky>
#include <Eigen/Eigenvalues>

#include <algorithm>
#include <cmath>
#include <limits>
#include <charconv>
#include <string>

namespace sw::solve {

namespace {

constexpr double kEps = std::numeric_limits<double>::epsilon();

// The roots tau of |z + tau d| = radius given zz = |z|^2, zd = z'd, dd = |d|^2 (z inside or
// on the ball), smaller first. Written to avoid cancellation: the product of the roots is
// (|z|^2 - radius^2) / |d|^2.
void boundaryRoots(double zz, double zd, double dd, double radius, double& tauMinus, double& tauPlus) {
    const double c = zz - radius * radius;  // <= 0 when z is inside
    const double disc = std::sqrt(std::max(0.0, zd * zd - dd * c));
    if (dd <= 0) {
        tauMinus = tauPlus = 0;
        return;
    }
    if (zd >= 0) {
        const double q = -(zd + disc);
        tauMinus = q / dd;
        tauPlus = (q != 0) ? c / q : 0.0;
    } else {
        const double q = -zd + disc;
        tauPlus = q / dd;
        tauMinus = (q != 0) ? c / q : 0.0;
    }
}

void boundaryRoots(const Vector& z, const Vector& d, double radius, double& tauMinus, double& tauPlus) {
    boundaryRoots(z.squaredNorm(), z.dot(d), d.squaredNorm(), radius, tauMinus, tauPlus);
}

// Eigen-decomposition view of the secular equations shared by the exact trust-region
// step and the cubic step: with B = Q diag(lambda_i) Q' and c = Q'g,
//   p(mu) = -sum c_i / (lambda_i + mu) q_i,   |p(mu)|^2 = sum c_i^2 / (lambda_i + mu)^2.
struct Eigenbasis {
    Vector lambda;  // ascending
    Matrix q;
    Vector c;
    double scale = 1;  // max(1, max |lambda|), for tolerances

    Eigenbasis(const Vector& g, const Matrix& b) {
        Eigen::SelfAdjointEigenSolver<Matrix> es(b);
        lambda = es.eigenvalues();
        q = es.eigenvectors();
        c = q.transpose() * g;
        scale = std::max(1.0, lambda.cwiseAbs().maxCoeff());
    }
    // Everything below is written in delta = mu + lambda_1, so that the denominators
    // lambda_i + mu = (lambda_i - lambda_1) + delta keep full relative accuracy near the
    // pole at mu = -lambda_1 (the nearly hard case).
    double gap(Eigen::Index i) const { return lambda(i) - lambda(0); }
    // |p|^2 and sum c_i^2 / (lambda_i + mu)^3 (the derivative of |p|^2 is -2 times it).
    void norms(double delta, double& norm2, double& cubeSum) const {
        norm2 = 0;
        cubeSum = 0;
        for (Eigen::Index i = 0; i < lambda.size(); ++i) {
            const double denom = gap(i) + delta;
            const double t = c(i) / denom;
            norm2 += t * t;
            cubeSum += t * t / denom;
        }
    }
    Vector step(double delta, const std::vector<bool>* skip = nullptr) const {
        Vector coefficients(lambda.size());
        for (Eigen::Index i = 0; i < lambda.size(); ++i) {
            const bool skipped = skip && (*skip)[static_cast<std::size_t>(i)];
            coefficients(i) = skipped ? 0.0 : -c(i) / (gap(i) + delta);
        }
        return q * coefficients;
    }
    // Indices whose eigenvalue equals the smallest one within rounding.
    std::vector<bool> smallestEigenspace() const {
        const double tol = 1e-12 * scale;
        std::vector<bool> in(static_cast<std::size_t>(lambda.size()), false);
        for (Eigen::Index i = 0; i < lambda.size(); ++i) in[static_cast<std::size_t>(i)] = lambda(i) - lambda(0) <= tol;
        return in;
    }
    // True when g has (within rounding) no component in the smallest eigenspace.
    bool orthogonalToSmallest(const std::vector<bool>& in, double gnorm) const {
        const double tol = 1e-12 * std::max(gnorm, std::numeric_limits<double>::min());
        for (Eigen::Index i = 0; i < lambda.size(); ++i)
            if (in[static_cast<std::size_t>(i)] && std::abs(c(i)) > tol) return false;
        return true;
    }
};

// Solves psi = 1/|p| - 1/target = 0 for delta = mu + lambda_1 on (lo, hi], where psi is
// increasing and concave in mu (Moré & Sorensen 1983, §3; Cartis, Gould & Toint 2011,
// §6.1) and psi(hi) >= 0. target is the radius (trust region, sigma = 0) or mu / sigma
// (cubic). Safeguarded Newton: a Newton point outside the bracket is replaced by bisection.
double solveSecular(const Eigenbasis& eb, double lo, double hi, double radius, double sigma, int& iterations) {
    const bool cubic = sigma > 0;
    const double lambda1 = eb.lambda(0);
    auto target = [&](double delta) { return cubic ? (delta - lambda1) / sigma : radius; };
    double delta = hi;
    double a = lo, b = hi;
    iterations = 0;
    for (int it = 0; it < 300; ++it) {
        ++iterations;
        double norm2 = 0, cubeSum = 0;
        eb.norms(delta, norm2, cubeSum);
        const double pnorm = std::sqrt(norm2);
        const double t = target(delta);
        if (!(pnorm > 0) || !std::isfinite(pnorm) || !(t > 0)) {
            // |p| infinite (at a pole), zero, or the cubic target not positive: bisect.
            if (!(pnorm > 0)) b = delta; else a = delta;
            delta = 0.5 * (a + b);
            continue;
        }
        const double psi = 1.0 / pnorm - 1.0 / t;
        if (std::abs(pnorm - t) <= 1e-14 * t) return delta;
        if (psi < 0) a = delta; else b = delta;
        if (b - a <= 2 * kEps * std::abs(b)) return b;
        // dpsi/dmu = sum c^2/(l+mu)^3 / |p|^3 (+ sigma / mu^2 for the cubic model).
        double slope = cubeSum / (norm2 * pnorm);
        if (cubic) slope += 1.0 / (sigma * t * t);
        double next = (slope > 0) ? delta - psi / slope : kNaN;
        if (!(next > a && next < b)) next = 0.5 * (a + b);
        delta = next;
    }
    return b;
}

}  // namespace

double quadraticModelDecrease(const Vector& g, const Matrix& b, const Vector& p) {
    return -(g.dot(p) + 0.5 * p.dot(b * p));
}

double cubicModelDecrease(const Vector& g, const Matrix& b, double sigma, const Vector& p) {
    const double norm = p.norm();
    return quadraticModelDecrease(g, b, p) - sigma / 3.0 * norm * norm * norm;
}

static SubproblemResult doglegUnscaled(const Vector& g, const Matrix& b, double radius, double up) {
    SubproblemResult result;
    const Eigen::Index n = g.size();
    const double gnorm = g.norm();
    if (gnorm == 0) {
        result.step = Vector::Zero(n);
        result.kind = StepKind::Interior;
        result.note = "gradient is zero: no dogleg step";
        return result;
    }
    // Nocedal & Wright 2006, Alg. 3.3: shift by tau I until Cholesky succeeds.
    double tau = 0;
    Eigen::LLT<Matrix> llt(b);
    if (llt.info() != Eigen::Success) {
        const double beta = 1e-3 * std::max(1.0, b.cwiseAbs().maxCoeff());
        const double minDiagonal = b.diagonal().minCoeff();
        tau = minDiagonal > 0 ? beta : -minDiagonal + beta;
        for (int attempt = 0; attempt < 200; ++attempt) {
            llt.compute(b + tau * Matrix::Identity(n, n));
            if (llt.info() == Eigen::Success) break;
            tau = std::max(2 * tau, beta);
        }
        result.multiplier = tau;
    }
    const Vector newton = -llt.solve(g);
    const Vector gradientDirection = -g;
    const double curvature = g.dot(b * g) + tau * gnorm * gnorm;  // g'(B + tau I)g > 0
    // Notes are deferred patterns (formatted when read); a shifted path says so in each.
    const bool shifted = tau > 0;

    if (newton.allFinite() && newton.norm() <= radius) {
        result.step = newton;
        result.kind = StepKind::Interior;
        if (shifted) result.note.add("shifted Newton point inside the region (B not positive definite: path built on B + {3} I)", tau * up);
        else result.note.add("Newton point inside the region");
    } else {
        const Vector cauchy = -(gnorm * gnorm / curvature) * g;
        if (!newton.allFinite() || cauchy.norm() >= radius) {
            result.step = (radius / gnorm) * gradientDirection;
            result.kind = StepKind::Cauchy;
            result.onBoundary = true;
            if (shifted) result.note.add("Cauchy point on the boundary (B not positive definite: path built on B + {3} I)", tau * up);
            else result.note.add("Cauchy point on the boundary");
        } else {
            double tauMinus = 0, tauPlus = 0;
            boundaryRoots(cauchy, newton - cauchy, radius, tauMinus, tauPlus);
            const double t = std::clamp(tauPlus, 0.0, 1.0);
            result.step = cauchy + t * (newton - cauchy);
            result.kind = StepKind::Dogleg;
            result.onBoundary = true;
            if (shifted)
                result.note.add("dogleg path meets the boundary at {3} of the way from Cauchy to Newton point "
                                "(B not positive definite: path built on B + {3} I)", t, tau * up);
            else result.note.add("dogleg path meets the boundary at {3} of the way from Cauchy to Newton point", t);
        }
    }
    result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
    return result;
}

static SubproblemResult steihaugUnscaled(const Vector& g, const Matrix& b, double radius, int maxIterations, double up) {
    SubproblemResult result;
    const Eigen::Index n = g.size();
    const double gnorm = g.norm();
    if (maxIterations <= 0) maxIterations = static_cast<int>(2 * n);
    result.kind = StepKind::Interior;
    if (gnorm == 0) {
        result.step = Vector::Zero(n);
        result.note = "gradient is zero: no CG step";
        return result;
    }
    // Forcing term of Nocedal & Wright 2006, eq. (7.3) with the superlinear choice.
    const double tolerance = std::min(0.5, std::sqrt(gnorm)) * gnorm;
    // z is the iterate, r = g + Bz the model gradient (CG residual), d the direction. Norms
    // of trial points come from dot products, so the loop allocates nothing.
    Vector z = Vector::Zero(n);
    Vector r = g;
    Vector d = -g;
    Vector bd(n);
    double rr = r.squaredNorm();
    bool finished = false;
    for (int j = 0; j < maxIterations && !finished; ++j) {
        result.innerIterations = j + 1;
        bd.noalias() = b * d;
        const double curvature = d.dot(bd);
        const double zz = z.squaredNorm(), zd = z.dot(d), dd = d.squaredNorm();
        if (!(curvature > 0)) {
            // Follow d to the boundary, choosing the root with the lower model value:
            // m(z + tau d) - m(z) = tau r'd + tau^2 d'Bd / 2.
            double tauMinus = 0, tauPlus = 0;
            boundaryRoots(zz, zd, dd, radius, tauMinus, tauPlus);
            const double rd = r.dot(d);
            auto change = [&](double tau) { return tau * rd + 0.5 * tau * tau * curvature; };
            const double tau = change(tauPlus) <= change(tauMinus) ? tauPlus : tauMinus;
            result.step = z + tau * d;
            result.kind = StepKind::NegativeCurvature;
            result.onBoundary = true;
            result.note.add("CG met curvature d'Bd = {3} <= 0 at inner iteration {}; followed to the boundary",
                            curvature * up * up * up, j + 1);
            finished = true;
            break;
        }
        const double alpha = rr / curvature;
        if (zz + alpha * (2 * zd + alpha * dd) >= radius * radius) {
            double tauMinus = 0, tauPlus = 0;
            boundaryRoots(zz, zd, dd, radius, tauMinus, tauPlus);
            result.step = z + tauPlus * d;
            result.kind = StepKind::Boundary;
            result.onBoundary = true;
            result.note.add("CG left the region at inner iteration {}", j + 1);
            finished = true;
            break;
        }
        z += alpha * d;
        r += alpha * bd;
        const double rrNext = r.squaredNorm();
        if (std::sqrt(rrNext) <= tolerance) {
            result.step = z;
            result.kind = StepKind::Interior;
            result.note.add("CG converged inside the region in {} inner iterations", j + 1);
            finished = true;
            break;
        }
        const double beta = rrNext / rr;
        rr = rrNext;
        d *= beta;
        d -= r;
    }
    if (!finished) {
        result.step = z;
        result.kind = StepKind::Interior;
        result.note.add("CG stopped at its limit of {} inner iterations", maxIterations);
    }
    result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
    return result;
}

static SubproblemResult exactUnscaled(const Vector& g, const Matrix& b, double radius, double up) {
    SubproblemResult result;
    const double gnorm = g.norm();
    {
        // lambda = 0 when B is positive definite and the Newton step fits: one Cholesky
        // factorisation settles it (Moré & Sorensen 1983 begin the same way), and the
        // eigendecomposition below is only needed otherwise.
        Eigen::LLT<Matrix> llt(b);
        if (llt.info() == Eigen::Success) {
            Vector p = -llt.solve(g);
            if (p.allFinite() && p.norm() <= radius) {
                result.step = std::move(p);
                result.kind = StepKind::Interior;
                result.note = "Newton step inside the region (lambda = 0)";
                result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
                return result;
            }
            // B positive definite, Newton step outside: Moré & Sorensen's Newton iteration
            // lambda += (|p| / |q|)^2 (|p| - radius) / radius with R'R = B + lambda I and
            // R'q = p (Nocedal & Wright 2006, Alg. 4.3). From lambda = 0 it increases
            // monotonically to the root, so B + lambda I stays positive definite.
            const Eigen::Index n = g.size();
            double lambda = 0;
            for (int it = 1; it <= 30 && p.allFinite(); ++it) {
                const double pnorm = p.norm();
                if (std::abs(pnorm - radius) <= 1e-12 * radius) {
                    if (pnorm > radius) p *= radius / pnorm;
                    result.step = std::move(p);
                    result.kind = StepKind::Boundary;
                    result.onBoundary = true;
                    result.multiplier = lambda;
                    result.innerIterations = it;
                    result.note.add("boundary step, lambda = {3} after {} Cholesky-Newton iterations", lambda * up, it);
                    result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
                    return result;
                }
                const Vector q = llt.matrixL().solve(p);
                const double step = (pnorm / q.norm()) * (pnorm / q.norm()) * (pnorm - radius) / radius;
                if (!(step >= 0) || !std::isfinite(step)) break;  // left the safe side: use the eigenbasis
                lambda += step;
                llt.compute(b + lambda * Matrix::Identity(n, n));
                if (llt.info() != Eigen::Success) break;
                p = -llt.solve(g);
            }
        }
    }
    const Eigenbasis eb(g, b);
    const double lambda1 = eb.lambda(0);
    const double zeroTol = 1e-12 * eb.scale;

    // lambda = 0 when B is positive definite and the Newton step fits (checked again in the
    // eigenbasis for a B too close to singular for the Cholesky test above).
    if (lambda1 > zeroTol) {
        const Vector newton = eb.step(lambda1);  // mu = 0
        if (newton.norm() <= radius) {
            result.step = newton;
            result.kind = StepKind::Interior;
            result.note = "Newton step inside the region (lambda = 0)";
            result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
            return result;
        }
    }
    const double lo = std::max(0.0, -lambda1);
    const std::vector<bool> smallest = eb.smallestEigenspace();
    if (lambda1 <= zeroTol && eb.orthogonalToSmallest(smallest, gnorm)) {
        // Candidate hard case (Moré & Sorensen 1983, §3): p(lo) without the singular part.
        const Vector partial = eb.step(0.0, &smallest);  // mu = -lambda1
        const double partialNorm = partial.norm();
        if (partialNorm <= radius) {
            if (lambda1 >= -zeroTol) {
                // B positive semidefinite and singular, g in its range: the minimum-norm
                // minimiser of the model lies inside.
                result.step = partial;
                result.kind = StepKind::Interior;
                result.note = "model minimiser inside the region (B singular, lambda = 0)";
            } else {
                const Vector z = eb.q.col(0);
                const double tau = std::sqrt(std::max(0.0, radius * radius - partialNorm * partialNorm));
                result.step = partial + tau * z;
                result.kind = StepKind::NegativeCurvature;
                result.hardCase = true;
                result.onBoundary = true;
                result.multiplier = lo;
                result.note.add("hard case: g is orthogonal to the eigenvector of lambda_min = {3}; moved along it to the boundary",
                                lambda1 * up);
            }
            result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
            return result;
        }
    }
    // Boundary solution: lambda in (lo, lo + |g|/radius], where |p| <= |g| / (lambda1 + lambda) <= radius.
    const double hi = lo + gnorm / radius;
    int iterations = 0;
    const double delta = solveSecular(eb, lo + lambda1, hi + lambda1, radius, 0.0, iterations);
    const double lambda = std::max(0.0, delta - lambda1);
    Vector p = eb.step(delta);
    const double pnorm = p.norm();
    if (pnorm > radius) p *= radius / pnorm;  // rounding: never leave the ball
    result.step = p;
    result.kind = StepKind::Boundary;
    result.onBoundary = true;
    result.multiplier = lambda;
    result.innerIterations = iterations;
    result.note.add("boundary step, lambda = {3} after {} secular-equation iterations", lambda * up, iterations);
    result.predictedDecrease = quadraticModelDecrease(g, b, result.step);
    return result;
}

static SubproblemResult cubicUnscaled(const Vector& g, const Matrix& b, double sigma, double up) {
    SubproblemResult result;
    result.kind = StepKind::Cubic;
    const double gnorm = g.norm();
    const Eigenbasis eb(g, b);
    const double lambda1 = eb.lambda(0);
    const double zeroTol = 1e-12 * eb.scale;
    const double lo = std::max(0.0, -lambda1);
    const std::vector<bool> smallest = eb.smallestEigenspace();

    if (gnorm == 0 && lambda1 >= -zeroTol) {
        result.step = Vector::Zero(g.size());
        result.note = "gradient is zero and B is positive semidefinite: no step";
        return result;
    }
    if (lambda1 < -zeroTol && eb.orthogonalToSmallest(smallest, gnorm)) {
        // Hard case (Cartis, Gould & Toint 2011, Part I, §6.1): lambda = -lambda1 and
        // |p| = lambda / sigma reached along the eigenvector of lambda1.
        const Vector partial = eb.step(0.0, &smallest);  // mu = -lambda1
        const double wanted = lo / sigma;
        const double partialNorm = partial.norm();
        if (partialNorm <= wanted) {
            const double tau = std::sqrt(std::max(0.0, wanted * wanted - partialNorm * partialNorm));
            result.step = partial + tau * eb.q.col(0);
            result.hardCase = true;
            result.multiplier = lo;
            result.note.add("hard case: g is orthogonal to the eigenvector of lambda_min = {3}; moved along it", lambda1 * up);
            result.predictedDecrease = cubicModelDecrease(g, b, sigma, result.step);
            return result;
        }
    }
    // lambda in (lo, lo + sqrt(sigma |g|)]: there |g| / (lambda1 + lambda) <= lambda / sigma.
    const double hi = lo + std::sqrt(sigma * gnorm);
    int iterations = 0;
    const double delta = solveSecular(eb, lo + lambda1, hi + lambda1, 0.0, sigma, iterations);
    const double lambda = delta - lambda1;
    result.step = eb.step(delta);
    result.multiplier = lambda;
    result.innerIterations = iterations;
    result.note.add("cubic model minimiser, lambda = sigma |p| = {3} after {} secular-equation iterations", lambda * up,
                    iterations);
    result.predictedDecrease = cubicModelDecrease(g, b, sigma, result.step);
    return result;
}

// Exact rescaling (scale invariance of the subproblems). Multiplying g and B (and the cubic
// weight sigma) by c leaves the step unchanged and multiplies the model decrease and the
// multiplier by c. When the entries of g and B lie outside [2^-100, 2^100], they are scaled by
// the power of two that brings the largest into [0.5, 1): exact (no rounding), and the
// products inside (g'Bg, |g|^3 of the Cauchy point, d'Bd of CG) can no longer overflow or
// underflow. At f = 1e150 (x^2 + y^2) the CG curvature d'Bd was 1e450 = inf, which made the
// step 0 and the run "converge on step" at the start. Inside the range nothing changes (bit
// for bit), so the published-problem catalogue keeps its iteration counts.
namespace {

int modelScaleExponent(const Vector& g, const Matrix& b) {
    const double largest = std::max(g.size() ? g.cwiseAbs().maxCoeff() : 0.0, b.size() ? b.cwiseAbs().maxCoeff() : 0.0);
    if (!(largest > 0) || !std::isfinite(largest)) return 0;
    int exponent = 0;
    std::frexp(largest, &exponent);  // largest = m 2^exponent, m in [0.5, 1)
    return (exponent > 100 || exponent < -100) ? exponent : 0;
}

template <class Solve>
SubproblemResult rescaled(const Vector& g, const Matrix& b, Solve solve) {
    const int exponent = modelScaleExponent(g, b);
    if (exponent == 0) return solve(g, b, 1.0, 1.0);
    const double down = std::ldexp(1.0, -exponent), up = std::ldexp(1.0, exponent);
    SubproblemResult result = solve(g * down, b * down, down, up);
    result.predictedDecrease *= up;
    result.multiplier *= up;
    return result;
}

}  // namespace

SubproblemResult doglegStep(const Vector& g, const Matrix& b, double radius) {
    return rescaled(g, b, [&](const Vector& sg, const Matrix& sb, double, double up) {
        return doglegUnscaled(sg, sb, radius, up);
    });
}

SubproblemResult steihaugStep(const Vector& g, const Matrix& b, double radius, int maxIterations) {
    return rescaled(g, b, [&](const Vector& sg, const Matrix& sb, double, double up) {
        return steihaugUnscaled(sg, sb, radius, maxIterations, up);
    });
}

SubproblemResult exactTrustRegionStep(const Vector& g, const Matrix& b, double radius) {
    return rescaled(g, b, [&](const Vector& sg, const Matrix& sb, double, double up) {
        return exactUnscaled(sg, sb, radius, up);
    });
}

SubproblemResult cubicStep(const Vector& g, const Matrix& b, double sigma) {
    return rescaled(g, b, [&](const Vector& sg, const Matrix& sb, double down, double up) {
        return cubicUnscaled(sg, sb, sigma * down, up);
    });
}

}  // namespace sw::solve
