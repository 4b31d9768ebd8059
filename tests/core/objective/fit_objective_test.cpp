// Fit objectives: exact derivatives against central differences, the residual form, losses,
// threads, and every definition error. Data here are invented for the test; expected values
// are the definitions themselves (common practice, no published source).
#include "core/expr/expr.h"
#include "core/objective/fit_objective.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>

using namespace sw;

namespace {

std::shared_ptr<Table> makeTable(int rows, unsigned seed = 7) {
    auto t = std::make_shared<Table>();
    t->columnNames = {"x", "z", "y", "count", "flag", "sd", "w"};
    t->columns.assign(7, {});
    std::mt19937 gen(seed);
    std::uniform_real_distribution<double> u(0.0, 1.0);
    for (int i = 0; i < rows; ++i) {
        double x = 4.0 * u(gen), z = u(gen) - 0.5;
        t->columns[0].push_back(x);
        t->columns[1].push_back(z);
        t->columns[2].push_back(2.0 * std::exp(-0.7 * x) + 0.3 * z + 0.05 * (u(gen) - 0.5));
        t->columns[3].push_back(std::floor(6.0 * u(gen)));
        t->columns[4].push_back(u(gen) < 0.4 ? 1.0 : 0.0);
        t->columns[5].push_back(0.5 + u(gen));
        t->columns[6].push_back(2.0 * u(gen));
        t->rowLines.push_back(i + 2);
    }
    return t;
}

FitDefinition definition(Loss loss) {
    FitDefinition d;
    d.loss = loss;
    d.parameters = {"a", "k", "c"};
    d.response = "y";
    d.model = "a*exp(-k*x) + c*z";
    if (loss == Loss::BernoulliLogit) {
        d.response = "flag";
        d.model = "a + k*x + c*z*x";
    } else if (loss == Loss::PoissonLog) {
        d.response = "count";
        d.model = "a + k*x + c*sin(z)";
    } else if (loss == Loss::Weighted) {
        d.sigma = "sd";
    }
    d.scale = 0.05;
    return d;
}

void expectDerivativesMatchDifferences(const Objective& f, const Vector& x) {
    Vector g;
    Matrix h;
    const double v = f.valueGradientHessian(x, g, h);
    EXPECT_NEAR(v, f.value(x), 1e-12 * std::max(1.0, std::fabs(v)));
    const double step = 1e-5;
    for (int j = 0; j < x.size(); ++j) {
        Vector xp = x, xm = x;
        xp[j] += step;
        xm[j] -= step;
        const double fd = (f.value(xp) - f.value(xm)) / (2 * step);
        EXPECT_NEAR(g[j], fd, 1e-6 * std::max(1.0, std::fabs(fd))) << "gradient " << j;
        Vector gp, gm;
        f.valueGradient(xp, gp);
        f.valueGradient(xm, gm);
        for (int i = 0; i < x.size(); ++i) {
            const double hd = (gp[i] - gm[i]) / (2 * step);
            EXPECT_NEAR(h(i, j), hd, 1e-5 * std::max(1.0, std::fabs(hd))) << "Hessian " << i << "," << j;
        }
    }
    EXPECT_TRUE(h.isApprox(h.transpose(), 1e-14));
}

std::string errorOf(const std::shared_ptr<Table>& t, const FitDefinition& d) {
    try {
        FitObjective f(t, d);
    } catch (const FitError& e) {
        return e.what();
    } catch (const expr::FormulaError& e) {
        return std::string("formula: ") + e.what();
    }
    return "";
}

}  // namespace

class FitObjectiveLoss : public ::testing::TestWithParam<Loss> {};

TEST_P(FitObjectiveLoss, GradientAndHessianMatchCentralDifferences) {
    auto table = makeTable(300);
    FitObjective f(table, definition(GetParam()));
    Vector x(3);
    x << 1.5, 0.4, 0.2;
    expectDerivativesMatchDifferences(f, x);
}

