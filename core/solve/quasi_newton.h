#pragma once
// The BFGS update of an inverse Hessian approximation, shared by the bfgs method and its tests.

#include "core/objective/objective.h"

#include <string>

namespace sw::solve {

// Nocedal & Wright (2006), eq. 6.17: H+ = (I - rho s y') H (I - rho y s') + rho s s', rho = 1/y's.
// When scaleFirst, H is first replaced by (y's / y'y) I (eq. 6.20). The update is skipped when
// y's <= 1e-12 |s||y| (no positive curvature along s), leaving H unchanged and H positive
// definite; then `note` says why ("BFGS update skipped: y's = -0.3 <= 0"). Returns true when applied.
bool updateInverseBfgs(Matrix& inverse, const Vector& s, const Vector& y, bool scaleFirst, std::string& note);

}  // namespace sw::solve
