#include "core/fit/fit_statistics.h"

#include "core/fit/student_t.h"

#include <Eigen/Eigenvalues>
#include <Eigen/SVD>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

namespace sw::fit {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kNearlyDeficientCondition = 1e8;  // common practice, no published source
constexpr double kUnidentifiableCorrelation = 0.99;
constexpr double kScaleSpread = 1e6;
constexpr double kPoorlyDetermined = 100;  // standard error / |estimate|; common practice, no published source
// A parameter with a larger share than this in the (unit-norm) null space of the scaled
// design is not determined by the data; common practice, no published source.
constexpr double kNullSpaceShare = 1e-6;

std::string num(double v, int digits = 4) {
    char buffer[40];
    std::snprintf(buffer, sizeof buffer, "%.*g", digits, v);
    return buffer;
}

std::string listOf(const Vector& v) {
    std::string s;
    for (Eigen::Index i = 0; i < v.size(); ++i) s += (i ? ", " : "") + num(v[i]);
    return s;
}

// Pseudo-inverse of a symmetric matrix through its eigendecomposition; reports whether it
// was positive definite.
Matrix symmetricInverse(const Matrix& h, bool& positiveDefinite) {
    Eigen::SelfAdjointEigenSolver<Matrix> eig(h);
    const Vector& values = eig.eigenvalues();
    const double largest = values.cwiseAbs().maxCoeff();
    const double tol = largest * 1e-14 * static_cast<double>(h.rows());
    positiveDefinite = values.minCoeff() > tol;
    Vector inv(values.size());
    for (Eigen::Index i = 0; i < values.size(); ++i) inv[i] = std::fabs(values[i]) > tol ? 1.0 / values[i] : 0.0;
    return eig.eigenvectors() * inv.asDiagonal() * eig.eigenvectors().transpose();
}

}  // namespace

