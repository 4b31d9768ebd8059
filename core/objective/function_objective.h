#pragma once
// An objective from plain C++ callables: for tests, benchmarks and hand-written problems.

#include "core/objective/objective.h"

#include <functional>
#include <utility>

namespace sw {

class FunctionObjective final : public Objective {
public:
    using ValueFn = std::function<double(const Vector&)>;
    using GradientFn = std::function<void(const Vector&, Vector&)>;
    using HessianFn = std::function<void(const Vector&, Matrix&)>;
    using ResidualFn = std::function<void(const Vector&, Vector&, Matrix*)>;

    FunctionObjective(std::vector<std::string> names, ValueFn value, GradientFn gradient, HessianFn hessian,
                      std::string description = "hand-written objective")
        : names_(std::move(names)), value_(std::move(value)), gradient_(std::move(gradient)),
          hessian_(std::move(hessian)), description_(std::move(description)) {}

    // Residual form: f = 0.5 * |r|^2 and its derivatives are built from r and J
    // (the Hessian then needs secondOrder to add sum r_i * Hess r_i; pass it as hessian).
    void setResiduals(int count, ResidualFn residuals) { residualCount_ = count; residuals_ = std::move(residuals); }

    int dimension() const override { return static_cast<int>(names_.size()); }
    std::vector<std::string> variableNames() const override { return names_; }
    std::string description() const override { return description_; }
    double value(const Vector& x) const override { return value_(x); }
    double valueGradient(const Vector& x, Vector& g) const override {
        g.resize(dimension());
        gradient_(x, g);
        return value_(x);
    }
    double valueGradientHessian(const Vector& x, Vector& g, Matrix& h) const override {
        h.resize(dimension(), dimension());
        hessian_(x, h);
        return valueGradient(x, g);
    }
    bool hasResiduals() const override { return static_cast<bool>(residuals_); }
    int residualCount() const override { return residualCount_; }
    void residuals(const Vector& x, Vector& r, Matrix* j) const override {
        r.resize(residualCount_);
        if (j) j->resize(residualCount_, dimension());
        residuals_(x, r, j);
    }

private:
    std::vector<std::string> names_;
    ValueFn value_;
    GradientFn gradient_;
    HessianFn hessian_;
    std::string description_;
    int residualCount_ = 0;
    ResidualFn residuals_;
};

}  // namespace sw
