// Methods for objectives in residual form f = 1/2 |r(x)|^2: Gauss-Newton with a line search,
// and Levenberg-Marquardt in Moré's scaled trust-region form.
//
// Both work from the residual Jacobian J without forming J'J (which squares its condition
// number): J is reduced by Householder QR to R (n x n), and the small scaled matrix
// R D^-1 = U S V' is decomposed once per iteration. Every damped step then costs O(n^2):
//   z(lambda) = -V diag(s_i / (s_i^2 + lambda)) U'Q'r,   p = D^-1 z,
// which is the minimiser of |J p + r|^2 + lambda |D p|^2. Everything else the methods need is
// in R and Q'r too: J'r = R'Q'r, the column norms of J are those of R, and J's singular values
// (rank, condition number) are R's. When the objective offers leastSquaresFactor (a fit
// objective folds each block of rows into R as it computes them), the m x n Jacobian is never
// formed; otherwise R comes from the explicit J.
#include "core/solve/line_search.h"
#include "core/solve/method.h"

#include <Eigen/QR>
#include <Eigen/SVD>

#include <algorithm>
#include <cmath>
#include <limits>
#include <thread>

namespace sw::solve {

namespace {

constexpr double kEps = std::numeric_limits<double>::epsilon();

// Above this many rows, J is reduced to R by two threads: each half of the rows is
// factorised on its own and the two R's are factorised again (tall-skinny QR; Demmel,
// Grigori, Hoemmen & Langou, "Communication-optimal parallel and sequential QR and LU
// factorizations", SIAM J. Sci. Comput. 34 (2012)). R and Q'r are those of J up to the signs
// of R's rows, which the steps do not depend on.
constexpr Eigen::Index kParallelQrRows = 20000;

void reduceInParallel(const Vector& r, const Matrix& jacobian, Matrix& reduced, Vector& qtr) {
    const Eigen::Index m = jacobian.rows(), n = jacobian.cols(), half = m / 2;
    Matrix stackedR = Matrix::Zero(2 * n, n);
    Vector stackedQtr(2 * n);
    auto reduceRows = [&](Eigen::Index begin, Eigen::Index count, Eigen::Index slot) {
        Eigen::HouseholderQR<Matrix> qr(jacobian.middleRows(begin, count));
        stackedR.middleRows(slot * n, n) = qr.matrixQR().topRows(n).triangularView<Eigen::Upper>();
        stackedQtr.segment(slot * n, n) = (qr.householderQ().transpose() * r.segment(begin, count)).head(n);
    };
    std::thread second(reduceRows, half, m - half, Eigen::Index{1});
    reduceRows(0, half, 0);
    second.join();
    Eigen::HouseholderQR<Matrix> qr(stackedR);
    reduced = qr.matrixQR().topRows(n).triangularView<Eigen::Upper>();
    qtr = (qr.householderQ().transpose() * stackedQtr).head(n);
}

// r(x) reduced to n x n: J = Q R, qtr = Q'r, |r|^2, and m (for the rank tolerance).
struct Reduced {
    Matrix r;  // n x n upper triangular (m x n when m < n: then J itself)
    Vector qtr;
    double residualNormSq = 0;
    Eigen::Index rows = 0;

    Vector gradient() const { return r.transpose() * qtr; }  // J'r
    Vector columnNorms() const {
        Vector norms = r.colwise().norm().transpose();
        for (Eigen::Index i = 0; i < norms.size(); ++i)
            if (!(norms[i] > 0) || !std::isfinite(norms[i])) norms[i] = 1.0;
        return norms;
    }
};

// Evaluates r at x in reduced form (counted as one value and one gradient); returns 0.5|r|^2.
double evaluateReduced(Evaluator& eval, const Vector& x, Reduced& out) {
    out.rows = eval.objective().residualCount();
    double value = 0;
    if (eval.leastSquaresFactor(x, out.r, out.qtr, value)) {
        out.residualNormSq = 2.0 * value;
        return value;
    }
    Vector residuals;
    Matrix jacobian;
    value = eval.residuals(x, residuals, &jacobian);
    out.rows = jacobian.rows();
    out.residualNormSq = residuals.squaredNorm();
    const Eigen::Index m = jacobian.rows(), n = jacobian.cols();
    if (m >= kParallelQrRows && m >= 8 * n) {
        reduceInParallel(residuals, jacobian, out.r, out.qtr);
    } else if (m > n) {
        Eigen::HouseholderQR<Matrix> qr(jacobian);
        out.r = qr.matrixQR().topRows(n).triangularView<Eigen::Upper>();
        out.qtr = (qr.householderQ().transpose() * residuals).head(n);
    } else {
        out.r = std::move(jacobian);
        out.qtr = std::move(residuals);
    }
    return value;
}

// The linearisation of r at one point, scaled by D, ready for any damping lambda.
struct Linearization {
    Vector singular;        // s_i of A = R D^-1, descending
    Matrix v;               // right singular vectors of A
    Vector projected;       // c = U' Q' r (size = number of singular values)
    double residualNormSq = 0;
    int rank = 0;           // numerical rank of J (unscaled)
    double condition = kNaN;  // s_max / s_min of J (unscaled); inf when rank-deficient
    double rankCutoff = 0;  // scaled singular values below this count as zero
    Vector unscaledSingular;  // singular values of J, descending

