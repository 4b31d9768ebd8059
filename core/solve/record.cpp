// Names of record enums, and the classification of an end point by its Hessian.
#include "core/solve/record.h"

#include <Eigen/Eigenvalues>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
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
        case Termination::GradientTolerance: return "gradient-norm-below";
        case Termination::StepTolerance: return "relative-step-below";
        case Termination::FunctionTolerance: return "relative-change-below";
        case Termination::GradientRatioBelow: return "gradient-ratio-below";
        case Termination::ReductionBelow: return "reduction-below";
        case Termination::ScaledRadiusBelow: return "scaled-radius-below";
        case Termination::ColumnCosineBelow: return "column-cosine-below";
        case Termination::ZeroResiduals: return "zero-residuals";
        case Termination::RoundingLimit: return "rounding-limit";
        case Termination::SimplexSizeBelow: return "simplex-size-below";
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
    switch (t) {
        case Termination::GradientTolerance:
        case Termination::StepTolerance:
        case Termination::FunctionTolerance:
        case Termination::GradientRatioBelow:
        case Termination::ReductionBelow:
        case Termination::ScaledRadiusBelow:
        case Termination::ColumnCosineBelow:
        case Termination::ZeroResiduals:
        case Termination::RoundingLimit:
        case Termination::SimplexSizeBelow: return true;
        default: return false;
    }
}

const char* describe(PointKind k) {
    switch (k) {
        case PointKind::Unknown: return "not classified";
        case PointKind::Minimum: return "local minimum";
        case PointKind::Saddle: return "saddle";
        case PointKind::Maximum: return "local maximum";
        case PointKind::Degenerate: return "degenerate point";
        case PointKind::NotCritical: return "not a critical point";
    }
    return "not classified";
}

const char* toString(PointKind k) {
    switch (k) {
        case PointKind::Unknown: return "unknown";
        case PointKind::Minimum: return "minimum";
        case PointKind::Saddle: return "saddle";
        case PointKind::Maximum: return "maximum";
        case PointKind::Degenerate: return "degenerate";
        case PointKind::NotCritical: return "not-critical";
    }
    return "unknown";
}

namespace {
// Appends v with `digits` significant digits (to_chars: locale-free, shortest that fits).
void appendNumber(std::string& out, double v, int digits) {
    if (std::isnan(v)) {
        out += "nan";
    } else if (std::isinf(v)) {
        out += v > 0 ? "inf" : "-inf";
    } else {
        char buffer[32];
        auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, v, std::chars_format::general, digits);
        if (ec == std::errc()) out.append(buffer, ptr);
        else out += '?';
    }
}

std::string listOf(const Vector& values) {
    std::string text;
    const Eigen::Index shown = std::min<Eigen::Index>(values.size(), 8);
    for (Eigen::Index i = 0; i < shown; ++i) text += (i ? ", " : "") + shortNumber(values[i]);
    if (values.size() > shown) text += ", ... (" + std::to_string(values.size()) + " in all)";
    return text;
}
}  // namespace

std::string shortNumber(double value, int digits) {
    std::string text;
    appendNumber(text, value, digits);
    return text;
}

double IterationRecord::angleToSteepestDescent() const {
    if (step.size() != gradient.size() || step.size() == 0) return kNaN;
    const double sn = step.norm(), gn = gradient.norm();
    if (!(sn > 0) || !(gn > 0) || !std::isfinite(sn) || !std::isfinite(gn)) return kNaN;
    // 2 atan2(|u - v|, |u + v|) for unit u = s/|s|, v = -g/|g| keeps its accuracy near 0 and
    // 180 degrees, where acos does not.
    double difference = 0, sum = 0;
    for (Eigen::Index i = 0; i < step.size(); ++i) {
        const double u = step[i] / sn, v = -gradient[i] / gn;
        difference += (u - v) * (u - v);
        sum += (u + v) * (u + v);
    }
    return 2.0 * std::atan2(std::sqrt(difference), std::sqrt(sum)) * 180.0 / 3.14159265358979323846;
}

// ---- Note -----------------------------------------------------------------------------

Note& Note::operator=(const char* text) {
    text_ = text;
    parts_ = 0;
    return *this;
}

Note& Note::operator=(std::string text) {
    text_ = std::move(text);
    parts_ = 0;
    return *this;
}

Note& Note::operator+=(std::string_view more) {
    render();
    text_ += more;
    return *this;
}

void Note::add(const char* pattern, double a, double b, double c) {
    if (!pattern || !*pattern) return;
    if (parts_ == static_cast<int>(deferred_.size())) render();
    deferred_[static_cast<std::size_t>(parts_++)] = Part{pattern, {a, b, c}};
}

void Note::clear() {
    text_.clear();
    parts_ = 0;
}

std::string Note::text() const {
    if (parts_ == 0) return text_;
    std::string out = text_;
    for (int i = 0; i < parts_; ++i) {
        if (!out.empty()) out += "; ";
        append(out, deferred_[static_cast<std::size_t>(i)]);
    }
    return out;
}

