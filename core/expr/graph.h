#pragma once
// Internal to core/expr: the operator set, the hash-consed node store and the exact local
// simplifier. Other folders use expr.h only.

#include "core/expr/expr.h"

#include <cstdint>
#include <deque>
#include <mutex>
#include <string>
#include <unordered_map>
#include <vector>

namespace sw::expr {

enum class Op : std::uint8_t {
    Constant,
    Symbol,
    // one argument
    Neg, Sin, Cos, Tan, Asin, Acos, Atan, Sinh, Cosh, Tanh, Asinh, Acosh, Atanh,
    Exp, Log, Log10, Log2, Sqrt, Abs, Sign,
    // two arguments
    Add, Sub, Mul, Div, Pow, Atan2, Min, Max,
    Less, LessEq, Greater, GreaterEq, Equal, NotEqual, And, Or,
    // three arguments: condition ? whenTrue : whenFalse
    Select,
};
inline constexpr int kOpCount = static_cast<int>(Op::Select) + 1;

int arity(Op op);
// Name as typed in a formula ("sin", "+", "<=", "?:").
const char* opName(Op op);

// The one definition of each operator's value, shared by constant folding, the compiled
// program and the callbacks muParser calls, so all three agree bit for bit.
double apply1(Op op, double a);
double apply2(Op op, double a, double b);
// x^n for a small integer n by repeated multiplication (used for constant integer exponents).
double powInteger(double x, int n);
// Exponents in [-kMaxIntegerPower, kMaxIntegerPower] are evaluated by multiplication.
inline constexpr int kMaxIntegerPower = 16;
bool isSmallInteger(double c, int* n = nullptr);

struct Node {
    Op op;
    std::uint32_t id;   // creation order: every child has a smaller id than its parent
    int symbol = -1;    // Op::Symbol
    double value = 0;   // Op::Constant
    const Node* a = nullptr;
    const Node* b = nullptr;
    const Node* c = nullptr;

    bool isConstant() const { return op == Op::Constant; }
    bool isConstant(double v) const { return op == Op::Constant && value == v; }
};

// Owns every node of the expressions built from one parse. Building a node that exists
// returns the existing one (hash-consing), so equal subtrees are one node and common
// subexpressions are shared for free. Building is guarded by a mutex (several threads
// may differentiate expressions of the same graph); nodes never move or change.
class Graph {
public:
    explicit Graph(std::vector<std::string> symbols) : symbols_(std::move(symbols)) {}
    Graph(const Graph&) = delete;
    Graph& operator=(const Graph&) = delete;

    const std::vector<std::string>& symbols() const { return symbols_; }

    const Node* constant(double v);
    const Node* symbol(int index);
    // Builds op(a, b, c) after exact local simplification (see graph.cpp for the rules).
    const Node* make(Op op, const Node* a, const Node* b = nullptr, const Node* c = nullptr);

    std::size_t size() const;

private:
    const Node* simplify(Op op, const Node* a, const Node* b, const Node* c);
    const Node* intern(Op op, const Node* a, const Node* b, const Node* c, double value, int symbol);

    struct Key {
        Op op;
        int symbol;
        std::uint64_t valueBits;
        const Node *a, *b, *c;
        bool operator==(const Key&) const = default;
    };
    struct KeyHash {
        std::size_t operator()(const Key& k) const;
    };

    std::vector<std::string> symbols_;
    mutable std::recursive_mutex mutex_;
    std::deque<Node> nodes_;
    std::unordered_map<Key, const Node*, KeyHash> index_;
};

// Every node reachable from `roots`, children before parents (ascending id). Iterative.
std::vector<const Node*> topologicalOrder(const std::vector<const Node*>& roots);

// Precedence used by the printer; mirrors muParser 2.3.3 (?: 0, || 1, && 2, comparisons 4,
// + - 5, * / and unary minus 6, ^ 7 right-associative, atoms and calls 10).
int precedence(const Node* n);

}  // namespace sw::expr
