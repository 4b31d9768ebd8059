#pragma once
// The objective seen by solvers and views: f : R^n -> R with exact gradient and Hessian,
// and (for least-squares fits) the residual form r : R^n -> R^m with its Jacobian.
//
// Every method is const and safe to call from several threads at once; an
// implementation keeps per-thread scratch space itself (e.g. thread_local or a pool).
// Non-finite values are returned as values, never thrown.

#include <Eigen/Dense>
#include <string>
#include <vector>

namespace sw {

using Vector = Eigen::VectorXd;
using Matrix = Eigen::MatrixXd;

class Objective {
public:
    virtual ~Objective() = default;

    virtual int dimension() const = 0;
    virtual std::vector<std::string> variableNames() const = 0;
    // One line for tables and reports, e.g. the formula text.
    virtual std::string description() const = 0;

    virtual double value(const Vector& x) const = 0;
    // Returns f(x) and fills gradient (resized to n).
    virtual double valueGradient(const Vector& x, Vector& gradient) const = 0;
    // Returns f(x), fills gradient and the full symmetric Hessian (resized to n x n).
    virtual double valueGradientHessian(const Vector& x, Vector& gradient, Matrix& hessian) const = 0;

    // Residual form. When hasResiduals() is true, value(x) == 0.5 * r(x).squaredNorm()
    // (weights already folded into r), so Gauss-Newton and Levenberg-Marquardt can use it.
    virtual bool hasResiduals() const { return false; }
    virtual int residualCount() const { return 0; }
    // Fills residuals (size m) and, when jacobian is non-null, J = dr/dx (m x n).
    virtual void residuals(const Vector& /*x*/, Vector& residuals, Matrix* /*jacobian*/) const { residuals.resize(0); }

    // The residual form at x reduced to n x n without handing out the m x n Jacobian, for
    // Gauss-Newton and Levenberg-Marquardt on many residuals: r (n x n, upper triangular) and
    // qtr (size n) with J = Q r and qtr = Q' residuals for some Q with orthonormal columns, and
    // residualNormSq = |residuals|^2. So r'r = J'J and r'qtr = J'residuals; the signs of r's rows
    // may differ from another QR of J. Non-finite residuals or Jacobian entries show up as
    // non-finite outputs. Returns false when not offered (callers then use residuals() with the
    // Jacobian); an objective offers it only with at least n residuals.
    virtual bool leastSquaresFactor(const Vector& /*x*/, Matrix& /*r*/, Vector& /*qtr*/,
                                    double& /*residualNormSq*/) const {
        return false;
    }
};

}  // namespace sw