INSTANTIATE_TEST_SUITE_P(EveryLoss, FitObjectiveLoss,
                         ::testing::Values(Loss::LeastSquares, Loss::Weighted, Loss::Huber, Loss::Cauchy,
                                           Loss::BernoulliLogit, Loss::PoissonLog),
                         [](const auto& param) {
                             std::string s = toString(param.param);
                             for (char& c : s)
                                 if (c == '-') c = '_';
                             return s;
                         });

TEST(FitObjective, LeastSquaresValueIsHalfTheResidualSumOfSquares) {
    auto table = makeTable(50);
    FitObjective f(table, definition(Loss::LeastSquares));
    Vector x(3);
    x << 2.0, 0.7, 0.3;
    Vector r;
    Matrix j;
    f.residuals(x, r, &j);
    ASSERT_EQ(r.size(), 50);
    double rss = 0;
    for (int i = 0; i < 50; ++i) {
        const double xi = table->columns[0][i], zi = table->columns[1][i];
        const double ri = table->columns[2][i] - (2.0 * std::exp(-0.7 * xi) + 0.3 * zi);
        EXPECT_NEAR(r[i], ri, 1e-15);
        EXPECT_NEAR(j(i, 0), -std::exp(-0.7 * xi), 1e-15);
        EXPECT_NEAR(j(i, 1), 2.0 * xi * std::exp(-0.7 * xi), 1e-14);
        EXPECT_NEAR(j(i, 2), -zi, 1e-15);
        rss += ri * ri;
    }
    EXPECT_NEAR(f.value(x), 0.5 * rss, 1e-14);
    // Exact Hessian = J'J + sum r_i Hess r_i; at any point it differs from J'J by the residual term.
    Vector g;
    Matrix h;
    f.valueGradientHessian(x, g, h);
    EXPECT_TRUE(g.isApprox(j.transpose() * r, 1e-12));
}

TEST(FitObjective, WeightsFoldIntoTheResiduals) {
    auto table = makeTable(40);
    FitDefinition d = definition(Loss::Weighted);
    FitObjective f(table, d);
    Vector x(3);
    x << 1.0, 0.5, 0.1;
    Vector r;
    f.residuals(x, r, nullptr);
    EXPECT_NEAR(0.5 * r.squaredNorm(), f.value(x), 1e-13);
    const double sd = table->columns[5][3];
    FitDefinition plain = definition(Loss::LeastSquares);
    FitObjective g(table, plain);
    Vector r0;
    g.residuals(x, r0, nullptr);
    EXPECT_NEAR(r[3], r0[3] / sd, 1e-14);
    FitDefinition byWeights = definition(Loss::Weighted);
    byWeights.sigma.clear();
    byWeights.weights = "w";
    FitObjective h(table, byWeights);
    Vector rw;
    h.residuals(x, rw, nullptr);
    EXPECT_NEAR(rw[5], r0[5] * std::sqrt(table->columns[6][5]), 1e-14);
}

TEST(FitObjective, LikelihoodsHaveNoResidualForm) {
    auto table = makeTable(20);
    EXPECT_FALSE(FitObjective(table, definition(Loss::BernoulliLogit)).hasResiduals());
    EXPECT_FALSE(FitObjective(table, definition(Loss::PoissonLog)).hasResiduals());
    EXPECT_FALSE(FitObjective(table, definition(Loss::Huber)).hasResiduals());
    EXPECT_TRUE(FitObjective(table, definition(Loss::LeastSquares)).hasResiduals());
}

TEST(FitObjective, BernoulliLossIsTheNegativeLogLikelihood) {
    // -log P for y=1 with p = 1/(1+e^-m): ln(1+e^-m); stays finite for large |m|.
    LossTerms t = lossTerms(Loss::BernoulliLogit, 1.0, 0.3, 1.0);
    EXPECT_NEAR(t.value, std::log1p(std::exp(-0.3)), 1e-15);
    LossTerms big = lossTerms(Loss::BernoulliLogit, 0.0, 800.0, 1.0);
    EXPECT_NEAR(big.value, 800.0, 1e-12);
    EXPECT_NEAR(big.first, 1.0, 1e-15);
    LossTerms pois = lossTerms(Loss::PoissonLog, 3.0, std::log(2.0), 1.0);
    EXPECT_NEAR(pois.value, -std::log(std::exp(-2.0) * 8.0 / 6.0), 1e-14);  // -log Poisson(3; mean 2)
}

