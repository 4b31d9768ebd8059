// The 4-wide row primitives of the streaming QR (AVX2 + FMA), used only after the run-time
// check in avx2Kernel(). Only these functions are compiled for AVX2: the standard headers are
// included before the target region, so no shared inline function is built with AVX2.
#include "core/objective/streaming_qr_kernel.h"

#include <cstddef>
#include <immintrin.h>

namespace sw::streaming_qr {

namespace {

#if defined(__clang__)  // the fuzz build (scripts/fuzz): clang ignores GCC's target pragma
#pragma clang attribute push(__attribute__((target("avx2,fma"))), apply_to = function)
#else
#pragma GCC push_options
#pragma GCC target("avx2,fma")
#endif

double horizontalSum(__m256d v) {
    const __m128d low = _mm256_castpd256_pd128(v), high = _mm256_extractf128_pd(v, 1);
    const __m128d pair = _mm_add_pd(low, high);
    return _mm_cvtsd_f64(_mm_add_sd(pair, _mm_unpackhi_pd(pair, pair)));
}

double avxSumSquares(const double* a, std::size_t m) {
    __m256d s0 = _mm256_setzero_pd(), s1 = _mm256_setzero_pd();
    std::size_t i = 0;
    for (; i + 8 <= m; i += 8) {
        const __m256d x0 = _mm256_loadu_pd(a + i), x1 = _mm256_loadu_pd(a + i + 4);
        s0 = _mm256_fmadd_pd(x0, x0, s0);
        s1 = _mm256_fmadd_pd(x1, x1, s1);
    }
    for (; i + 4 <= m; i += 4) {
        const __m256d x0 = _mm256_loadu_pd(a + i);
        s0 = _mm256_fmadd_pd(x0, x0, s0);
    }
    double s = horizontalSum(_mm256_add_pd(s0, s1));
    for (; i < m; ++i) s += a[i] * a[i];
    return s;
}

// C columns b[0..C-1] against a in one pass: a is loaded once per 4 rows. Written out per
// column (if constexpr) so the sums stay in registers.
template <int C>
void avxDotsOf(const double* a, const double* const* b, std::size_t m, double* out) {
    const double* b0 = b[0];
    const double* b1 = C > 1 ? b[1] : b0;
    const double* b2 = C > 2 ? b[2] : b0;
    const double* b3 = C > 3 ? b[3] : b0;
    __m256d s0 = _mm256_setzero_pd(), s1 = _mm256_setzero_pd(), s2 = _mm256_setzero_pd(), s3 = _mm256_setzero_pd();
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) {
        const __m256d x = _mm256_loadu_pd(a + i);
        s0 = _mm256_fmadd_pd(x, _mm256_loadu_pd(b0 + i), s0);
        if constexpr (C > 1) s1 = _mm256_fmadd_pd(x, _mm256_loadu_pd(b1 + i), s1);
        if constexpr (C > 2) s2 = _mm256_fmadd_pd(x, _mm256_loadu_pd(b2 + i), s2);
        if constexpr (C > 3) s3 = _mm256_fmadd_pd(x, _mm256_loadu_pd(b3 + i), s3);
    }
    double t0 = horizontalSum(s0), t1 = horizontalSum(s1), t2 = horizontalSum(s2), t3 = horizontalSum(s3);
    for (; i < m; ++i) {
        t0 += a[i] * b0[i];
        if constexpr (C > 1) t1 += a[i] * b1[i];
        if constexpr (C > 2) t2 += a[i] * b2[i];
        if constexpr (C > 3) t3 += a[i] * b3[i];
    }
    out[0] = t0;
    if constexpr (C > 1) out[1] = t1;
    if constexpr (C > 2) out[2] = t2;
    if constexpr (C > 3) out[3] = t3;
}

void avxDots(const double* a, const double* const* b, int count, std::size_t m, double* out) {
    switch (count) {
        case 1: avxDotsOf<1>(a, b, m, out); break;
        case 2: avxDotsOf<2>(a, b, m, out); break;
        case 3: avxDotsOf<3>(a, b, m, out); break;
        default: avxDotsOf<4>(a, b, m, out); break;
    }
}

template <int C>
void avxAxpysOf(const double* x, double* const* y, const double* alpha, std::size_t m) {
    double* y0 = y[0];
    double* y1 = C > 1 ? y[1] : y0;
    double* y2 = C > 2 ? y[2] : y0;
    double* y3 = C > 3 ? y[3] : y0;
    const __m256d a0 = _mm256_set1_pd(alpha[0]), a1 = _mm256_set1_pd(C > 1 ? alpha[1] : 0.0),
                  a2 = _mm256_set1_pd(C > 2 ? alpha[2] : 0.0), a3 = _mm256_set1_pd(C > 3 ? alpha[3] : 0.0);
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) {
        const __m256d v = _mm256_loadu_pd(x + i);
        _mm256_storeu_pd(y0 + i, _mm256_fmadd_pd(a0, v, _mm256_loadu_pd(y0 + i)));
        if constexpr (C > 1) _mm256_storeu_pd(y1 + i, _mm256_fmadd_pd(a1, v, _mm256_loadu_pd(y1 + i)));
        if constexpr (C > 2) _mm256_storeu_pd(y2 + i, _mm256_fmadd_pd(a2, v, _mm256_loadu_pd(y2 + i)));
        if constexpr (C > 3) _mm256_storeu_pd(y3 + i, _mm256_fmadd_pd(a3, v, _mm256_loadu_pd(y3 + i)));
    }
    for (; i < m; ++i) {
        y0[i] += alpha[0] * x[i];
        if constexpr (C > 1) y1[i] += alpha[1] * x[i];
        if constexpr (C > 2) y2[i] += alpha[2] * x[i];
        if constexpr (C > 3) y3[i] += alpha[3] * x[i];
    }
}

