// The compiled program: shared subexpressions once, register reuse, block evaluation with
// broadcast and strided inputs, grids over threads. Common practice, no published source.
#include "core/expr/expr.h"
#include "core/expr/program_impl.h"
#include "core/objective/formula_objective.h"

#include <gtest/gtest.h>

#include <cmath>
#include <thread>
#include <atomic>
#include <cstring>
#include <random>

using namespace sw::expr;

TEST(Program, ComputesSharedSubexpressionsOnce) {
    auto f = Expression::parse("sin(x*y)*sin(x*y) + sin(x*y)", {"x", "y"});
    auto p = Program::compile({f});
    EXPECT_EQ(p.instructionCount(), 4u);  // x*y, sin, product, sum
    EXPECT_EQ(p.inputCount(), 2);
    EXPECT_EQ(p.outputCount(), 1);
    // Value, gradient and Hessian together share the exponential.
    DerivativeSet d("exp(x*y)", {"x", "y"});
    EXPECT_LE(d.program().instructionCount(), 9u);
}

TEST(Program, ReusesRegisters) {
    std::string sum = "0";
    for (int i = 1; i <= 200; ++i) sum += " + sin(" + std::to_string(i) + "*x)";
    auto p = Program::compile({Expression::parse(sum, {"x"})});
    auto ws = p.makeWorkspace();
    EXPECT_GT(p.instructionCount(), 400u);
    EXPECT_LT(ws.registerValues.size(), 220u) << "one register per constant plus a few temporaries";
    double x = 0.3, out = 0, expected = 0;
    for (int i = 1; i <= 200; ++i) expected += std::sin(i * x);
    p.evaluate(&x, &out, ws);
    EXPECT_NEAR(out, expected, 1e-12);
}

TEST(Program, OutputsMayRepeatOrBeInputsAndConstants) {
    auto f = Expression::parse("x*y", {"x", "y"});
    auto x = Expression::parse("x", {"x", "y"});
    auto p = Program::compile({f, f, f.derivative(0), f.derivative(0).derivative(0), Expression()});
    auto ws = p.makeWorkspace();
    const double in[2] = {3, 4};
    double out[5];
    p.evaluate(in, out, ws);
    EXPECT_EQ(out[0], 12);
    EXPECT_EQ(out[1], 12);
    EXPECT_EQ(out[2], 4);  // an input
    EXPECT_EQ(out[3], 0);  // a constant
    EXPECT_TRUE(std::isnan(out[4])) << "an invalid expression gives NaN";
    (void)x;
}

TEST(Program, BlockEvaluationBroadcastsAndGathers) {
    DerivativeSet d("a*x^2 + sin(x)*b", {"x", "a", "b"}, 1);
    const Program& p = d.program();
    const std::size_t n = 1000;  // several internal blocks and a partial one
    std::vector<double> rows(2 * n);  // x values interleaved with ignored values: stride 2
    for (std::size_t i = 0; i < n; ++i) {
        rows[2 * i] = -2 + 4.0 * i / n;
        rows[2 * i + 1] = 1e300;
    }
    const double a = 1.5, b = -0.5;
    std::vector<std::vector<double>> out(p.outputCount(), std::vector<double>(n));
    std::vector<double*> ptr;
    for (auto& o : out) ptr.push_back(o.data());
    Program::BlockInput in[3] = {{rows.data(), 2}, {&a, 0}, {&b, 0}};
    auto ws = p.makeWorkspace();
    p.evaluateBlock(in, n, ptr.data(), ws);
    for (std::size_t i = 0; i < n; i += 111) {
        const double x = rows[2 * i];
        EXPECT_DOUBLE_EQ(out[0][i], a * x * x + std::sin(x) * b);
        EXPECT_DOUBLE_EQ(out[1][i], 2 * a * x + std::cos(x) * b);
        EXPECT_DOUBLE_EQ(out[2][i], x * x);
        EXPECT_DOUBLE_EQ(out[3][i], std::sin(x));
    }
}

TEST(Program, GridUsesThreadsAndGivesTheSameNumbersAsOneThread) {
    DerivativeSet d("(x^2 + y - 11)^2 + (x + y^2 - 7)^2 + z*x", {"x", "y", "z"});
    GridSpec grid;
    grid.xMin = -5, grid.xMax = 5, grid.yMin = -4, grid.yMax = 6;
    grid.nx = 301, grid.ny = 257;
    grid.fixedInputs = {0, 0, 0.25};
    std::vector<std::vector<double>> one, two;
    evaluateGrid(d.program(), grid, one, 1);
    const double seconds = evaluateGrid(d.program(), grid, two, 2);
    EXPECT_GE(seconds, 0.0);
    ASSERT_EQ(one.size(), 1u + 3u + 6u);
    EXPECT_EQ(one, two);
    // corners and one interior point against the formula
    auto f = [](double x, double y) { return std::pow(x * x + y - 11, 2) + std::pow(x + y * y - 7, 2) + 0.25 * x; };
    EXPECT_DOUBLE_EQ(one[0][0], f(-5, -4));
    EXPECT_DOUBLE_EQ(one[0][300], f(5, -4));
    EXPECT_DOUBLE_EQ(one[0][256 * 301], f(-5, 6));
    const int row = 100, col = 150;
    const double x = -5 + 10.0 * col / 300, y = -4 + 10.0 * row / 256;
    EXPECT_DOUBLE_EQ(one[0][row * 301 + col], f(x, y));
}

