#pragma once
// Internal layout of a compiled Program (core/expr only).

#include "core/expr/graph.h"

#include <cstdint>
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
enum class ScalarOp : std::uint8_t {
    Add, Sub, Mul, Div, Neg, Square, Cube, Fourth, Reciprocal, PowInteger,
    Sin, Cos, Exp, Log, Sqrt, Atan, Pow, Select,
    Unary,   // any other one-argument op: apply1(generic, a)
    Binary,  // any other two-argument op: apply2(generic, a, b)
    End,
};

struct ScalarInstruction {
    ScalarOp op = ScalarOp::End;
    Op generic = Op::Constant;  // Unary, Binary
    std::int32_t dst = 0, a = 0;
    std::int32_t b = 0;         // second operand; the exponent of PowInteger; Select's "then"
    std::int32_t c = 0;         // Select's "else"
};

struct Program::Impl {
    std::uint64_t id = 0;  // unique per compiled program, never reused
    int inputs = 0;
    int registers = 0;     // inputs first, then constants, then temporaries
    std::vector<std::pair<int, double>> constants;  // register, value
    std::vector<Instruction> code;
    std::vector<ScalarInstruction> scalar;  // `code` for single-point evaluation
    std::vector<int> outputRegister;
    // Output o is written straight into the caller's array by its instruction (first use of
    // a computed node); the others are copied after the block.
    std::vector<bool> outputDirect;
};

// Single-point evaluation by the original switch loop over `code` (Program::evaluate runs the
// flattened `scalar` form); kept so tests can check that both give the same bits.
void evaluateBySwitch(const Program::Impl& p, const double* inputs, double* outputs, Program::Workspace& ws);

}  // namespace sw::expr
