// Compiling outputs into one straight-line program, and running it at one point or over
// blocks of points (structure of arrays).
//
// Hash-consing already made common subexpressions one node, so each distinct node becomes
// one instruction. Registers are allocated by a linear scan over the instructions in
// topological order: a register is released after the last instruction that reads it and
// reused for the next result (an instruction may write over its own operand; every loop
// reads element i before writing element i).
// GCC 12 at -O2 vectorises only loops that need no run-time alias checks; the block
// loops below need them (an instruction may write over its operand), so ask for more.
#pragma GCC optimize("tree-vectorize", "vect-cost-model=dynamic")
// Fused single-point opcodes must round like the separate instructions they replace: never
// contract a*b + c into one fused multiply-add (tested: Fusion.KeepsTwoRoundingsInMultiplyAdd).
#pragma GCC optimize("fp-contract=off")
#include "core/expr/program_impl.h"
#include "core/expr/vector_math.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstring>
#include <limits>
#include <sstream>
#include <unordered_map>

namespace sw::expr {

namespace {
std::atomic<std::uint64_t> nextProgramId{1};

ScalarOp scalarOp(const Instruction& in) {
    switch (in.code) {
    case Code::Select: return ScalarOp::Select;
    case Code::Square: return ScalarOp::Square;
    case Code::Cube: return ScalarOp::Cube;
    case Code::Fourth: return ScalarOp::Fourth;
    case Code::Reciprocal: return ScalarOp::Reciprocal;
    case Code::PowInteger: return ScalarOp::PowInteger;
    case Code::Unary:
        switch (in.op) {
        case Op::Neg: return ScalarOp::Neg;
        case Op::Sin: return ScalarOp::Sin;
        case Op::Cos: return ScalarOp::Cos;
        case Op::Exp: return ScalarOp::Exp;
        case Op::Log: return ScalarOp::Log;
        case Op::Abs: return ScalarOp::Abs;
        case Op::Sign: return ScalarOp::Sign;
        case Op::Sqrt: return ScalarOp::Sqrt;
        case Op::Atan: return ScalarOp::Atan;
        default: return ScalarOp::Unary;
        }
    case Code::Binary:
        switch (in.op) {
        case Op::Add: return ScalarOp::Add;
        case Op::Sub: return ScalarOp::Sub;
        case Op::Mul: return ScalarOp::Mul;
        case Op::Div: return ScalarOp::Div;
        case Op::Pow: return ScalarOp::Pow;
        case Op::Min: return ScalarOp::Min;
        case Op::Max: return ScalarOp::Max;
        default: return ScalarOp::Binary;
        }
    }
    return ScalarOp::Binary;
}

std::vector<ScalarInstruction> flatten(const std::vector<Instruction>& code) {
    std::vector<ScalarInstruction> flat;
    flat.reserve(code.size() + 1);
    for (const Instruction& in : code) {
        ScalarInstruction s;
        s.op = scalarOp(in);
        s.generic = in.op;
        s.dst = in.dst;
        s.a = in.a;
        s.b = in.code == Code::PowInteger ? in.n : std::max(in.b, 0);
        s.c = std::max(in.c, 0);
        flat.push_back(s);
    }
    flat.push_back(ScalarInstruction{});  // End
    return flat;
}

// Runs a flattened program over the registers r. Threaded dispatch (GCC's labels as values):
// every handler ends in its own indirect jump, which the processor predicts far better than
// the single jump of a switch in a loop. Each handler reads its operands before writing, so
// a destination may be one of its operands.
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wpedantic"
// Direct threading: each instruction carries its handler's address, so a dispatch is one load
// and one jump. Called with `table`, it only reports the handler addresses (in ScalarOp order)
// for threadProgram(); never inlined or cloned, so those addresses belong to the one copy that
// runs them. No cross-jumping: GCC would otherwise merge the common tails of the handlers
// (the outer operation, the store and the jump), leaving several opcodes to share one
// indirect jump, which the processor then predicts worse.
__attribute__((noinline, noclone, optimize("no-crossjumping"))) void runThreaded(const ThreadedInstruction* in, double* __restrict r,
                                                    const void* const** table) {
    // Same order as ScalarOp.
    static const void* const handler[] = {&&add, &&sub, &&mul, &&div, &&neg, &&square, &&cube, &&fourth,
                                          &&reciprocal, &&powInteger, &&sin, &&cos, &&exp, &&log, &&sqrt,
                                          &&atan, &&pow, &&select, &&abs, &&sign, &&min, &&max, &&unary, &&binary,
#define SW_EXPR_FUSED_LABEL(P, p, Q, q) &&fused_##P##Q, &&fused_##P##Q##r,
                                          SW_EXPR_PAIRS(SW_EXPR_FUSED_LABEL)
#undef SW_EXPR_FUSED_LABEL
#define SW_EXPR_SQUARE_LABEL(X, P, p) &&fused_##P##Square,
                                          SW_EXPR_ARITHMETIC(SW_EXPR_SQUARE_LABEL, X)
#undef SW_EXPR_SQUARE_LABEL
#define SW_EXPR_SQUARE_ADD_LABEL(X, P, p) &&fused_##P##SquareAdd, &&fused_##P##SquareAddr,
                                          SW_EXPR_ARITHMETIC(SW_EXPR_SQUARE_ADD_LABEL, X)
#undef SW_EXPR_SQUARE_ADD_LABEL
#define SW_EXPR_FUNCTION_LABEL(X, P, p) &&fused_##P##Neg, &&fused_##P##Sin, &&fused_##P##Cos, &&fused_##P##Exp, &&fused_##P##Log, &&fused_##P##Sqrt,
                                          SW_EXPR_ARITHMETIC(SW_EXPR_FUNCTION_LABEL, X)
#undef SW_EXPR_FUNCTION_LABEL
                                          &&negExp, &&dotStep, &&squareStep,
                                          &&end};
    static_assert(sizeof handler / sizeof handler[0] == static_cast<std::size_t>(ScalarOp::End) + 1);
    if (table) {
        *table = handler;
        return;
    }
#define SW_DISPATCH() goto* in->handler
#define SW_NEXT() \
    ++in;         \
    SW_DISPATCH()
    SW_DISPATCH();
add:
    r[in->dst] = r[in->a] + r[in->b];
    SW_NEXT();
sub:
    r[in->dst] = r[in->a] - r[in->b];
    SW_NEXT();
mul:
    r[in->dst] = r[in->a] * r[in->b];
    SW_NEXT();
div:
    r[in->dst] = r[in->a] / r[in->b];
    SW_NEXT();
neg:
    r[in->dst] = -r[in->a];
    SW_NEXT();
square:
    r[in->dst] = r[in->a] * r[in->a];
    SW_NEXT();
cube: {
    const double x = r[in->a];
    r[in->dst] = x * (x * x);
    SW_NEXT();
}
fourth: {
    const double x2 = r[in->a] * r[in->a];
    r[in->dst] = x2 * x2;
    SW_NEXT();
}
reciprocal:
    r[in->dst] = 1.0 / r[in->a];
    SW_NEXT();
powInteger:
    r[in->dst] = sw::expr::powInteger(r[in->a], in->b);  // b is the exponent
    SW_NEXT();
sin:
    r[in->dst] = std::sin(r[in->a]);
    SW_NEXT();
cos:
    r[in->dst] = std::cos(r[in->a]);
    SW_NEXT();
exp:
    r[in->dst] = std::exp(r[in->a]);
    SW_NEXT();
log:
    r[in->dst] = std::log(r[in->a]);
    SW_NEXT();
sqrt:
    r[in->dst] = std::sqrt(r[in->a]);
    SW_NEXT();
atan:
    r[in->dst] = std::atan(r[in->a]);
    SW_NEXT();
pow:
    r[in->dst] = std::pow(r[in->a], r[in->b]);
    SW_NEXT();
    // abs, sign, min and max exactly as apply1/apply2 (graph.cpp) compute them, without the call.
abs:
    r[in->dst] = std::fabs(r[in->a]);
    SW_NEXT();
sign: {
    const double x = r[in->a];
    r[in->dst] = x > 0 ? 1.0 : (x < 0 ? -1.0 : x);
    SW_NEXT();
}
min: {
    const double x = r[in->a], y = r[in->b];
    r[in->dst] = (x <= y || x != x) ? x : y;
    SW_NEXT();
}
max: {
    const double x = r[in->a], y = r[in->b];
    r[in->dst] = (x >= y || x != x) ? x : y;
    SW_NEXT();
}
select:
    r[in->dst] = r[in->a] != 0 ? r[in->b] : r[in->c];
    SW_NEXT();
unary:
    r[in->dst] = apply1(static_cast<Op>(in->b), r[in->a]);
    SW_NEXT();
binary:
    r[in->dst] = apply2(static_cast<Op>(in->c), r[in->a], r[in->b]);
    SW_NEXT();
    // Fused forms: the inner operation first, rounded to a double, then the outer one.
#define SW_EXPR_FUSED_HANDLER(P, p, Q, q)                  \
    fused_##P##Q : {                                       \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = t q r[in->c];                         \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##Q##r : {                                    \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = r[in->c] q t;                         \
        SW_NEXT();                                         \
    }
    SW_EXPR_PAIRS(SW_EXPR_FUSED_HANDLER)
#undef SW_EXPR_FUSED_HANDLER
#define SW_EXPR_SQUARE_HANDLER(X, P, p)                    \
    fused_##P##Square : {                                  \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = t * t;                                \
        SW_NEXT();                                         \
    }
    SW_EXPR_ARITHMETIC(SW_EXPR_SQUARE_HANDLER, X)
#undef SW_EXPR_SQUARE_HANDLER
#define SW_EXPR_SQUARE_ADD_HANDLER(X, P, p)                \
    fused_##P##SquareAdd : {                               \
        const double t = r[in->a] p r[in->b];              \
        const double t2 = t * t;                           \
        r[in->dst] = t2 + r[in->c];                        \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##SquareAddr : {                              \
        const double t = r[in->a] p r[in->b];              \
        const double t2 = t * t;                           \
        r[in->dst] = r[in->c] + t2;                        \
        SW_NEXT();                                         \
    }
    SW_EXPR_ARITHMETIC(SW_EXPR_SQUARE_ADD_HANDLER, X)
