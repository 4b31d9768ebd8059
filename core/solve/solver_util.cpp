// Small helpers shared by the framework and the methods.
#include "core/solve/method.h"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
#include <utility>

namespace sw::solve {

double angleToSteepestDescentDegrees(const Vector& step, const Vector& gradient) {
    if (step.size() != gradient.size() || step.size() == 0) return kNaN;
    const double sn = step.norm(), gn = gradient.norm();
    if (!(sn > 0) || !(gn > 0) || !std::isfinite(sn) || !std::isfinite(gn)) return kNaN;
    // 2 atan2(|u - v|, |u + v|) for unit u = s/|s|, v = -g/|g| keeps its accuracy near 0 and
    // 180 degrees, where acos does not. A plain loop: this runs every iteration, so no temporaries.
    double difference = 0, sum = 0;
    for (Eigen::Index i = 0; i < step.size(); ++i) {
        const double u = step[i] / sn, v = -gradient[i] / gn;
        difference += (u - v) * (u - v);
        sum += (u + v) * (u + v);
    }
    return 2.0 * std::atan2(std::sqrt(difference), std::sqrt(sum)) * 180.0 / 3.14159265358979323846;
}

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

std::string shortNumber(double v) {
    if (std::isnan(v)) return "nan";
    if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
    char buffer[32];
    auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, v, std::chars_format::general, 6);
    return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
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
