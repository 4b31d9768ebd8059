// The graph: hash-consing and the exact local simplifier. Common practice, no published source.
#include "core/expr/expr.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>

using sw::expr::Expression;

namespace {
std::string simplified(const std::string& text) { return Expression::parse(text, {"x", "y"}).toText(); }
constexpr double kInf = std::numeric_limits<double>::infinity();
}  // namespace

TEST(Graph, EqualSubtreesAreOneNode) {
    auto f = Expression::parse("(x+y)*(x+y)", {"x", "y"});
    EXPECT_EQ(f.nodeCount(), 4u);  // x, y, x+y, product
    auto g = Expression::parse("x*y + y*x", {"x", "y"});
    EXPECT_EQ(g.nodeCount(), 4u);  // x*y and y*x are one node (a*b == b*a exactly)
    auto h = Expression::parse("sin(x)^2 + cos(sin(x))", {"x"});
    EXPECT_EQ(h.nodeCount(), 6u);  // x, sin, 2, ^, cos, +
}

TEST(Graph, DerivativesShareNodesWithTheFunction) {
    auto f = Expression::parse("exp(x*y)", {"x", "y"});
    auto dx = f.derivative(0);
    auto dy = f.derivative(1);
    // d/dx = exp(x*y)*y reuses the node exp(x*y).
    EXPECT_EQ(dx.toText(), "y*exp(x*y)");
    EXPECT_EQ(dy.toText(), "x*exp(x*y)");
    EXPECT_DOUBLE_EQ(dx.derivative(1).evaluate({0.5, 2.0}), dy.derivative(0).evaluate({0.5, 2.0}));
}

TEST(Simplifier, NeutralElementsGo) {
    EXPECT_EQ(simplified("x+0"), "x");
    EXPECT_EQ(simplified("0+x"), "x");
    EXPECT_EQ(simplified("x-0"), "x");
    EXPECT_EQ(simplified("0-x"), "-x");
    EXPECT_EQ(simplified("x*1"), "x");
    EXPECT_EQ(simplified("1*x"), "x");
    EXPECT_EQ(simplified("x/1"), "x");
    EXPECT_EQ(simplified("x^1"), "x");
    EXPECT_EQ(simplified("x^0"), "1");
    EXPECT_EQ(simplified("1^y"), "1");
}

TEST(Simplifier, ConstantsFold) {
    EXPECT_EQ(simplified("2*3+x"), "x + 6");
    EXPECT_EQ(simplified("2^10"), "1024");
    EXPECT_EQ(simplified("1/3"), "0.3333333333333333");
    EXPECT_EQ(simplified("sin(0)+x"), "x");
    EXPECT_EQ(simplified("1 < 2 ? x : y"), "x");
    EXPECT_EQ(simplified("0 ? x : y"), "y");
    EXPECT_EQ(simplified("x > 1 ? y : y"), "y");
}

TEST(Simplifier, SignsFold) {
    EXPECT_EQ(simplified("-(-x)"), "x");
    EXPECT_EQ(simplified("x + (-y)"), "x - y");
    EXPECT_EQ(simplified("x - (-y)"), "x + y");
    EXPECT_EQ(simplified("x + -3"), "x - 3");
    EXPECT_EQ(simplified("x - -3"), "x + 3");
    EXPECT_EQ(simplified("(-x)*(-y)"), "x*y");
    EXPECT_EQ(simplified("(-x)*y"), "-(x*y)");
    EXPECT_EQ(simplified("x*(-2)"), "-(2*x)");
    EXPECT_EQ(simplified("x/(-2)"), "-(x/2)");
    EXPECT_EQ(simplified("(-x)/(-y)"), "x/y");
    EXPECT_EQ(simplified("abs(-x)"), "abs(x)");
}

// x*0, x-x and x/x are NaN for infinite or NaN x, so they stay (documented choice).
TEST(Simplifier, KeepsRulesThatWouldHideNonFiniteValues) {
    auto zeroTimes = Expression::parse("x*0", {"x"});
    EXPECT_FALSE(zeroTimes.isConstant());
    EXPECT_TRUE(std::isnan(zeroTimes.evaluate({kInf})));
    EXPECT_EQ(zeroTimes.evaluate({3.0}), 0.0);
    auto minusItself = Expression::parse("x-x", {"x"});
    EXPECT_FALSE(minusItself.isConstant());
    EXPECT_TRUE(std::isnan(minusItself.evaluate({kInf})));
    EXPECT_FALSE(Expression::parse("x/x", {"x"}).isConstant());
    EXPECT_TRUE(Expression::parse("2*0", {}).isConstant()) << "a finite constant folds";
}

