// Small helpers shared by the framework and the methods.
#include "core/solve/method.h"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
#include <utility>

namespace sw::solve {

void spectrum(const Matrix& h, Vector& eigenvalues, double& condition) {
    condition = kNaN;
    eigenvalues.resize(0);
    if (h.rows() == 0 || h.rows() != h.cols() || !h.allFinite()) return;
    Eigen::SelfAdjointEigenSolver<Matrix> solver(h, Eigen::EigenvaluesOnly);
    if (solver.info() != Eigen::Success) return;
    eigenvalues = solver.eigenvalues();
    const Vector magnitudes = eigenvalues.cwiseAbs();
    const double smallest = magnitudes.minCoeff();
    condition = smallest > 0 ? magnitudes.maxCoeff() / smallest : std::numeric_limits<double>::infinity();
}

OptionSpec realOption(std::string name, std::string description, double defaultValue, double lower, double upper,
                      bool lowerOpen, bool upperOpen) {
    OptionSpec s;
    s.name = std::move(name);
    s.description = std::move(description);
    s.type = OptionSpec::Type::Real;
    s.defaultValue = defaultValue;
    s.lower = lower;
    s.upper = upper;
    s.lowerOpen = lowerOpen;
    s.upperOpen = upperOpen;
    return s;
}

OptionSpec integerOption(std::string name, std::string description, int defaultValue, int lower, int upper) {
    OptionSpec s = realOption(std::move(name), std::move(description), defaultValue, lower, upper, false, false);
    s.type = OptionSpec::Type::Integer;
    return s;
}

OptionSpec choiceOption(std::string name, std::string description, std::vector<std::string> choices,
                        int defaultIndex) {
    OptionSpec s;
    s.name = std::move(name);
    s.description = std::move(description);
    s.type = OptionSpec::Type::Choice;
    s.defaultValue = defaultIndex;
    s.choices = std::move(choices);
    return s;
}

OptionSpec flagOption(std::string name, std::string description, bool defaultValue) {
    OptionSpec s;
    s.name = std::move(name);
    s.description = std::move(description);
    s.type = OptionSpec::Type::Boolean;
    s.defaultValue = defaultValue ? 1 : 0;
    return s;
}

OptionSpec formerlyNamed(OptionSpec spec, std::string formerName) {
    spec.formerNames.push_back(std::move(formerName));
    return spec;
}

std::string pointText(const Vector& x, const std::vector<std::string>& names) {
    std::string text = "(";
    const Eigen::Index shown = std::min<Eigen::Index>(x.size(), 8);
    for (Eigen::Index i = 0; i < shown; ++i) {
        if (i) text += ", ";
        const auto k = static_cast<std::size_t>(i);
        text += (k < names.size() ? names[k] : "x" + std::to_string(i + 1)) + "=" + shortNumber(x[i]);
    }
    if (x.size() > shown) text += ", ...";
    return text + ")";
}

}  // namespace sw::solve