#undef SW_EXPR_SQUARE_ADD_HANDLER
#define SW_EXPR_FUNCTION_HANDLER(X, P, p)                  \
    fused_##P##Neg : {                                     \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = -t;                                   \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##Sin : {                                     \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = std::sin(t);                          \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##Cos : {                                     \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = std::cos(t);                          \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##Exp : {                                     \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = std::exp(t);                          \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##Log : {                                     \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = std::log(t);                          \
        SW_NEXT();                                         \
    }                                                      \
    fused_##P##Sqrt : {                                    \
        const double t = r[in->a] p r[in->b];              \
        r[in->dst] = std::sqrt(t);                         \
        SW_NEXT();                                         \
    }
    SW_EXPR_ARITHMETIC(SW_EXPR_FUNCTION_HANDLER, X)
#undef SW_EXPR_FUNCTION_HANDLER
negExp : {
    const double t = -r[in->a];
    r[in->dst] = std::exp(t);
    SW_NEXT();
}
dotStep : {
    const double t = r[in->a] * r[in->b];
    const double sum = r[in->c] + t;
    const double u = r[in->e] * r[in->f];
    r[in->dst] = sum + u;
    SW_NEXT();
}
squareStep : {
    const double t = r[in->a] - r[in->b];
    const double sum = r[in->c] + t * t;
    const double u = r[in->e] - r[in->f];
    r[in->dst] = sum + u * u;
    SW_NEXT();
}
end:
    return;
