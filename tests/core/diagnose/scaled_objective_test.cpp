// The poor-scaling remedy's objective in rescaled variables x = D u: chain rule by hand
// (grad_u = D grad_x, H_u = D H D, J_u = J D; common practice, no published source).
#include "core/diagnose/scaled_objective.h"
#include "core/objective/fit_objective.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

namespace sw::diagnose {
namespace {

Vector vec(std::initializer_list<double> v) {
    Vector x(static_cast<Eigen::Index>(v.size()));
    Eigen::Index i = 0;
    for (double d : v) x[i++] = d;
    return x;
}

TEST(ScaledObjective, ValueGradientAndHessianFollowTheChainRule) {
    const FormulaObjective f("((power - 1200)/400)^2 + 50*(duty - 0.00025*power - 0.05)^2", {"power", "duty"});
    const Vector scale = vec({100, 0.1});
    const ScaledObjective scaled(f, scale);
    const Vector u = vec({3, 9}), x = u.cwiseProduct(scale);
    Vector gx, gu;
    Matrix hx, hu;
    const double fx = f.valueGradientHessian(x, gx, hx);
    const double fu = scaled.valueGradientHessian(u, gu, hu);
    EXPECT_DOUBLE_EQ(fx, fu);
    EXPECT_DOUBLE_EQ(scaled.value(u), fx);
    EXPECT_NEAR((gu - scale.cwiseProduct(gx)).norm(), 0, 1e-12 * gx.norm());
    EXPECT_NEAR((hu - scale.asDiagonal() * hx * scale.asDiagonal()).norm(), 0, 1e-12 * hu.norm());
    // Central differences in u agree with the scaled gradient.
    for (int i = 0; i < 2; ++i) {
        Vector a = u, b = u;
        a[i] += 1e-5;
        b[i] -= 1e-5;
        EXPECT_NEAR((scaled.value(a) - scaled.value(b)) / 2e-5, gu[i], 1e-6 * (1 + std::abs(gu[i])));
    }
    EXPECT_TRUE(scaled.toOriginal(scaled.toScaled(x)).isApprox(x));
}

TEST(ScaledObjective, ResidualFactorIsTheOriginalTimesTheScale) {
    auto table = std::make_shared<Table>();
    table->columnNames = {"t", "y"};
    table->columns = {{0, 1, 2, 3, 4, 5}, {5.0, 3.1, 1.8, 1.2, 0.7, 0.4}};
    FitDefinition def;
    def.model = "a*exp(-k*t)";
    def.response = "y";
    def.parameters = {"a", "k"};
    const FitObjective fit(table, def);
    const Vector scale = vec({10, 0.1});
    const ScaledObjective scaled(fit, scale);
    const Vector u = vec({0.5, 5});
    Vector r, ru;
    Matrix j, ju;
    fit.residuals(u.cwiseProduct(scale), r, &j);
    scaled.residuals(u, ru, &ju);
    EXPECT_TRUE(ru.isApprox(r));
    EXPECT_TRUE(ju.isApprox(j * scale.asDiagonal()));
    Matrix rFactor;
    Vector qtr;
    double rss = 0;
    if (scaled.leastSquaresFactor(u, rFactor, qtr, rss)) {
        // R'R = J_u' J_u whatever the signs of R's rows.
        EXPECT_TRUE((rFactor.transpose() * rFactor).isApprox(ju.transpose() * ju, 1e-10));
        EXPECT_NEAR(rss, r.squaredNorm(), 1e-12);
    }
}

TEST(ScaledObjective, ARunMappedBackIsInTheOriginalVariables) {
    const FormulaObjective f("((power - 1200)/400)^2 + 50*(duty - 0.00025*power - 0.05)^2", {"power", "duty"});
    const Vector scale = vec({100, 0.1});
    const ScaledObjective scaled(f, scale);
    solve::StoppingRules rules;
    const solve::Run inU = solve::solve("bfgs", scaled, scaled.toScaled(vec({300, 0.9})), {}, rules);
    const solve::Run run = mapRunBack(inU, f, scale);
    // Minimum power = 1200, duty = 0.35 (solved by hand: both squares zero).
    EXPECT_NEAR(run.x[0], 1200, 1e-4);
    EXPECT_NEAR(run.x[1], 0.35, 1e-7);
    EXPECT_NEAR(run.trace.front().x[0], 300, 1e-12);
    EXPECT_EQ(run.endPoint.kind, solve::PointKind::Minimum);
    // Converged in u, it is a critical point in x too (the gradient in watts is larger than
    // the tolerance met in u; the stationarity test does not depend on units).
    EXPECT_TRUE(run.endPoint.critical) << run.endPoint.reason;
    Vector g;
    f.valueGradient(run.trace.back().x, g);
    EXPECT_NEAR(run.trace.back().gradientNorm, g.norm(), 1e-9 * (1 + g.norm()));
}

}  // namespace
}  // namespace sw::diagnose