    // Fills the linearisation from the reduced form and the scaling D (all entries > 0).
    void compute(const Reduced& point, const Vector& scale) {
        const Matrix& reduced = point.r;  // R, or J itself when there are fewer rows than parameters
        const Vector& qtr = point.qtr;
        const Eigen::Index m = point.rows, n = reduced.cols();
        residualNormSq = point.residualNormSq;
        Eigen::JacobiSVD<Matrix> plain(reduced);
        unscaledSingular = plain.singularValues();
        const double sMax = unscaledSingular.size() ? unscaledSingular[0] : 0.0;
        const double tol = sMax * kEps * static_cast<double>(std::max(m, n));
        rank = 0;
        for (Eigen::Index i = 0; i < unscaledSingular.size(); ++i)
            if (unscaledSingular[i] > tol) ++rank;
        const double sMin = unscaledSingular.size() == n ? unscaledSingular[n - 1] : 0.0;
        condition = sMin > 0 ? sMax / sMin : std::numeric_limits<double>::infinity();

        Matrix scaled = reduced * scale.cwiseInverse().asDiagonal();
        Eigen::JacobiSVD<Matrix> svd(scaled, Eigen::ComputeThinU | Eigen::ComputeFullV);
        singular = svd.singularValues();
        v = svd.matrixV();
        projected = svd.matrixU().transpose() * qtr;
        const double scaledMax = singular.size() ? singular[0] : 0.0;
        rankCutoff = scaledMax * kEps * static_cast<double>(std::max(m, n));
    }

    // Scaled step z(lambda); lambda = 0 gives the minimum-norm Gauss-Newton step.
    Vector scaledStep(double lambda) const {
        Vector coefficients = Vector::Zero(v.cols());
        for (Eigen::Index i = 0; i < singular.size(); ++i) {
            const double s = singular[i];
            if (s <= rankCutoff) continue;
            coefficients[i] = -s * projected[i] / (s * s + lambda);
        }
        return v * coefficients;
    }

    double scaledStepNorm(double lambda, double* derivative = nullptr) const {
        double sq = 0, dsq = 0;
        for (Eigen::Index i = 0; i < singular.size(); ++i) {
            const double s = singular[i];
            if (s <= rankCutoff) continue;
            const double denom = s * s + lambda;
            const double term = s * projected[i] / denom;
            sq += term * term;
            dsq -= 2.0 * term * term / denom;  // d/dlambda of term^2
        }
        const double norm = std::sqrt(sq);
        if (derivative) *derivative = norm > 0 ? dsq / (2.0 * norm) : 0.0;
        return norm;
    }

