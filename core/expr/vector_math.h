#pragma once
// Vectorised exp, log, sin, cos, pow for block evaluation: glibc's libmvec (4 doubles per
// call, AVX2, at most 4 ulp from the correctly rounded result per glibc's documentation),
// loaded at run time when the processor has AVX2. Without it, or with the environment
// variable SADDLEWISE_SCALAR_MATH set, the scalar libm functions are used.
#include "core/expr/graph.h"

#include <cstddef>

namespace sw::expr::vecmath {

// True when the vector versions are in use.
bool available();
// d[i] = op(a[i]) for i < m, op one of Exp, Log, Sin, Cos; returns false if not vectorised.
bool apply1(Op op, double* d, const double* a, std::size_t m);
// d[i] = pow(a[i], b[i]); returns false if not vectorised.
bool pow(double* d, const double* a, const double* b, std::size_t m);

}  // namespace sw::expr::vecmath
