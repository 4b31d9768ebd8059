#include "core/objective/formula_objective.h"

#include <limits>

namespace sw {

namespace {
std::vector<std::string> allSymbols(const std::vector<std::string>& variables,
                                    const std::vector<std::pair<std::string, double>>& constants) {
    std::vector<std::string> s = variables;
    for (const auto& c : constants) s.push_back(c.first);
    return s;
}
std::vector<int> firstIndices(std::size_t n) {
    std::vector<int> v(n);
    for (std::size_t i = 0; i < n; ++i) v[i] = static_cast<int>(i);
    return v;
}
}  // namespace

FormulaObjective::FormulaObjective(const std::string& formula, std::vector<std::string> variables,
                                   std::vector<std::pair<std::string, double>> constants)
    : formula_(formula),
      variables_(std::move(variables)),
      constants_(std::move(constants)),
      derivatives_(expr::Expression::parse(formula_, allSymbols(variables_, constants_)), firstIndices(variables_.size()), 2) {
    valueProgram_ = expr::Program::compile({derivatives_.function()});
    std::vector<expr::Expression> fg{derivatives_.function()};
    fg.insert(fg.end(), derivatives_.gradient().begin(), derivatives_.gradient().end());
    gradientProgram_ = expr::Program::compile(fg);
}

std::vector<double> FormulaObjective::inputsFor(const Vector& x) const {
    std::vector<double> in(x.data(), x.data() + x.size());
    for (const auto& c : constants_) in.push_back(c.second);
    return in;
}

FormulaObjective::Scratch& FormulaObjective::threadScratch() {
    thread_local Scratch scratch;
    return scratch;
}

// A point of the wrong size reads NaN for the missing coordinates rather than out of bounds.
const double* FormulaObjective::inputsWithConstants(const Vector& x, Scratch& s) const {
    const int n = dimension();
    s.inputs.assign(n + constants_.size(), std::numeric_limits<double>::quiet_NaN());
    for (int i = 0; i < n && i < x.size(); ++i) s.inputs[i] = x[i];
    for (std::size_t c = 0; c < constants_.size(); ++c) s.inputs[n + c] = constants_[c].second;
    return s.inputs.data();
}

double FormulaObjective::value(const Vector& x) const {
    Scratch& s = threadScratch();
    double f;
    valueProgram_.evaluate(inputs(x, s), &f, s.valueWs);
    return f;
}

double FormulaObjective::valueGradient(const Vector& x, Vector& gradient) const {
    const int n = dimension();
    Scratch* s = &threadScratch();
    s->outputs.resize(1 + n);
    gradientProgram_.evaluate(inputs(x, *s), s->outputs.data(), s->gradientWs);
    gradient.resize(n);
    for (int i = 0; i < n; ++i) gradient[i] = s->outputs[1 + i];
    const double f = s->outputs[0];
    return f;
}

double FormulaObjective::valueGradientHessian(const Vector& x, Vector& gradient, Matrix& hessian) const {
    const int n = dimension();
    Scratch* s = &threadScratch();
    const auto& program = derivatives_.program();
    s->outputs.resize(program.outputCount());
    program.evaluate(inputs(x, *s), s->outputs.data(), s->hessianWs);
    gradient.resize(n);
    hessian.resize(n, n);
    for (int i = 0; i < n; ++i) gradient[i] = s->outputs[1 + i];
    std::size_t k = 1 + n;
    for (int i = 0; i < n; ++i)
        for (int j = i; j < n; ++j, ++k) hessian(i, j) = hessian(j, i) = s->outputs[k];
    const double f = s->outputs[0];
    return f;
}

}  // namespace sw