// The update of C columns and, from the updated values still in registers, |y0|^2 and y0'yc.
template <int C>
void avxAxpysThenDotsOf(const double* x, double* const* y, const double* alpha, std::size_t m, double* sums) {
    double* y0 = y[0];
    double* y1 = C > 1 ? y[1] : y0;
    double* y2 = C > 2 ? y[2] : y0;
    double* y3 = C > 3 ? y[3] : y0;
    const __m256d a0 = _mm256_set1_pd(alpha[0]), a1 = _mm256_set1_pd(C > 1 ? alpha[1] : 0.0),
                  a2 = _mm256_set1_pd(C > 2 ? alpha[2] : 0.0), a3 = _mm256_set1_pd(C > 3 ? alpha[3] : 0.0);
    __m256d s0 = _mm256_setzero_pd(), s1 = _mm256_setzero_pd(), s2 = _mm256_setzero_pd(), s3 = _mm256_setzero_pd();
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) {
        const __m256d v = _mm256_loadu_pd(x + i);
        const __m256d u0 = _mm256_fmadd_pd(a0, v, _mm256_loadu_pd(y0 + i));
        _mm256_storeu_pd(y0 + i, u0);
        s0 = _mm256_fmadd_pd(u0, u0, s0);
        if constexpr (C > 1) {
            const __m256d u = _mm256_fmadd_pd(a1, v, _mm256_loadu_pd(y1 + i));
            _mm256_storeu_pd(y1 + i, u);
            s1 = _mm256_fmadd_pd(u0, u, s1);
        }
        if constexpr (C > 2) {
            const __m256d u = _mm256_fmadd_pd(a2, v, _mm256_loadu_pd(y2 + i));
            _mm256_storeu_pd(y2 + i, u);
            s2 = _mm256_fmadd_pd(u0, u, s2);
        }
        if constexpr (C > 3) {
            const __m256d u = _mm256_fmadd_pd(a3, v, _mm256_loadu_pd(y3 + i));
            _mm256_storeu_pd(y3 + i, u);
            s3 = _mm256_fmadd_pd(u0, u, s3);
        }
    }
    double t0 = horizontalSum(s0), t1 = horizontalSum(s1), t2 = horizontalSum(s2), t3 = horizontalSum(s3);
    for (; i < m; ++i) {
        y0[i] += alpha[0] * x[i];
        t0 += y0[i] * y0[i];
        if constexpr (C > 1) {
            y1[i] += alpha[1] * x[i];
            t1 += y0[i] * y1[i];
        }
        if constexpr (C > 2) {
            y2[i] += alpha[2] * x[i];
            t2 += y0[i] * y2[i];
        }
        if constexpr (C > 3) {
            y3[i] += alpha[3] * x[i];
            t3 += y0[i] * y3[i];
        }
    }
    sums[0] = t0;
    if constexpr (C > 1) sums[1] = t1;
    if constexpr (C > 2) sums[2] = t2;
    if constexpr (C > 3) sums[3] = t3;
}

void avxAxpysThenDots(const double* x, double* const* y, const double* alpha, int count, std::size_t m,
                      double* sums) {
    switch (count) {
        case 1: avxAxpysThenDotsOf<1>(x, y, alpha, m, sums); break;
        case 2: avxAxpysThenDotsOf<2>(x, y, alpha, m, sums); break;
        case 3: avxAxpysThenDotsOf<3>(x, y, alpha, m, sums); break;
        default: avxAxpysThenDotsOf<4>(x, y, alpha, m, sums); break;
    }
}

void avxAxpys(const double* x, double* const* y, const double* alpha, int count, std::size_t m) {
    switch (count) {
        case 1: avxAxpysOf<1>(x, y, alpha, m); break;
        case 2: avxAxpysOf<2>(x, y, alpha, m); break;
        case 3: avxAxpysOf<3>(x, y, alpha, m); break;
        default: avxAxpysOf<4>(x, y, alpha, m); break;
    }
}

#if defined(__clang__)
#pragma clang attribute pop
#else
#pragma GCC pop_options
#endif

}  // namespace

const Kernel* avx2Kernel() {
    static const Kernel kernel{avxSumSquares, avxDots, avxAxpys, avxAxpysThenDots};
    __builtin_cpu_init();
    if (!__builtin_cpu_supports("avx2") || !__builtin_cpu_supports("fma")) return nullptr;
    return &kernel;
}

}  // namespace sw::streaming_qr