    // |A z|^2 = |J p|^2 for a scaled step z.
    double modelDecreaseTerm(const Vector& z) const {
        Vector vz = v.transpose() * z;
        double sq = 0;
        for (Eigen::Index i = 0; i < singular.size(); ++i) sq += singular[i] * singular[i] * vz[i] * vz[i];
        return sq;
    }
};

// The lambda >= 0 with |z(lambda)| = radius within a relative tolerance (Moré 1978, Sec. 5):
// Newton's method on phi(lambda) = 1/radius - 1/|z(lambda)|, which is nearly linear in lambda
// (Hebden 1973), safeguarded inside [lower, upper] with upper = |A'c| / radius.
double dampingForRadius(const Linearization& lin, double radius, double tolerance) {
    double upper = 0;
    for (Eigen::Index i = 0; i < lin.singular.size(); ++i)
        upper = std::hypot(upper, lin.singular[i] * lin.projected[i]);
    upper /= radius;
    double lower = 0;
    double lambda = std::max(upper * 1e-3, std::numeric_limits<double>::min());
    for (int iteration = 0; iteration < 60; ++iteration) {
        double derivative = 0;
        const double norm = lin.scaledStepNorm(lambda, &derivative);
        if (std::fabs(norm - radius) <= tolerance * radius) break;
        if (norm > radius) lower = lambda;
        else upper = lambda;
        // phi = 1/radius - 1/norm; phi' = derivative / norm^2
        double next = (derivative < 0 && norm > 0) ? lambda - (1.0 / radius - 1.0 / norm) * norm * norm / derivative
                                                   : 0.5 * (lower + upper);
        if (!(next > lower && next < upper)) next = std::max(0.5 * (lower + upper), std::sqrt(lower * upper));
        if (!(next > 0)) next = 0.5 * (lower + upper);
        lambda = next;
    }
    return lambda;
}

void fillJacobianFacts(IterationRecord& record, const Linearization& lin) {
    record.jacobianRank = lin.rank;
    record.jacobianCondition = lin.condition;
}

std::string singularValueText(const Vector& s) {
    std::string t;
    for (Eigen::Index i = 0; i < s.size(); ++i) t += (i ? ", " : "") + shortNumber(s[i]);
    return t;
}

// ---------------------------------------------------------------------------------------
// Levenberg-Marquardt: Moré, "The Levenberg-Marquardt algorithm: implementation and theory",
// Numerical Analysis, Lecture Notes in Mathematics 630 (1978), the algorithm of MINPACK's
// lmder: a trust region |D p| <= radius in scaled variables, D_ii = max over iterations of
// the column norms of J, lambda found for the radius, radius updated from rho.

struct LevenbergMarquardtOptions {
    // radius_0 = factor * |D x_0| (factor when x_0 = 0). MINPACK suggests 100; we start at 1,
    // which keeps the first steps from far starts on the data's scale (NIST StRD BoxBOD from
    // start 1 jumps onto a plateau with 100 and converges with 1).
    double initialRadiusFactor = 1;
    double reductionBelow = 1e-15;      // relative reduction of |r|^2, actual and predicted
    double scaledRadiusBelow = 1e-15;   // radius <= this * |D x|
    double columnCosineBelow = 0;       // max_j |J_j'r| / (|J_j| |r|) <= this (0 = off)
    double acceptRatio = 1e-4;          // rho above which a step is accepted
    double radiusTolerance = 0.1;       // |D p| within (1 +- this) radius
    // D from the column norms of J (Moré 1978; MINPACK mode 1), or D = I (MINPACK mode 2 with
    // unit diag: the region is a plain ball in the parameters).
    bool columnScaling = true;
};

class LevenbergMarquardt final : public MethodState {
public:
    explicit LevenbergMarquardt(LevenbergMarquardtOptions options) : options_(options) {}

    void start(Evaluator& eval, State& state) override {
        evaluateWithJacobian(eval, state);
        scale_ = options_.columnScaling ? point_.columnNorms() : Vector::Ones(state.x.size());
        const double xNorm = (scale_.asDiagonal() * state.x).norm();
        radius_ = xNorm > 0 ? options_.initialRadiusFactor * xNorm : options_.initialRadiusFactor;
    }

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        record.dampingName = "lambda";
        record.stepKind = StepKind::LevenbergMarquardt;
        record.stepLength = 1;
        Linearization lin;
        lin.compute(point_, scale_);
        fillJacobianFacts(record, lin);
        record.trustRadius = radius_;
        const double fnormSq = lin.residualNormSq;

        if (fnormSq == 0) {
            record.note = "all residuals are zero";
            return {Termination::ZeroResiduals, "converged: every residual is exactly zero"};
        }
        if (options_.columnCosineBelow > 0) {
            const double cosine = maxColumnCosine();
            if (cosine <= options_.columnCosineBelow)
                return {Termination::ColumnCosineBelow,
                        "converged: residuals orthogonal to the Jacobian's columns (largest cosine " +
                            shortNumber(cosine) + " <= column_cosine_below " +
                            shortNumber(options_.columnCosineBelow) + ")"};
        }