#undef SW_NEXT
#undef SW_DISPATCH
}
#pragma GCC diagnostic pop

std::vector<ThreadedInstruction> threadProgram(const std::vector<ScalarInstruction>& program) {
    const void* const* handler = nullptr;
    runThreaded(nullptr, nullptr, &handler);
    std::vector<ThreadedInstruction> threaded;
    threaded.reserve(program.size());
    for (const ScalarInstruction& in : program) {
        ThreadedInstruction t;
        t.handler = handler[static_cast<std::size_t>(in.op)];
        t.dst = in.dst;
        t.a = in.a;
        t.b = in.op == ScalarOp::Unary ? static_cast<std::int32_t>(in.generic) : in.b;
        t.c = in.op == ScalarOp::Binary ? static_cast<std::int32_t>(in.generic) : in.c;
        t.e = in.e;
        t.f = in.f;
        threaded.push_back(t);
    }
    return threaded;
}

// ---- peephole fusion of the flattened program ----------------------------------------------------

// Registers an instruction reads, in operand order (PowInteger's b is its exponent, not a register).
int operandsOf(const ScalarInstruction& in, std::int32_t out[5]) {
    const int op = static_cast<int>(in.op);
    int count = 3;  // Select and the three-operand fused forms
    switch (in.op) {
    case ScalarOp::End: return 0;
    case ScalarOp::Neg: case ScalarOp::Square: case ScalarOp::Cube: case ScalarOp::Fourth:
    case ScalarOp::Reciprocal: case ScalarOp::PowInteger: case ScalarOp::Sin: case ScalarOp::Cos:
    case ScalarOp::Exp: case ScalarOp::Log: case ScalarOp::Sqrt: case ScalarOp::Atan: case ScalarOp::Unary:
    case ScalarOp::Abs: case ScalarOp::Sign:
    case ScalarOp::NegExp:
        count = 1;
        break;
    case ScalarOp::Add: case ScalarOp::Sub: case ScalarOp::Mul: case ScalarOp::Div:
    case ScalarOp::Pow: case ScalarOp::Binary: case ScalarOp::Min: case ScalarOp::Max:
        count = 2;
        break;
    case ScalarOp::DotStep: case ScalarOp::SquareStep: count = 5; break;
    default:
        if ((op >= static_cast<int>(ScalarOp::AddSquare) && op <= static_cast<int>(ScalarOp::DivSquare)) ||
            (op >= static_cast<int>(ScalarOp::AddNeg) && op <= static_cast<int>(ScalarOp::DivSqrt)))
            count = 2;
        break;
    }
    const std::int32_t all[5] = {in.a, in.b, in.c, in.e, in.f};
    std::copy_n(all, count, out);
    return count;
}

// Position 0..3 of Add, Sub, Mul, Div, or -1.
int arithmeticIndex(ScalarOp op) {
    switch (op) {
    case ScalarOp::Add: return 0;
    case ScalarOp::Sub: return 1;
    case ScalarOp::Mul: return 2;
    case ScalarOp::Div: return 3;
    default: return -1;
    }
}

// Position 0..5 of Neg, Sin, Cos, Exp, Log, Sqrt (the functions with a fused form), or -1.
int functionIndex(ScalarOp op) {
    switch (op) {
    case ScalarOp::Neg: return 0;
    case ScalarOp::Sin: return 1;
    case ScalarOp::Cos: return 2;
    case ScalarOp::Exp: return 3;
    case ScalarOp::Log: return 4;
    case ScalarOp::Sqrt: return 5;
    default: return -1;
    }
}

ScalarOp offset(ScalarOp base, int k) { return static_cast<ScalarOp>(static_cast<int>(base) + k); }
static_assert(static_cast<int>(ScalarOp::DivDivr) == static_cast<int>(ScalarOp::AddAdd) + 31);
static_assert(static_cast<int>(ScalarOp::DivSquare) == static_cast<int>(ScalarOp::AddSquare) + 3);
static_assert(static_cast<int>(ScalarOp::DivSquareAddr) == static_cast<int>(ScalarOp::AddSquareAdd) + 7);
static_assert(static_cast<int>(ScalarOp::DivSqrt) == static_cast<int>(ScalarOp::AddNeg) + 23);

bool isMultiplyAdd(ScalarOp op) { return op == ScalarOp::MulAdd || op == ScalarOp::MulAddr; }
bool isSquareOfDifferenceAdd(ScalarOp op) { return op == ScalarOp::SubSquareAdd || op == ScalarOp::SubSquareAddr; }

