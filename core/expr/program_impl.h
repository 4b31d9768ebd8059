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

struct Program::Impl {
    std::uint64_t id = 0;  // unique per compiled program, never reused
    int inputs = 0;
    int registers = 0;     // inputs first, then constants, then temporaries
    std::vector<std::pair<int, double>> constants;  // register, value
    std::vector<Instruction> code;
    std::vector<int> outputRegister;
    // Output o is written straight into the caller's array by its instruction (first use of
    // a computed node); the others are copied after the block.
    std::vector<bool> outputDirect;
};

}  // namespace sw::expr