        double lambda = 0;
        Vector z = lin.scaledStep(0);
        if (z.norm() > (1.0 + options_.radiusTolerance) * radius_) {
            lambda = dampingForRadius(lin, radius_, options_.radiusTolerance);
            z = lin.scaledStep(lambda);
        }
        const Vector step = z.cwiseQuotient(scale_);
        const double stepScaledNorm = z.norm();
        if (iterationsDone_ == 0) radius_ = std::min(radius_, std::max(stepScaledNorm, 1e-300));
        record.damping = lambda;
        record.step = step;

        // Predicted relative reduction of |r|^2 from the normal equations of the damped step:
        // |r|^2 - |r + J p|^2 = |J p|^2 + 2 lambda |D p|^2 (Moré 1978, eq. 4.4).
        const double jpSq = lin.modelDecreaseTerm(z);
        const double predicted = (jpSq + 2.0 * lambda * stepScaledNorm * stepScaledNorm) / fnormSq;
        const double directional = -(jpSq + lambda * stepScaledNorm * stepScaledNorm) / fnormSq;
        record.predictedDecrease = 0.5 * predicted * fnormSq;

        // The trial point is evaluated with its Jacobian (reduced to R) in one pass (the compiled
        // programs share the model's subexpressions): most steps are accepted, and an accepted
        // step then needs no second pass over the rows.
        const Vector trial = state.x + step;
        Reduced trialPoint;
        const double trialValue = evaluateReduced(eval, trial, trialPoint);
        const bool finite = !eval.sawNonFinite();
        if (!finite) eval.clearNonFinite();
        const double trialNormSq = finite ? trialPoint.residualNormSq : std::numeric_limits<double>::infinity();
        // Actual relative reduction; MINPACK sets it to -1 when the sum of squares grows tenfold.
        const double actual = (finite && 0.1 * std::sqrt(trialNormSq) < std::sqrt(fnormSq))
                                  ? 1.0 - trialNormSq / fnormSq
                                  : -1.0;
        const double rho = predicted > 0 ? actual / predicted : 0.0;
        record.ratio = rho;
        record.actualDecrease = finite ? 0.5 * (fnormSq - trialNormSq) : kNaN;

        // Radius update (MINPACK lmder, after Moré 1978 Sec. 6).
        std::string radiusNote;
        if (rho <= 0.25) {
            double shrink = actual >= 0 ? 0.5 : 0.5 * directional / (directional + 0.5 * actual);
            if (!finite || 0.1 * std::sqrt(trialNormSq) >= std::sqrt(fnormSq) || shrink < 0.1) shrink = 0.1;
            radius_ = shrink * std::min(radius_, stepScaledNorm / 0.1);
            radiusNote = "radius reduced";
        } else if (lambda == 0 || rho >= 0.75) {
            radius_ = stepScaledNorm / 0.5;
            radiusNote = "radius enlarged";
        }

        const bool accepted = finite && rho >= options_.acceptRatio;
        record.accepted = accepted;
        if (accepted) {
            state.x = trial;
            state.value = trialValue;
            point_ = std::move(trialPoint);
            state.gradient = point_.gradient();
            if (options_.columnScaling) scale_ = scale_.cwiseMax(point_.columnNorms());
            ++iterationsDone_;
        }
        record.note = std::string(accepted ? "step accepted" : "step rejected") +
                      (finite ? "" : " (residuals not finite at the trial point)") +
                      (lambda == 0 ? "; Gauss-Newton step inside the region" : "") +
                      (radiusNote.empty() ? "" : "; " + radiusNote);

