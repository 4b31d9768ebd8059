// Fuzz harness: formula front end (muParser + our checks) -> expression graph ->
// differentiation -> compiled program. The input is formula text in the symbols x, y, z.
// Beyond "no crash", every answer that can be cross-checked is:
//   - a formula that is refused must be refused with a FormulaError whose position lies in the
//     text (never another exception);
//   - value, gradient and Hessian from the compiled program at one point must equal the graph's
//     own evaluation (Expression::evaluate, a tree walk) bit for bit (any NaN equals any NaN);
//   - the block evaluation (structure of arrays, scalar libm so no vector-math rounding) must
//     give the same bits as the single-point program;
//   - the printed formula must read back (when within the length limit) to the same values.
#include "core/expr/expr.h"
#include "tests/fuzz/fuzz_check.h"

#include <array>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <vector>

using namespace sw::expr;
using sw::fuzz::finding;
using sw::fuzz::printable;
using sw::fuzz::sameBits;
using sw::fuzz::show;

namespace {

const std::vector<std::string> kSymbols = {"x", "y", "z"};

// Points where formulas tend to be interesting: ordinary values, zeros, negative numbers under
// powers and logarithms, large values near overflow of exp.
constexpr std::array<std::array<double, 3>, 6> kPoints = {{{0.3, -1.7, 2.5},
                                                           {0.0, 0.0, 0.0},
                                                           {1.0, 1.0, -1.0},
                                                           {-2.5, 0.5, 1e3},
                                                           {710.0, -745.5, 1e-300},
                                                           {-0.0, 3.0, 0.5}}};

}  // namespace

extern "C" int LLVMFuzzerInitialize(int*, char***) {
    // Block evaluation with glibc's scalar functions, so it must match the single-point
    // program bit for bit (libmvec's vector exp/sin/... may differ by a few ulp, by design).
    setenv("SADDLEWISE_SCALAR_MATH", "1", 1);
    return 0;
}

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    Expression f;
    try {
        f = Expression::parse(text, kSymbols);
    } catch (const FormulaError& e) {
        if (e.position() < -1 || e.position() > static_cast<int>(text.size()))
            finding("FormulaError position " + std::to_string(e.position()) + " outside the text of " +
                    std::to_string(text.size()) + " bytes: " + printable(text));
        if (e.withCaret().empty() || e.reason().empty()) finding("FormulaError without a message: " + printable(text));
        return 0;
    } catch (const std::exception& e) {
        finding(std::string("parse threw something other than FormulaError: ") + e.what() + " for " + printable(text));
    }

    const DerivativeSet set(f, 2);
    const Program& program = set.program();
    const int n = static_cast<int>(kSymbols.size());
    if (program.inputCount() != n || program.outputCount() != 1 + n + n * (n + 1) / 2)
        finding("program shape " + std::to_string(program.inputCount()) + " inputs, " +
                std::to_string(program.outputCount()) + " outputs for " + printable(text));
    std::vector<const Expression*> outputs{&set.function()};
    for (const Expression& e : set.gradient()) outputs.push_back(&e);
    for (const Expression& e : set.hessianUpper()) outputs.push_back(&e);

    Program::Workspace ws = program.makeWorkspace();
    const std::size_t count = kPoints.size(), outs = outputs.size();
    std::vector<double> single(outs * count);
    for (std::size_t p = 0; p < count; ++p) {
        const std::vector<double> point(kPoints[p].begin(), kPoints[p].end());
        program.evaluate(point.data(), single.data() + p * outs, ws);
        for (std::size_t o = 0; o < outs; ++o) {
            const double tree = outputs[o]->evaluate(point);
            if (!sameBits(single[p * outs + o], tree))
                finding("output " + std::to_string(o) + " at point " + std::to_string(p) + ": program " +
                        show(single[p * outs + o]) + ", graph " + show(tree) + " for " + printable(text));
        }
    }

    // Block evaluation of the same points (x, y, z as columns).
    std::vector<double> columns(static_cast<std::size_t>(n) * count), block(outs * count);
    std::vector<Program::BlockInput> inputs(n);
    std::vector<double*> outputPointers(outs);
    for (int k = 0; k < n; ++k) {
        for (std::size_t p = 0; p < count; ++p) columns[k * count + p] = kPoints[p][k];
        inputs[k] = {columns.data() + k * count, 1};
    }
    for (std::size_t o = 0; o < outs; ++o) outputPointers[o] = block.data() + o * count;
    program.evaluateBlock(inputs.data(), count, outputPointers.data(), ws);
    for (std::size_t p = 0; p < count; ++p)
        for (std::size_t o = 0; o < outs; ++o)
            if (!sameBits(block[o * count + p], single[p * outs + o]))
                finding("block output " + std::to_string(o) + " at point " + std::to_string(p) + ": " +
                        show(block[o * count + p]) + ", single point " + show(single[p * outs + o]) + " for " +
                        printable(text));

    // The printed formula reads back to the same values.
    const std::string printed = f.toText();
    if (printed.size() <= kMaxFormulaLength) {
        Expression back;
        try {
            back = Expression::parse(printed, kSymbols);
        } catch (const FormulaError& e) {
            // Printing adds parentheses (x^y^z -> x^(y^z)), so a formula near the nesting limit
            // may print deeper than the limit: a limit, not a wrong answer.
            if (e.reason().find("nested more than") != std::string::npos) return 0;
            finding("printed formula does not read back (" + e.reason() + "): " + printable(printed) + " from " +
                    printable(text));
        }
        for (std::size_t p = 0; p < count; ++p) {
            const std::vector<double> point(kPoints[p].begin(), kPoints[p].end());
            const double a = back.evaluate(point), b = single[p * outs];
            if (!sameBits(a, b))
                finding("printed formula gives " + show(a) + " instead of " + show(b) + " at point " +
                        std::to_string(p) + ": " + printable(printed) + " from " + printable(text));
        }
    }
    return 0;
}
