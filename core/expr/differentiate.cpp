// Symbolic differentiation on the graph, forward over the nodes in topological order (no
// recursion, so any depth of formula is safe).
//
// Conventions where the derivative is undefined or a jump (documented in docs/expr.md):
//   d|u| = sign(u) du (so 0 at u = 0);  d sign(u) = 0;  comparisons, && and || have
//   derivative 0;  d(c ? a : b) = c ? da : db (the branches, not the condition);
//   d min(a,b) = (a <= b ? da : db) and d max(a,b) = (a >= b ? da : db), i.e. the selected
//   argument, the first one on ties;  d u^v = v u^(v-1) du + u^v ln(u) dv, with the terms of
//   a constant exponent or base left out (so x^2 at x < 0 is fine).
// A term whose factor is the structural zero (a constant's derivative) is left out rather
// than multiplied by 0, so derivatives do not carry 0*inf = NaN from unrelated terms.
#include "core/expr/graph.h"

#include <cmath>
#include <numbers>
#include <unordered_map>

namespace sw::expr {

namespace {

class Differentiator {
public:
    explicit Differentiator(Graph& g) : g_(g), zero_(g.constant(0.0)), one_(g.constant(1.0)) {}

    const Node* run(const Node* root, int symbol) {
        std::unordered_map<const Node*, const Node*> d;
        for (const Node* n : topologicalOrder({root})) {
            const Node* da = n->a ? d[n->a] : nullptr;
            const Node* db = n->b ? d[n->b] : nullptr;
            const Node* dc = n->c ? d[n->c] : nullptr;
            d[n] = rule(n, symbol, da, db, dc);
        }
        return d[root];
    }

private:
    static bool zero(const Node* n) { return n->op == Op::Constant && n->value == 0; }
    const Node* k(double v) { return g_.constant(v); }
    const Node* add(const Node* x, const Node* y) { return zero(x) ? y : zero(y) ? x : g_.make(Op::Add, x, y); }
    const Node* sub(const Node* x, const Node* y) { return zero(y) ? x : zero(x) ? neg(y) : g_.make(Op::Sub, x, y); }
    // Products gather their constant factors into one leading constant: the chain rule
    // otherwise piles up 0.5*(2*(3*u)). This reassociates (mathematically exact, may differ
    // from the unsimplified product in the last bit), and is used only when building
    // derivatives, never on the user's own formula.
    const Node* strip(const Node* n, double& c) {
        for (;;) {
            if (n->op == Op::Constant) {
                c *= n->value;
                return nullptr;
            }
            if (n->op == Op::Neg) {
                c = -c;
                n = n->a;
            } else if (n->op == Op::Mul && n->a->isConstant()) {
                c *= n->a->value;
                n = n->b;
            } else {
                return n;
            }
        }
    }
    const Node* scaled(double c, const Node* n) {
        if (!n) return k(c);
        if (c == 1) return n;
        if (c == -1) return g_.make(Op::Neg, n);
        return g_.make(Op::Mul, k(c), n);
    }
    const Node* mul(const Node* x, const Node* y) {
        if (zero(x) || zero(y)) return zero_;
        double c = 1;
        const Node* u = strip(x, c);
        const Node* v = strip(y, c);
        if (!std::isfinite(c)) return g_.make(Op::Mul, x, y);
        const Node* product = !u ? v : !v ? u : g_.make(Op::Mul, u, v);
        return scaled(c, product);
    }
    const Node* div(const Node* x, const Node* y) {
        if (zero(x)) return zero_;
        double c = 1;
        const Node* u = strip(x, c);
        if (!std::isfinite(c) || !u) return g_.make(Op::Div, x, y);
        return scaled(c, g_.make(Op::Div, u, y));
    }
    const Node* neg(const Node* x) { return zero(x) ? zero_ : mul(k(-1.0), x); }
    const Node* f(Op op, const Node* x, const Node* y = nullptr) { return g_.make(op, x, y); }
    const Node* square(const Node* x) { return g_.make(Op::Pow, x, k(2.0)); }

