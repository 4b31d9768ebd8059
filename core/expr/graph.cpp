#include "core/expr/graph.h"

#include <algorithm>
#include <bit>
#include <cmath>

namespace sw::expr {

int arity(Op op) {
    if (op == Op::Constant || op == Op::Symbol) return 0;
    if (op < Op::Add) return 1;
    if (op < Op::Select) return 2;
    return 3;
}

const char* opName(Op op) {
    switch (op) {
    case Op::Constant: return "constant";
    case Op::Symbol: return "symbol";
    case Op::Neg: return "-";
    case Op::Sin: return "sin";
    case Op::Cos: return "cos";
    case Op::Tan: return "tan";
    case Op::Asin: return "asin";
    case Op::Acos: return "acos";
    case Op::Atan: return "atan";
    case Op::Sinh: return "sinh";
    case Op::Cosh: return "cosh";
    case Op::Tanh: return "tanh";
    case Op::Asinh: return "asinh";
    case Op::Acosh: return "acosh";
    case Op::Atanh: return "atanh";
    case Op::Exp: return "exp";
    case Op::Log: return "ln";
    case Op::Log10: return "log10";
    case Op::Log2: return "log2";
    case Op::Sqrt: return "sqrt";
    case Op::Abs: return "abs";
    case Op::Sign: return "sign";
    case Op::Add: return "+";
    case Op::Sub: return "-";
    case Op::Mul: return "*";
    case Op::Div: return "/";
    case Op::Pow: return "^";
    case Op::Atan2: return "atan2";
    case Op::Min: return "min";
    case Op::Max: return "max";
    case Op::Less: return "<";
    case Op::LessEq: return "<=";
    case Op::Greater: return ">";
    case Op::GreaterEq: return ">=";
    case Op::Equal: return "==";
    case Op::NotEqual: return "!=";
    case Op::And: return "&&";
    case Op::Or: return "||";
    case Op::Select: return "?:";
    }
    return "?";
}

double apply1(Op op, double a) {
    switch (op) {
    case Op::Neg: return -a;
    case Op::Sin: return std::sin(a);
    case Op::Cos: return std::cos(a);
    case Op::Tan: return std::tan(a);
    case Op::Asin: return std::asin(a);
    case Op::Acos: return std::acos(a);
    case Op::Atan: return std::atan(a);
    case Op::Sinh: return std::sinh(a);
    case Op::Cosh: return std::cosh(a);
    case Op::Tanh: return std::tanh(a);
    case Op::Asinh: return std::asinh(a);
    case Op::Acosh: return std::acosh(a);
    case Op::Atanh: return std::atanh(a);
    case Op::Exp: return std::exp(a);
    case Op::Log: return std::log(a);
    case Op::Log10: return std::log10(a);
    case Op::Log2: return std::log2(a);
    case Op::Sqrt: return std::sqrt(a);
    case Op::Abs: return std::fabs(a);
    // sign(0) = 0 (keeping the zero's sign) and sign(NaN) = NaN.
    case Op::Sign: return a > 0 ? 1.0 : (a < 0 ? -1.0 : a);
    default: return std::nan("");
    }
}

double apply2(Op op, double a, double b) {
    switch (op) {
    case Op::Add: return a + b;
    case Op::Sub: return a - b;
    case Op::Mul: return a * b;
    case Op::Div: return a / b;
    case Op::Pow: return std::pow(a, b);
    case Op::Atan2: return std::atan2(a, b);
    // The first argument wins ties (and the derivative follows it); NaN propagates.
    case Op::Min: return (a <= b || a != a) ? a : b;
    case Op::Max: return (a >= b || a != a) ? a : b;
    case Op::Less: return a < b ? 1.0 : 0.0;
    case Op::LessEq: return a <= b ? 1.0 : 0.0;
    case Op::Greater: return a > b ? 1.0 : 0.0;
    case Op::GreaterEq: return a >= b ? 1.0 : 0.0;
    case Op::Equal: return a == b ? 1.0 : 0.0;
    case Op::NotEqual: return a != b ? 1.0 : 0.0;
    // Non-zero is true (NaN is non-zero, so true), as in muParser's evaluation of x&&y.
    case Op::And: return (a != 0 && b != 0) ? 1.0 : 0.0;
    case Op::Or: return (a != 0 || b != 0) ? 1.0 : 0.0;
    default: return std::nan("");
    }
}

double powInteger(double x, int n) {
    if (n < 0) return 1.0 / powInteger(x, -n);
    double result = 1.0, base = x;
    bool first = true;
    while (n > 0) {
        if (n & 1) {
            result = first ? base : result * base;
            first = false;
        }
        n >>= 1;
        if (n > 0) base *= base;
    }
    return result;
}

bool isSmallInteger(double c, int* n) {
    if (!(std::fabs(c) <= kMaxIntegerPower) || c != std::trunc(c)) return false;
    if (n) *n = static_cast<int>(c);
    return true;
}

std::size_t Graph::KeyHash::operator()(const Key& k) const {
    auto mix = [](std::size_t h, std::size_t v) { return h ^ (v + 0x9e3779b97f4a7c15ULL + (h << 6) + (h >> 2)); };
    std::size_t h = static_cast<std::size_t>(k.op);
    h = mix(h, static_cast<std::size_t>(k.symbol));
    h = mix(h, static_cast<std::size_t>(k.valueBits));
    h = mix(h, reinterpret_cast<std::uintptr_t>(k.a));
    h = mix(h, reinterpret_cast<std::uintptr_t>(k.b));
    h = mix(h, reinterpret_cast<std::uintptr_t>(k.c));
    return h;
}

std::size_t Graph::size() const {
    std::lock_guard lock(mutex_);
    return nodes_.size();
}

const Node* Graph::intern(Op op, const Node* a, const Node* b, const Node* c, double value, int symbol) {
    Key key{op, symbol, std::bit_cast<std::uint64_t>(value), a, b, c};
    auto found = index_.find(key);
    if (found != index_.end()) return found->second;
    Node& node = nodes_.emplace_back();
    node.op = op;
    node.id = static_cast<std::uint32_t>(nodes_.size() - 1);
    node.symbol = symbol;
    node.value = value;
    node.a = a;
    node.b = b;
    node.c = c;
    index_.emplace(key, &node);
    return &node;
}

const Node* Graph::constant(double v) {
    std::lock_guard lock(mutex_);
    return intern(Op::Constant, nullptr, nullptr, nullptr, v, -1);
}

const Node* Graph::symbol(int index) {
    std::lock_guard lock(mutex_);
    return intern(Op::Symbol, nullptr, nullptr, nullptr, 0.0, index);
}

const Node* Graph::make(Op op, const Node* a, const Node* b, const Node* c) {
    std::lock_guard lock(mutex_);
    return simplify(op, a, b, c);
}

static bool isZero(const Node* n) { return n->op == Op::Constant && n->value == 0; }
static bool isNegativeConstant(const Node* n) { return n->op == Op::Constant && n->value < 0; }

// Exact local simplification. Every rule gives the same value for finite inputs (at most the
// sign of a zero result changes: x + 0 -> x). Rules that would turn NaN or an infinity into
// a number are left out on purpose: x*0, 0*x, x-x and x/x stay as they are unless x is a
// finite constant (then constant folding applies), so a formula that overflows still
// reports its non-finite value.
const Node* Graph::simplify(Op op, const Node* a, const Node* b, const Node* c) {
    const int n = arity(op);
    if (op == Op::Select) {
        if (a->isConstant()) return a->value != 0 ? b : c;
        if (b == c) return b;
        return intern(op, a, b, c, 0.0, -1);
    }
    if (n == 1 && a->isConstant()) return intern(Op::Constant, nullptr, nullptr, nullptr, apply1(op, a->value), -1);
    if (n == 2 && a->isConstant() && b->isConstant()) {
        double v;
        int k;
        if (op == Op::Pow && isSmallInteger(b->value, &k)) v = powInteger(a->value, k);
        else v = apply2(op, a->value, b->value);
        return intern(Op::Constant, nullptr, nullptr, nullptr, v, -1);
    }
    switch (op) {
    case Op::Neg:
        if (a->op == Op::Neg) return a->a;
        break;
    case Op::Abs:
        if (a->op == Op::Neg) return simplify(Op::Abs, a->a, nullptr, nullptr);
        if (a->op == Op::Abs) return a;
        break;
    case Op::Sign:
        if (a->op == Op::Sign) return a;
        break;
    case Op::Add:
        // a + b == b + a exactly: a canonical order (constants last, then by age) makes x+y
        // and y+x one node.
        if (a->isConstant() || (!b->isConstant() && b->id < a->id)) std::swap(a, b);
        if (isZero(b)) return a;
        if (isNegativeConstant(b)) return simplify(Op::Sub, a, intern(Op::Constant, nullptr, nullptr, nullptr, -b->value, -1), nullptr);
        if (b->op == Op::Neg) return simplify(Op::Sub, a, b->a, nullptr);
        if (a->op == Op::Neg) return simplify(Op::Sub, b, a->a, nullptr);
        break;
    case Op::Sub:
        if (isZero(b)) return a;
        if (a->isConstant(0.0) && !std::signbit(a->value)) return simplify(Op::Neg, b, nullptr, nullptr);
        if (b->op == Op::Neg) return simplify(Op::Add, a, b->a, nullptr);
        if (isNegativeConstant(b)) return simplify(Op::Add, a, intern(Op::Constant, nullptr, nullptr, nullptr, -b->value, -1), nullptr);
        if (a->op == Op::Neg) return simplify(Op::Neg, simplify(Op::Add, a->a, b, nullptr), nullptr, nullptr);
        break;
    case Op::Mul:
        if (b->isConstant() || (!a->isConstant() && b->id < a->id)) std::swap(a, b);
        if (a->isConstant(1.0)) return b;
        if (a->isConstant(-1.0)) return simplify(Op::Neg, b, nullptr, nullptr);
        if (isNegativeConstant(a))
            return simplify(Op::Neg, simplify(Op::Mul, intern(Op::Constant, nullptr, nullptr, nullptr, -a->value, -1), b, nullptr),
                            nullptr, nullptr);
        if (a->op == Op::Neg && b->op == Op::Neg) return simplify(Op::Mul, a->a, b->a, nullptr);
        if (a->op == Op::Neg) return simplify(Op::Neg, simplify(Op::Mul, a->a, b, nullptr), nullptr, nullptr);
        if (b->op == Op::Neg) return simplify(Op::Neg, simplify(Op::Mul, a, b->a, nullptr), nullptr, nullptr);
        break;
    case Op::Div:
        if (b->isConstant(1.0)) return a;
        if (b->isConstant(-1.0)) return simplify(Op::Neg, a, nullptr, nullptr);
        if (isNegativeConstant(b))
            return simplify(Op::Neg, simplify(Op::Div, a, intern(Op::Constant, nullptr, nullptr, nullptr, -b->value, -1), nullptr),
                            nullptr, nullptr);
        if (isNegativeConstant(a))
            return simplify(Op::Neg, simplify(Op::Div, intern(Op::Constant, nullptr, nullptr, nullptr, -a->value, -1), b, nullptr),
                            nullptr, nullptr);
        if (a->op == Op::Neg && b->op == Op::Neg) return simplify(Op::Div, a->a, b->a, nullptr);
        if (a->op == Op::Neg) return simplify(Op::Neg, simplify(Op::Div, a->a, b, nullptr), nullptr, nullptr);
        if (b->op == Op::Neg) return simplify(Op::Neg, simplify(Op::Div, a, b->a, nullptr), nullptr, nullptr);
        break;
    case Op::Pow:
        // pow(x, 1) == x and pow(x, 0) == pow(1, y) == 1 for every x and y, NaN included (C99 F.9.4.4).
        if (b->isConstant(1.0)) return a;
        if (isZero(b)) return intern(Op::Constant, nullptr, nullptr, nullptr, 1.0, -1);
        if (a->isConstant(1.0)) return a;
        break;
    case Op::Min:
    case Op::Max:
        if (a == b) return a;
        break;
    default:
        break;
    }
    return intern(op, a, n >= 2 ? b : nullptr, nullptr, 0.0, -1);
}

std::vector<const Node*> topologicalOrder(const std::vector<const Node*>& roots) {
    std::vector<const Node*> found;
    std::unordered_map<const Node*, bool> seen;
    std::vector<const Node*> stack;
    for (const Node* r : roots)
        if (r && seen.emplace(r, true).second) stack.push_back(r);
    while (!stack.empty()) {
        const Node* n = stack.back();
        stack.pop_back();
        found.push_back(n);
        for (const Node* child : {n->a, n->b, n->c})
            if (child && seen.emplace(child, true).second) stack.push_back(child);
    }
    std::sort(found.begin(), found.end(), [](const Node* x, const Node* y) { return x->id < y->id; });
    return found;
}

int precedence(const Node* n) {
    switch (n->op) {
    case Op::Select: return 0;
    case Op::Or: return 1;
    case Op::And: return 2;
    case Op::Less:
    case Op::LessEq:
    case Op::Greater:
    case Op::GreaterEq:
    case Op::Equal:
    case Op::NotEqual: return 4;
    case Op::Add:
    case Op::Sub: return 5;
    case Op::Mul:
    case Op::Div:
    case Op::Neg: return 6;
    case Op::Pow: return 7;
    case Op::Constant: return n->value < 0 || std::signbit(n->value) ? 6 : 10;
    default: return 10;
    }
}

}  // namespace sw::expr
