#pragma once
// An objective typed as a formula in named variables, with exact symbolic gradient and
// Hessian compiled into one program (core/expr). Optional named constants are further
// symbols of the formula held at fixed values (no derivatives are taken for them).

#include "core/expr/expr.h"
#include "core/objective/objective.h"

#include <atomic>
#include <memory>
#include <mutex>
#include <string>
#include <utility>
#include <vector>

namespace sw {

class FormulaObjective final : public Objective {
public:
    // Throws expr::FormulaError for a formula that cannot be read.
    FormulaObjective(const std::string& formula, std::vector<std::string> variables,
                     std::vector<std::pair<std::string, double>> constants = {});
    FormulaObjective(const FormulaObjective&) = delete;
    FormulaObjective& operator=(const FormulaObjective&) = delete;

    int dimension() const override { return static_cast<int>(variables_.size()); }
    std::vector<std::string> variableNames() const override { return variables_; }
    std::string description() const override { return formula_; }

    double value(const Vector& x) const override;
    double valueGradient(const Vector& x, Vector& gradient) const override;
    double valueGradientHessian(const Vector& x, Vector& gradient, Matrix& hessian) const override;

    const std::string& formula() const { return formula_; }
    const std::vector<std::pair<std::string, double>>& constants() const { return constants_; }
    // Program inputs are the variables followed by the constants (see inputsFor()).
    const expr::DerivativeSet& derivatives() const { return derivatives_; }
    // Program inputs for the point x: x followed by the constants' values.
    std::vector<double> inputsFor(const Vector& x) const;

private:
    std::string formula_;
    std::vector<std::string> variables_;
    std::vector<std::pair<std::string, double>> constants_;
    expr::DerivativeSet derivatives_;
    expr::Program valueProgram_;     // f only
    expr::Program gradientProgram_;  // f and gradient

    // Scratch space: one per thread, shared by every formula objective on that thread (a
    // workspace reloads a program's constants when another program used it last), so
    // concurrent callers never share and no call takes a lock or allocates.
    struct Scratch {
        std::vector<double> inputs, outputs;
        expr::Program::Workspace valueWs, gradientWs, hessianWs;
    };
    static Scratch& threadScratch();
    // The program's inputs for x: x itself when it has the right size and there are no
    // constants (no copy), else x and the constants copied into the scratch space.
    const double* inputs(const Vector& x, Scratch& s) const {
        return constants_.empty() && x.size() == static_cast<Eigen::Index>(variables_.size()) ? x.data()
                                                                                             : inputsWithConstants(x, s);
    }
    const double* inputsWithConstants(const Vector& x, Scratch& s) const;
};

}  // namespace sw
