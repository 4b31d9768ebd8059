#pragma once
// Trust-region and cubic-regularisation subproblems as standalone functions.
//
// Each minimises (exactly or approximately) the local model
//     m(p) = g'p + 1/2 p'Bp                 subject to |p| <= radius      (trust region)
//     m(p) = g'p + 1/2 p'Bp + sigma/3 |p|^3                                (cubic)
// and returns the step, what kind of step it is, and the numbers a person needs to see
// why (model decrease, multiplier, inner iterations, a short note). B is symmetric and
// may be indefinite; no function here throws or allocates beyond its result.

#include "core/solve/record.h"

#include <string>

namespace sw::solve {

struct SubproblemResult {
    Vector step;                         // p
    StepKind kind = StepKind::None;
    double predictedDecrease = 0;        // m(0) - m(p) of the model that was minimised (>= 0)
    double multiplier = 0;               // lambda with (B + lambda I) p = -g (exact, cubic); shift tau (dogleg)
    int innerIterations = 0;             // CG iterations or secular-equation Newton steps
    bool onBoundary = false;             // |p| = radius (within rounding)
    bool hardCase = false;               // exact/cubic: the Moré–Sorensen hard case occurred
    Note note;                           // short and readable (deferred numbers: Note in record.h)
};

// m(0) - m(p) for the quadratic model; positive means the model decreases.
double quadraticModelDecrease(const Vector& g, const Matrix& b, const Vector& p);
// m(0) - m(p) for the cubic model with weight sigma.
double cubicModelDecrease(const Vector& g, const Matrix& b, double sigma, const Vector& p);

// Dogleg (Powell 1970; Nocedal & Wright 2006, §4.1). When B is not positive definite the
// path is built on B + tau I, tau from Nocedal & Wright Alg. 3.3 (Cholesky with added
// multiple of the identity); predictedDecrease is always that of the true model B, which
// is at least the shifted model's decrease because tau >= 0.
// Kinds: Interior (full Newton point inside), Cauchy (the Cauchy point is on the
// boundary), Dogleg (on the segment between the Cauchy and the Newton point).
SubproblemResult doglegStep(const Vector& g, const Matrix& b, double radius);

// Steihaug–Toint truncated conjugate gradients (Steihaug 1983; Toint 1981; Nocedal &
// Wright 2006, Alg. 7.2). Stops on the residual test |r| <= min(0.5, sqrt|g|) |g|
// (kind Interior), on leaving the region (Boundary), or on a direction of non-positive
// curvature d'Bd <= 0 (NegativeCurvature, followed to the boundary).
// maxIterations <= 0 means 2n.
SubproblemResult steihaugStep(const Vector& g, const Matrix& b, double radius, int maxIterations = 0);

// The exact trust-region step (Moré & Sorensen 1983): the global minimiser of the model in
// the ball, characterised by (B + lambda I) p = -g, B + lambda I positive semidefinite,
// lambda (radius - |p|) = 0. lambda solves the secular equation 1/|p(lambda)| = 1/radius by
// safeguarded Newton steps (Moré & Sorensen 1983 §3; Nocedal & Wright 2006 Alg. 4.3). The
// equation is evaluated in the eigenbasis of B (one symmetric eigendecomposition per call in
// place of one Cholesky factorisation per Newton step; affordable for the n this program
// draws). Hard case (g orthogonal to the eigenspace of the smallest eigenvalue lambda1 < 0
// and |p(-lambda1)| <= radius): p = p(-lambda1) + tau z, |p| = radius, z the unit vector of
// that eigenspace along -(g's part in it) when g has a part there below the tolerance (so the
// step lowers the model's linear term; never worse than -z), else the first eigenvector.
// Kinds: Interior (lambda = 0, the Newton step), Boundary, NegativeCurvature (hard case).
SubproblemResult exactTrustRegionStep(const Vector& g, const Matrix& b, double radius);

// Global minimiser of the cubic model (Cartis, Gould & Toint 2011, Part I, §6.1 and
// Thm 3.1): (B + lambda I) p = -g with lambda = sigma |p| and B + lambda I positive
// semidefinite; lambda from the secular equation 1/|p(lambda)| = sigma/lambda, solved in
// the eigenbasis as above, including the hard case. Kind: Cubic.
SubproblemResult cubicStep(const Vector& g, const Matrix& b, double sigma);

}  // namespace sw::solve
