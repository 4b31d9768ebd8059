#pragma once
// Internal layout of a compiled Program (core/expr only).

#include "core/expr/graph.h"

#include <cstdint>
#include <string>
#include <vector>

namespace sw::expr {

enum class Code : std::uint8_t {
    Unary,     // op applied to a
    Binary,    // op applied to a, b
    Select,    // a != 0 ? b : c
    Square,    // a*a
    Cube,      // a*(a*a)
    Fourth,    // (a*a)*(a*a)
    Reciprocal,  // 1/a
    PowInteger,  // a^n by repeated multiplication
};

struct Instruction {
    Code code;
    Op op;
    int n = 0;  // PowInteger exponent
    int dst = -1, a = -1, b = -1, c = -1;
};

// The same program flattened for evaluation at one point (the solver's path): one opcode
// per operation, so the loop dispatches once per instruction (no nested switch), operands
// as register indices. Produces the same values as `code` bit for bit (same operations in
// the same order). Ends with ScalarOp::End.
//
// After flattening, a peephole pass (fuseScalar) merges an instruction into the single
// instruction that reads its result, when the pair has a fused opcode below: one dispatch and
// no round trip through a register for the intermediate value. A fused opcode computes the
// same operations in the same order with the same roundings (program.cpp is compiled with
// floating-point contraction off, so a*b + c stays two roundings), so the results stay
// bit-identical to `code`.
//
// The four arithmetic operators as X(..., Name, symbol); SW_EXPR_PAIRS(X) calls X(P, p, Q, q)
// for every producer/consumer pair of them (a second list macro, since a macro does not
// expand inside its own expansion).
#define SW_EXPR_ARITHMETIC(X, ...) X(__VA_ARGS__, Add, +) X(__VA_ARGS__, Sub, -) X(__VA_ARGS__, Mul, *) X(__VA_ARGS__, Div, /)
#define SW_EXPR_ARITHMETIC_INNER(X, ...) X(__VA_ARGS__, Add, +) X(__VA_ARGS__, Sub, -) X(__VA_ARGS__, Mul, *) X(__VA_ARGS__, Div, /)
#define SW_EXPR_PAIRS_OF(X, P, p) SW_EXPR_ARITHMETIC_INNER(X, P, p)
#define SW_EXPR_PAIRS(X) SW_EXPR_ARITHMETIC(SW_EXPR_PAIRS_OF, X)
enum class ScalarOp : std::uint8_t {
    Add, Sub, Mul, Div, Neg, Square, Cube, Fourth, Reciprocal, PowInteger,
    Sin, Cos, Exp, Log, Sqrt, Atan, Pow, Select,
    Abs, Sign, Min, Max,  // inline, as apply1/apply2 define them
    Unary,   // any other one-argument op: apply1(generic, a)
    Binary,  // any other two-argument op: apply2(generic, a, b)
    // Fused pairs, t = a P b read once by Q:  PQ: (a P b) Q c;  PQr: c Q (a P b).
#define SW_EXPR_FUSED_ENUM(P, p, Q, q) P##Q, P##Q##r,
    SW_EXPR_PAIRS(SW_EXPR_FUSED_ENUM)
#undef SW_EXPR_FUSED_ENUM
    // (a P b)^2
#define SW_EXPR_SQUARE_ENUM(X, P, p) P##Square,
    SW_EXPR_ARITHMETIC(SW_EXPR_SQUARE_ENUM, X)
    // (a P b)^2 + c and c + (a P b)^2: one term of a sum of squares.
#define SW_EXPR_SQUARE_ADD_ENUM(X, P, p) P##SquareAdd, P##SquareAddr,
    SW_EXPR_ARITHMETIC(SW_EXPR_SQUARE_ADD_ENUM, X)
    // -(a P b), sin(a P b), cos(a P b), exp(a P b), ln(a P b), sqrt(a P b).
#define SW_EXPR_FUNCTION_ENUM(X, P, p) P##Neg, P##Sin, P##Cos, P##Exp, P##Log, P##Sqrt,
    SW_EXPR_ARITHMETIC(SW_EXPR_FUNCTION_ENUM, X)
#undef SW_EXPR_SQUARE_ENUM
#undef SW_EXPR_SQUARE_ADD_ENUM
#undef SW_EXPR_FUNCTION_ENUM
    NegExp,      // exp(-a)
    // Two steps of a sum, five operands (+ is commutative bit for bit, so either operand
    // order of each addition maps here):
    DotStep,     // (c + a*b) + e*f
    SquareStep,  // (c + (a - b)^2) + (e - f)^2
    End,
};

struct ScalarInstruction {
    ScalarOp op = ScalarOp::End;
    Op generic = Op::Constant;  // Unary, Binary
    std::int32_t dst = 0, a = 0;
    std::int32_t b = 0;         // second operand; the exponent of PowInteger; Select's "then"
    std::int32_t c = 0;         // Select's "else"; the consumer's other operand of a fused pair
    std::int32_t e = 0, f = 0;  // DotStep and SquareStep only
};

// What Program::evaluate runs: ScalarInstruction with the handler's address in place of the
// opcode (Unary keeps its operator in b, Binary in c).
struct ThreadedInstruction {
    const void* handler = nullptr;
    std::int32_t dst = 0, a = 0, b = 0, c = 0, e = 0, f = 0;
};

// Merges single-reader results into their reader where a fused opcode exists (see above).
// `outputs` are the registers read after the program ends. Exposed for tests.
std::vector<ScalarInstruction> fuseScalar(std::vector<ScalarInstruction> program, const std::vector<int>& outputs);
// Runs a flattened (possibly fused) program ending in End over the registers r, as
// Program::evaluate does. Exposed for tests.
void runScalarProgram(const std::vector<ScalarInstruction>& program, double* r);
// One line per instruction ("r5 = (r3 * r4) + r2"), for tests and debugging.
std::string listing(const std::vector<ScalarInstruction>& program);

struct Program::Impl {
    std::uint64_t id = 0;  // unique per compiled program, never reused
    int inputs = 0;
    int registers = 0;     // inputs first, then constants, then temporaries
    std::vector<std::pair<int, double>> constants;  // register, value
    std::vector<Instruction> code;
    std::vector<ScalarInstruction> scalar;  // `code` for single-point evaluation, fused
    std::vector<ThreadedInstruction> threaded;  // `scalar` as run
    // `scalar` has its own temporaries (see buildSinglePointProgram): where its outputs are
    // and how many registers it needs (inputs and constants are where `code` has them).
    std::vector<int> scalarOutputRegister;
    int scalarRegisters = 0;
    std::vector<int> outputRegister;
    // Output o is written straight into the caller's array by its instruction (first use of
    // a computed node); the others are copied after the block.
    std::vector<bool> outputDirect;
};

// Builds scalar, threaded, scalarOutputRegister and scalarRegisters from code, outputRegister
// and registers.
void buildSinglePointProgram(Program::Impl& p);

// Single-point evaluation by the original switch loop over `code` (Program::evaluate runs the
// flattened `scalar` form); kept so tests can check that both give the same bits.
void evaluateBySwitch(const Program::Impl& p, const double* inputs, double* outputs, Program::Workspace& ws);

}  // namespace sw::expr