// The fused opcode for `producer` whose result is operand `slot` of `consumer`, or End when
// there is none. A producer Square (a*a) counts as Mul with both operands a.
ScalarOp fusedOp(ScalarOp producer, ScalarOp consumer, int slot) {
    const int p = arithmeticIndex(producer == ScalarOp::Square ? ScalarOp::Mul : producer);
    if (p >= 0) {
        const int q = arithmeticIndex(consumer);
        if (q >= 0 && slot < 2) return offset(ScalarOp::AddAdd, (p * 4 + q) * 2 + slot);
        if (consumer == ScalarOp::Square) return offset(ScalarOp::AddSquare, p);
        const int u = functionIndex(consumer);
        if (u >= 0) return offset(ScalarOp::AddNeg, p * 6 + u);
        return ScalarOp::End;
    }
    const int sq = static_cast<int>(producer) - static_cast<int>(ScalarOp::AddSquare);
    if (sq >= 0 && sq < 4 && consumer == ScalarOp::Add && slot < 2) return offset(ScalarOp::AddSquareAdd, sq * 2 + slot);
    if (producer == ScalarOp::Neg && consumer == ScalarOp::Exp) return ScalarOp::NegExp;
    // Running sums: the previous step is the consumer's third operand c.
    if (slot == 2 && isMultiplyAdd(producer) && isMultiplyAdd(consumer)) return ScalarOp::DotStep;
    if (slot == 2 && isSquareOfDifferenceAdd(producer) && isSquareOfDifferenceAdd(consumer)) return ScalarOp::SquareStep;
    return ScalarOp::End;
}

// One pass: every instruction whose result has exactly one reading (one operand of one later
// instruction, not an output) moves into that reader when a fused opcode exists for the pair
// and the registers it reads are not overwritten in between (registers are reused). Returns
// whether anything changed.
bool fuseOnce(std::vector<ScalarInstruction>& program, const std::vector<int>& outputs) {
    const std::size_t n = program.size() - 1;  // the last one is End
    std::int32_t registers = 0;
    std::int32_t ops[5];
    for (std::size_t i = 0; i < n; ++i) {
        registers = std::max(registers, program[i].dst + 1);
        for (int k = 0, m = operandsOf(program[i], ops); k < m; ++k) registers = std::max(registers, ops[k] + 1);
    }
    for (int o : outputs) registers = std::max(registers, o + 1);

    // readings[i]: how many operands read instruction i's result (a value read after the
    // program ends counts twice, so it is never fused away).
    std::vector<std::int32_t> writer(static_cast<std::size_t>(registers), -1);
    std::vector<int> readings(n, 0);
    for (std::size_t i = 0; i < n; ++i) {
        for (int k = 0, m = operandsOf(program[i], ops); k < m; ++k)
            if (writer[ops[k]] >= 0) ++readings[writer[ops[k]]];
        writer[program[i].dst] = static_cast<std::int32_t>(i);
    }
    for (int o : outputs)
        if (writer[o] >= 0) readings[writer[o]] += 2;

    std::fill(writer.begin(), writer.end(), -1);
    std::vector<char> gone(n, 0);
    bool changed = false;
    for (std::size_t j = 0; j < n; ++j) {
        ScalarInstruction& consumer = program[j];
        const int m = std::min(operandsOf(consumer, ops), 3);
        for (int slot = 0; slot < m; ++slot) {
            const std::int32_t i = writer[ops[slot]];
            if (i < 0 || gone[i] || readings[i] != 1) continue;
            const ScalarInstruction& producer = program[i];
            const ScalarOp fused = fusedOp(producer.op, consumer.op, slot);
            if (fused == ScalarOp::End) continue;
            // The producer's operands must still hold what it read (the writer so far is the
            // producer itself when it wrote over its own operand: nothing else wrote since).
            std::int32_t pops[5];
            bool intact = true;
            for (int k = 0, pm = operandsOf(producer, pops); k < pm; ++k) intact = intact && writer[pops[k]] <= i;
            if (!intact) continue;
            ScalarInstruction f;
            f.op = fused;
            f.dst = consumer.dst;
            f.a = producer.a;
            f.b = producer.op == ScalarOp::Square ? producer.a : producer.b;
            if (fused == ScalarOp::DotStep || fused == ScalarOp::SquareStep) {
                f.c = producer.c;
                f.e = consumer.a;
                f.f = consumer.b;
            } else if (m == 2) {
                f.c = ops[1 - slot];  // the consumer's other operand
            }
            consumer = f;
            gone[i] = 1;
            changed = true;
            break;
        }
        writer[consumer.dst] = static_cast<std::int32_t>(j);
    }
    if (changed) {
        std::size_t k = 0;
        for (std::size_t i = 0; i <= n; ++i)
            if (i == n || !gone[i]) program[k++] = program[i];
        program.resize(k);
    }
    return changed;
}

}  // namespace

std::vector<ScalarInstruction> fuseScalar(std::vector<ScalarInstruction> program, const std::vector<int>& outputs) {
    if (program.empty() || program.back().op != ScalarOp::End) program.push_back(ScalarInstruction{});
    // Pairs first, then (a P b)^2 into a sum; a third pass finds nothing new in practice.
    for (int pass = 0; pass < 3 && fuseOnce(program, outputs); ++pass) {
    }
    return program;
}

void runScalarProgram(const std::vector<ScalarInstruction>& program, double* r) {
    const std::vector<ThreadedInstruction> threaded = threadProgram(program);
    runThreaded(threaded.data(), r, nullptr);
}

