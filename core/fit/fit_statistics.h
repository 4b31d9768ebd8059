#pragma once
// What a modeler reports after a fit: estimates with standard errors, correlations and
// confidence intervals, goodness of fit, and warnings about what the data cannot tell.
//
// Covariance of the estimates, by loss:
//   least squares (weighted or not): s^2 (J'J)^-1 with s^2 = RSS / (m - p), J the (weighted)
//     residual Jacobian, computed from the SVD of J (never forming J'J);
//   huber, cauchy: the sandwich H^-1 B H^-1 m/(m-p), H the exact Hessian of the loss,
//     B = sum (w loss'(m_i))^2 dm_i dm_i' (Huber 1967; common practice for M-estimators);
//   logistic, poisson: the inverse observed information H^-1, H the exact
//     Hessian of the negative log-likelihood.
// Confidence intervals: estimate +- t(1 - (1 - level)/2, m - p) SE for least squares and the
// robust losses, +- z(1 - (1 - level)/2) SE for likelihoods (Wald intervals).

#include "core/objective/fit_objective.h"

#include <string>
#include <vector>

namespace sw::fit {

struct FitStatistics {
    std::vector<std::string> names;
    Vector estimates;
    Vector standardErrors;
    Matrix covariance;
    Matrix correlation;
    double confidenceLevel = 0.95;
    double criticalValue = 0;  // the t (or z) quantile used for the intervals
    Vector lower, upper;       // confidence interval bounds

    int rows = 0;
    int parameters = 0;
    int degreesOfFreedom = 0;  // rows - parameters
    double objectiveValue = 0;
    double residualSumOfSquares = 0;         // sum w r^2 (all losses)
    double residualStandardDeviation = 0;    // sqrt(RSS / dof) (NaN when dof <= 0)
    bool likelihood = false;
    double logLikelihood = 0;                // likelihood losses: -f
    double deviance = 0;                     // likelihood losses: 2 sum w [saturated - fitted] log-likelihood
    std::string covarianceMethod;            // "s^2 (J'J)^-1", "sandwich", "inverse observed information"

    Vector singularValues;                   // of J with unit-norm columns (least squares) or sqrt|eig H|
    int rank = 0;
    double scaledCondition = 0;              // singular value ratio with unit-norm columns
    std::vector<std::string> warnings;       // sentences for the modeler
};

// Statistics at the parameters x (normally a converged fit).
FitStatistics computeStatistics(const FitObjective& objective, const Vector& x, double confidenceLevel = 0.95);

}  // namespace sw::fit
