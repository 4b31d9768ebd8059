// The peephole pass that fuses an operation into its only reader (single-point programs):
// every fused opcode must give exactly the bits of the separate instructions it replaces,
// for ordinary and special values alike, and the pass must leave alone what it cannot fuse
// safely (shared results, outputs, operands overwritten in between). The reference is the
// unfused program itself; IEEE 754 double arithmetic, common practice, no published source.
#include "core/expr/expr.h"
#include "core/expr/program_impl.h"
#include "formula_generator.h"
#include "tests/reference/solve/published_problems.h"

#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <cstdint>
#include <cstring>
#include <limits>
#include <random>
#include <string>
#include <vector>

using namespace sw::expr;

namespace {

ScalarInstruction instruction(ScalarOp op, int dst, int a, int b = 0, int c = 0) {
    ScalarInstruction in;
    in.op = op;
    in.dst = dst;
    in.a = a;
    in.b = b;
    in.c = c;
    return in;
}

std::vector<ScalarInstruction> withEnd(std::vector<ScalarInstruction> program) {
    program.push_back(ScalarInstruction{});
    return program;
}

// The same bits, or NaN on both sides. IEEE 754-2019 6.3 leaves the sign of a NaN result
// uninterpreted and 6.2.3 lets an operation with two NaN operands return either one; the
// compiler swaps the operands of + and * freely, so which NaN comes out depends on register
// allocation even within the reference loop. Every number, zero sign and infinity must match.
bool sameBits(double x, double y) {
    return std::bit_cast<std::uint64_t>(x) == std::bit_cast<std::uint64_t>(y) || (std::isnan(x) && std::isnan(y));
}

// Ordinary values and the awkward ones: signed zeros, infinities, NaN, subnormals, huge and
// tiny magnitudes, values whose products and sums round.
std::vector<double> specialValues() {
    const double inf = std::numeric_limits<double>::infinity();
    return {0.0, -0.0, 1.0, -1.0, inf, -inf, std::numeric_limits<double>::quiet_NaN(),
            std::numeric_limits<double>::denorm_min(), -std::numeric_limits<double>::denorm_min(),
            std::numeric_limits<double>::min(), std::numeric_limits<double>::max(), -std::numeric_limits<double>::max(),
            1e-300, 1e300, 0.1, 1.0 / 3.0, 1 + 0x1p-30, 1 - 0x1p-30, 3.0, -2.5};
}

// Registers: 0, 1, 2 hold a, b, c; 3 and 4 are temporaries.
void expectSameBitsEverywhere(const std::vector<ScalarInstruction>& separate, const std::vector<ScalarInstruction>& fused,
                              int result, const std::string& what) {
    const std::vector<double> special = specialValues();
    std::mt19937 random(7);
    std::uniform_real_distribution<double> uniform(-4, 4);
    std::uniform_int_distribution<std::size_t> pickSpecial(0, special.size() - 1);
    auto value = [&](int k) { return k % 3 == 0 ? uniform(random) : special[pickSpecial(random)]; };
    for (int k = 0; k < 3000; ++k) {
        double r1[5] = {value(k), value(k + 1), value(k + 2), 0, 0};
        double r2[5];
        std::memcpy(r2, r1, sizeof r1);
        runScalarProgram(separate, r1);
        runScalarProgram(fused, r2);
        ASSERT_TRUE(sameBits(r1[result], r2[result]))
            << what << " at a=" << r1[0] << " b=" << r1[1] << " c=" << r1[2] << ": " << r1[result] << " separately, "
            << r2[result] << " fused";
    }
}

const ScalarOp kArithmetic[] = {ScalarOp::Add, ScalarOp::Sub, ScalarOp::Mul, ScalarOp::Div};
const char* const kSymbol[] = {"+", "-", "*", "/"};

}  // namespace

TEST(Fusion, EveryPairOfArithmeticOperationsGivesTheBitsOfTheSeparateInstructions) {
    int forms = 0;
    for (int p = 0; p < 4; ++p)
        for (int q = 0; q < 4; ++q)
            for (int slot = 0; slot < 2; ++slot) {
                // r3 = a P b; r4 = r3 Q c (slot 0) or c Q r3 (slot 1).
                const auto separate = withEnd({instruction(kArithmetic[p], 3, 0, 1),
                                               slot == 0 ? instruction(kArithmetic[q], 4, 3, 2) : instruction(kArithmetic[q], 4, 2, 3)});
                const auto fused = fuseScalar(separate, {4});
                const std::string what = slot == 0 ? std::string("(a ") + kSymbol[p] + " b) " + kSymbol[q] + " c"
                                                   : std::string("c ") + kSymbol[q] + " (a " + kSymbol[p] + " b)";
                ASSERT_EQ(fused.size(), 2u) << what << " was not fused:\n" << listing(fused);
                expectSameBitsEverywhere(separate, fused, 4, what);
                ++forms;
            }
    EXPECT_EQ(forms, 32);
}