std::string listing(const std::vector<ScalarInstruction>& program) {
    static const char* const symbol[] = {"+", "-", "*", "/"};
    std::ostringstream out;
    auto reg = [](std::int32_t r) { return "r" + std::to_string(r); };
    for (const ScalarInstruction& in : program) {
        const int op = static_cast<int>(in.op);
        const int pair = op - static_cast<int>(ScalarOp::AddAdd);
        const int square = op - static_cast<int>(ScalarOp::AddSquare);
        const int squareAdd = op - static_cast<int>(ScalarOp::AddSquareAdd);
        const int function = op - static_cast<int>(ScalarOp::AddNeg);
        if (in.op == ScalarOp::End) {
            out << "end\n";
            break;
        }
        out << reg(in.dst) << " = ";
        if (pair >= 0 && pair < 32) {
            const std::string inner = "(" + reg(in.a) + " " + symbol[pair / 8] + " " + reg(in.b) + ")";
            const char* outer = symbol[(pair / 2) % 4];
            if (pair % 2 == 0) out << inner << " " << outer << " " << reg(in.c);
            else out << reg(in.c) << " " << outer << " " << inner;
        } else if (square >= 0 && square < 4) {
            out << "(" << reg(in.a) << " " << symbol[square] << " " << reg(in.b) << ")^2";
        } else if (function >= 0 && function < 24) {
            static const char* const name[] = {"-", "sin", "cos", "exp", "ln", "sqrt"};
            out << name[function % 6] << "(" << reg(in.a) << " " << symbol[function / 6] << " " << reg(in.b) << ")";
        } else if (in.op == ScalarOp::NegExp) {
            out << "exp(-" << reg(in.a) << ")";
        } else if (in.op == ScalarOp::DotStep) {
            out << "(" << reg(in.c) << " + " << reg(in.a) << " * " << reg(in.b) << ") + " << reg(in.e) << " * " << reg(in.f);
        } else if (in.op == ScalarOp::SquareStep) {
            out << "(" << reg(in.c) << " + (" << reg(in.a) << " - " << reg(in.b) << ")^2) + (" << reg(in.e) << " - " << reg(in.f) << ")^2";
        } else if (squareAdd >= 0 && squareAdd < 8) {
            const std::string inner = "(" + reg(in.a) + " " + symbol[squareAdd / 2] + " " + reg(in.b) + ")^2";
            if (squareAdd % 2 == 0) out << inner << " + " << reg(in.c);
            else out << reg(in.c) << " + " << inner;
        } else {
            const int q = arithmeticIndex(in.op);
            if (q >= 0) out << reg(in.a) << " " << symbol[q] << " " << reg(in.b);
            else if (in.op == ScalarOp::Select) out << reg(in.a) << " ? " << reg(in.b) << " : " << reg(in.c);
            else if (in.op == ScalarOp::PowInteger) out << reg(in.a) << "^" << in.b;
            else if (in.op == ScalarOp::Pow || in.op == ScalarOp::Min || in.op == ScalarOp::Max || in.op == ScalarOp::Binary)
                out << opName(in.op == ScalarOp::Pow ? Op::Pow : in.op == ScalarOp::Min ? Op::Min : in.op == ScalarOp::Max ? Op::Max : in.generic)
                    << "(" << reg(in.a) << ", " << reg(in.b) << ")";
            else if (in.op == ScalarOp::Abs || in.op == ScalarOp::Sign)
                out << opName(in.op == ScalarOp::Abs ? Op::Abs : Op::Sign) << "(" << reg(in.a) << ")";
            else {
                static const char* const unary[] = {"-", "square", "cube", "fourth", "reciprocal"};
                const int u = op - static_cast<int>(ScalarOp::Neg);
                const Op generic[] = {Op::Sin, Op::Cos, Op::Exp, Op::Log, Op::Sqrt, Op::Atan};
                if (u >= 0 && u < 5) out << unary[u] << "(" << reg(in.a) << ")";
                else if (in.op == ScalarOp::Unary) out << opName(in.generic) << "(" << reg(in.a) << ")";
                else out << opName(generic[op - static_cast<int>(ScalarOp::Sin)]) << "(" << reg(in.a) << ")";
            }
        }
        out << "\n";
    }
    return out.str();
}

Program Program::compile(const std::vector<Expression>& outputs) {
    auto impl = std::make_shared<Impl>();
    impl->id = nextProgramId.fetch_add(1);
    std::shared_ptr<Graph> graph;
    std::vector<const Node*> roots;
    for (const auto& e : outputs) {
        if (!e.valid()) continue;
        if (!graph) graph = e.graph();
        roots.push_back(e.node());
    }
    impl->inputs = graph ? static_cast<int>(graph->symbols().size()) : 0;
    const std::vector<const Node*> order = topologicalOrder(roots);

    // Last reader of each node (outputs live to the end).
    constexpr std::size_t kForever = std::numeric_limits<std::size_t>::max();
    std::unordered_map<const Node*, std::size_t> lastUse;
    for (std::size_t i = 0; i < order.size(); ++i)
        for (const Node* c : {order[i]->a, order[i]->b, order[i]->c})
            if (c) lastUse[c] = i;
    for (const Node* r : roots) lastUse[r] = kForever;

    std::unordered_map<const Node*, int> reg;
    int next = impl->inputs;
    for (const Node* n : order) {
        if (n->op == Op::Symbol) reg[n] = n->symbol;
        else if (n->op == Op::Constant) {
            reg[n] = next;
            impl->constants.emplace_back(next, n->value);
            ++next;
        }
    }
    std::vector<int> freeRegisters;
    for (std::size_t i = 0; i < order.size(); ++i) {
        const Node* n = order[i];
        if (n->op == Op::Symbol || n->op == Op::Constant) continue;
        Instruction in;
        in.op = n->op;
        int k = 0;
        if (n->op == Op::Select) in.code = Code::Select;
        else if (arity(n->op) == 1) in.code = Code::Unary;
        else if (n->op == Op::Pow && n->b->isConstant() && isSmallInteger(n->b->value, &k)) {
            in.code = k == 2 ? Code::Square : k == 3 ? Code::Cube : k == 4 ? Code::Fourth : k == -1 ? Code::Reciprocal : Code::PowInteger;
            in.n = k;
        } else in.code = Code::Binary;
        in.a = reg.at(n->a);
        if (n->b && in.code == Code::Binary) in.b = reg.at(n->b);
        if (n->op == Op::Select) {
            in.b = reg.at(n->b);
            in.c = reg.at(n->c);
        }
        // Release operands read for the last time here (temporaries only).
        const Node* released[3] = {nullptr, nullptr, nullptr};
        int count = 0;
        for (const Node* c : {n->a, n->b, n->c}) {
            if (!c || c->op == Op::Symbol || c->op == Op::Constant || lastUse[c] != i) continue;
            if (std::find(released, released + count, c) != released + count) continue;
            released[count++] = c;
            freeRegisters.push_back(reg[c]);
        }
        if (!freeRegisters.empty()) {
            in.dst = freeRegisters.back();
            freeRegisters.pop_back();
        } else {
            in.dst = next++;
        }
        reg[n] = in.dst;
        impl->code.push_back(in);
    }
    impl->registers = next;
    std::vector<int> directSeen;
    for (const Node* r : roots) {
        const int rr = reg.at(r);
        impl->outputRegister.push_back(rr);
        const bool computed = r->op != Op::Symbol && r->op != Op::Constant;
        const bool first = std::find(directSeen.begin(), directSeen.end(), rr) == directSeen.end();
        impl->outputDirect.push_back(computed && first);
        if (computed && first) directSeen.push_back(rr);
    }
    // Invalid expressions in `outputs` give NaN outputs at their positions.
    if (roots.size() != outputs.size()) {
        std::vector<int> regs;
        std::vector<bool> direct;
        const int nanRegister = impl->registers++;
        impl->constants.emplace_back(nanRegister, std::numeric_limits<double>::quiet_NaN());
        std::size_t k = 0;
        for (const auto& e : outputs) {
            if (e.valid()) {
                regs.push_back(impl->outputRegister[k]);
                direct.push_back(impl->outputDirect[k]);
                ++k;
            } else {
                regs.push_back(nanRegister);
                direct.push_back(false);
            }
        }
        impl->outputRegister = regs;
        impl->outputDirect = direct;
    }
    buildSinglePointProgram(*impl);
    return Program(std::move(impl));
}