void Note::render() {
    if (parts_ == 0) return;
    text_ = text();
    parts_ = 0;
}

// "{}" takes the next number with 6 significant digits, "{3}" with 3.
void Note::append(std::string& out, const Part& part) {
    std::size_t next = 0;
    for (const char* p = part.pattern; *p; ++p) {
        if (*p == '{' && next < part.numbers.size()) {
            const char* close = p + 1;
            int digits = 0;
            while (*close >= '0' && *close <= '9') digits = digits * 10 + (*close++ - '0');
            if (*close == '}') {
                appendNumber(out, part.numbers[next++], digits > 0 ? digits : 6);
                p = close;
                continue;
            }
        }
        out += *p;
    }
}

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
    // Relative to the Hessian alone: f scaled by 1e-150 has the same class as f.
    end.tolerance = relativeTolerance * largest;
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
        end.description = "local minimum (" + eig + ")";
    } else if (positive == 0) {
        end.kind = PointKind::Maximum;
        end.description = "local maximum (" + eig + ")";
    } else {
        end.kind = PointKind::Saddle;
        end.description = "saddle of index " + std::to_string(negative) + " (" + eig + ")";
    }
    end.curvature = end.kind;
    return end;
}

namespace {

const char* nonFiniteWord(double v) { return std::isnan(v) ? "nan" : (v > 0 ? "inf" : "-inf"); }

EndPoint notClassified(std::string reason) {
    EndPoint end;
    end.kind = PointKind::Unknown;
    end.critical = false;
    end.reason = reason;
    end.description = "not classified: " + reason;
    return end;
}

}  // namespace

EndPoint classifyEndPoint(const Matrix& hessian, const Vector& x, double value, const Vector& gradient) {
    // Nothing is claimed from numbers that are not finite (a diverged run's end, value inf).
    if (!x.allFinite()) return notClassified("the end point is not finite");
    if (!std::isfinite(value))
        return notClassified(std::string("the value at the end point is ") + nonFiniteWord(value));
    if (gradient.size() != x.size()) return notClassified("no gradient at the end point");
    if (!gradient.allFinite()) return notClassified("the gradient at the end point is not finite");
    EndPoint end = classifyPoint(hessian);
    if (end.curvature == PointKind::Unknown) {
        end.reason = end.description.rfind("not classified: ", 0) == 0 ? end.description.substr(16) : end.description;
        return end;
    }
    // Stationarity that does not scale with f: the distance to the stationary point of the
    // local quadratic model, |H^+ g|, with eigenvalues below 1e-8 max|lambda| raised to that
    // floor (a direction without curvature but with slope is then far, not infinitely near).
    // Multiplying f by c multiplies g and H by c and leaves the distance unchanged.
    Eigen::SelfAdjointEigenSolver<Matrix> eigen(hessian);
    double distanceSquared = 0;
    if (eigen.info() == Eigen::Success) {
        const Vector& lambda = eigen.eigenvalues();
        const double largest = lambda.cwiseAbs().maxCoeff();
        const double floor = 1e-8 * largest;
        const Vector slope = eigen.eigenvectors().transpose() * gradient;
        for (Eigen::Index i = 0; i < lambda.size(); ++i) {
            const double curvature = std::max(std::abs(lambda[i]), floor);
            if (slope[i] == 0) continue;
            const double d = curvature > 0 ? slope[i] / curvature : std::numeric_limits<double>::infinity();
            distanceSquared += d * d;
        }
    } else {
        distanceSquared = std::numeric_limits<double>::infinity();
    }
    end.stationaryDistance = std::sqrt(distanceSquared);
    end.stationaryBound = kStationaryRelativeDistance * (1.0 + x.norm());
    if (end.stationaryDistance <= end.stationaryBound) {
        end.critical = true;
        return end;
    }
    end.kind = PointKind::NotCritical;
    end.critical = false;
    std::string curvatureText = toString(end.curvature);
    if (end.curvature == PointKind::Saddle) curvatureText += " of index " + std::to_string(end.index);
    end.reason = std::isfinite(end.stationaryDistance)
                     ? "gradient norm " + shortNumber(gradient.norm()) +
                           "; the stationary point of the local quadratic model is " +
                           shortNumber(end.stationaryDistance, 3) + " away (more than 1e-3 (1 + |x|) = " +
                           shortNumber(end.stationaryBound, 3) + ")"
                     : "gradient norm " + shortNumber(gradient.norm()) +
                           " where the Hessian has no curvature (the local model has no stationary point)";
    end.description = "not a critical point: " + end.reason + "; the curvature there is that of a " +
                      (end.curvature == PointKind::Minimum || end.curvature == PointKind::Maximum ? "local " : "") + curvatureText +
                      " (eigenvalues " + listOf(end.eigenvalues) + ")";
    return end;
}

}  // namespace sw::solve
