#include "core/expr/expr.h"
#include "core/objective/formula_objective.h"

#include <gtest/gtest.h>
#include <cmath>

using namespace sw::expr;

TEST(QuickStart, ParsesDifferentiatesAndCompiles) {
    auto f = Expression::parse("x^2*y + sin(x)", {"x", "y"});
    EXPECT_NEAR(f.evaluate({1.5, 2.0}), 1.5 * 1.5 * 2 + std::sin(1.5), 1e-15);
    auto g = gradient(f);
    ASSERT_EQ(g.size(), 2u);
    EXPECT_NEAR(g[0].evaluate({1.5, 2.0}), 2 * 1.5 * 2 + std::cos(1.5), 1e-14);
    EXPECT_NEAR(g[1].evaluate({1.5, 2.0}), 1.5 * 1.5, 1e-14);
    DerivativeSet d("x^2*y + sin(x)", {"x", "y"});
    auto ws = d.program().makeWorkspace();
    double in[2] = {1.5, 2.0}, out[6];
    d.program().evaluate(in, out, ws);
    EXPECT_NEAR(out[3], 2 * 2 - std::sin(1.5), 1e-14);
    EXPECT_NEAR(out[4], 2 * 1.5, 1e-14);
    EXPECT_NEAR(out[5], 0.0, 1e-14);
    sw::FormulaObjective obj("(1-x)^2 + 100*(y-x^2)^2", {"x", "y"});
    sw::Vector x(2), gr;
    sw::Matrix h;
    x << 1, 1;
    EXPECT_EQ(obj.valueGradientHessian(x, gr, h), 0.0);
    EXPECT_NEAR(h(0, 0), 802, 1e-12);
    EXPECT_NEAR(h(0, 1), -400, 1e-12);
    std::printf("%s | %s | %s\n", f.toText().c_str(), g[0].toText().c_str(), g[1].toText().c_str());
}