    const Node* rule(const Node* n, int symbol, const Node* da, const Node* db, const Node* dc) {
        const Node* a = n->a;
        const Node* b = n->b;
        switch (n->op) {
        case Op::Constant: return zero_;
        case Op::Symbol: return n->symbol == symbol ? one_ : zero_;
        default: break;
        }
        const bool noA = !da || zero(da);
        const bool noB = !db || zero(db);
        if (n->op == Op::Select) {
            if (zero(db) && zero(dc)) return zero_;
            return g_.make(Op::Select, a, db, dc);
        }
        if (noA && noB) return zero_;
        switch (n->op) {
        case Op::Neg: return neg(da);
        case Op::Sin: return mul(f(Op::Cos, a), da);
        case Op::Cos: return neg(mul(f(Op::Sin, a), da));
        case Op::Tan: return mul(add(one_, square(n)), da);  // 1 + tan^2
        case Op::Asin: return div(da, f(Op::Sqrt, sub(one_, square(a))));
        case Op::Acos: return neg(div(da, f(Op::Sqrt, sub(one_, square(a)))));
        case Op::Atan: return div(da, add(one_, square(a)));
        case Op::Sinh: return mul(f(Op::Cosh, a), da);
        case Op::Cosh: return mul(f(Op::Sinh, a), da);
        case Op::Tanh: return mul(sub(one_, square(n)), da);
        case Op::Asinh: return div(da, f(Op::Sqrt, add(square(a), one_)));
        case Op::Acosh: return div(da, f(Op::Sqrt, sub(square(a), one_)));
        case Op::Atanh: return div(da, sub(one_, square(a)));
        case Op::Exp: return mul(n, da);
        case Op::Log: return div(da, a);
        case Op::Log10: return div(da, mul(a, k(std::numbers::ln10)));
        case Op::Log2: return div(da, mul(a, k(std::numbers::ln2)));
        case Op::Sqrt: return div(da, mul(k(2.0), n));
        case Op::Abs: return mul(f(Op::Sign, a), da);
        case Op::Sign: return zero_;
        case Op::Add: return add(da, db);
        case Op::Sub: return sub(da, db);
        case Op::Mul: return add(mul(da, b), mul(a, db));
        case Op::Div: return noB ? div(da, b) : div(sub(da, mul(n, db)), b);  // (a' - (a/b) b') / b
        case Op::Pow: {
            const Node* viaBase = zero_;
            if (!noA) {
                const Node* lowered = b->isConstant() ? k(b->value - 1.0) : sub(b, one_);
                viaBase = mul(mul(b, f(Op::Pow, a, lowered)), da);
            }
            const Node* viaExponent = noB ? zero_ : mul(mul(n, f(Op::Log, a)), db);
            return add(viaBase, viaExponent);
        }
        case Op::Atan2: {  // atan2(y, x): (x dy - y dx) / (x^2 + y^2)
            const Node* numerator = sub(mul(b, da), mul(a, db));
            return div(numerator, add(square(b), square(a)));
        }
        case Op::Min: return g_.make(Op::Select, f(Op::LessEq, a, b), da, db);
        case Op::Max: return g_.make(Op::Select, f(Op::GreaterEq, a, b), da, db);
        default: return zero_;  // comparisons and logic: piecewise constant
        }
    }

    Graph& g_;
    const Node* zero_;
    const Node* one_;
};

}  // namespace

Expression Expression::derivative(int symbol) const {
    if (!valid()) return {};
    Differentiator d(*graph_);
    return Expression(graph_, d.run(node_, symbol));
}

std::vector<Expression> gradient(const Expression& f, const std::vector<int>& wrt) {
    std::vector<int> indices = wrt;
    if (indices.empty())
        for (int i = 0; i < static_cast<int>(f.symbols().size()); ++i) indices.push_back(i);
    std::vector<Expression> g;
    g.reserve(indices.size());
    for (int i : indices) g.push_back(f.derivative(i));
    return g;
}

std::vector<Expression> hessianUpper(const Expression& f, const std::vector<int>& wrt) {
    std::vector<int> indices = wrt;
    if (indices.empty())
        for (int i = 0; i < static_cast<int>(f.symbols().size()); ++i) indices.push_back(i);
    const std::vector<Expression> g = gradient(f, indices);
    std::vector<Expression> h;
    for (std::size_t i = 0; i < indices.size(); ++i)
        for (std::size_t j = i; j < indices.size(); ++j) h.push_back(g[i].derivative(indices[j]));
    return h;
}

}  // namespace sw::expr