TEST(Fusion, SquaresOfArithmeticAndSumOfSquaresTermsGiveTheSameBits) {
    for (int p = 0; p < 4; ++p) {
        // r3 = a P b; r3 = r3^2 (the square writes over its operand, as register reuse does).
        const auto square = withEnd({instruction(kArithmetic[p], 3, 0, 1), instruction(ScalarOp::Square, 3, 3)});
        const auto fusedSquare = fuseScalar(square, {3});
        ASSERT_EQ(fusedSquare.size(), 2u) << listing(fusedSquare);
        expectSameBitsEverywhere(square, fusedSquare, 3, std::string("(a ") + kSymbol[p] + " b)^2");
        for (int slot = 0; slot < 2; ++slot) {
            auto term = square;
            term.insert(term.end() - 1, slot == 0 ? instruction(ScalarOp::Add, 4, 3, 2) : instruction(ScalarOp::Add, 4, 2, 3));
            const auto fused = fuseScalar(term, {4});
            ASSERT_EQ(fused.size(), 2u) << "three instructions become one:\n" << listing(fused);
            expectSameBitsEverywhere(term, fused, 4, std::string("sum-of-squares term with ") + kSymbol[p]);
        }
    }
    // A square (a*a) feeding an addition is a multiply-add with both factors a.
    const auto accumulate = withEnd({instruction(ScalarOp::Square, 3, 0), instruction(ScalarOp::Add, 4, 2, 3)});
    const auto fused = fuseScalar(accumulate, {4});
    ASSERT_EQ(fused.size(), 2u) << listing(fused);
    expectSameBitsEverywhere(accumulate, fused, 4, "c + a*a");
}

TEST(Fusion, ArithmeticInsideNegationAndFunctionsGivesTheSameBits) {
    const ScalarOp functions[] = {ScalarOp::Neg, ScalarOp::Sin, ScalarOp::Cos, ScalarOp::Exp, ScalarOp::Log, ScalarOp::Sqrt};
    const char* const names[] = {"-", "sin", "cos", "exp", "ln", "sqrt"};
    for (int p = 0; p < 4; ++p)
        for (int u = 0; u < 6; ++u) {
            const auto separate = withEnd({instruction(kArithmetic[p], 3, 0, 1), instruction(functions[u], 4, 3)});
            const auto fused = fuseScalar(separate, {4});
            const std::string what = std::string(names[u]) + "(a " + kSymbol[p] + " b)";
            ASSERT_EQ(fused.size(), 2u) << what << " was not fused:\n" << listing(fused);
            expectSameBitsEverywhere(separate, fused, 4, what);
        }
    const auto negExp = withEnd({instruction(ScalarOp::Neg, 3, 0), instruction(ScalarOp::Exp, 3, 3)});
    const auto fused = fuseScalar(negExp, {3});
    ASSERT_EQ(fused.size(), 2u) << listing(fused);
    expectSameBitsEverywhere(negExp, fused, 3, "exp(-a)");
}

// Two steps of a running sum of products or of squared differences become one instruction,
// whichever operand order each addition has (+ commutes bit for bit).
TEST(Fusion, TwoStepsOfARunningSumGiveTheSameBits) {
    for (int order = 0; order < 4; ++order) {
        const bool firstSumLeft = order & 1, secondSumLeft = order & 2;
        // r3 = c + a*b; r4 = r3 + b*c.
        const auto dot = withEnd({instruction(ScalarOp::Mul, 3, 0, 1),
                                  firstSumLeft ? instruction(ScalarOp::Add, 3, 3, 2) : instruction(ScalarOp::Add, 3, 2, 3),
                                  instruction(ScalarOp::Mul, 4, 1, 2),
                                  secondSumLeft ? instruction(ScalarOp::Add, 4, 4, 3) : instruction(ScalarOp::Add, 4, 3, 4)});
        const auto fusedDot = fuseScalar(dot, {4});
        ASSERT_EQ(fusedDot.size(), 2u) << "four instructions become one:\n" << listing(fusedDot);
        EXPECT_EQ(fusedDot[0].op, ScalarOp::DotStep);
        expectSameBitsEverywhere(dot, fusedDot, 4, "(c + a*b) + b*c, order " + std::to_string(order));
        // r3 = c + (a - b)^2; r4 = r3 + (c - a)^2.
        const auto squares = withEnd({instruction(ScalarOp::Sub, 3, 0, 1), instruction(ScalarOp::Square, 3, 3),
                                      firstSumLeft ? instruction(ScalarOp::Add, 3, 3, 2) : instruction(ScalarOp::Add, 3, 2, 3),
                                      instruction(ScalarOp::Sub, 4, 2, 0), instruction(ScalarOp::Square, 4, 4),
                                      secondSumLeft ? instruction(ScalarOp::Add, 4, 4, 3) : instruction(ScalarOp::Add, 4, 3, 4)});
        const auto fusedSquares = fuseScalar(squares, {4});
        ASSERT_EQ(fusedSquares.size(), 2u) << "six instructions become one:\n" << listing(fusedSquares);
        EXPECT_EQ(fusedSquares[0].op, ScalarOp::SquareStep);
        expectSameBitsEverywhere(squares, fusedSquares, 4, "(c + (a - b)^2) + (c - a)^2, order " + std::to_string(order));
    }
}

