// The Hessian's eigenvalues along a run (the curvature view).
#include "core/analyze/analyze.h"

#include <Eigen/Eigenvalues>
#include <cmath>
#include <limits>

namespace sw::analyze {

namespace {

double conditionOf(const Vector& eigenvalues) {
    if (eigenvalues.size() == 0) return solve::kNaN;
    const double largest = eigenvalues.cwiseAbs().maxCoeff(), smallest = eigenvalues.cwiseAbs().minCoeff();
    return smallest > 0 ? largest / smallest : std::numeric_limits<double>::infinity();
}

}  // namespace

std::vector<SpectrumPoint> spectrumAlong(const solve::Run& run, const Objective* objective, int maxDimension,
                                         double zeroTolerance) {
    std::vector<SpectrumPoint> points;
    points.reserve(run.trace.size());
    Vector gradient;
    Matrix hessian;
    for (const solve::IterationRecord& record : run.trace) {
        SpectrumPoint point;
        point.iteration = record.iteration;
        if (record.hessianEigenvalues.size() > 0) {
            point.eigenvalues = record.hessianEigenvalues;
            point.conditionNumber =
                std::isnan(record.conditionNumber) ? conditionOf(point.eigenvalues) : record.conditionNumber;
            point.fromRecord = true;
        } else if (objective && objective->dimension() <= maxDimension && record.x.size() == objective->dimension() &&
                   record.x.allFinite()) {
            objective->valueGradientHessian(record.x, gradient, hessian);
            if (hessian.allFinite()) {
                const Matrix symmetric = 0.5 * (hessian + hessian.transpose());
                point.eigenvalues =
                    Eigen::SelfAdjointEigenSolver<Matrix>(symmetric, Eigen::EigenvaluesOnly).eigenvalues();
                point.conditionNumber = conditionOf(point.eigenvalues);
            }
        }
        if (point.eigenvalues.size() > 0) {
            const double zero = zeroTolerance * std::max(1.0, point.eigenvalues.cwiseAbs().maxCoeff());
            point.negativeCurvature = point.eigenvalues(0) < -zero;
        }
        points.push_back(std::move(point));
    }
    return points;
}

}  // namespace sw::analyze