// The single-point form: `code` flattened, renamed so that every result has its own register
// (then moving an operation down to its reader can never read a register written in
// between), fused, and given registers again by the same linear scan as `code`. Inputs and
// constants keep their registers; temporaries reuse the registers `code` wrote, and more if
// fusion made some values live longer.
void buildSinglePointProgram(Program::Impl& p) {
    std::vector<ScalarInstruction> flat = flatten(p.code);
    const std::size_t n = flat.size() - 1;
    const std::int32_t fixed = p.registers;  // virtual registers start here
    std::vector<char> written(static_cast<std::size_t>(fixed), 0);
    std::vector<std::int32_t> current(static_cast<std::size_t>(fixed));
    for (std::int32_t r = 0; r < fixed; ++r) current[r] = r;
    for (std::size_t k = 0; k < n; ++k) {
        ScalarInstruction& in = flat[k];
        std::int32_t* const field[5] = {&in.a, &in.b, &in.c, &in.e, &in.f};
        std::int32_t ops[5];
        for (int i = 0, m = operandsOf(in, ops); i < m; ++i) *field[i] = current[ops[i]];
        written[in.dst] = 1;
        current[in.dst] = fixed + static_cast<std::int32_t>(k);
        in.dst = fixed + static_cast<std::int32_t>(k);
    }
    std::vector<int> outputs;
    for (int r : p.outputRegister) outputs.push_back(current[r]);
    std::vector<ScalarInstruction> fused = fuseScalar(std::move(flat), outputs);

    // Linear scan: a register is free after the last instruction that reads it.
    const std::size_t m = fused.size() - 1;
    constexpr std::size_t kForever = std::numeric_limits<std::size_t>::max();
    std::vector<std::size_t> lastUse(n, kForever - 1);  // per virtual register; unread: free at once
    std::int32_t ops[5];
    for (std::size_t j = 0; j < m; ++j)
        for (int i = 0, c = operandsOf(fused[j], ops); i < c; ++i)
            if (ops[i] >= fixed) lastUse[ops[i] - fixed] = j;
    for (int o : outputs)
        if (o >= fixed) lastUse[o - fixed] = kForever;
    std::vector<std::int32_t> freeRegisters;
    for (std::int32_t r = fixed - 1; r >= 0; --r)
        if (written[r]) freeRegisters.push_back(r);  // lowest on top
    std::int32_t total = fixed;
    std::vector<std::int32_t> physical(n, -1);
    for (std::size_t j = 0; j < m; ++j) {
        ScalarInstruction& in = fused[j];
        std::int32_t* const field[5] = {&in.a, &in.b, &in.c, &in.e, &in.f};
        const int c = operandsOf(in, ops);
        std::int32_t released[5];
        int count = 0;
        for (int i = 0; i < c; ++i) {
            if (ops[i] < fixed) continue;
            const std::int32_t v = ops[i] - fixed;
            *field[i] = physical[v];
            if (lastUse[v] == j && std::find(released, released + count, v) == released + count) {
                released[count++] = v;
                freeRegisters.push_back(physical[v]);
            }
        }
        const std::int32_t v = in.dst - fixed;
        if (!freeRegisters.empty()) {
            physical[v] = freeRegisters.back();
            freeRegisters.pop_back();
        } else {
            physical[v] = total++;
        }
        in.dst = physical[v];
        if (lastUse[v] == kForever - 1) freeRegisters.push_back(physical[v]);  // never read
    }
    p.scalarOutputRegister.clear();
    for (int o : outputs) p.scalarOutputRegister.push_back(o >= fixed ? physical[o - fixed] : o);
    p.scalarRegisters = total;
    p.scalar = std::move(fused);
    p.threaded = threadProgram(p.scalar);
}

