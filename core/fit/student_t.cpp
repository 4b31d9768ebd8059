#include "core/fit/student_t.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace sw::fit {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Continued fraction for I_x(a, b) (Abramowitz & Stegun 26.5.8), evaluated with the
// modified Lentz method (Lentz 1976; Thompson & Barnett 1986). Converges fast for
// x < (a + 1) / (a + b + 2); the caller uses the symmetry I_x(a,b) = 1 - I_{1-x}(b,a) otherwise.
double betaContinuedFraction(double a, double b, double x) {
    constexpr double tiny = 1e-300;
    constexpr double eps = 1e-16;
    double c = 1.0;
    double d = 1.0 - (a + b) * x / (a + 1.0);
    if (std::fabs(d) < tiny) d = tiny;
    d = 1.0 / d;
    double h = d;
    for (int m = 1; m <= 200000; ++m) {
        const double m2 = 2.0 * m;
        // even step: d_{2m} = m (b - m) x / ((a + 2m - 1)(a + 2m))
        double num = m * (b - m) * x / ((a + m2 - 1.0) * (a + m2));
        d = 1.0 + num * d;
        if (std::fabs(d) < tiny) d = tiny;
        c = 1.0 + num / c;
        if (std::fabs(c) < tiny) c = tiny;
        d = 1.0 / d;
        h *= d * c;
        // odd step: d_{2m+1} = -(a + m)(a + b + m) x / ((a + 2m)(a + 2m + 1))
        num = -(a + m) * (a + b + m) * x / ((a + m2) * (a + m2 + 1.0));
        d = 1.0 + num * d;
        if (std::fabs(d) < tiny) d = tiny;
        c = 1.0 + num / c;
        if (std::fabs(c) < tiny) c = tiny;
        d = 1.0 / d;
        const double delta = d * c;
        h *= delta;
        if (std::fabs(delta - 1.0) < eps) break;
    }
    return h;
}

// Stirling's remainder: lgamma(x) = (x - 1/2) ln x - x + ln(2 pi)/2 + stirlingRemainder(x)
// (Abramowitz & Stegun 6.1.41); five terms give full double precision for x >= 15.
double stirlingRemainder(double x) {
    const double r = 1.0 / (x * x);
    return (1.0 / 12 - r * (1.0 / 360 - r * (1.0 / 1260 - r * (1.0 / 1680 - r / 1188)))) / x;
}

// ln B(a, b). lgamma(a) + lgamma(b) - lgamma(a + b) cancels badly when one argument is large
// (a fit with thousands of degrees of freedom), so then the large parts are subtracted
// analytically: lgamma(big) - lgamma(big + small)
//   = -(big - 1/2) log1p(small/big) - small ln(big + small) + small + remainders.
double logBeta(double a, double b) {
    const double big = std::max(a, b), small = std::min(a, b);
    if (big < 15) return std::lgamma(a) + std::lgamma(b) - std::lgamma(a + b);
    return std::lgamma(small) - (big - 0.5) * std::log1p(small / big) - small * std::log(big + small) + small +
           stirlingRemainder(big) - stirlingRemainder(big + small);
}

// x^a (1-x)^b / (a B(a, b)), in logarithms to survive large a and b.
double betaPrefactor(double a, double b, double x) {
    return std::exp(a * std::log(x) + b * std::log1p(-x) - logBeta(a, b)) / a;
}

// Upper tail P(T > t) for t >= 0: (1/2) I_{dof/(dof+t^2)}(dof/2, 1/2), computed so that
// small tails keep their relative accuracy.
double upperTail(double t, double dof) {
    const double a = 0.5 * dof, b = 0.5;
    const double t2 = t * t;
    // x = dof / (dof + t^2) and 1 - x = t^2 / (dof + t^2), each formed without cancellation.
    const double x = dof / (dof + t2);
    const double oneMinusX = t2 / (dof + t2);
    if (t2 == 0) return 0.5;
    if (x < (a + 1.0) / (a + b + 2.0)) return 0.5 * betaPrefactor(a, b, x) * betaContinuedFraction(a, b, x);
    // I_x(a,b) = 1 - I_{1-x}(b,a)
    return 0.5 * (1.0 - betaPrefactor(b, a, oneMinusX) * betaContinuedFraction(b, a, oneMinusX));
}

double density(double t, double dof) {
    // 1 / (sqrt(dof) B(dof/2, 1/2)) (1 + t^2/dof)^(-(dof+1)/2)
    const double logNorm = -logBeta(0.5 * dof, 0.5) - 0.5 * std::log(dof);
    return std::exp(logNorm - 0.5 * (dof + 1.0) * std::log1p(t * t / dof));
}

}  // namespace

double regularizedIncompleteBeta(double a, double b, double x) {
    if (!(a > 0) || !(b > 0) || !(x >= 0) || !(x <= 1)) return kNaN;
    if (x == 0) return 0;
    if (x == 1) return 1;
    if (x < (a + 1.0) / (a + b + 2.0)) return betaPrefactor(a, b, x) * betaContinuedFraction(a, b, x);
    return 1.0 - betaPrefactor(b, a, 1.0 - x) * betaContinuedFraction(b, a, 1.0 - x);
}

double studentTDistribution(double t, double dof) {
    if (!(dof > 0) || std::isnan(t)) return kNaN;
    if (std::isinf(t)) return t > 0 ? 1.0 : 0.0;
    const double tail = upperTail(std::fabs(t), dof);
    return t >= 0 ? 1.0 - tail : tail;
}

double studentTQuantile(double p, double dof) {
    if (!(p > 0) || !(p < 1) || !(dof > 0)) return kNaN;
    if (p == 0.5) return 0.0;
    // Solve upperTail(t) = tail for t > 0, then restore the sign.
    const double tail = p < 0.5 ? p : 1.0 - p;
    double lo = 0.0, hi = 1.0;
    while (upperTail(hi, dof) > tail && hi < 1e300) {
        lo = hi;
        hi *= 2.0;
    }
    double t = 0.5 * (lo + hi);
    for (int iteration = 0; iteration < 400; ++iteration) {
        const double excess = upperTail(t, dof) - tail;  // decreasing in t
        if (excess > 0) lo = t;
        else hi = t;
        // Newton on the tail (derivative = -density), kept inside the bracket.
        const double f = density(t, dof);
        double next = f > 0 ? t + excess / f : 0.5 * (lo + hi);
        if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
        if (std::fabs(next - t) <= 4e-16 * std::fabs(next) || hi - lo <= 4e-16 * hi) {
            t = next;
            break;
        }
        t = next;
    }
    return p < 0.5 ? -t : t;
}

}  // namespace sw::fit

namespace sw::fit {

double normalQuantile(double p) {
    if (!(p > 0) || !(p < 1)) return std::numeric_limits<double>::quiet_NaN();
    if (p == 0.5) return 0.0;
    // Newton on the tail Q(z) = erfc(z / sqrt 2) / 2, which keeps relative accuracy far out.
    const double tail = p < 0.5 ? p : 1.0 - p;
    double z = std::sqrt(-2.0 * std::log(tail));  // a start above the root
    for (int i = 0; i < 100; ++i) {
        const double q = 0.5 * std::erfc(z / std::sqrt(2.0));
        const double density = std::exp(-0.5 * z * z) / std::sqrt(2.0 * M_PI);
        const double next = z + (q - tail) / density;
        if (std::fabs(next - z) <= 1e-16 * std::fabs(next)) {
            z = next;
            break;
        }
        z = next;
    }
    return p < 0.5 ? -z : z;
}

}  // namespace sw::fit
