#include "core/expr/graph.h"

#include <algorithm>
#include <numeric>

namespace sw::expr {

DerivativeSet::DerivativeSet(const std::string& text, const std::vector<std::string>& variables, int order)
    : DerivativeSet(Expression::parse(text, variables), order) {}

DerivativeSet::DerivativeSet(const Expression& f, int order)
    : DerivativeSet(f,
                    [&] {
                        std::vector<int> all(f.symbols().size());
                        std::iota(all.begin(), all.end(), 0);
                        return all;
                    }(),
                    order) {}

DerivativeSet::DerivativeSet(const Expression& f, const std::vector<int>& wrt, int order)
    : order_(std::clamp(order, 0, 2)), wrt_(wrt), function_(f) {
    for (int i : wrt_) variables_.push_back(f.symbols().at(i));
    std::vector<Expression> outputs{function_};
    if (order_ >= 1) {
        // An empty wrt would mean "all symbols" to gradient(); here it means none.
        if (!wrt_.empty()) gradient_ = expr::gradient(function_, wrt_);
        outputs.insert(outputs.end(), gradient_.begin(), gradient_.end());
    }
    if (order_ >= 2) {
        for (std::size_t i = 0; i < wrt_.size(); ++i)
            for (std::size_t j = i; j < wrt_.size(); ++j) hessianUpper_.push_back(gradient_[i].derivative(wrt_[j]));
        outputs.insert(outputs.end(), hessianUpper_.begin(), hessianUpper_.end());
    }
    program_ = Program::compile(outputs);
}

std::size_t DerivativeSet::hessianIndex(int i, int j, int n) {
    if (i > j) std::swap(i, j);
    return static_cast<std::size_t>(i) * n - static_cast<std::size_t>(i) * (i - 1) / 2 + (j - i);
}

}  // namespace sw::expr
