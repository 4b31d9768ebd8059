#pragma once
// An objective in rescaled variables: x = D u with D = diag(scale), so
//   f_u(u) = f(D u),  grad_u = D grad_x,  H_u = D H_x D,  r_u(u) = r(D u),  J_u = J D.
// The poor-scaling remedy runs a method on this and maps the result back (mapRunBack), so the
// rerun is the same method on the same objective, only in other units.

#include "core/objective/objective.h"
#include "core/solve/options.h"
#include "core/solve/record.h"

#include <memory>

namespace sw::diagnose {

class ScaledObjective final : public Objective {
public:
    // `base` must outlive this object. Every factor must be finite and non-zero.
    ScaledObjective(const Objective& base, Vector scale);

    const Vector& scale() const { return scale_; }
    Vector toScaled(const Vector& x) const { return x.cwiseQuotient(scale_); }
    Vector toOriginal(const Vector& u) const { return u.cwiseProduct(scale_); }

    int dimension() const override { return base_.dimension(); }
    std::vector<std::string> variableNames() const override { return base_.variableNames(); }
    std::string description() const override;
    double value(const Vector& u) const override;
    double valueGradient(const Vector& u, Vector& gradient) const override;
    double valueGradientHessian(const Vector& u, Vector& gradient, Matrix& hessian) const override;
    bool hasResiduals() const override { return base_.hasResiduals(); }
    int residualCount() const override { return base_.residualCount(); }
    void residuals(const Vector& u, Vector& residuals, Matrix* jacobian) const override;
    bool leastSquaresFactor(const Vector& u, Matrix& r, Vector& qtr, double& residualNormSq) const override;

private:
    const Objective& base_;
    Vector scale_;
};

// The run of a method on a ScaledObjective, in the original variables: x, steps and gradients
// mapped back (x = D u, s_x = D s_u, g_x = D^-1 g_u); the records' Hessian spectra, which were
// of D H D, are dropped. The end point is classified again from the original Hessian (the
// inertia is the same, Sylvester's law, but the eigenvalues are not) with the stationarity test
// every run's end passes (solve::classifyEndPoint), so a rerun that converged in the scaled
// variables is not called "not critical" for a gradient measured in the original units.
solve::Run mapRunBack(const solve::Run& scaledRun, const Objective& original, const Vector& scale);

}  // namespace sw::diagnose
