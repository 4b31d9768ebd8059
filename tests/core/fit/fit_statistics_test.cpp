// Fit statistics: standard errors, intervals and warnings on small invented tables.
// Reference formulas: ordinary least squares for a straight line, se(b1) = s / sqrt(Sxx),
// se(b0) = s sqrt(1/n + xbar^2 / Sxx), s^2 = RSS / (n - 2) (common practice, no published
// source); t quantile t(0.975, 4) = 2.7764451051977943578 computed with mpmath 1.2.1.
#include "core/fit/run_fit.h"

#include <gtest/gtest.h>

#include <cmath>
#include <memory>

using namespace sw;

namespace {

std::shared_ptr<Table> table(std::vector<std::string> names, std::vector<std::vector<double>> columns) {
    auto t = std::make_shared<Table>();
    t->columnNames = std::move(names);
    t->columns = std::move(columns);
    return t;
}

fit::FitResult fitLine(const std::shared_ptr<Table>& t) {
    fit::FitRequest request;
    request.definition.model = "b0 + b1*x";
    request.definition.response = "y";
    request.definition.parameters = {"b0", "b1"};
    request.start = {0.0, 0.0};
    return fit::runFit(t, request);
}

bool anyWarningContains(const std::vector<std::string>& warnings, const std::string& text) {
    for (const auto& w : warnings)
        if (w.find(text) != std::string::npos) return true;
    return false;
}

}  // namespace

TEST(FitStatistics, StraightLineMatchesTheTextbookFormulas) {
    const std::vector<double> x = {1, 2, 3, 4, 5, 6}, y = {2.1, 3.9, 6.2, 7.8, 10.1, 12.2};
    const fit::FitResult r = fitLine(table({"x", "y"}, {x, y}));
    const double n = 6, xbar = 3.5;
    double ybar = 0, sxx = 0, sxy = 0;
    for (double v : y) ybar += v / n;
    for (int i = 0; i < 6; ++i) {
        sxx += (x[i] - xbar) * (x[i] - xbar);
        sxy += (x[i] - xbar) * (y[i] - ybar);
    }
    const double b1 = sxy / sxx, b0 = ybar - b1 * xbar;
    double rss = 0;
    for (int i = 0; i < 6; ++i) rss += std::pow(y[i] - b0 - b1 * x[i], 2);
    const double s = std::sqrt(rss / (n - 2));
    const fit::FitStatistics& st = r.statistics;
    EXPECT_NEAR(st.estimates[0], b0, 1e-12);
    EXPECT_NEAR(st.estimates[1], b1, 1e-12);
    EXPECT_NEAR(st.residualSumOfSquares, rss, 1e-12);
    EXPECT_NEAR(st.residualStandardDeviation, s, 1e-12);
    EXPECT_NEAR(st.standardErrors[1], s / std::sqrt(sxx), 1e-12);
    EXPECT_NEAR(st.standardErrors[0], s * std::sqrt(1 / n + xbar * xbar / sxx), 1e-12);
    EXPECT_EQ(st.degreesOfFreedom, 4);
    EXPECT_NEAR(st.criticalValue, 2.7764451051977943578, 1e-13);  // mpmath 1.2.1
    EXPECT_NEAR(st.lower[1], b1 - 2.7764451051977943578 * s / std::sqrt(sxx), 1e-11);
    EXPECT_NEAR(st.upper[0], b0 + 2.7764451051977943578 * st.standardErrors[0], 1e-11);
    // correlation of intercept and slope: -xbar / sqrt(xbar^2 + Sxx/n)
    EXPECT_NEAR(st.correlation(0, 1), -xbar / std::sqrt(xbar * xbar + sxx / n), 1e-12);
    EXPECT_EQ(st.correlation(0, 0), 1.0);
    EXPECT_TRUE(st.warnings.empty());
    EXPECT_EQ(st.covarianceMethod, "s^2 (J'J)^-1");
}

TEST(FitStatistics, WarnsWhenTheJacobianIsRankDeficient) {
    auto t = table({"x", "y"}, {{1, 2, 3, 4}, {1.1, 1.9, 3.2, 3.9}});
    fit::FitRequest request;
    request.definition.model = "a*x + b*x";
    request.definition.response = "y";
    request.definition.parameters = {"a", "b"};
    request.start = {0.5, 0.5};
    const fit::FitResult r = fit::runFit(t, request);
    EXPECT_EQ(r.statistics.rank, 1);
    EXPECT_TRUE(anyWarningContains(r.warnings, "rank-deficient: rank 1 of 2")) << r.warnings.front();
    EXPECT_TRUE(anyWarningContains(r.warnings, "singular values"));
}

