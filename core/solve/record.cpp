// Names of record enums, and the classification of an end point by its Hessian.
#include "core/solve/record.h"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <string>

namespace sw::solve {

const char* toString(StepKind kind) {
    switch (kind) {
        case StepKind::None: return "none";
        case StepKind::Gradient: return "gradient";
        case StepKind::Momentum: return "momentum";
        case StepKind::Adaptive: return "adaptive";
        case StepKind::Newton: return "newton";
        case StepKind::ModifiedNewton: return "modified-newton";
        case StepKind::SaddleFreeNewton: return "saddle-free-newton";
        case StepKind::NegativeCurvature: return "negative-curvature";
        case StepKind::Dogleg: return "dogleg";
        case StepKind::Cauchy: return "cauchy";
        case StepKind::Boundary: return "boundary";
        case StepKind::Interior: return "interior";
        case StepKind::QuasiNewton: return "quasi-newton";
        case StepKind::ConjugateGradient: return "conjugate-gradient";
        case StepKind::Simplex: return "simplex";
        case StepKind::GaussNewton: return "gauss-newton";
        case StepKind::LevenbergMarquardt: return "levenberg-marquardt";
        case StepKind::Cubic: return "cubic";
    }
    return "unknown";
}

const char* toString(Termination t) {
    switch (t) {
        case Termination::Running: return "running";
        case Termination::GradientTolerance: return "gradient-tolerance";
        case Termination::StepTolerance: return "step-tolerance";
        case Termination::FunctionTolerance: return "function-tolerance";
        case Termination::IterationLimit: return "iteration-limit";
        case Termination::EvaluationLimit: return "evaluation-limit";
        case Termination::LineSearchFailed: return "line-search-failed";
        case Termination::TrustRegionCollapsed: return "trust-region-collapsed";
        case Termination::NonFinite: return "non-finite";
        case Termination::StoppedByCaller: return "stopped-by-caller";
        case Termination::Failed: return "failed";
    }
    return "unknown";
}

bool isConvergence(Termination t) {
    return t == Termination::GradientTolerance || t == Termination::StepTolerance ||
           t == Termination::FunctionTolerance;
}

const char* toString(PointKind k) {
    switch (k) {
        case PointKind::Unknown: return "unknown";
        case PointKind::Minimum: return "minimum";
        case PointKind::Saddle: return "saddle";
        case PointKind::Maximum: return "maximum";
        case PointKind::Degenerate: return "degenerate";
    }
    return "unknown";
}

namespace {
std::string shortNumber(double v) {
    if (std::isnan(v)) return "nan";
    if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
    char buffer[32];
    auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, v, std::chars_format::general, 6);
    return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
}

std::string listOf(const Vector& values) {
    std::string text;
    const Eigen::Index shown = std::min<Eigen::Index>(values.size(), 8);
    for (Eigen::Index i = 0; i < shown; ++i) text += (i ? ", " : "") + shortNumber(values[i]);
    if (values.size() > shown) text += ", ... (" + std::to_string(values.size()) + " in all)";
    return text;
}
}  // namespace

EndPoint classifyPoint(const Matrix& hessian, double relativeTolerance) {
    EndPoint end;
    if (hessian.rows() == 0 || hessian.rows() != hessian.cols()) {
        end.description = "not classified: no Hessian";
        return end;
    }
    if (!hessian.allFinite()) {
        end.description = "not classified: the Hessian is not finite here";
        return end;
    }
    // Only the lower triangle is read, so a slightly asymmetric Hessian (rounding) is fine.
    Eigen::SelfAdjointEigenSolver<Matrix> solver(hessian, Eigen::EigenvaluesOnly);
    if (solver.info() != Eigen::Success) {
        end.description = "not classified: the eigenvalue computation did not converge";
        return end;
    }
    end.eigenvalues = solver.eigenvalues();  // ascending
    const double largest = end.eigenvalues.cwiseAbs().maxCoeff();
    end.tolerance = relativeTolerance * std::max(1.0, largest);
    int negative = 0, positive = 0, zero = 0;
    for (double l : end.eigenvalues) {
        if (std::abs(l) <= end.tolerance) ++zero;
        else if (l < 0) ++negative;
        else ++positive;
    }
    end.index = negative;
    const std::string eig = "eigenvalues " + listOf(end.eigenvalues);
    if (zero > 0) {
        end.kind = PointKind::Degenerate;
        end.description = "degenerate: " + std::to_string(zero) + " eigenvalue" + (zero > 1 ? "s" : "") +
                          " within " + shortNumber(end.tolerance) + " of zero (" + eig + ")";
    } else if (negative == 0) {
        end.kind = PointKind::Minimum;
        end.description = "minimum (" + eig + ")";
    } else if (positive == 0) {
        end.kind = PointKind::Maximum;
        end.description = "maximum (" + eig + ")";
    } else {
        end.kind = PointKind::Saddle;
        end.description = "saddle of index " + std::to_string(negative) + " (" + eig + ")";
    }
    return end;
}

}  // namespace sw::solve