        // Convergence tests of MINPACK lmder (info 1, 2, 6, 7), in Moré's scaled norms.
        const double xScaledNorm = (scale_.asDiagonal() * state.x).norm();
        const bool smallReduction = std::fabs(actual) <= options_.reductionBelow &&
                                    predicted <= options_.reductionBelow && 0.5 * rho <= 1.0;
        if (smallReduction)
            return {Termination::ReductionBelow,
                    "converged: relative reduction of the sum of squares (actual " + shortNumber(std::fabs(actual)) +
                        ", predicted " + shortNumber(predicted) + ") <= reduction_below " +
                        shortNumber(options_.reductionBelow)};
        if (radius_ <= options_.scaledRadiusBelow * xScaledNorm)
            return {Termination::ScaledRadiusBelow, "converged: trust radius " + shortNumber(radius_) +
                                                        " <= scaled_radius_below x |D x| = " +
                                                        shortNumber(options_.scaledRadiusBelow * xScaledNorm)};
        if (std::fabs(actual) <= kEps && predicted <= kEps && 0.5 * rho <= 1.0)
            return {Termination::RoundingLimit,
                    "converged: no further reduction of the sum of squares is possible in double precision"};
        if (radius_ <= kEps * xScaledNorm)
            return {Termination::RoundingLimit,
                    "converged: no further improvement of the parameters is possible in double precision"};
        if (!(radius_ > 0) || !std::isfinite(radius_))
            return {Termination::TrustRegionCollapsed, "the trust region collapsed (radius " + shortNumber(radius_) + ")"};
        return {};
    }

private:
    void evaluateWithJacobian(Evaluator& eval, State& state) {
        state.value = evaluateReduced(eval, state.x, point_);
        state.gradient = point_.gradient();
    }

    // max_j |J_j'r| / (|J_j| |r|), from R and Q'r: J_j'r = (R'Q'r)_j and |J_j| = |R_j|.
    double maxColumnCosine() const {
        const double rn = std::sqrt(point_.residualNormSq);
        const Vector jtr = point_.gradient();
        double worst = 0;
        for (Eigen::Index j = 0; j < point_.r.cols(); ++j) {
            const double cn = point_.r.col(j).norm();
            if (cn > 0) worst = std::max(worst, std::fabs(jtr[j]) / (cn * rn));
        }
        return worst;
    }

    LevenbergMarquardtOptions options_;
    Reduced point_;  // r at state.x, reduced
    Vector scale_;
    double radius_ = 1;
    int iterationsDone_ = 0;
};

// ---------------------------------------------------------------------------------------
// Gauss-Newton: the direction is the minimum-norm least-squares solution of J d = -r
// (rank-revealing, via the same QR + SVD), globalised by a backtracking Armijo line search
// on f = 1/2 |r|^2 (Nocedal & Wright 2006, Sec. 10.3). A direction that is not a descent
// direction falls back to steepest descent, and the record says so.

class GaussNewton final : public MethodState {
public:
    explicit GaussNewton(LineSearchSettings settings, double reductionBelow)
        : settings_(settings), reductionBelow_(reductionBelow) {}

    void start(Evaluator& eval, State& state) override { evaluateWithJacobian(eval, state); }

    StepOutcome iterate(Evaluator& eval, State& state, IterationRecord& record) override {
        Linearization lin;
        const Eigen::Index n = point_.r.cols();
        const Vector unit = Vector::Ones(n);
        lin.compute(point_, unit);
        fillJacobianFacts(record, lin);
        if (lin.residualNormSq == 0) return {Termination::ZeroResiduals, "converged: every residual is exactly zero"};
        Vector direction = lin.scaledStep(0);
        record.stepKind = StepKind::GaussNewton;
        if (lin.rank < n)
            record.note = "J is rank-deficient (rank " + std::to_string(lin.rank) + " of " +
                          std::to_string(n) + "; singular values " +
                          singularValueText(lin.unscaledSingular) + "): minimum-norm direction";
        if (!(direction.dot(state.gradient) < 0)) {
            direction = -state.gradient;
            record.stepKind = StepKind::Gradient;
            record.note += std::string(record.note.empty() ? "" : "; ") +
                           "Gauss-Newton direction is not a descent direction: steepest descent instead";
        }
        const double predicted = lin.modelDecreaseTerm(direction) / lin.residualNormSq;
        const double before = state.value;
        StepOutcome outcome = searchAndMove(eval, state, record, direction, LineSearchKind::Armijo, settings_);
        if (outcome.termination != Termination::Running) return outcome;
        evaluateWithJacobian(eval, state);
        record.damping = kNaN;
        const double actual = before > 0 ? (before - state.value) / before : 0.0;
        if (reductionBelow_ > 0 && std::fabs(actual) <= reductionBelow_ && predicted <= reductionBelow_)
            return {Termination::ReductionBelow,
                    "converged: relative reduction of the sum of squares (actual " + shortNumber(std::fabs(actual)) +
                        ", predicted " + shortNumber(predicted) + ") <= reduction_below " +
                        shortNumber(reductionBelow_)};
        return {};
    }

private:
    void evaluateWithJacobian(Evaluator& eval, State& state) {
        state.value = evaluateReduced(eval, state.x, point_);
        state.gradient = point_.gradient();
    }