TEST(FormulaObjective, GivesValueGradientAndFullHessian) {
    // Rosenbrock's function: minimum 0 at (1, 1), Hessian [[802, -400], [-400, 200]] there
    // (Rosenbrock 1960; Moré, Garbow & Hillstrom 1981, problem 1).
    sw::FormulaObjective f("(1-x)^2 + 100*(y-x^2)^2", {"x", "y"});
    sw::Vector x(2), g;
    sw::Matrix h;
    x << 1, 1;
    EXPECT_EQ(f.valueGradientHessian(x, g, h), 0.0);
    EXPECT_EQ(g.norm(), 0.0);
    EXPECT_EQ(h(0, 0), 802);
    EXPECT_EQ(h(0, 1), -400);
    EXPECT_EQ(h(1, 0), -400);
    EXPECT_EQ(h(1, 1), 200);
    x << -1.2, 1;
    EXPECT_DOUBLE_EQ(f.value(x), 24.2);  // f at the standard start point, same source
    EXPECT_DOUBLE_EQ(f.valueGradient(x, g), 24.2);
    EXPECT_DOUBLE_EQ(g[0], -215.6);
    EXPECT_DOUBLE_EQ(g[1], -88.0);
    EXPECT_EQ(f.dimension(), 2);
    EXPECT_EQ(f.description(), "(1-x)^2 + 100*(y-x^2)^2");
}

TEST(FormulaObjective, HoldsNamedConstantsFixed) {
    sw::FormulaObjective f("a*(x - b)^2", {"x"}, {{"a", 3.0}, {"b", 2.0}});
    sw::Vector x(1), g;
    sw::Matrix h;
    x << 5;
    EXPECT_EQ(f.valueGradientHessian(x, g, h), 27.0);
    EXPECT_EQ(g[0], 18.0);
    EXPECT_EQ(h(0, 0), 6.0);
    EXPECT_EQ(f.derivatives().dimension(), 1);
    EXPECT_EQ(f.derivatives().program().inputCount(), 3);
}

TEST(FormulaObjective, IsSafeToCallFromSeveralThreads) {
    sw::FormulaObjective f("sin(x)*exp(y) + x^3*y", {"x", "y"});
    auto expected = [](double x, double y) { return std::sin(x) * std::exp(y) + x * x * x * y; };
    std::atomic<int> wrong{0};
    auto work = [&](int seed) {
        sw::Vector x(2), g;
        sw::Matrix h;
        for (int i = 0; i < 20000; ++i) {
            x << 0.001 * ((i * 7 + seed) % 1000), -0.5 + 0.001 * (i % 1000);
            const double v = f.valueGradientHessian(x, g, h);
            if (std::fabs(v - expected(x[0], x[1])) > 1e-12 * (1 + std::fabs(v))) ++wrong;
            if (std::fabs(g[1] - (std::sin(x[0]) * std::exp(x[1]) + x[0] * x[0] * x[0])) > 1e-12 * (1 + std::fabs(g[1]))) ++wrong;
        }
    };
    std::thread a(work, 1), b(work, 2);
    a.join();
    b.join();
    EXPECT_EQ(wrong.load(), 0);
}

TEST(FormulaObjective, BadFormulaThrowsFormulaError) {
    EXPECT_THROW(sw::FormulaObjective("x + q", {"x"}), FormulaError);
}

// Single-point evaluation runs a flattened, threaded-dispatch copy of the program; it must give
// the same bits as the switch loop over the block instructions, for every operator.
TEST(Program, SinglePointFastPathGivesTheSameBitsAsTheSwitchLoop) {
    const std::vector<std::string> formulas = {
        "x + y - x*y/(1 + y^2)", "-x^3 + y^4 - 1/x + x^-3 + x^7 + x^0.5",
        "sin(x)*cos(y) + exp(-x*y) + ln(abs(y) + 1) + sqrt(abs(x))", "atan(x*y) + tan(x) + sinh(y) + tanh(x) + sign(x - y)",
        "x < y ? x^2 : (y >= 0 ? y : -y)", "(x > 0 && y > 0) + (x <= y || x != y) + min(x, y)*max(x, 2) + atan2(y, x)",
        "x^y + 2^x + log10(abs(x) + 1) + log2(abs(y) + 2)", "asin(x/10) + acos(y/10) + asinh(x) + cosh(y/3)"};
    std::mt19937 random(20261202);
    std::uniform_real_distribution<double> coordinate(-3, 3);
    for (const std::string& text : formulas) {
        SCOPED_TRACE(text);
        const DerivativeSet set(text, {"x", "y"}, 2);
        const Program& program = set.program();
        auto fast = program.makeWorkspace(), reference = program.makeWorkspace();
        std::vector<double> a(static_cast<std::size_t>(program.outputCount())), b(a.size());
        for (int k = 0; k < 200; ++k) {
            const double in[2] = {coordinate(random), k == 0 ? 0.0 : coordinate(random)};
            program.evaluate(in, a.data(), fast);
            evaluateBySwitch(*program.impl(), in, b.data(), reference);
            for (std::size_t o = 0; o < a.size(); ++o)
                ASSERT_EQ(std::memcmp(&a[o], &b[o], sizeof(double)), 0)
                    << "output " << o << " at (" << in[0] << ", " << in[1] << "): " << a[o] << " vs " << b[o];
        }
    }
}
