// The convention for powers at their edges, pinned against muParser 2.3.3's own evaluation
// (the oracle of the differential tests) and C's pow (C99 Annex F / IEEE 754-2019 §9.2.1):
// x^0 = 1 for every x (NaN included), 1^y = 1 for every y (NaN included), 0^y = inf for y < 0,
// a negative base with a non-integer exponent is NaN, and a power past 1.8e308 is inf.
// Expected values: the C standard's special cases (common practice), checked against muParser.
#include "core/expr/expr.h"

#include <muParser.h>

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <string>

using sw::expr::DerivativeSet;
using sw::expr::Expression;

namespace {

double muParserValue(const std::string& text, double x, double y) {
    mu::Parser p;
    p.DefineVar("x", &x);
    p.DefineVar("y", &y);
    p.DefineConst("e", 2.718281828459045235);
    p.EnableOptimizer(false);
    p.SetExpr(text);
    return p.Eval();
}

double programValue(const std::string& text, double x, double y) {
    const DerivativeSet set(text, {"x", "y"}, 0);
    std::vector<double> out(set.program().outputCount());
    auto ws = set.program().makeWorkspace();
    const double point[2] = {x, y};
    set.program().evaluate(point, out.data(), ws);
    return out[0];
}

void expectSame(double a, double b, const std::string& text) {
    if (std::isnan(a) || std::isnan(b)) EXPECT_TRUE(std::isnan(a) && std::isnan(b)) << text << ": " << a << " vs " << b;
    else EXPECT_EQ(a, b) << text;
}

}  // namespace

TEST(PowerConvention, EdgeCasesFollowCPowInTheProgramTheTreeAndMuParser) {
    const double inf = std::numeric_limits<double>::infinity();
    struct Case {
        const char* text;
        double x, y, expected;
    } cases[] = {
        {"x^y", 0, 0, 1},            // 0^0 = 1
        {"x^0", 0, 0, 1},            // simplified to 1, as pow
        {"x^y", inf, 0, 1},          // inf^0 = 1
        {"(x/y)^0", 0, 0, 1},        // NaN^0 = 1 (pow), kept by the simplifier's x^0 = 1
        {"1^(x/y)", 0, 0, 1},        // 1^NaN = 1
        {"x^y", 0, -1, inf},         // 0^-1 = inf
        {"x^y", -8, 1.0 / 3, std::nan("")},  // negative base, non-integer exponent
        {"x^y", 10, 400, inf},       // overflow
        {"x^y", 0.1, -400, inf},     // overflow through a negative exponent
        {"x^y", 1e-200, 2, 0},       // underflow to 0
        {"x^2", -3, 0, 9},           // integer exponents are multiplications
        {"x^(-2)", 0, 0, inf},
    };
    for (const Case& c : cases) {
        const double program = programValue(c.text, c.x, c.y);
        const double tree = Expression::parse(c.text, {"x", "y"}).evaluate({c.x, c.y});
        const double oracle = muParserValue(c.text, c.x, c.y);
        const double libm = std::isnan(c.expected) ? std::nan("") : c.expected;
        expectSame(program, libm, c.text);
        expectSame(tree, libm, c.text);
        expectSame(oracle, libm, c.text);
    }
}

// Issue 14's probe formula: finite in one evaluation and NaN in the other, it said. Decided:
// tanh(tanh(0.1))^(-4e2^2.5) = 0.0993^(-3.2e6) overflows to inf, the exponent is inf and the
// value (3.78)^inf = inf, in the program and in muParser alike; the gradient is NaN in the
// program (the power rule adds inf and -inf), which is what the printed derivative gives in
// muParser too.
TEST(PowerConvention, TheProbeFormulaIsInfiniteInBothEvaluations) {
    const std::string f =
        "(cos(sin((x*x*((2.5*1.5)))))/.25)^(tanh(tanh(0.1))^(-4e2^2.5)*exp(-((y*(x))))+(exp(x)*(x*(0.5))/"
        "(sinh(e)-10*y))*asinh(asinh(3-y)))";
    const double program = programValue(f, 0.3, 3);
    const double oracle = muParserValue(f, 0.3, 3);
    EXPECT_EQ(program, std::numeric_limits<double>::infinity());
    EXPECT_EQ(oracle, std::numeric_limits<double>::infinity());
    const DerivativeSet set(f, {"x", "y"}, 1);
    std::vector<double> out(set.program().outputCount());
    auto ws = set.program().makeWorkspace();
    const double point[2] = {0.3, 3};
    set.program().evaluate(point, out.data(), ws);
    for (int i = 0; i < 2; ++i) {
        const std::string text = set.gradient()[i].toText();
        expectSame(out[1 + i], muParserValue(text, 0.3, 3), "d/d" + std::string(i ? "y" : "x") + " = " + text.substr(0, 80));
    }
}
