// Counted, checked access to the objective for the methods.
#include "core/solve/method.h"

#include <cmath>

namespace sw::solve {

Evaluator::Evaluator(const Objective& objective, long maxEvaluations)
    : objective_(objective), maxEvaluations_(maxEvaluations) {}

// Names are needed only for a message about a non-finite result, so they are fetched then.
const std::vector<std::string>& Evaluator::names() {
    if (names_.empty()) {
        names_ = objective_.variableNames();
        if (static_cast<int>(names_.size()) != objective_.dimension()) {
            names_.clear();
            for (int i = 0; i < objective_.dimension(); ++i) names_.push_back("x" + std::to_string(i + 1));
        }
    }
    return names_;
}

namespace {
const char* nonFiniteWord(double v) { return std::isnan(v) ? "nan" : (v > 0 ? "inf" : "-inf"); }
}  // namespace

void Evaluator::checkFinite(const Vector& x, double f, const Vector* g, const Matrix* h) {
    if (!nonFinite_.empty()) return;  // keep the first
    std::string what;
    if (!std::isfinite(f)) {
        what = std::string("value is ") + nonFiniteWord(f);
    } else if (g && !g->allFinite()) {
        for (Eigen::Index i = 0; i < g->size(); ++i)
            if (!std::isfinite((*g)[i])) {
                what = "gradient component " + names()[static_cast<std::size_t>(i)] + " is " + nonFiniteWord((*g)[i]);
                break;
            }
    } else if (h && !h->allFinite()) {
        for (Eigen::Index j = 0; j < h->cols() && what.empty(); ++j)
            for (Eigen::Index i = 0; i <= j; ++i)
                if (!std::isfinite((*h)(i, j))) {
                    what = "Hessian entry (" + names()[static_cast<std::size_t>(i)] + ", " +
                           names()[static_cast<std::size_t>(j)] + ") is " + nonFiniteWord((*h)(i, j));
                    break;
                }
    }
    if (!what.empty()) {
        nonFinite_ = what;
        nonFinitePoint_ = x;
    }
}

double Evaluator::value(const Vector& x) {
    ++counts_.value;
    const double f = objective_.value(x);
    checkFinite(x, f, nullptr, nullptr);
    return f;
}

double Evaluator::gradient(const Vector& x, Vector& g) {
    ++counts_.gradient;
    const double f = objective_.valueGradient(x, g);
    checkFinite(x, f, &g, nullptr);
    return f;
}

double Evaluator::hessian(const Vector& x, Vector& g, Matrix& h) {
    ++counts_.hessian;
    const double f = objective_.valueGradientHessian(x, g, h);
    checkFinite(x, f, &g, &h);
    return f;
}

double Evaluator::residuals(const Vector& x, Vector& r, Matrix* jacobian) {
    ++counts_.value;
    if (jacobian) ++counts_.gradient;
    objective_.residuals(x, r, jacobian);
    const double f = 0.5 * r.squaredNorm();
    if (nonFinite_.empty()) {
        if (!r.allFinite()) {
            for (Eigen::Index i = 0; i < r.size(); ++i)
                if (!std::isfinite(r[i])) {
                    nonFinite_ = "residual " + std::to_string(i + 1) + " is " + nonFiniteWord(r[i]);
                    break;
                }
            nonFinitePoint_ = x;
        } else if (jacobian && !jacobian->allFinite()) {
            for (Eigen::Index i = 0; i < jacobian->rows() && nonFinite_.empty(); ++i)
                for (Eigen::Index j = 0; j < jacobian->cols(); ++j)
                    if (!std::isfinite((*jacobian)(i, j))) {
                        nonFinite_ = "Jacobian entry (residual " + std::to_string(i + 1) + ", " +
                                     names()[static_cast<std::size_t>(j)] + ") is " +
                                     nonFiniteWord((*jacobian)(i, j));
                        break;
                    }
            nonFinitePoint_ = x;
        } else if (!std::isfinite(f)) {
            nonFinite_ = std::string("value is ") + nonFiniteWord(f);
            nonFinitePoint_ = x;
        }
    }
    return f;
}

bool Evaluator::leastSquaresFactor(const Vector& x, Matrix& r, Vector& qtr, double& value) {
    double residualNormSq = 0;
    if (!objective_.leastSquaresFactor(x, r, qtr, residualNormSq)) return false;
    ++counts_.value;
    ++counts_.gradient;
    value = 0.5 * residualNormSq;
    if (nonFinite_.empty() && !(std::isfinite(residualNormSq) && r.allFinite() && qtr.allFinite())) {
        // Name the residual or Jacobian entry from the explicit form (diagnosis only: not counted).
        const EvaluationCounts counted = counts_;
        Vector residualValues;
        Matrix jacobian;
        residuals(x, residualValues, &jacobian);
        counts_ = counted;
        if (nonFinite_.empty()) {
            nonFinite_ = "the least-squares factor of the Jacobian is not finite";
            nonFinitePoint_ = x;
        }
    }
    return true;
}

}  // namespace sw::solve