FitStatistics computeStatistics(const FitObjective& objective, const Vector& x, double confidenceLevel) {
    FitStatistics s;
    const FitDefinition& def = objective.definition();
    const int p = objective.dimension();
    const int m = objective.rowCount();
    s.names = objective.variableNames();
    s.estimates = x;
    s.confidenceLevel = confidenceLevel;
    s.rows = m;
    s.parameters = p;
    s.degreesOfFreedom = m - p;
    s.likelihood = isLikelihood(def.loss);

    Vector model;
    Matrix dm;
    objective.model(x, model, &dm);
    const Vector& y = objective.response();
    const Vector& w = objective.weights();

    // Per-row loss terms; RSS and deviance.
    Vector first(m), second(m);
    double rss = 0, deviance = 0;
    for (int i = 0; i < m; ++i) {
        const LossTerms t = lossTerms(def.loss, y[i], model[i], def.scale);
        first[i] = w[i] * t.first;
        second[i] = w[i] * t.second;
        const double r = y[i] - model[i];
        rss += w[i] * r * r;
        if (def.loss == Loss::BernoulliLogit) {
            // 2 [y ln(y/p) + (1-y) ln((1-y)/(1-p))], with 0 ln 0 = 0
            const double eta = model[i];
            const double logP = -(std::max(-eta, 0.0) + std::log1p(std::exp(-std::fabs(eta))));
            const double log1mP = -(std::max(eta, 0.0) + std::log1p(std::exp(-std::fabs(eta))));
            double d = 0;
            if (y[i] > 0) d += y[i] * (std::log(y[i]) - logP);
            if (y[i] < 1) d += (1 - y[i]) * (std::log1p(-y[i]) - log1mP);
            deviance += 2 * w[i] * d;
        } else if (def.loss == Loss::PoissonLog) {
            // 2 [y ln(y/mu) - (y - mu)], with 0 ln 0 = 0
            const double mu = std::exp(model[i]);
            const double d = (y[i] > 0 ? y[i] * (std::log(y[i]) - model[i]) : 0.0) - (y[i] - mu);
            deviance += 2 * w[i] * d;
        }
    }
    s.objectiveValue = objective.value(x);
    s.residualSumOfSquares = rss;
    s.residualStandardDeviation = s.degreesOfFreedom > 0 ? std::sqrt(rss / s.degreesOfFreedom) : kNaN;
    if (s.likelihood) {
        s.logLikelihood = -s.objectiveValue;
        s.deviance = deviance;
    }

    // The design the data see: sqrt(weight) dm (least squares, robust) or sqrt(w loss'') dm
    // (likelihoods: the Fisher information's square root), with unit-norm columns.
    Vector rowScale = s.likelihood ? Vector(second.cwiseMax(0.0).cwiseSqrt()) : Vector(w.cwiseSqrt());
    Matrix design = rowScale.asDiagonal() * dm;
    Vector columnNorm = design.colwise().norm().transpose();
    Vector safeNorm = columnNorm;
    for (int j = 0; j < p; ++j)
        if (!(safeNorm[j] > 0)) safeNorm[j] = 1.0;
    Matrix normalized = design * safeNorm.cwiseInverse().asDiagonal();
    Eigen::JacobiSVD<Matrix> svd(normalized, Eigen::ComputeFullV);
    s.singularValues = svd.singularValues();
    const double sMax = s.singularValues.size() ? s.singularValues[0] : 0.0;
    const double rankTol = sMax * std::numeric_limits<double>::epsilon() * std::max(m, p);
    s.rank = 0;
    for (Eigen::Index i = 0; i < s.singularValues.size(); ++i)
        if (s.singularValues[i] > rankTol) ++s.rank;
    for (int j = 0; j < p; ++j)
        if (!(columnNorm[j] > 0)) s.rank = std::min(s.rank, p - 1);
    const double sMin = s.singularValues.size() == p ? s.singularValues[p - 1] : 0.0;
    s.scaledCondition = sMin > 0 ? sMax / sMin : std::numeric_limits<double>::infinity();

    // The null space of the scaled design: singular vectors with singular values at or below
    // the rank tolerance, and every direction beyond min(m, p) when there are fewer rows.
    const Matrix& fullV = svd.matrixV();
    std::vector<Eigen::Index> nullColumns;
    for (Eigen::Index k = 0; k < p; ++k)
        if (k >= s.singularValues.size() || !(s.singularValues[k] > rankTol)) nullColumns.push_back(k);
    // A zero column (the model does not depend on that parameter here) is a null direction too.
    Matrix nullBasis(p, static_cast<Eigen::Index>(nullColumns.size()));
    for (std::size_t k = 0; k < nullColumns.size(); ++k) nullBasis.col(static_cast<Eigen::Index>(k)) = fullV.col(nullColumns[k]);
    s.notDetermined.assign(static_cast<std::size_t>(p), false);
    std::vector<Eigen::Index> undetermined;
    for (int j = 0; j < p; ++j) {
        const bool zeroColumn = !(columnNorm[j] > 0);
        if (zeroColumn || (nullBasis.cols() > 0 && nullBasis.row(j).norm() > kNullSpaceShare)) {
            s.notDetermined[static_cast<std::size_t>(j)] = true;
            undetermined.push_back(j);
        }
    }

    // Residual degrees of freedom: rows minus the parameters the data determine (the rank of
    // the scaled design), as for a rank-deficient linear model (common practice, e.g. R's lm:
    // n - rank). With every parameter determined this is rows - parameters, as before.
    s.degreesOfFreedom = m - (p - static_cast<int>(nullColumns.size()));
    s.residualStandardDeviation = s.degreesOfFreedom > 0 ? std::sqrt(rss / s.degreesOfFreedom) : kNaN;

    if (def.loss == Loss::LeastSquares || def.loss == Loss::Weighted) {
        s.covarianceMethod = "s^2 (J'J)^-1";
        // (J'J)^+ = D^-1 V S^-2 V' D^-1 with J D^-1 = U S V' (column-scaled, so the pseudo-inverse
        // cut-off is not fooled by parameter units).
        Vector invSq = Vector::Zero(s.singularValues.size());
        for (Eigen::Index i = 0; i < invSq.size(); ++i)
            if (s.singularValues[i] > rankTol) invSq[i] = 1.0 / (s.singularValues[i] * s.singularValues[i]);
        const Matrix v = safeNorm.cwiseInverse().asDiagonal() * svd.matrixV().leftCols(invSq.size());
        const double s2 = s.degreesOfFreedom > 0 ? rss / s.degreesOfFreedom : kNaN;
        s.covariance = s2 * (v * invSq.asDiagonal() * v.transpose());
    } else {
        Vector g;
        Matrix h;
        objective.valueGradientHessian(x, g, h);
        bool positiveDefinite = true;
        const Matrix hInv = symmetricInverse(h, positiveDefinite);
        if (!positiveDefinite)
            s.warnings.push_back("The Hessian of the loss is not positive definite at these parameters, so this is not "
                                 "a strict minimum and the covariance is not meaningful.");
        if (s.likelihood) {
            s.covarianceMethod = "inverse observed information";
            s.covariance = hInv;
        } else {
            s.covarianceMethod = "sandwich";
            const Matrix scores = first.asDiagonal() * dm;
            const Matrix meat = scores.transpose() * scores;
            const double correction = s.degreesOfFreedom > 0 ? static_cast<double>(m) / s.degreesOfFreedom : kNaN;
            s.covariance = correction * (hInv * meat * hInv);
        }
    }

    s.standardErrors = s.covariance.diagonal().cwiseMax(0.0).cwiseSqrt();
    s.correlation = Matrix::Identity(p, p);
    for (int i = 0; i < p; ++i)
        for (int j = 0; j < p; ++j)
            if (i != j) {
                const double d = s.standardErrors[i] * s.standardErrors[j];
                s.correlation(i, j) = d > 0 ? s.covariance(i, j) / d : kNaN;
            }
    const double upperProbability = 1.0 - 0.5 * (1.0 - confidenceLevel);
    s.criticalValue = s.likelihood ? normalQuantile(upperProbability)
                                   : (s.degreesOfFreedom > 0 ? studentTQuantile(upperProbability, s.degreesOfFreedom)
                                                             : kNaN);
    // Combinations the data do determine: directions w among the undetermined parameters
    // (in scaled units) orthogonal to the null space, i.e. the null space of N_U' (N_U: the
    // null basis restricted to those parameters). In parameter units the coefficients are
    // w_j / (1 / column norm_j) = w_j * norm_j.
    if (!undetermined.empty() && nullBasis.cols() > 0) {
        const auto u = static_cast<Eigen::Index>(undetermined.size());
        Matrix restricted(u, nullBasis.cols());
        for (Eigen::Index r = 0; r < u; ++r) restricted.row(r) = nullBasis.row(undetermined[static_cast<std::size_t>(r)]);
        Eigen::JacobiSVD<Matrix> split(restricted, Eigen::ComputeFullU);
        const Vector& values = split.singularValues();
        int restrictedRank = 0;
        for (Eigen::Index k = 0; k < values.size(); ++k)
            if (values[k] > kNullSpaceShare) ++restrictedRank;
        for (Eigen::Index k = restrictedRank; k < u; ++k) {
            const Vector direction = split.matrixU().col(k);
            DeterminedCombination c;
            c.coefficients = Vector::Zero(p);
            for (Eigen::Index r = 0; r < u; ++r) {
                const Eigen::Index j = undetermined[static_cast<std::size_t>(r)];
                c.coefficients[j] = direction[r] * safeNorm[j];
            }
            const double largest = c.coefficients.cwiseAbs().maxCoeff();
            if (!(largest > 0)) continue;
            c.coefficients /= largest;
            for (int j = 0; j < p; ++j) {
                if (std::fabs(c.coefficients[j]) < 1e-12) c.coefficients[j] = 0;
            }
            for (int j = 0; j < p; ++j)
                if (c.coefficients[j] != 0) {
                    if (c.coefficients[j] < 0) c.coefficients = -c.coefficients;
                    break;
                }
            for (int j = 0; j < p; ++j) {
                const double a = c.coefficients[j];
                if (a == 0) continue;
                const bool leading = c.text.empty();
                const std::string name = s.names[static_cast<std::size_t>(j)];
                const double magnitude = std::fabs(a);
                const std::string term = std::fabs(magnitude - 1) < 1e-9 ? name : num(magnitude) + "*" + name;
                c.text += leading ? (a < 0 ? "-" + term : term) : (a < 0 ? " - " : " + ") + term;
            }
            c.estimate = c.coefficients.dot(x);
            const double variance = c.coefficients.dot(s.covariance * c.coefficients);
            c.standardError = std::isfinite(variance) ? std::sqrt(std::max(0.0, variance)) : kNaN;
            // Two parameters that enter only as a product (or a ratio): the local direction is
            // the differential of a*b (or a/b), which reads differently from every start. Check
            // the invariance on the loss itself (scalings by 2 and 1/2 leave it unchanged to
            // rounding) and then name the product with its own estimate and error (delta method:
            // d(ab) = b da + a db is k times the combination, k = b / coefficient of a).
            std::vector<Eigen::Index> used;
            for (int j = 0; j < p; ++j)
                if (c.coefficients[j] != 0) used.push_back(j);
            if (used.size() == 2 && x[used[0]] != 0 && x[used[1]] != 0) {
                const Eigen::Index i = used[0], j = used[1];
                const double f0 = objective.value(x);
                auto invariant = [&](double si, double sj) {
                    for (const double scale : {2.0, 0.5}) {
                        Vector moved = x;
                        moved[i] *= std::pow(scale, si);
                        moved[j] *= std::pow(scale, sj);
                        const double f = objective.value(moved);
                        if (!(std::fabs(f - f0) <= 1e-9 * (1 + std::fabs(f0)))) return false;
                    }
                    return true;
                };
                const std::string ni = s.names[static_cast<std::size_t>(i)], nj = s.names[static_cast<std::size_t>(j)];
                if (invariant(1, -1)) {  // a*s, b/s: the product
                    c.form = "product";
                    c.text = ni + "*" + nj;
                    c.estimate = x[i] * x[j];
                    c.standardError *= std::fabs(x[j] / c.coefficients[i]);
                } else if (invariant(1, 1)) {  // a*s, b*s: the ratio
                    c.form = "ratio";
                    c.text = ni + "/" + nj;
                    c.estimate = x[i] / x[j];
                    c.standardError *= std::fabs(1 / (x[j] * c.coefficients[i]));
                }
            }
            c.lower = c.estimate - s.criticalValue * c.standardError;
            c.upper = c.estimate + s.criticalValue * c.standardError;
            s.determinedCombinations.push_back(std::move(c));
        }
    }
    // No error, interval, covariance or correlation for what the data cannot determine: the
    // pseudo-inverse would give finite numbers that depend on the start.
    for (Eigen::Index j : undetermined) {
        s.standardErrors[j] = kNaN;
        for (int i = 0; i < p; ++i) {
            s.covariance(i, j) = s.covariance(j, i) = kNaN;
            if (i != j) s.correlation(i, j) = s.correlation(j, i) = kNaN;
        }
    }
    s.lower = s.estimates - s.criticalValue * s.standardErrors;
    s.upper = s.estimates + s.criticalValue * s.standardErrors;

    // Warnings a modeler needs.
    if (m < p)
        s.warnings.push_back("Fewer rows (" + std::to_string(m) + ") than parameters (" + std::to_string(p) +
                             "): the data cannot determine every parameter.");
    else if (m == p)
        s.warnings.push_back("As many rows as parameters: no degrees of freedom remain, so no error estimates.");
    if (s.rank < p)
        s.warnings.push_back("The Jacobian is rank-deficient: rank " + std::to_string(s.rank) + " of " +
                             std::to_string(p) + " (singular values with unit-norm columns: " +
                             listOf(s.singularValues) +
                             "). Some parameter combinations are not determined by these data.");
    if (!undetermined.empty()) {
        std::string names;
        for (std::size_t k = 0; k < undetermined.size(); ++k)
            names += (k ? (k + 1 == undetermined.size() ? " and " : ", ") : "") +
                     s.names[static_cast<std::size_t>(undetermined[k])];
        std::string sentence = (undetermined.size() == 1 ? "Parameter " + names + " is" : "Parameters " + names + " are") +
                               " not determined by the data: no standard error or interval is given for " +
                               (undetermined.size() == 1 ? "it" : "them") +
                               ", and the estimate depends on the start.";
        if (s.determinedCombinations.empty()) {
            sentence += " The model does not depend on " + std::string(undetermined.size() == 1 ? "it" : "them") +
                        " here in any way the data can see.";
        } else {
            bool local = false;
            for (const DeterminedCombination& c : s.determinedCombinations) local = local || c.form == "linear";
            sentence += local ? " Near these estimates the data determine only " : " The data determine only ";
            for (std::size_t k = 0; k < s.determinedCombinations.size(); ++k) {
                const DeterminedCombination& c = s.determinedCombinations[k];
                sentence += (k ? "; and " : "") + c.text + " = " + num(c.estimate, 6) +
                            (std::isfinite(c.standardError) ? " (standard error " + num(c.standardError) + ")" : "");
            }
            sentence += ".";
        }
        s.warnings.push_back(sentence);
    }
    else if (s.scaledCondition > kNearlyDeficientCondition)
        s.warnings.push_back("The Jacobian is nearly rank-deficient: condition number " + num(s.scaledCondition) +
                             " with unit-norm columns (singular values: " + listOf(s.singularValues) +
                             "). Estimates and standard errors may be unreliable.");
    for (int i = 0; i < p; ++i)
        for (int j = i + 1; j < p; ++j)
            if (std::fabs(s.correlation(i, j)) > kUnidentifiableCorrelation)
                s.warnings.push_back("Parameters " + s.names[static_cast<std::size_t>(i)] + " and " +
                                     s.names[static_cast<std::size_t>(j)] +
                                     " are nearly unidentifiable together: correlation " +
                                     num(s.correlation(i, j), 6) + ".");
    for (int j = 0; j < p; ++j) {
        const double estimate = std::fabs(x[j]), se = s.standardErrors[j];
        if (estimate > 0 && se > kPoorlyDetermined * estimate)
            s.warnings.push_back("Parameter " + s.names[static_cast<std::size_t>(j)] +
                                 " is poorly determined: its standard error " + num(se) + " is more than " +
                                 num(kPoorlyDetermined) + " times its estimate " + num(x[j]) +
                                 " (the model hardly depends on it here; try another start or model).");
    }
    // Magnitudes: only parameters that are determined and not zero in effect count (zero
    // within their uncertainty, or too small to change the model beyond rounding: a constant
    // response leaves a slope of 3e-18 that says nothing about scaling).
    const double modelNorm = model.norm();
    auto zeroInEffect = [&](int j) {
        const double a = std::fabs(x[j]), se = s.standardErrors[j];
        if (std::isfinite(se) && std::isfinite(s.criticalValue) && a <= s.criticalValue * se) return true;
        return a * dm.col(j).norm() <= 64 * std::numeric_limits<double>::epsilon() * modelNorm;
    };
    int smallest = -1, largest = -1;
    for (int j = 0; j < p; ++j) {
        const double a = std::fabs(x[j]);
        if (!(a > 0) || !std::isfinite(a)) continue;
        if (s.notDetermined[static_cast<std::size_t>(j)] || zeroInEffect(j)) continue;
        if (smallest < 0 || a < std::fabs(x[smallest])) smallest = j;
        if (largest < 0 || a > std::fabs(x[largest])) largest = j;
    }
    if (smallest >= 0 && std::fabs(x[largest]) > kScaleSpread * std::fabs(x[smallest])) {
        const int orders = static_cast<int>(std::floor(std::log10(std::fabs(x[largest]) / std::fabs(x[smallest]))));
        s.warnings.push_back("Parameter magnitudes differ by about 10^" + std::to_string(orders) + " (" +
                             s.names[static_cast<std::size_t>(largest)] + " = " + num(x[largest]) + ", " +
                             s.names[static_cast<std::size_t>(smallest)] + " = " + num(x[smallest]) +
                             "): consider rescaling the model so the parameters are of similar size.");
    }
    return s;
}

}  // namespace sw::fit
