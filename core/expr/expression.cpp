#include "core/expr/graph.h"

#include <cmath>
#include <unordered_map>

namespace sw::expr {

const std::vector<std::string>& Expression::symbols() const {
    static const std::vector<std::string> none;
    return graph_ ? graph_->symbols() : none;
}

std::vector<std::string> Expression::usedSymbols() const {
    if (!valid()) return {};
    std::vector<bool> used(symbols().size(), false);
    for (const Node* n : topologicalOrder({node_}))
        if (n->op == Op::Symbol) used[n->symbol] = true;
    std::vector<std::string> out;
    for (std::size_t i = 0; i < used.size(); ++i)
        if (used[i]) out.push_back(symbols()[i]);
    return out;
}

bool Expression::isConstant() const { return valid() && node_->op == Op::Constant; }

std::size_t Expression::nodeCount() const { return valid() ? topologicalOrder({node_}).size() : 0; }

// A plain tree walk over the nodes, independent of the compiled program (tests compare the two).
double Expression::evaluate(const std::vector<double>& values) const {
    if (!valid()) return std::nan("");
    std::unordered_map<const Node*, double> v;
    for (const Node* n : topologicalOrder({node_})) {
        double r;
        switch (arity(n->op)) {
        case 0:
            r = n->op == Op::Constant ? n->value
                                      : (n->symbol < static_cast<int>(values.size()) ? values[n->symbol] : std::nan(""));
            break;
        case 1: r = apply1(n->op, v[n->a]); break;
        case 2: {
            int k;
            if (n->op == Op::Pow && n->b->isConstant() && isSmallInteger(n->b->value, &k)) r = powInteger(v[n->a], k);
            else r = apply2(n->op, v[n->a], v[n->b]);
            break;
        }
        default: r = v[n->a] != 0 ? v[n->b] : v[n->c]; break;
        }
        v[n] = r;
    }
    return v[node_];
}

}  // namespace sw::expr
