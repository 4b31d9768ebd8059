#pragma once
// The BFGS update of an inverse Hessian approximation, shared by the bfgs method and its tests.

#include "core/objective/objective.h"

#include <string>
#include <vector>

namespace sw::solve {

// Nocedal & Wright (2006), eq. 6.17: H+ = (I - rho s y') H (I - rho y s') + rho s s', rho = 1/y's.
// When scaleFirst, H is first replaced by (y's / y'y) I (eq. 6.20). The update is skipped when
// y's <= 1e-12 |s||y| (no positive curvature along s), leaving H unchanged and H positive
// definite; then `note` says why ("BFGS update skipped: y's = -0.3 <= 0"). Returns true when applied.
bool updateInverseBfgs(Matrix& inverse, const Vector& s, const Vector& y, bool scaleFirst, std::string& note);

// The L-BFGS direction -H g by the two-loop recursion (Nocedal & Wright 2006, Alg. 7.4) with
// H0 = gamma I, gamma = s'y / y'y of the newest pair (eq. 7.20). The `count` pairs are columns
// of s and y in a ring of s.cols() columns: the newest in column `newest`, each older one in the
// column before it (wrapping). rho holds 1 / y's per column; alpha is scratch, one per column.
// Two variables (the landscape's case) take a path with the iterate in registers; it gives the
// same bits as the general loop (lbfgsTwoLoopGeneral, kept as its reference in the tests).
void lbfgsTwoLoop(const Matrix& s, const Matrix& y, const std::vector<double>& rho, int count, int newest,
                  const Vector& g, Vector& direction, std::vector<double>& alpha);
void lbfgsTwoLoopGeneral(const Matrix& s, const Matrix& y, const std::vector<double>& rho, int count, int newest,
                         const Vector& g, Vector& direction, std::vector<double>& alpha);

}  // namespace sw::solve
