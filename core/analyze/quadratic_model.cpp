// The local quadratic model m(p) = f + g'p + 1/2 p'Hp and its shape from the Hessian's
// eigenvalues (the second-order picture every Newton-type step is built on).
#include "core/analyze/analyze.h"

#include <Eigen/Eigenvalues>
#include <cmath>
#include <cstdio>

namespace sw::analyze {

const char* toString(Shape shape) {
    switch (shape) {
        case Shape::Bowl:
            return "bowl";
        case Shape::Dome:
            return "dome";
        case Shape::Saddle:
            return "saddle";
        case Shape::FlatDirection:
            return "flat direction";
        case Shape::Ridge:
            return "ridge";
        case Shape::Unknown:
            break;
    }
    return "unknown";
}

double QuadraticModel::at(const Vector& p) const {
    return value + gradient.dot(p) + 0.5 * p.dot(hessian * p);
}

std::vector<double> QuadraticModel::along(const Vector& direction, const std::vector<double>& ts) const {
    // m(t d) = f + t g'd + t^2/2 d'Hd
    const double slope = gradient.dot(direction);
    const double curvature = direction.dot(hessian * direction);
    std::vector<double> values;
    values.reserve(ts.size());
    for (double t : ts) values.push_back(value + t * slope + 0.5 * t * t * curvature);
    return values;
}

namespace {

std::string shortNumber(double v) {
    char text[32];
    std::snprintf(text, sizeof text, "%.3g", v);
    return text;
}

std::string eigenvalueList(const Vector& eigenvalues) {
    std::string list;
    const Eigen::Index n = eigenvalues.size();
    // Long spectra are summarised by their ends.
    if (n > 4) return shortNumber(eigenvalues(0)) + " ... " + shortNumber(eigenvalues(n - 1));
    for (Eigen::Index k = 0; k < n; ++k) list += (k ? ", " : "") + shortNumber(eigenvalues(k));
    return list;
}

std::string directions(int count) {
    return std::to_string(count) + (count == 1 ? " direction" : " directions");
}

}  // namespace

QuadraticModel quadraticModel(const Objective& objective, const Vector& x, double zeroTolerance) {
    QuadraticModel model;
    model.center = x;
    model.zeroTolerance = zeroTolerance;
    const int n = objective.dimension();
    model.value = objective.valueGradientHessian(x, model.gradient, model.hessian);
    model.finite = std::isfinite(model.value) && model.gradient.allFinite() && model.hessian.allFinite();
    if (!model.finite) {
        model.shape = Shape::Unknown;
        model.reason = "the value or a derivative is not finite here, so there is no quadratic model";
        model.verdict = "unknown: " + model.reason;
        model.conditionNumber = solve::kNaN;
        return model;
    }
    // Symmetrise against rounding in the upper/lower halves before the eigen-decomposition.
    const Matrix symmetric = 0.5 * (model.hessian + model.hessian.transpose());
    Eigen::SelfAdjointEigenSolver<Matrix> eigen(symmetric);
    model.eigenvalues = eigen.eigenvalues();
    model.eigenvectors = eigen.eigenvectors();

    const double largest = n ? model.eigenvalues.cwiseAbs().maxCoeff() : 0.0;
    const double zero = zeroTolerance * std::max(1.0, largest);
    int positive = 0, negative = 0, flat = 0;
    for (Eigen::Index k = 0; k < n; ++k) {
        const double lambda = model.eigenvalues(k);
        if (std::abs(lambda) <= zero)
            ++flat;
        else if (lambda > 0)
            ++positive;
        else
            ++negative;
    }
    const double smallest = n ? model.eigenvalues.cwiseAbs().minCoeff() : 0.0;
    model.conditionNumber = smallest > 0 ? largest / smallest : std::numeric_limits<double>::infinity();

    model.hasNewtonPoint = flat == 0 && n > 0;
    if (model.hasNewtonPoint) {
        // x - H^{-1} g through the eigen-decomposition: H^{-1} = V diag(1/lambda) V'.
        const Vector coefficients = model.eigenvectors.transpose() * model.gradient;
        model.newtonPoint = x - model.eigenvectors * coefficients.cwiseQuotient(model.eigenvalues);
    }

    const std::string values = "eigenvalues " + eigenvalueList(model.eigenvalues);
    const std::string zeroNote = "|eigenvalue| <= " + shortNumber(zero) + " counts as zero";
    if (flat > 0 && negative > 0) {
        model.shape = Shape::Ridge;
        model.reason = "no curvature along " + directions(flat) + " and curving down along " + directions(negative) +
                       " (" + values + "; " + zeroNote + "); the model has no stationary point to aim at";
    } else if (flat > 0) {
        model.shape = Shape::FlatDirection;
        model.reason = "no curvature along " + directions(flat) + (positive ? ", curving up along the rest" : "") +
                       " (" + values + "; " + zeroNote +
                       "); the model has no unique minimiser, so Newton steps are ill-defined";
    } else if (negative == 0) {
        model.shape = Shape::Bowl;
        model.reason = "curving up in every direction (" + values + ", condition number " +
                       shortNumber(model.conditionNumber) + "); the Newton point is the model's minimiser";
    } else if (positive == 0) {
        model.shape = Shape::Dome;
        model.reason = "curving down in every direction (" + values +
                       "); the Newton point is the model's maximiser, so a full Newton step goes uphill";
    } else {
        model.shape = Shape::Saddle;
        model.reason = "curving up along " + directions(positive) + " and down along " + directions(negative) + " (" +
                       values + "); the Newton point is a saddle of the model, not a minimiser";
    }
    model.verdict = std::string(toString(model.shape)) + ": " + model.reason;
    return model;
}

}  // namespace sw::analyze