TEST(FitObjective, ThreadsGiveTheSameSums) {
    auto table = makeTable(70000);
    FitDefinition one = definition(Loss::Cauchy);
    one.threads = 1;
    FitDefinition two = one;
    two.threads = 2;
    FitObjective f1(table, one), f2(table, two);
    Vector x(3);
    x << 1.8, 0.6, 0.25;
    Vector g1, g2;
    Matrix h1, h2;
    const double v1 = f1.valueGradientHessian(x, g1, h1);
    const double v2 = f2.valueGradientHessian(x, g2, h2);
    EXPECT_NEAR(v1, v2, 1e-11 * std::fabs(v1));
    EXPECT_TRUE(g1.isApprox(g2, 1e-11));
    EXPECT_TRUE(h1.isApprox(h2, 1e-11));
    FitObjective l1(table, [] { auto d = definition(Loss::LeastSquares); d.threads = 1; return d; }());
    FitObjective l2(table, [] { auto d = definition(Loss::LeastSquares); d.threads = 2; return d; }());
    Vector r1, r2;
    Matrix j1, j2;
    l1.residuals(x, r1, &j1);
    l2.residuals(x, r2, &j2);
    EXPECT_EQ(r1, r2);
    EXPECT_EQ(j1, j2);
}

TEST(FitObjective, UnknownNamesAreListedWithTheColumns) {
    auto table = makeTable(5);
    FitDefinition d = definition(Loss::LeastSquares);
    d.model = "a*exp(-k*time) + c";
    std::string e = errorOf(table, d);
    EXPECT_NE(e.find("'time'"), std::string::npos) << e;
    EXPECT_NE(e.find("neither a parameter (a, k, c)"), std::string::npos) << e;
    EXPECT_NE(e.find("x, z, y, count, flag, sd, w"), std::string::npos) << e;
}

TEST(FitObjective, RejectsDefinitionsThatCannotWork) {
    auto table = makeTable(5);
    auto with = [&](auto change) {
        FitDefinition d = definition(Loss::LeastSquares);
        change(d);
        return errorOf(table, d);
    };
    EXPECT_NE(with([](FitDefinition& d) { d.model = "a*x + k"; }).find("'c' does not appear"), std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.model = "a*x + k*y + c"; }).find("response column 'y'"),
              std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.response = "speed"; }).find("'speed' is not in the table"),
              std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.parameters = {"a", "x", "c"}; }).find("also a column"), std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.parameters = {"a", "a", "c"}; }).find("given twice"), std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.parameters.clear(); }).find("no parameters"), std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.loss = Loss::Weighted; }).find("needs a weights column"),
              std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.weights = "missing"; }).find("weights column 'missing'"),
              std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.scale = 0; }).find("scale must be"), std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.loss = Loss::BernoulliLogit; }).find("responses in [0, 1]"),
              std::string::npos);
    EXPECT_NE(with([](FitDefinition& d) { d.model = "a*exp(-k*x"; }).find("formula:"), std::string::npos);
}

TEST(FitObjective, NamesTheLineOfABadStandardDeviation) {
    auto table = makeTable(5);
    table->columns[5][3] = 0.0;
    FitDefinition d = definition(Loss::Weighted);
    std::string e = errorOf(table, d);
    EXPECT_NE(e.find("sigma column 'sd', line 5"), std::string::npos) << e;
    EXPECT_NE(e.find("must be > 0"), std::string::npos) << e;
}

TEST(FitObjective, ModelDerivativesReadAsFormulas) {
    auto table = makeTable(5);
    FitObjective f(table, definition(Loss::LeastSquares));
    auto text = f.modelDerivativeText();
    ASSERT_EQ(text.size(), 3u);
    EXPECT_NE(text[2].find("z"), std::string::npos);
    EXPECT_EQ(f.usedColumns(), (std::vector<std::string>{"x", "z"}));
    EXPECT_NE(f.description().find("least-squares fit: y = a*exp(-k*x) + c*z + error (5 rows)"), std::string::npos);
}
