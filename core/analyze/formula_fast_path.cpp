#include "core/analyze/formula_fast_path.h"

#include <utility>

#include "core/objective/formula_objective.h"

namespace sw::analyze {

namespace {

class FormulaRowSampler final : public RowSampler {
public:
    // inputs: the program inputs at the held point (variables, then any fixed constants).
    FormulaRowSampler(const expr::DerivativeSet& derivatives, std::vector<double> inputs, int xVariable, int yVariable)
        : valueOnly_(derivatives.function(), 0),
          held_(std::move(inputs)),
          xVariable_(xVariable),
          yVariable_(yVariable) {}

    bool usable() const { return valueOnly_.program().inputCount() == static_cast<int>(held_.size()); }

    struct RowScratch : Scratch {
        expr::Program::Workspace workspace;
        std::vector<expr::Program::BlockInput> inputs;
    };

    std::unique_ptr<Scratch> makeScratch() const override {
        auto scratch = std::make_unique<RowScratch>();
        scratch->workspace = valueOnly_.program().makeWorkspace();
        scratch->inputs.resize(held_.size());
        return scratch;
    }

    void sampleRow(const std::vector<double>& xs, double y, double* row, Scratch& base) const override {
        auto& scratch = static_cast<RowScratch&>(base);
        for (std::size_t k = 0; k < held_.size(); ++k) scratch.inputs[k] = {&held_[k], 0};
        scratch.inputs[xVariable_] = {xs.data(), 1};
        scratch.inputs[yVariable_] = {&y, 0};
        double* outputs[1] = {row};
        valueOnly_.program().evaluateBlock(scratch.inputs.data(), xs.size(), outputs, scratch.workspace);
    }

private:
    expr::DerivativeSet valueOnly_;
    std::vector<double> held_;
    int xVariable_, yVariable_;
};

}  // namespace

std::unique_ptr<RowSampler> makeFormulaRowSampler(const Objective& objective, const Vector& held, int xVariable,
                                                  int yVariable) {
    const auto* formula = dynamic_cast<const FormulaObjective*>(&objective);
    if (!formula) return nullptr;
    auto sampler =
        std::make_unique<FormulaRowSampler>(formula->derivatives(), formula->inputsFor(held), xVariable, yVariable);
    if (!sampler->usable()) return nullptr;
    return sampler;
}

}  // namespace sw::analyze