    LineSearchSettings settings_;
    double reductionBelow_;
    Reduced point_;  // r at state.x, reduced
};

}  // namespace

std::vector<MethodRegistration> leastSquaresMethods() {
    std::vector<MethodRegistration> list;

    {
        MethodRegistration lm;
        lm.info.id = "levenberg-marquardt";
        lm.info.family = "least-squares";
        lm.info.summary = "Levenberg-Marquardt in Moré's scaled trust-region form (needs residuals)";
        lm.info.needsGradient = true;
        lm.info.needsResiduals = true;
        lm.info.options = {
            realOption("initial_radius_factor", "first trust radius = factor x |D x0| (factor when x0 = 0)", 1, 0,
                       std::numeric_limits<double>::infinity(), true, false),
            formerlyNamed(realOption("reduction_below",
                                     "stop when the relative reduction of the sum of squares, actual and predicted, "
                                     "is at most this",
                                     1e-15, 0, 1, false, true),
                          "function_tolerance"),
            formerlyNamed(realOption("scaled_radius_below", "stop when the trust radius is at most this x |D x|", 1e-15,
                                     0, 1, false, true),
                          "step_tolerance"),
            formerlyNamed(realOption("column_cosine_below",
                                     "stop when the cosine between r and every column of J is at most this (0 = off)",
                                     0, 0, 1, false, true),
                          "orthogonality_tolerance"),
            realOption("accept_ratio", "accept a step when rho is at least this", 1e-4, 0, 0.25, false, true),
            choiceOption("scaling",
                         "jacobian: the region is scaled by the largest column norms of J seen so far (Moré); "
                         "none: a plain ball in the parameters",
                         {"jacobian", "none"}, 0),
        };
        lm.make = [specs = lm.info.options](const OptionValues& values) -> std::unique_ptr<MethodState> {
            LevenbergMarquardtOptions o;
            o.initialRadiusFactor = optionNumber(specs, values, "initial_radius_factor");
            o.reductionBelow = optionNumber(specs, values, "reduction_below");
            o.scaledRadiusBelow = optionNumber(specs, values, "scaled_radius_below");
            o.columnCosineBelow = optionNumber(specs, values, "column_cosine_below");
            o.acceptRatio = optionNumber(specs, values, "accept_ratio");
            o.columnScaling = optionChoice(specs, values, "scaling") == "jacobian";
            return std::make_unique<LevenbergMarquardt>(o);
        };
        list.push_back(std::move(lm));
    }
    {
        MethodRegistration gn;
        gn.info.id = "gauss-newton";
        gn.info.family = "least-squares";
        gn.info.summary = "Gauss-Newton direction (minimum-norm, via QR) with a backtracking line search";
        gn.info.needsGradient = true;
        gn.info.needsResiduals = true;
        gn.info.options = lineSearchOptionSpecs(0.9);
        gn.info.options.erase(std::remove_if(gn.info.options.begin(), gn.info.options.end(),
                                             [](const OptionSpec& s) { return s.name == "curvature"; }),
                              gn.info.options.end());
        gn.info.options.push_back(formerlyNamed(realOption("reduction_below",
                                                           "stop when the relative reduction of the sum of squares, "
                                                           "actual and predicted, is at most this",
                                                           1e-12, 0, 1, false, true),
                                                "function_tolerance"));
        gn.make = [specs = gn.info.options](const OptionValues& values) -> std::unique_ptr<MethodState> {
            LineSearchSettings s;
            s.sufficientDecrease = optionNumber(specs, values, "sufficient_decrease");
            s.backtrackFactor = optionNumber(specs, values, "backtrack_factor");
            s.maxTrials = static_cast<int>(optionNumber(specs, values, "max_trials"));
            return std::make_unique<GaussNewton>(s, optionNumber(specs, values, "reduction_below"));
        };
        list.push_back(std::move(gn));
    }
    return list;
}

}  // namespace sw::solve
