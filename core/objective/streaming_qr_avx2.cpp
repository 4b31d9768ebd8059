// The 4-wide row primitives of the streaming QR (AVX2 + FMA), used only after the run-time
// check in avx2Kernel(). Only these functions are compiled for AVX2: the standard headers are
// included before the target region, so no shared inline function is built with AVX2.
#include "core/objective/streaming_qr_kernel.h"

#include <cstddef>
#include <immintrin.h>

namespace sw::streaming_qr {

namespace {

#pragma GCC push_options
#pragma GCC target("avx2,fma")

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

// C columns b[0..C-1] against a in one pass: a is loaded once per 4 rows.
template <int C>
void avxDotsOf(const double* a, double* const* b, std::size_t m, double* out) {
    __m256d s[C];
    for (int c = 0; c < C; ++c) s[c] = _mm256_setzero_pd();
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) {
        const __m256d x = _mm256_loadu_pd(a + i);
        for (int c = 0; c < C; ++c) s[c] = _mm256_fmadd_pd(x, _mm256_loadu_pd(b[c] + i), s[c]);
    }
    for (int c = 0; c < C; ++c) {
        double t = horizontalSum(s[c]);
        for (std::size_t k = i; k < m; ++k) t += a[k] * b[c][k];
        out[c] = t;
    }
}

void avxDots(const double* a, double* const* b, int count, std::size_t m, double* out) {
    switch (count) {
        case 1: avxDotsOf<1>(a, b, m, out); break;
        case 2: avxDotsOf<2>(a, b, m, out); break;
        case 3: avxDotsOf<3>(a, b, m, out); break;
        default: avxDotsOf<4>(a, b, m, out); break;
    }
}

template <int C>
void avxAxpysOf(const double* x, double* const* y, const double* alpha, std::size_t m) {
    __m256d va[C];
    for (int c = 0; c < C; ++c) va[c] = _mm256_set1_pd(alpha[c]);
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) {
        const __m256d v = _mm256_loadu_pd(x + i);
        for (int c = 0; c < C; ++c)
            _mm256_storeu_pd(y[c] + i, _mm256_fmadd_pd(va[c], v, _mm256_loadu_pd(y[c] + i)));
    }
    for (; i < m; ++i)
        for (int c = 0; c < C; ++c) y[c][i] += alpha[c] * x[i];
}

void avxAxpys(const double* x, double* const* y, const double* alpha, int count, std::size_t m) {
    switch (count) {
        case 1: avxAxpysOf<1>(x, y, alpha, m); break;
        case 2: avxAxpysOf<2>(x, y, alpha, m); break;
        case 3: avxAxpysOf<3>(x, y, alpha, m); break;
        default: avxAxpysOf<4>(x, y, alpha, m); break;
    }
}

#pragma GCC pop_options

}  // namespace

const Kernel* avx2Kernel() {
    static const Kernel kernel{avxSumSquares, avxDots, avxAxpys};
    __builtin_cpu_init();
    if (!__builtin_cpu_supports("avx2") || !__builtin_cpu_supports("fma")) return nullptr;
    return &kernel;
}

}  // namespace sw::streaming_qr