// A fused multiply-add would give -2^-60 here: (1 + 2^-30)(1 - 2^-30) = 1 - 2^-60 exactly,
// which rounds to 1 before the addition of -1.
TEST(Fusion, KeepsTwoRoundingsInMultiplyAdd) {
    const Program program = Program::compile({Expression::parse("x*y + z", {"x", "y", "z"})});
    ASSERT_EQ(program.singlePointInstructionCount(), 1u) << listing(program.impl()->scalar);
    auto ws = program.makeWorkspace();
    const double in[3] = {1 + 0x1p-30, 1 - 0x1p-30, -1};
    double out = 1;
    program.evaluate(in, &out, ws);
    EXPECT_TRUE(sameBits(out, 0.0)) << "got " << out << " (a contracted multiply-add gives " << -0x1p-60 << ")";
    const Program minus = Program::compile({Expression::parse("z - x*y", {"x", "y", "z"})});
    ASSERT_EQ(minus.singlePointInstructionCount(), 1u);
    auto ws2 = minus.makeWorkspace();
    const double in2[3] = {1 + 0x1p-30, 1 - 0x1p-30, 1};
    minus.evaluate(in2, &out, ws2);
    EXPECT_TRUE(sameBits(out, 0.0)) << "got " << out;
}

TEST(Fusion, LeavesResultsWithSeveralReadersOrReadAtTheEnd) {
    // r3 = a*b is read twice: it stays (the sum read once may still move into the difference).
    const auto twice = withEnd({instruction(ScalarOp::Mul, 3, 0, 1), instruction(ScalarOp::Add, 4, 3, 2),
                                instruction(ScalarOp::Sub, 4, 4, 3)});
    const auto fusedTwice = fuseScalar(twice, {4});
    EXPECT_EQ(listing(fusedTwice), "r3 = r0 * r1\nr4 = (r3 + r2) - r3\nend\n");
    expectSameBitsEverywhere(twice, fusedTwice, 4, "product read twice");
    // r3 = a*b is read once but is also an output.
    const auto output = withEnd({instruction(ScalarOp::Mul, 3, 0, 1), instruction(ScalarOp::Add, 4, 3, 2)});
    EXPECT_EQ(fuseScalar(output, {4, 3}).size(), output.size());
    // r3 + r3 reads the product twice in one instruction.
    const auto both = withEnd({instruction(ScalarOp::Mul, 3, 0, 1), instruction(ScalarOp::Add, 4, 3, 3)});
    EXPECT_EQ(fuseScalar(both, {4}).size(), both.size());
    // An operation without a fused form (a sine) stays.
    const auto sine = withEnd({instruction(ScalarOp::Sin, 3, 0), instruction(ScalarOp::Add, 4, 3, 2)});
    EXPECT_EQ(fuseScalar(sine, {4}).size(), sine.size());
}

TEST(Fusion, NeverMovesAReadPastAWriteOfTheSameRegister) {
    // r3 = a*b; then b's register is overwritten (r1 = c + c) before r3 is read: moving the
    // product down would read the new b.
    const auto overwritten = withEnd({instruction(ScalarOp::Mul, 3, 0, 1), instruction(ScalarOp::Add, 1, 2, 2),
                                      instruction(ScalarOp::Add, 4, 3, 1)});
    const auto fused = fuseScalar(overwritten, {4});
    EXPECT_EQ(listing(fused), "r3 = r0 * r1\nr4 = r3 + (r2 + r2)\nend\n") << "the product stays where it was";
    expectSameBitsEverywhere(overwritten, fused, 4, "product read after its operand was overwritten");
    // A producer that writes over its own operand may move: nothing else touches the register.
    const auto own = withEnd({instruction(ScalarOp::Add, 3, 0, 1), instruction(ScalarOp::Mul, 3, 3, 2),
                              instruction(ScalarOp::Sub, 4, 3, 0)});
    const auto fusedOwn = fuseScalar(own, {4});
    EXPECT_LT(fusedOwn.size(), own.size()) << listing(fusedOwn);
    expectSameBitsEverywhere(own, fusedOwn, 4, "producer over its own operand");
    // The producer's result register is reused by an unrelated instruction in between.
    const auto reused = withEnd({instruction(ScalarOp::Mul, 3, 0, 1), instruction(ScalarOp::Sub, 4, 3, 2),
                                 instruction(ScalarOp::Add, 3, 2, 2), instruction(ScalarOp::Div, 4, 4, 3)});
    const auto fusedReused = fuseScalar(reused, {4});
    expectSameBitsEverywhere(reused, fusedReused, 4, "result register reused");
}

