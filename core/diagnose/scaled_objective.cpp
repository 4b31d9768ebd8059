#include "core/diagnose/scaled_objective.h"

#include <algorithm>
#include <cmath>

namespace sw::diagnose {

ScaledObjective::ScaledObjective(const Objective& base, Vector scale) : base_(base), scale_(std::move(scale)) {}

std::string ScaledObjective::description() const { return base_.description() + " (in rescaled variables)"; }

double ScaledObjective::value(const Vector& u) const { return base_.value(toOriginal(u)); }

double ScaledObjective::valueGradient(const Vector& u, Vector& gradient) const {
    const double f = base_.valueGradient(toOriginal(u), gradient);
    gradient = gradient.cwiseProduct(scale_);
    return f;
}

double ScaledObjective::valueGradientHessian(const Vector& u, Vector& gradient, Matrix& hessian) const {
    const double f = base_.valueGradientHessian(toOriginal(u), gradient, hessian);
    gradient = gradient.cwiseProduct(scale_);
    hessian = scale_.asDiagonal() * hessian * scale_.asDiagonal();
    return f;
}

void ScaledObjective::residuals(const Vector& u, Vector& residuals, Matrix* jacobian) const {
    base_.residuals(toOriginal(u), residuals, jacobian);
    if (jacobian && jacobian->cols() == scale_.size()) *jacobian = *jacobian * scale_.asDiagonal();
}

bool ScaledObjective::leastSquaresFactor(const Vector& u, Matrix& r, Vector& qtr, double& residualNormSq) const {
    if (!base_.leastSquaresFactor(toOriginal(u), r, qtr, residualNormSq)) return false;
    // J D = Q (R D), and R D is still upper triangular.
    r = r * scale_.asDiagonal();
    return true;
}

solve::Run mapRunBack(const solve::Run& scaledRun, const Objective& original, const Vector& scale) {
    solve::Run run = scaledRun;
    auto back = [&](Vector& v) {
        if (v.size() == scale.size()) v = v.cwiseProduct(scale);
    };
    auto gradientBack = [&](Vector& g) {
        if (g.size() == scale.size()) g = g.cwiseQuotient(scale);
    };
    for (solve::IterationRecord& r : run.trace) {
        back(r.x);
        back(r.step);
        gradientBack(r.gradient);
        r.gradientNorm = r.gradient.size() ? r.gradient.norm() : solve::kNaN;
        if (r.step.size()) r.stepNorm = r.step.norm();
        r.hessianEigenvalues.resize(0);
        r.conditionNumber = solve::kNaN;
    }
    back(run.x);
    if (run.x.size() == original.dimension() && run.x.allFinite()) {
        Vector g;
        Matrix h;
        run.value = original.valueGradientHessian(run.x, g, h);
        run.gradientNorm = g.norm();
        // The same stationarity test as every run's end (record.h), in the original variables.
        run.endPoint = solve::classifyEndPoint(h, run.x, run.value, g);
    }
    return run;
}

}  // namespace sw::diagnose
