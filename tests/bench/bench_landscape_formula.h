#pragma once
// The benchmark landscape of scripts/bench_expr, its value, gradient and Hessian written out by
// hand with the subexpressions shared by hand (the "hand-written C++" route of both the
// in-process and the whole-process comparison). Checked against our compiled program by
// bench_expr's BM_CheckNativeAgainstOurs (max relative difference ~5e-15).
#include <cmath>

namespace sw::bench {

// A quartic bowl with a tilted valley, plus a Gaussian bump modulated by sines and cosines.
inline constexpr const char* kLandscapeFormula =
    "0.1*x^4 + 0.1*y^4 - 0.5*x*y + 3*exp(-0.5*((x - 1)^2 + (y + 0.5)^2))*sin(2*x)*cos(3*y)";

// out = f, df/dx, df/dy, d2f/dx2, d2f/dxdy, d2f/dy2.
// G = 3 exp(-(u^2 + v^2)/2), u = x - 1, v = y + 1/2; S = sin 2x, C = cos 3y.
inline void landscapeByHand(double x, double y, double* out) {
    const double u = x - 1, v = y + 0.5;
    const double G = 3 * std::exp(-0.5 * (u * u + v * v));
    const double S = std::sin(2 * x), Sp = 2 * std::cos(2 * x), Spp = -4 * S;
    const double C = std::cos(3 * y), Cp = -3 * std::sin(3 * y), Cpp = -9 * C;
    const double Gx = -u * G, Gy = -v * G, Gxx = (u * u - 1) * G, Gyy = (v * v - 1) * G, Gxy = u * v * G;
    const double x2 = x * x, y2 = y * y;
    const double A = Gx * S + G * Sp;  // d(G S)/dx
    out[0] = 0.1 * x2 * x2 + 0.1 * y2 * y2 - 0.5 * x * y + G * S * C;
    out[1] = 0.4 * x2 * x - 0.5 * y + A * C;
    out[2] = 0.4 * y2 * y - 0.5 * x + S * (Gy * C + G * Cp);
    out[3] = 1.2 * x2 + (Gxx * S + 2 * Gx * Sp + G * Spp) * C;
    out[4] = -0.5 + (Gxy * S + Gy * Sp) * C + A * Cp;
    out[5] = 1.2 * y2 + S * (Gyy * C + 2 * Gy * Cp + G * Cpp);
}

}  // namespace sw::bench