// Random formulas with their gradients and Hessians (the programs the solvers run): the fused
// single-point program gives the switch loop's bits at random points and at special values.
TEST(Fusion, GeneratedFormulasGiveTheBitsOfTheSwitchLoop) {
    gen::FormulaGenerator generator(20261202u, false);
    std::mt19937 random(11);
    std::uniform_real_distribution<double> coordinate(-3, 3);
    const std::vector<double> special = specialValues();
    std::uniform_int_distribution<std::size_t> pickSpecial(0, special.size() - 1);
    std::size_t unfused = 0, fused = 0;
    for (int k = 0; k < 200; ++k) {
        const std::string text = generator.next(5);
        SCOPED_TRACE(text);
        const DerivativeSet set(text, {"x", "y", "z"}, 2);
        const Program& program = set.program();
        unfused += program.instructionCount();
        fused += program.singlePointInstructionCount();
        auto fast = program.makeWorkspace(), reference = program.makeWorkspace();
        std::vector<double> a(static_cast<std::size_t>(program.outputCount())), b(a.size());
        for (int t = 0; t < 40; ++t) {
            double in[3];
            for (double& v : in) v = t < 20 ? coordinate(random) : (random() % 2 ? special[pickSpecial(random)] : coordinate(random));
            program.evaluate(in, a.data(), fast);
            evaluateBySwitch(*program.impl(), in, b.data(), reference);
            for (std::size_t o = 0; o < a.size(); ++o)
                ASSERT_TRUE(sameBits(a[o], b[o])) << "output " << o << " at (" << in[0] << ", " << in[1] << ", " << in[2]
                                                  << "): " << a[o] << " fused, " << b[o] << " by the switch loop";
        }
    }
    // The pass must have had work to do, or this test checks nothing.
    EXPECT_LT(fused, unfused * 9 / 10) << fused << " of " << unfused << " instructions remain";
    std::printf("generated programs: %zu instructions, %zu after fusion\n", unfused, fused);
}

// The programs the solvers run on the published test problems (sums of squared residuals with
// their gradients and Hessians; formulas from Moré, Garbow & Hillstrom (1981) as written in
// tests/reference/solve/published_problems.h): the running-sum forms occur there, and the
// fused programs give the switch loop's bits near the start points and at special values.
TEST(Fusion, LeastSquaresProgramsGiveTheBitsOfTheSwitchLoop) {
    std::mt19937 random(5);
    std::uniform_real_distribution<double> factor(0.5, 1.5);
    const std::vector<double> special = specialValues();
    std::size_t dotSteps = 0, squareSteps = 0;
    for (const auto& problem : sw::reference::publishedProblems()) {
        SCOPED_TRACE(problem.name);
        const DerivativeSet set(problem.formula, problem.variables, 2);
        std::vector<Expression> valueAndGradient{set.function()};
        valueAndGradient.insert(valueAndGradient.end(), set.gradient().begin(), set.gradient().end());
        for (const Program& program : {Program::compile({set.function()}), Program::compile(valueAndGradient), set.program()}) {
            for (const ScalarInstruction& in : program.impl()->scalar) {
                dotSteps += in.op == ScalarOp::DotStep;
                squareSteps += in.op == ScalarOp::SquareStep;
            }
            auto fast = program.makeWorkspace(), reference = program.makeWorkspace();
            std::vector<double> a(static_cast<std::size_t>(program.outputCount())), b(a.size());
            for (int t = 0; t < 60; ++t) {
                std::vector<double> x(problem.start);
                for (std::size_t i = 0; i < x.size(); ++i)
                    x[i] = t % 4 == 3 ? special[random() % special.size()] : (x[i] == 0 ? factor(random) - 1 : x[i] * factor(random));
                program.evaluate(x.data(), a.data(), fast);
                evaluateBySwitch(*program.impl(), x.data(), b.data(), reference);
                for (std::size_t o = 0; o < a.size(); ++o) ASSERT_TRUE(sameBits(a[o], b[o])) << "output " << o << ": " << a[o] << " vs " << b[o];
            }
        }
    }
    EXPECT_GT(dotSteps, 0u);
    EXPECT_GT(squareSteps, 0u);
}