int Program::inputCount() const { return impl_ ? impl_->inputs : 0; }
int Program::outputCount() const { return impl_ ? static_cast<int>(impl_->outputRegister.size()) : 0; }
std::size_t Program::instructionCount() const { return impl_ ? impl_->code.size() : 0; }
std::size_t Program::singlePointInstructionCount() const { return impl_ ? impl_->scalar.size() - 1 : 0; }

// Single-point registers with the program's constants loaded. Cheap, so one workspace can
// serve several programs in turn (each switch reloads the constants).
static void prepare(const Program::Impl& p, Program::Workspace& ws) {
    if (ws.preparedFor == p.id) return;
    ws.registerValues.assign(static_cast<std::size_t>(std::max(p.registers, p.scalarRegisters)), 0.0);
    for (const auto& [r, v] : p.constants) ws.registerValues[r] = v;
    ws.preparedFor = p.id;
}

// Block registers (kBlockSize values each) with the constants broadcast: only block
// evaluation pays for them.
static void prepareBlock(const Program::Impl& p, Program::Workspace& ws) {
    if (ws.blockPreparedFor == p.id) return;
    const std::size_t B = Program::kBlockSize;
    ws.block.assign(static_cast<std::size_t>(p.registers) * B, 0.0);
    ws.rows.assign(p.registers, nullptr);
    for (const auto& [r, v] : p.constants) std::fill_n(ws.block.data() + static_cast<std::size_t>(r) * B, B, v);
    ws.blockPreparedFor = p.id;
}

Program::Workspace Program::makeWorkspace() const {
    Workspace ws;
    if (impl_) {
        prepare(*impl_, ws);
        prepareBlock(*impl_, ws);
    }
    return ws;
}

// The solver's path: a few inputs, a few outputs. The copies are plain loops (GCC would turn
// std::copy_n into a call to memmove, which costs more than copying two to four doubles).
__attribute__((optimize("no-tree-loop-distribute-patterns"))) void Program::evaluate(const double* inputs, double* outputs,
                                                                                       Workspace& ws) const {
    if (!impl_) return;
    const Impl& p = *impl_;
    if (ws.preparedFor != p.id) prepare(p, ws);
    double* const r = ws.registerValues.data();
    for (int k = 0; k < p.inputs; ++k) r[k] = inputs[k];
    runThreaded(p.threaded.data(), r, nullptr);
    const int* const out = p.scalarOutputRegister.data();
    const std::size_t outputCount = p.scalarOutputRegister.size();
    for (std::size_t o = 0; o < outputCount; ++o) outputs[o] = r[out[o]];
}

// The switch form of the same loop, kept as the reference the threaded form is tested against.
void evaluateBySwitch(const Program::Impl& p, const double* inputs, double* outputs, Program::Workspace& ws) {
    prepare(p, ws);
    double* r = ws.registerValues.data();
    std::copy_n(inputs, p.inputs, r);
    for (const Instruction& in : p.code) {
        switch (in.code) {
        case Code::Unary:
            switch (in.op) {
            case Op::Neg: r[in.dst] = -r[in.a]; break;
            case Op::Sin: r[in.dst] = std::sin(r[in.a]); break;
            case Op::Cos: r[in.dst] = std::cos(r[in.a]); break;
            case Op::Exp: r[in.dst] = std::exp(r[in.a]); break;
            default: r[in.dst] = apply1(in.op, r[in.a]); break;
            }
            break;
        case Code::Binary:
            switch (in.op) {
            case Op::Add: r[in.dst] = r[in.a] + r[in.b]; break;
            case Op::Sub: r[in.dst] = r[in.a] - r[in.b]; break;
            case Op::Mul: r[in.dst] = r[in.a] * r[in.b]; break;
            case Op::Div: r[in.dst] = r[in.a] / r[in.b]; break;
            default: r[in.dst] = apply2(in.op, r[in.a], r[in.b]); break;
            }
            break;
        case Code::Select: r[in.dst] = r[in.a] != 0 ? r[in.b] : r[in.c]; break;
        case Code::Square: r[in.dst] = r[in.a] * r[in.a]; break;
        case Code::Cube: {
            const double x = r[in.a];
            r[in.dst] = x * (x * x);
            break;
        }
        case Code::Fourth: {
            const double x2 = r[in.a] * r[in.a];
            r[in.dst] = x2 * x2;
            break;
        }
        case Code::Reciprocal: r[in.dst] = 1.0 / r[in.a]; break;
        case Code::PowInteger: r[in.dst] = powInteger(r[in.a], in.n); break;
        }
    }
    for (std::size_t o = 0; o < p.outputRegister.size(); ++o) outputs[o] = r[p.outputRegister[o]];
}