TEST(Simplifier, NeverChangesFiniteValues) {
    const char* formulas[] = {"x+0", "-(-x)*y", "(-x)/(-y)", "x - -3", "x*(-2) + y/(-4)", "(x^1)^2", "x^0 + y^1",
                              "0 - x*y", "abs(-x) + sign(-y)"};
    for (const char* text : formulas) {
        auto f = Expression::parse(text, {"x", "y"});
        auto reparsed = Expression::parse(f.toText(), {"x", "y"});
        for (double x : {-2.5, 0.0, 1.75})
            for (double y : {-1.0, 3.5}) {
                const double direct = (x + 0 == 0 && std::string(text) == "x+0") ? 0.0 : f.evaluate({x, y});
                EXPECT_EQ(direct, reparsed.evaluate({x, y})) << text;
            }
    }
}

TEST(Derivative, BasicRules) {
    auto d = [](const std::string& text) { return Expression::parse(text, {"x", "y"}).derivative(0).toText(); };
    EXPECT_EQ(d("x^3"), "3*x^2");
    EXPECT_EQ(d("y"), "0");
    EXPECT_EQ(d("5*x"), "5");
    EXPECT_EQ(d("sin(x)"), "cos(x)");
    EXPECT_EQ(d("cos(x)"), "-sin(x)");
    EXPECT_EQ(d("exp(x)"), "exp(x)");
    EXPECT_EQ(d("ln(x)"), "1/x");
    EXPECT_EQ(d("x*y"), "y");
    EXPECT_EQ(d("x/y"), "1/y");
}

// Conventions where the derivative is undefined (documented in differentiate.cpp and the notes).
TEST(Derivative, ConventionsAtKinksAndJumps) {
    auto at = [](const std::string& text, double x, double y = 0.0) {
        return Expression::parse(text, {"x", "y"}).derivative(0).evaluate({x, y});
    };
    EXPECT_EQ(at("abs(x)", 0.0), 0.0);
    EXPECT_EQ(at("abs(x)", -2.0), -1.0);
    EXPECT_EQ(at("sign(x)", 0.0), 0.0);
    EXPECT_EQ(at("x < 1", 1.0), 0.0);
    EXPECT_EQ(at("x && y", 1.0, 1.0), 0.0);
    EXPECT_EQ(at("x > 0 ? x^2 : -x", 2.0), 4.0);
    EXPECT_EQ(at("x > 0 ? x^2 : -x", -2.0), -1.0);
    EXPECT_EQ(at("min(x, y)", 1.0, 1.0), 1.0) << "ties take the first argument";
    EXPECT_EQ(at("min(y, x)", 1.0, 1.0), 0.0) << "ties take the first argument";
    EXPECT_EQ(at("max(x, 2*y)", 3.0, 1.0), 1.0);
    EXPECT_EQ(at("max(x, 2*y)", 1.0, 1.0), 0.0);
    EXPECT_EQ(at("x^2", -3.0), -6.0) << "constant exponent: no log of a negative base";
    EXPECT_DOUBLE_EQ(at("x^y", 2.0, 3.0), 12.0);
    EXPECT_DOUBLE_EQ(Expression::parse("x^y", {"x", "y"}).derivative(1).evaluate({2.0, 3.0}), 8.0 * std::log(2.0));
}

TEST(Derivative, HessianUpperTriangleOrder) {
    auto f = Expression::parse("x^2*y^3", {"x", "y"});
    auto h = sw::expr::hessianUpper(f);
    ASSERT_EQ(h.size(), 3u);
    EXPECT_EQ(h[0].evaluate({2.0, 1.0}), 2.0);   // 2 y^3
    EXPECT_EQ(h[1].evaluate({2.0, 1.0}), 12.0);  // 6 x y^2
    EXPECT_EQ(h[2].evaluate({2.0, 1.0}), 24.0);  // 6 x^2 y
    EXPECT_EQ(sw::expr::DerivativeSet::hessianIndex(1, 0, 2), 1u);
    EXPECT_EQ(sw::expr::DerivativeSet::hessianIndex(2, 2, 3), 5u);
}