TEST(FitStatistics, WarnsAboutNearlyUnidentifiableParameters) {
    // x and z almost collinear: the two slopes trade off against each other.
    auto t = table({"x", "z", "y"}, {{1, 2, 3, 4, 5, 6}, {1.001, 2.0, 2.999, 4.002, 5.0, 5.998},
                                      {2.0, 4.1, 5.9, 8.2, 9.9, 12.1}});
    fit::FitRequest request;
    request.definition.model = "a*x + b*z";
    request.definition.response = "y";
    request.definition.parameters = {"a", "b"};
    request.start = {1, 1};
    const fit::FitResult r = fit::runFit(t, request);
    EXPECT_GT(std::fabs(r.statistics.correlation(0, 1)), 0.99);
    EXPECT_TRUE(anyWarningContains(r.warnings, "Parameters a and b are nearly unidentifiable together"));
}

TEST(FitStatistics, SuggestsRescalingWhenMagnitudesDifferWildly) {
    auto t = table({"x", "y"}, {{1e-7, 2e-7, 3e-7, 4e-7, 5e-7}, {3.0, 5.1, 6.9, 9.2, 11.0}});
    const fit::FitResult r = fitLine(t);
    EXPECT_TRUE(anyWarningContains(r.warnings, "consider rescaling")) << (r.warnings.empty() ? "" : r.warnings[0]);
}

TEST(FitStatistics, WarnsWhenThereAreFewerRowsThanParameters) {
    auto t = table({"x", "y"}, {{1, 2}, {1.0, 3.0}});
    fit::FitRequest request;
    request.definition.model = "a + b*x + c*x^2";
    request.definition.response = "y";
    request.definition.parameters = {"a", "b", "c"};
    request.start = {0, 0, 0};
    const fit::FitResult r = fit::runFit(t, request);
    EXPECT_TRUE(anyWarningContains(r.warnings, "Fewer rows (2) than parameters (3)"));
    EXPECT_TRUE(std::isnan(r.statistics.residualStandardDeviation));
}

TEST(FitStatistics, UsesTheSandwichForRobustLosses) {
    auto t = table({"x", "y"}, {{1, 2, 3, 4, 5, 6, 7, 8}, {2.0, 4.1, 5.9, 8.2, 30.0, 12.1, 13.8, 16.1}});
    fit::FitRequest request;
    request.definition.model = "b0 + b1*x";
    request.definition.response = "y";
    request.definition.parameters = {"b0", "b1"};
    request.definition.loss = Loss::Huber;
    request.definition.scale = 1.0;
    request.start = {0, 1};
    const fit::FitResult r = fit::runFit(t, request);
    EXPECT_TRUE(r.converged()) << r.run.message;
    EXPECT_EQ(r.statistics.covarianceMethod, "sandwich");
    EXPECT_NEAR(r.run.x[1], 2.0, 0.1);  // the outlier at x = 5 barely moves the slope
    EXPECT_GT(r.statistics.standardErrors[1], 0.0);
}

TEST(RunFit, RejectsAMismatchedStartAndAResidualMethodForALikelihood) {
    auto t = table({"x", "y"}, {{1, 2, 3}, {0, 1, 1}});
    fit::FitRequest request;
    request.definition.model = "a + b*x";
    request.definition.response = "y";
    request.definition.parameters = {"a", "b"};
    request.start = {0};
    EXPECT_THROW(fit::runFit(t, request), FitError);
    request.start = {0, 0};
    request.definition.loss = Loss::BernoulliLogit;
    request.method = "levenberg-marquardt";
    try {
        fit::runFit(t, request);
        FAIL();
    } catch (const FitError& e) {
        EXPECT_NE(std::string(e.what()).find("needs residuals"), std::string::npos) << e.what();
    }
    request.method = "no-such-method";
    EXPECT_THROW(fit::runFit(t, request), FitError);
}

TEST(RunFit, ChoosesLevenbergMarquardtForLeastSquares) {
    EXPECT_EQ(fit::defaultFitMethod(Loss::LeastSquares), "levenberg-marquardt");
    EXPECT_EQ(fit::defaultFitMethod(Loss::Weighted), "levenberg-marquardt");
    EXPECT_NE(fit::defaultFitMethod(Loss::PoissonLog), "levenberg-marquardt");
}