namespace {

template <class F>
inline void loop1(double* __restrict d, const double* a, std::size_t m, F f) {
    for (std::size_t i = 0; i < m; ++i) d[i] = f(a[i]);
}
template <class F>
inline void loop2(double* d, const double* a, const double* b, std::size_t m, F f) {
    for (std::size_t i = 0; i < m; ++i) d[i] = f(a[i], b[i]);
}

// One instruction over m points. Each case is its own tight loop so the simple ones vectorize.
// Compiled twice (AVX2 and baseline), picked at load time by the processor.
__attribute__((target_clones("avx2", "default"))) void runBlock(const Instruction& in, double* const* rows, std::size_t m) {
    double* d = rows[in.dst];
    const double* a = rows[in.a];
    switch (in.code) {
    case Code::Unary:
        switch (in.op) {
        case Op::Neg: for (std::size_t i = 0; i < m; ++i) d[i] = -a[i]; return;
        case Op::Sin:
            if (m < 4 || !vecmath::apply1(in.op, d, a, m))
                for (std::size_t i = 0; i < m; ++i) d[i] = std::sin(a[i]);
            return;
        case Op::Cos:
            if (m < 4 || !vecmath::apply1(in.op, d, a, m))
                for (std::size_t i = 0; i < m; ++i) d[i] = std::cos(a[i]);
            return;
        case Op::Exp:
            if (m < 4 || !vecmath::apply1(in.op, d, a, m))
                for (std::size_t i = 0; i < m; ++i) d[i] = std::exp(a[i]);
            return;
        case Op::Log:
            if (m < 4 || !vecmath::apply1(in.op, d, a, m))
                for (std::size_t i = 0; i < m; ++i) d[i] = std::log(a[i]);
            return;
        case Op::Sqrt: for (std::size_t i = 0; i < m; ++i) d[i] = std::sqrt(a[i]); return;
        case Op::Abs: for (std::size_t i = 0; i < m; ++i) d[i] = std::fabs(a[i]); return;
        case Op::Sign: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] > 0 ? 1.0 : (a[i] < 0 ? -1.0 : a[i]); return;
        default: {
            const Op op = in.op;
            for (std::size_t i = 0; i < m; ++i) d[i] = apply1(op, a[i]);
            return;
        }
        }
    case Code::Binary: {
        const double* b = rows[in.b];
        switch (in.op) {
        case Op::Add: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] + b[i]; return;
        case Op::Sub: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] - b[i]; return;
        case Op::Mul: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] * b[i]; return;
        case Op::Div: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] / b[i]; return;
        case Op::Pow:
            if (m < 4 || !vecmath::pow(d, a, b, m))
                for (std::size_t i = 0; i < m; ++i) d[i] = std::pow(a[i], b[i]);
            return;
        default: {
            const Op op = in.op;
            loop2(d, a, b, m, [op](double x, double y) { return apply2(op, x, y); });
            return;
        }
        }
    }
    case Code::Select: {
        const double* b = rows[in.b];
        const double* c = rows[in.c];
        for (std::size_t i = 0; i < m; ++i) d[i] = a[i] != 0 ? b[i] : c[i];
        return;
    }
    case Code::Square: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] * a[i]; return;
    case Code::Cube: for (std::size_t i = 0; i < m; ++i) d[i] = a[i] * (a[i] * a[i]); return;
    case Code::Fourth:
        for (std::size_t i = 0; i < m; ++i) {
            const double x2 = a[i] * a[i];
            d[i] = x2 * x2;
        }
        return;
    case Code::Reciprocal: for (std::size_t i = 0; i < m; ++i) d[i] = 1.0 / a[i]; return;
    case Code::PowInteger: {
        const int n = in.n;
        for (std::size_t i = 0; i < m; ++i) d[i] = powInteger(a[i], n);
        return;
    }
    }
}

}  // namespace

void Program::evaluateBlock(const BlockInput* inputs, std::size_t count, double* const* outputs, Workspace& ws) const {
    if (!impl_ || count == 0) return;
    const Impl& p = *impl_;
    prepareBlock(p, ws);
    const std::size_t B = kBlockSize;
    double* const storage = ws.block.data();
    double** rows = ws.rows.data();
    for (int r = 0; r < p.registers; ++r) rows[r] = storage + static_cast<std::size_t>(r) * B;
    // Broadcast inputs are filled once per call.
    for (int k = 0; k < p.inputs; ++k)
        if (inputs[k].stride == 0) std::fill_n(storage + static_cast<std::size_t>(k) * B, B, inputs[k].data[0]);

    // Which instructions see the same operands at every point (constants, stride-0 inputs
    // and what is computed from them only)? Registers are reused, so track them in order.
    ws.uniform.assign(p.code.size(), 0);
    std::vector<char> uniformRegister(p.registers, 0);
    for (int k = 0; k < p.inputs; ++k) uniformRegister[k] = inputs[k].stride == 0;
    for (const auto& [r, v] : p.constants) uniformRegister[r] = 1;
    bool anyUniform = false;
    for (std::size_t k = 0; k < p.code.size(); ++k) {
        const Instruction& in = p.code[k];
        const bool u = uniformRegister[in.a] && (in.b < 0 || uniformRegister[in.b]) && (in.c < 0 || uniformRegister[in.c]);
        ws.uniform[k] = u;
        uniformRegister[in.dst] = u;
        anyUniform = anyUniform || u;
    }

    for (std::size_t start = 0; start < count; start += B) {
        const std::size_t m = std::min(B, count - start);
        for (int k = 0; k < p.inputs; ++k) {
            const BlockInput& in = inputs[k];
            if (in.stride == 1) {
                rows[k] = const_cast<double*>(in.data + start);  // read only: inputs are never written
            } else if (in.stride > 1) {
                double* dst = storage + static_cast<std::size_t>(k) * B;
                for (std::size_t i = 0; i < m; ++i) dst[i] = in.data[(start + i) * in.stride];
                rows[k] = dst;
            }
        }
        for (std::size_t o = 0; o < p.outputRegister.size(); ++o)
            if (p.outputDirect[o]) rows[p.outputRegister[o]] = outputs[o] + start;
        if (!anyUniform) {
            for (const Instruction& in : p.code) runBlock(in, rows, m);
        } else {
            for (std::size_t k = 0; k < p.code.size(); ++k) {
                const Instruction& in = p.code[k];
                if (ws.uniform[k]) {
                    runBlock(in, rows, 1);
                    double* d = rows[in.dst];
                    std::fill(d + 1, d + m, d[0]);
                } else {
                    runBlock(in, rows, m);
                }
            }
        }
        for (std::size_t o = 0; o < p.outputRegister.size(); ++o)
            if (!p.outputDirect[o]) std::memcpy(outputs[o] + start, rows[p.outputRegister[o]], m * sizeof(double));
    }
}

}  // namespace sw::expr
