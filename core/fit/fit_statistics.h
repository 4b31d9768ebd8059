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

// A linear combination of parameters the data determine although its parameters, one by one,
// are not determined (they lie in the null space of the scaled information): e.g. a + b in
// the model a + b + c*t. Coefficients are in the parameters' own units, the largest 1 in
// magnitude; for a nonlinear model the combination is the local one at the estimates (for
// a*b*t it is b0*a + a0*b, the differential of a*b).
struct DeterminedCombination {
    Vector coefficients;            // one per parameter; 0 for parameters not in it
    std::string text;               // e.g. "a + b", "0.25*a + b"
    double estimate = 0;            // coefficients' estimates
    double standardError = 0;       // sqrt(c' Cov c) (NaN when no error estimate exists)
    double lower = 0, upper = 0;    // its confidence interval
    // "linear": the combination above (exact for a model in a + b; a local statement otherwise).
    // "product" / "ratio": two parameters the model uses only as a*b (or a/b), checked on the
    // loss along the whole curve; text, estimate and error are then the product's (or ratio's),
    // the same from every start. The coefficients stay the local direction.
    std::string form = "linear";
};

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
    int degreesOfFreedom = 0;  // rows - parameters the data determine (rows - parameters unless some are not determined)
    double objectiveValue = 0;
    double residualSumOfSquares = 0;         // sum w r^2 (all losses)
    double residualStandardDeviation = 0;    // sqrt(RSS / dof) (NaN when dof <= 0)
    bool likelihood = false;
    double logLikelihood = 0;                // likelihood losses: -f
    double deviance = 0;                     // likelihood losses: 2 sum w [saturated - fitted] log-likelihood
    std::string covarianceMethod;            // "s^2 (J'J)^-1", "sandwich", "inverse observed information"

    Vector singularValues;                   // of J with unit-norm columns (least squares) or sqrt|eig H|
    int rank = 0;
    // Parameters the data cannot determine: those with a share (> 1e-6) in the null space of
    // the column-scaled design (J, or the information's square root for likelihoods). They have
    // no standard error, interval, covariance or correlation (NaN); only the combinations
    // below are determined. One implementation for the command line, JSON and the window.
    std::vector<bool> notDetermined;         // per parameter
    std::vector<DeterminedCombination> determinedCombinations;
    double scaledCondition = 0;              // singular value ratio with unit-norm columns
    std::vector<std::string> warnings;       // sentences for the modeler
};

// Statistics at the parameters x (normally a converged fit).
FitStatistics computeStatistics(const FitObjective& objective, const Vector& x, double confidenceLevel = 0.95);

}  // namespace sw::fit
