// Every method over objective scales 1e-150 ... 1e150: a run never claims convergence unless
// its stopping test held with finite numbers, and an end point is classified (minimum, saddle,
// ...) only where it is a critical point. Multiplying f by a constant changes neither the
// minimiser nor the critical points, so the truth is known at every scale.
//
// Minimisers: s ((x - 1)^2 + 2 (y + 0.5)^2 + 0.5 (x - 1)(y + 0.5)) at (1, -0.5) (worked by
// hand: the quadratic form is positive definite, eigenvalues of [[2, .5], [.5, 4]] > 0);
// Rosenbrock (1960) s (100 (y - x^2)^2 + (1 - x)^2) at (1, 1). The least-squares line fit
// y = a + b t with weights s has the ordinary least-squares solution computed here from the
// normal equations (common practice, no published source).
#include "core/objective/fit_objective.h"
#include "core/objective/formula_objective.h"
#include "core/solve/method.h"

#include <gtest/gtest.h>

#include <cmath>
#include <memory>
#include <string>
#include <vector>

namespace sw::solve {
namespace {

const std::vector<std::string> kScales = {"1e-150", "1e-100", "1e-50", "1e-10", "1", "1e10", "1e50", "1e100", "1e150"};

struct Truth {
    double x, y;
};

bool near(const Vector& x, const Truth& t, double tolerance) {
    return x.allFinite() && std::abs(x[0] - t.x) <= tolerance * (1 + std::abs(t.x)) &&
           std::abs(x[1] - t.y) <= tolerance * (1 + std::abs(t.y));
}

// What every run at every scale must honour. Returns "" or what went wrong.
std::string checkHonest(const solve::Run& run, const Truth& truth, const StoppingRules& rules) {
    const std::string where = run.methodId + ": " + toString(run.termination) + " - " + run.message + "; end point " +
                              run.endPoint.description;
    if (!run.finished()) return "not finished: " + where;
    if (isConvergence(run.termination)) {
        if (!std::isfinite(run.value) || !run.x.allFinite() || !std::isfinite(run.gradientNorm))
            return "claims convergence with non-finite numbers: " + where;
        if (run.termination == Termination::GradientTolerance && !(run.gradientNorm <= rules.gradientTolerance))
            return "gradient convergence without the gradient test: " + where;
        // Converged at the minimiser, or a test held elsewhere (an absolute gradient tolerance
        // on a tiny objective, steps below the rounding of x) and the run says the end point
        // is not critical.
        if (!near(run.x, truth, 1e-3) &&
            !(run.endPoint.kind == PointKind::NotCritical && run.message.find("not a critical point") != std::string::npos))
            return "claims convergence away from the minimiser: " + where;
    }
    const PointKind kind = run.endPoint.kind;
    if (kind != PointKind::Unknown && kind != PointKind::NotCritical) {
        if (!run.endPoint.critical) return "a class without the critical flag: " + where;
        if (!near(run.x, truth, 1e-3)) return "a class at a point that is not critical: " + where;
        if (kind != PointKind::Minimum) return "the minimiser classified as " + std::string(toString(kind)) + ": " + where;
    }
    if (kind == PointKind::NotCritical && run.endPoint.reason.empty()) return "not critical without a reason: " + where;
    if ((run.termination == Termination::NonFinite || !std::isfinite(run.value)) &&
        kind != PointKind::Unknown)
        return "a non-finite end classified: " + where;
    return "";
}

// With the default gradient tolerance (1e-8, absolute) and with none (0: the other tests
// decide, including the rounding tests whose floor used to be 1 whatever the scale of f).
void sweepFormula(const std::string& shape, const Vector& start, const Truth& truth, int maxIterations) {
    int runs = 0;
    for (double gradientTolerance : {1e-8, 0.0}) {
        StoppingRules rules;
        rules.maxIterations = maxIterations;
        rules.gradientTolerance = gradientTolerance;
        rules.spectrumMaxDimension = 0;  // the sweep checks ends, not per-record spectra
        for (const MethodInfo& info : methods()) {
            if (info.needsResiduals) continue;
            for (const std::string& scale : kScales) {
                const FormulaObjective f(scale + "*(" + shape + ")", {"x", "y"});
                const solve::Run run = solve(info.id, f, start, {}, rules);
                const std::string problem = checkHonest(run, truth, rules);
                EXPECT_EQ(problem, "") << "scale " << scale << ", gradient tolerance " << gradientTolerance;
                ++runs;
            }
        }
    }
    EXPECT_EQ(runs, 2 * 18 * static_cast<int>(kScales.size()));
}

TEST(ExtremeScales, QuadraticEveryMethodEveryScaleIsHonest) {
    sweepFormula("(x-1)^2 + 2*(y+0.5)^2 + 0.5*(x-1)*(y+0.5)", Vector::Zero(2), {1, -0.5}, 3000);
}

TEST(ExtremeScales, RosenbrockEveryMethodEveryScaleIsHonest) {
    Vector start(2);
    start << -1.2, 1;
    sweepFormula("100*(y-x^2)^2 + (1-x)^2", start, {1, 1}, 3000);
}

TEST(ExtremeScales, LeastSquaresMethodsOnAWeightedLineAtEveryScale) {
    // y = a + b t on 8 rows; the weight column w = s scales f by s and keeps the minimiser.
    std::vector<double> t, y;
    for (int i = 0; i < 8; ++i) {
        t.push_back(i);
        y.push_back(1.0 + 2.0 * i + ((i % 3) - 1) * 0.25);
    }
    double st = 0, sy = 0, stt = 0, sty = 0;
    for (int i = 0; i < 8; ++i) {
        st += t[i];
        sy += y[i];
        stt += t[i] * t[i];
        sty += t[i] * y[i];
    }
    const double b = (8 * sty - st * sy) / (8 * stt - st * st), a = (sy - b * st) / 8;
    for (const std::string& id : {std::string("levenberg-marquardt"), std::string("gauss-newton")}) {
        for (const std::string& scale : kScales) {
            auto table = std::make_shared<Table>();
            table->columnNames = {"t", "y", "w"};
            table->columns = {t, y, std::vector<double>(8, std::stod(scale))};
            FitDefinition definition;
            definition.model = "a + b*t";
            definition.response = "y";
            definition.parameters = {"a", "b"};
            definition.loss = Loss::Weighted;
            definition.weights = "w";
            const FitObjective f(table, definition);
            StoppingRules rules;
            rules.maxIterations = 500;
            rules.gradientTolerance = 0;
            const solve::Run run = solve(id, f, Vector::Zero(2), {}, rules);
            EXPECT_EQ(checkHonest(run, {a, b}, rules), "") << "scale " << scale;
            EXPECT_TRUE(isConvergence(run.termination)) << id << " scale " << scale << ": " << run.message;
        }
    }
}

// The probe's case: at f = 1e150 (x^2 + y^2) the CG curvature d'Bd = 1e450 overflowed, the
// step came out 0 and the run "converged on step" at the start.
TEST(ExtremeScales, TrustRegionCgTakesARealStepAt1e150) {
    const FormulaObjective f("1e150*(x^2+y^2)", {"x", "y"});
    const solve::Run run = solve("trust-region-cg", f, Vector::Ones(2));
    ASSERT_TRUE(isConvergence(run.termination)) << run.message;
    EXPECT_LT(run.x.norm(), 1e-6) << run.message;
    EXPECT_EQ(run.endPoint.kind, PointKind::Minimum) << run.endPoint.description;
    EXPECT_TRUE(run.endPoint.critical);
}

// A diverged run (value inf) is not classified at all, however its Hessian looks.
TEST(ExtremeScales, ADivergedMomentumRunHasNoEndPointClass) {
    const FormulaObjective f("1e50*(x^2+y^2)", {"x", "y"});
    const solve::Run run = solve("momentum", f, Vector::Ones(2));
    ASSERT_EQ(run.termination, Termination::NonFinite) << run.message;
    EXPECT_EQ(run.endPoint.kind, PointKind::Unknown) << run.endPoint.description;
    EXPECT_FALSE(run.endPoint.critical);
    EXPECT_FALSE(run.endPoint.reason.empty());
}

// The stationarity test does not scale with f: the same point is critical or not at every
// scale, and a tiny objective passing the absolute gradient test is still "not critical".
TEST(ExtremeScales, StationarityTestIsTheSameAtEveryScale) {
    Matrix h(2, 2);
    h << 2, 0.5, 0.5, 4;
    Vector x(2), g(2);
    x << 0.3, -0.2;
    g << 1.0, -0.7;
    for (double scale : {1e-150, 1e-20, 1.0, 1e20, 1e150}) {
        const EndPoint end = classifyEndPoint(scale * h, x, scale * 3.0, scale * g);
        EXPECT_EQ(end.kind, PointKind::NotCritical) << scale;
        EXPECT_EQ(end.curvature, PointKind::Minimum) << scale;
        EXPECT_NEAR(end.stationaryDistance, (h.inverse() * g).norm(), 1e-12) << scale;
        const EndPoint atMinimum = classifyEndPoint(scale * h, x, scale * 3.0, scale * 1e-9 * g);
        EXPECT_EQ(atMinimum.kind, PointKind::Minimum) << scale;
        EXPECT_TRUE(atMinimum.critical);
    }
    // A slope where the Hessian has no curvature at all: never critical.
    const EndPoint linear = classifyEndPoint(Matrix::Zero(2, 2), x, 1.0, g);
    EXPECT_EQ(linear.kind, PointKind::NotCritical);
    EXPECT_NE(linear.reason.find("no curvature"), std::string::npos) << linear.reason;
    // A constant function: every point is critical (degenerate).
    EXPECT_EQ(classifyEndPoint(Matrix::Zero(2, 2), x, 1.0, Vector::Zero(2)).kind, PointKind::Degenerate);
    // Non-finite numbers: no class.
    EXPECT_EQ(classifyEndPoint(h, x, std::numeric_limits<double>::infinity(), g).kind, PointKind::Unknown);
}

// Nelder-Mead ends by its own simplex test; a point where the gradient is far from zero is
// not called a saddle because the curvature there has a negative eigenvalue.
TEST(ExtremeScales, NelderMeadEndAwayFromStationarityIsNotClassified) {
    const FormulaObjective f("1e40*(x^2 - y^2 + 0.1*x^4 + 0.1*y^4)", {"x", "y"});
    StoppingRules rules;
    rules.maxIterations = 3;  // stopped early, wherever the simplex is
    Vector start(2);
    start << 0.5, 0.25;
    const solve::Run run = solve("nelder-mead", f, start, {}, rules);
    EXPECT_NE(run.endPoint.kind, PointKind::Saddle) << run.endPoint.description;
    EXPECT_EQ(run.endPoint.kind, PointKind::NotCritical) << run.endPoint.description;
}

}  // namespace
}  // namespace sw::solve
