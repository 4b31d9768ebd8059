#pragma once
// Internal to streaming_qr.cpp: the Householder fold of a block of rows into [R Q'r], written
// once over small row primitives (a plain version and an AVX2 + FMA version).
#include <algorithm>
#include <cmath>
#include <cstddef>

namespace sw::streaming_qr {

// Over m entries: the sum of squares of a; out[c] = a'b[c] for c < count; y[c] += alpha[c] x
// for c < count. count is 1 to kGroup: a group of columns shares one pass over a (or x).
constexpr int kGroup = 4;
using SumSquares = double (*)(const double* a, std::size_t m);
using Dots = void (*)(const double* a, const double* const* b, int count, std::size_t m, double* out);
using Axpys = void (*)(const double* x, double* const* y, const double* alpha, int count, std::size_t m);
// Axpys, then in the same pass over the updated columns: sums[0] = |y[0]|^2 and
// sums[c] = y[0]'y[c] for 0 < c < count (what the next column's reflection needs).
using AxpysThenDots = void (*)(const double* x, double* const* y, const double* alpha, int count, std::size_t m,
                               double* sums);

struct Kernel {
    SumSquares sumSquares;
    Dots dots;
    Axpys axpys;
    AxpysThenDots axpysThenDots;
};

const Kernel& plainKernel();
// nullptr when the processor lacks AVX2 or FMA.
const Kernel* avx2Kernel();

// Reduces [T; A] (T: n x (n+1) column-major with leading dimension n, upper triangular in its
// first n columns; A: m rows given as n+1 column pointers) to upper-triangular form in T.
// Column k: the reflector H = I - tau v v' with v = [1; a_k / (alpha - beta)] at row k of T
// and the rows of A, beta = -sign(alpha) sqrt(alpha^2 + |a_k|^2), tau = (beta - alpha) / beta
// (LAPACK dlarfg's convention; Golub & Van Loan, Sec. 5.1.3), applied to columns k+1..n.
inline void foldRows(const Kernel& kernel, double* t, int n, double* const* a, std::size_t m) {
    if (n >= 1 && n <= kGroup) {
        // Columns 1..n fit in one group: each column's update pass also sums what the next
        // reflection needs, so every column of A is read and written once per reflection.
        const std::size_t nn = static_cast<std::size_t>(n);
        double sigma = kernel.sumSquares(a[0], m);
        double dot[kGroup + 1] = {0, 0, 0, 0, 0};
        kernel.dots(a[0], a + 1, n, m, dot);
        for (int k = 0; k < n; ++k) {
            const int count = n - k;  // columns k+1..n
            double* ak = a[k];
            const std::size_t kk = static_cast<std::size_t>(k);
            double next[kGroup + 1] = {0, 0, 0, 0, 0};
            if (sigma == 0) {  // column already zero below the diagonal: no reflection
                if (k + 1 < n) {
                    next[0] = kernel.sumSquares(a[k + 1], m);
                    kernel.dots(a[k + 1], a + k + 2, count - 1, m, next + 1);
                }
            } else {
                const double alpha = t[kk + kk * nn];
                const double norm = std::sqrt(alpha * alpha + sigma);
                const double beta = alpha >= 0 ? -norm : norm;
                const double tau = (beta - alpha) / beta;
                const double inverse = 1.0 / (alpha - beta);
                t[kk + kk * nn] = beta;
                double scaled[kGroup];
                for (int c = 0; c < count; ++c) {
                    double& tkj = t[kk + static_cast<std::size_t>(k + 1 + c) * nn];
                    const double w = tkj + inverse * dot[c];
                    tkj -= tau * w;
                    scaled[c] = -tau * w * inverse;
                }
                if (k + 1 < n) kernel.axpysThenDots(ak, a + k + 1, scaled, count, m, next);
                else kernel.axpys(ak, a + k + 1, scaled, count, m);
            }
            sigma = next[0];
            for (int c = 1; c < count; ++c) dot[c - 1] = next[c];
        }
        return;
    }
    for (int k = 0; k < n; ++k) {
        double* ak = a[k];
        const double sigma = kernel.sumSquares(ak, m);
        if (sigma == 0) continue;  // column already zero below the diagonal
        const std::size_t nn = static_cast<std::size_t>(n);
        const std::size_t kk = static_cast<std::size_t>(k);
        const double alpha = t[kk + kk * nn];
        const double norm = std::sqrt(alpha * alpha + sigma);
        const double beta = alpha >= 0 ? -norm : norm;
        const double tau = (beta - alpha) / beta;
        const double inverse = 1.0 / (alpha - beta);
        t[kk + kk * nn] = beta;
        for (int j0 = k + 1; j0 <= n; j0 += kGroup) {
            const int count = std::min(kGroup, n + 1 - j0);
            double dot[kGroup], alpha2[kGroup];
            kernel.dots(ak, a + j0, count, m, dot);
            for (int c = 0; c < count; ++c) {
                double& tkj = t[kk + static_cast<std::size_t>(j0 + c) * nn];
                const double w = tkj + inverse * dot[c];
                tkj -= tau * w;
                alpha2[c] = -tau * w * inverse;
            }
            kernel.axpys(ak, a + j0, alpha2, count, m);
        }
    }
}

}  // namespace sw::streaming_qr
