// Differential tests: the compiled program against muParser's own evaluation (its built-in
// functions and operators, not ours) on hundreds of generated formulas, and derivatives
// against central finite differences. Reference: muParser 2.3.3 as shipped by Debian
// (optimizer off, because its constant folding of && and || is wrong, see PITFALLS.md);
// finite differences are common practice, no published source.
#include "core/expr/expr.h"
#include "core/expr/vector_math.h"
#include "formula_generator.h"

#include <muParser.h>

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <random>

using namespace sw::expr;

namespace {

bool agree(double ours, double reference, double relative) {
    if (std::isnan(reference)) return std::isnan(ours);
    if (std::isinf(reference)) return ours == reference;
    return std::fabs(ours - reference) <= relative * std::max(1.0, std::fabs(reference));
}

}  // namespace

TEST(Differential, ProgramMatchesMuParserOnGeneratedFormulas) {
    gen::FormulaGenerator generator(20240611u, false);
    std::mt19937 rng(7);
    std::uniform_real_distribution<double> coordinate(-3.0, 3.0);
    int formulas = 0, points = 0, mismatches = 0;
    for (int k = 0; k < 600; ++k) {
        const std::string text = generator.next(5);
        double x = 0, y = 0, z = 0;
        mu::Parser oracle;
        oracle.EnableOptimizer(false);
        oracle.DefineVar("x", &x);
        oracle.DefineVar("y", &y);
        oracle.DefineVar("z", &z);
        oracle.DefineConst("pi", std::numbers::pi);
        oracle.DefineConst("e", std::numbers::e);
        oracle.SetExpr(text);
        const Expression f = Expression::parse(text, {"x", "y", "z"});
        const Program program = Program::compile({f});
        auto ws = program.makeWorkspace();
        ++formulas;
        for (int p = 0; p < 5; ++p) {
            x = coordinate(rng);
            y = coordinate(rng);
            z = coordinate(rng);
            const double reference = oracle.Eval();
            const double in[3] = {x, y, z};
            double ours = 0;
            program.evaluate(in, &ours, ws);
            ++points;
            if (!agree(ours, reference, 1e-9)) {
                ++mismatches;
                ADD_FAILURE() << text << "\n at x=" << x << " y=" << y << " z=" << z << ": ours " << ours << ", muParser "
                              << reference;
            }
        }
    }
    std::printf("differential vs muParser %s: %d formulas, %d points, %d mismatches\n", mu::ParserVersion.c_str(), formulas, points,
                mismatches);
    EXPECT_EQ(mismatches, 0);
}

// Central differences at steps h and h/2 (h = 1e-4 relative), combined by Richardson
// extrapolation (error O(h^4)). Where the two steps disagree the formula is too wild for
// differences at that point (e.g. sin(u^4) with u near 15): such points are counted and
// skipped, and must stay rare.
TEST(Differential, DerivativesMatchCentralDifferences) {
    gen::FormulaGenerator generator(99u, true);
    std::mt19937 rng(11);
    std::uniform_real_distribution<double> coordinate(-2.0, 2.0);
    int checked = 0, skipped = 0;
    for (int k = 0; k < 300; ++k) {
        const std::string text = generator.next(4);
        DerivativeSet d(text, {"x", "y", "z"});
        const Program& program = d.program();
        auto ws = program.makeWorkspace();
        const std::size_t outs = program.outputCount();
        std::vector<double> out(outs), plus(outs), minus(outs), plus2(outs), minus2(outs);
        for (int p = 0; p < 3; ++p) {
            double at[3] = {coordinate(rng), coordinate(rng), coordinate(rng)};
            program.evaluate(at, out.data(), ws);
            for (int i = 0; i < 3; ++i) {
                const double h = 1e-4 * std::max(1.0, std::fabs(at[i]));
                auto shiftedBy = [&](double step, std::vector<double>& into) {
                    double shifted[3] = {at[0], at[1], at[2]};
                    shifted[i] = at[i] + step;
                    program.evaluate(shifted, into.data(), ws);
                };
                shiftedBy(h, plus);
                shiftedBy(-h, minus);
                shiftedBy(h / 2, plus2);
                shiftedBy(-h / 2, minus2);
                // output 0 gives the gradient entry i; outputs 1..3 give Hessian row i.
                for (int o = 0; o < 4; ++o) {
                    const double coarse = (plus[o] - minus[o]) / (2 * h);
                    const double fine = (plus2[o] - minus2[o]) / h;
                    const double extrapolated = (4 * fine - coarse) / 3;
                    const double exact = o == 0 ? out[1 + i] : out[4 + DerivativeSet::hessianIndex(i, o - 1, 3)];
                    const double scale = 1 + std::fabs(exact) + std::fabs(out[o == 0 ? 0 : o]);
                    if (std::fabs(coarse - fine) > 1e-3 * scale) {
                        ++skipped;
                        continue;
                    }
                    EXPECT_NEAR(exact, extrapolated, 1e-6 * scale) << text << (o == 0 ? " gradient " : " Hessian ") << i << ","
                                                                   << o - 1;
                    ++checked;
                }
            }
        }
    }
    std::printf("finite-difference checks: %d derivative entries agree, %d skipped (differences unstable)\n", checked,
                skipped);
    EXPECT_LT(skipped, checked / 50);
}

// The program and the tree walk of the graph give identical numbers; block evaluation agrees
// to rounding.
TEST(Differential, SinglePointBlockAndTreeWalkAgree) {
    gen::FormulaGenerator generator(5u, false);
    std::mt19937 rng(3);
    std::uniform_real_distribution<double> coordinate(-3.0, 3.0);
    const std::size_t n = 700;  // not a multiple of the block size
    std::vector<double> xs(n), ys(n);
    for (std::size_t i = 0; i < n; ++i) {
        xs[i] = coordinate(rng);
        ys[i] = coordinate(rng);
    }
    const double z = 0.75;
    for (int k = 0; k < 150; ++k) {
        const std::string text = generator.next(5);
        DerivativeSet d(text, {"x", "y", "z"}, 2);
        const Program& program = d.program();
        auto ws = program.makeWorkspace();
        const int outs = program.outputCount();
        std::vector<std::vector<double>> block(outs, std::vector<double>(n));
        std::vector<double*> outPtr(outs);
        for (int o = 0; o < outs; ++o) outPtr[o] = block[o].data();
        Program::BlockInput in[3] = {{xs.data(), 1}, {ys.data(), 1}, {&z, 0}};
        program.evaluateBlock(in, n, outPtr.data(), ws);
        std::vector<double> single(outs);
        for (std::size_t i = 0; i < n; i += 37) {
            const double at[3] = {xs[i], ys[i], z};
            program.evaluate(at, single.data(), ws);
            const double tree = d.function().evaluate({xs[i], ys[i], z});
            // Block evaluation may use glibc's vector exp/log/sin/cos/pow (at most 4 ulp each,
            // vector_math.h); everything else is the same arithmetic in the same order.
            const double tolerance = vecmath::available() ? 1e-12 : 0.0;
            for (int o = 0; o < outs; ++o) {
                if (std::isnan(single[o])) EXPECT_TRUE(std::isnan(block[o][i]));
                else if (std::isinf(single[o])) EXPECT_EQ(single[o], block[o][i]);
                else EXPECT_NEAR(single[o], block[o][i], tolerance * std::max(1.0, std::fabs(single[o]))) << text << " output " << o;
            }
            if (std::isnan(tree)) EXPECT_TRUE(std::isnan(single[0]));
            else EXPECT_EQ(single[0], tree) << text;
        }
    }
}
