// See vector_math.h. This file is compiled for AVX2 (the pragma); its functions are only
// called after the run-time check in available().
#if !defined(__clang__)
#pragma GCC target("avx2,fma")
#endif
#include "core/expr/vector_math.h"

#include <immintrin.h>

#include <cstdlib>
#include <dlfcn.h>

// Clang (the fuzz build, scripts/fuzz) ignores GCC's target pragma; its own form follows.
#if defined(__clang__)
#pragma clang attribute push(__attribute__((target("avx2,fma"))), apply_to = function)
#endif

namespace sw::expr::vecmath {

namespace {

using Vector1 = __m256d (*)(__m256d);
using Vector2 = __m256d (*)(__m256d, __m256d);

struct Table {
    bool ok = false;
    Vector1 exp = nullptr, log = nullptr, sin = nullptr, cos = nullptr;
    Vector2 pow = nullptr;
};

const Table& table() {
    static const Table t = [] {
        Table r;
        if (std::getenv("SADDLEWISE_SCALAR_MATH")) return r;
        __builtin_cpu_init();
        if (!__builtin_cpu_supports("avx2")) return r;
        void* lib = dlopen("libmvec.so.1", RTLD_NOW | RTLD_LOCAL);
        if (!lib) return r;
        r.exp = reinterpret_cast<Vector1>(dlsym(lib, "_ZGVdN4v_exp"));
        r.log = reinterpret_cast<Vector1>(dlsym(lib, "_ZGVdN4v_log"));
        r.sin = reinterpret_cast<Vector1>(dlsym(lib, "_ZGVdN4v_sin"));
        r.cos = reinterpret_cast<Vector1>(dlsym(lib, "_ZGVdN4v_cos"));
        r.pow = reinterpret_cast<Vector2>(dlsym(lib, "_ZGVdN4vv_pow"));
        r.ok = r.exp && r.log && r.sin && r.cos && r.pow;
        return r;
    }();
    return t;
}

// The tail (m not a multiple of 4) goes through the same vector function via a padded
// buffer, so every point of a block is computed the same way.
void run1(Vector1 f, double* d, const double* a, std::size_t m) {
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) _mm256_storeu_pd(d + i, f(_mm256_loadu_pd(a + i)));
    if (i < m) {
        alignas(32) double in[4] = {0, 0, 0, 0}, out[4];
        for (std::size_t k = 0; i + k < m; ++k) in[k] = a[i + k];
        _mm256_store_pd(out, f(_mm256_load_pd(in)));
        for (std::size_t k = 0; i + k < m; ++k) d[i + k] = out[k];
    }
}

}  // namespace

bool available() { return table().ok; }

bool apply1(Op op, double* d, const double* a, std::size_t m) {
    const Table& t = table();
    if (!t.ok) return false;
    switch (op) {
    case Op::Exp: run1(t.exp, d, a, m); return true;
    case Op::Log: run1(t.log, d, a, m); return true;
    case Op::Sin: run1(t.sin, d, a, m); return true;
    case Op::Cos: run1(t.cos, d, a, m); return true;
    default: return false;
    }
}

bool pow(double* d, const double* a, const double* b, std::size_t m) {
    const Table& t = table();
    if (!t.ok) return false;
    std::size_t i = 0;
    for (; i + 4 <= m; i += 4) _mm256_storeu_pd(d + i, t.pow(_mm256_loadu_pd(a + i), _mm256_loadu_pd(b + i)));
    if (i < m) {
        alignas(32) double x[4] = {1, 1, 1, 1}, y[4] = {1, 1, 1, 1}, out[4];
        for (std::size_t k = 0; i + k < m; ++k) {
            x[k] = a[i + k];
            y[k] = b[i + k];
        }
        _mm256_store_pd(out, t.pow(_mm256_load_pd(x), _mm256_load_pd(y)));
        for (std::size_t k = 0; i + k < m; ++k) d[i + k] = out[k];
    }
    return true;
}

}  // namespace sw::expr::vecmath

#if defined(__clang__)
#pragma clang attribute pop
#endif
