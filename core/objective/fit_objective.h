#pragma once
// A model fitted to a data table, as an objective every method and view can use.
//
// The model is a formula in data columns and parameters; the parameters are the names the
// caller lists (with start values elsewhere), every other name must be a column. For row i
// with response y_i, weight w_i (1 unless given) and model value m_i = model(row_i; theta):
//
//   f(theta) = sum_i w_i * loss(y_i, m_i)
//
// with these losses (each written as a function of the model value m):
//   least-squares     1/2 (y - m)^2                         (r_i = y_i - m_i)
//   weighted          1/2 (y - m)^2 with w from a weights column, or w = 1/sigma^2 from a
//                     column of standard deviations (one of them is required)
//   huber  (scale c)  1/2 r^2 when |r| <= c, else c (|r| - c/2)      (Huber 1964)
//   cauchy (scale c)  c^2/2 ln(1 + (r/c)^2)                          (the Lorentzian loss)
//   logistic          ln(1 + e^m) - y m, the negative log-likelihood of y in {0, 1} with
//                     P(y = 1) = 1 / (1 + e^-m): m is the linear predictor (logistic regression)
//   poisson           e^m - y m + ln(y!), the negative log-likelihood of a count y with mean
//                     e^m: m is the linear predictor (log link)
//
// Derivatives are exact: the model's gradient and Hessian in the parameters are symbolic
// (core/expr), compiled into programs evaluated over blocks of rows (columns as arrays,
// parameters broadcast), and combined with the loss's first and second derivatives:
//   grad f = sum w loss'(m) dm,   Hess f = sum w (loss''(m) dm dm' + loss'(m) d2m).
// For least squares that is J'J + sum r_i Hess r_i with J = dr/dtheta = -dm.
// Rows are shared between threads when there are many (threads kept for the life of the
// objective). The last point evaluated is remembered with what was computed there (value,
// gradient, Hessian, least-squares factor), so asking again for the same point is free and
// gives the same numbers.
//
// Least squares and weighted least squares also expose the residual form
// r_i = sqrt(w_i) (y_i - m_i), so Gauss-Newton and Levenberg-Marquardt can use them, and its
// least-squares factor (R, Q'r, |r|^2 in one pass, see streaming_qr.h).

#include "core/objective/objective.h"
#include "core/objective/table.h"

#include <memory>
#include <stdexcept>
#include <string>
#include <vector>

namespace sw {

enum class Loss { LeastSquares, Weighted, Huber, Cauchy, BernoulliLogit, PoissonLog };
const char* toString(Loss loss);  // "least-squares", "weighted", "huber", "cauchy", "logistic", "poisson"
// Also reads the former ids "bernoulli-logit" and "poisson-log" (docs/names.md).
bool parseLoss(const std::string& text, Loss& loss);
std::string lossList();  // "least-squares, weighted, ..." for messages
bool isLikelihood(Loss loss);       // logistic, poisson
bool hasResidualForm(Loss loss);    // least-squares, weighted

// loss(y, m) and its first two derivatives in m, per unit weight (see the header comment).
struct LossTerms {
    double value = 0, first = 0, second = 0;
};
LossTerms lossTerms(Loss loss, double y, double m, double scale);

struct FitDefinition {
    std::string model;                    // formula in columns and parameters
    std::string response;                 // response column
    std::vector<std::string> parameters;  // parameter names, in order
    Loss loss = Loss::LeastSquares;
    std::string weights;                  // optional column of weights (>= 0)
    std::string sigma;                    // optional column of standard deviations (> 0): w = 1/sigma^2
    double scale = 1.0;                   // Huber / Cauchy scale c (> 0)
    int threads = 0;                      // 0: every hardware thread
};

// The model as an equation in the terms of its loss, for people: "temp = a - b*exp(-minutes/tau)
// + error", "log(p / (1 - p)) = b0 + b1*x, where p = P(y = 1)", "log(mean of n) = ...". One
// text for the fit verb, the window's fit panel, the review report and Objective::description().
std::string modelEquation(const FitDefinition& definition);
// "least squares: 1/2 sum (temp - model)^2", "logistic: the negative log-likelihood of 0/1 outcomes", ...
std::string lossInWords(const FitDefinition& definition);

// A definition that does not fit the table (unknown name, bad column values, ...). Formula
// syntax errors are expr::FormulaError, thrown as they are.
class FitError : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

class FitObjective final : public Objective {
public:
    // Checks everything; throws FitError or expr::FormulaError with a message naming the place.
    FitObjective(std::shared_ptr<const Table> table, FitDefinition definition);
    ~FitObjective() override;

    int dimension() const override;
    std::vector<std::string> variableNames() const override;
    std::string description() const override;

    double value(const Vector& x) const override;
    double valueGradient(const Vector& x, Vector& gradient) const override;
    double valueGradientHessian(const Vector& x, Vector& gradient, Matrix& hessian) const override;

    bool hasResiduals() const override;
    int residualCount() const override;
    void residuals(const Vector& x, Vector& residuals, Matrix* jacobian) const override;
    // R, Q'r and |r|^2 in one pass over the rows, each block of rows folded into R while it is
    // in cache (core/objective/streaming_qr.h); the m x n Jacobian is never stored.
    bool leastSquaresFactor(const Vector& x, Matrix& r, Vector& qtr, double& residualNormSq) const override;

    const FitDefinition& definition() const;
    const Table& table() const;
    int rowCount() const;
    const Vector& response() const;
    const Vector& weights() const;  // all ones when none were given
    // The model at every row and, when asked, its derivatives dm_i/dtheta_j (rows x parameters).
    void model(const Vector& x, Vector& values, Matrix* derivatives) const;
    // The model's derivative in each parameter as formula text, for reading.
    std::vector<std::string> modelDerivativeText() const;
    // Columns the model uses, in table order.
    std::vector<std::string> usedColumns() const;

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

}  // namespace sw
