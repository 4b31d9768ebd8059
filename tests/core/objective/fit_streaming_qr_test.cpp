// The streaming QR (core/objective/streaming_qr.h) and the fit objective's least-squares
// factor built on it. Expected values: the defining identities of a QR factorisation J = Q R,
// R'R = J'J and R'Q'r = J'r, R unique up to the signs of its rows for J of full column rank,
// checked against Eigen 3.4's HouseholderQR of the explicit matrix (Golub & Van Loan, "Matrix
// Computations", 4th ed., Sec. 5.2; common practice, no published source for the data, which are
// random and invented here).
#include "core/objective/fit_objective.h"
#include "core/objective/streaming_qr.h"
#include "core/solve/method.h"
#include "core/solve/solver.h"

#include <gtest/gtest.h>

#include <Eigen/QR>
#include <Eigen/SVD>

#include <cmath>
#include <limits>
#include <random>
#include <vector>

using namespace sw;

namespace {

// Relative difference |a - b| / |b| in the Frobenius norm.
double relativeDifference(const Matrix& a, const Matrix& b) { return (a - b).norm() / b.norm(); }

// Feeds rows [begin, end) of [J r] into qr in blocks of `block` rows (copies: the fold overwrites).
void feed(StreamingQr& qr, const Matrix& j, const Vector& r, Eigen::Index begin, Eigen::Index end, Eigen::Index block) {
    const Eigen::Index n = j.cols();
    for (Eigen::Index row = begin; row < end; row += block) {
        const Eigen::Index count = std::min(block, end - row);
        Matrix scratch(count, n + 1);
        scratch.leftCols(n) = j.middleRows(row, count);
        scratch.col(n) = r.segment(row, count);
        std::vector<double*> columns;
        for (Eigen::Index c = 0; c <= n; ++c) columns.push_back(scratch.col(c).data());
        qr.addRows(columns.data(), static_cast<std::size_t>(count));
    }
}

// A tall J with columns of very different scales (condition number about 1e6) and r.
void randomProblem(Eigen::Index m, Eigen::Index n, unsigned seed, Matrix& j, Vector& r) {
    std::mt19937_64 gen(seed);
    std::normal_distribution<double> normal(0.0, 1.0);
    j.resize(m, n);
    r.resize(m);
    for (Eigen::Index i = 0; i < m; ++i) {
        for (Eigen::Index c = 0; c < n; ++c) j(i, c) = normal(gen) * std::pow(10.0, static_cast<double>(c) - 2.0);
        if (n > 1) j(i, n - 1) += 0.999 * j(i, 0) * 1e3;  // nearly parallel to column 0, on its own scale
        r(i) = normal(gen);
    }
}

}  // namespace

TEST(StreamingQr, MatchesTheQrOfTheWholeMatrixAcrossBlocksAndMergedParts) {
    // Up to 4 columns the fold takes its fused path (one pass per reflection), above it the
    // grouped one: both are checked.
    for (int n : {1, 2, 4, 5, 9}) {
        SCOPED_TRACE("columns " + std::to_string(n));
        Matrix j;
        Vector r;
        randomProblem(5000, n, 11 + static_cast<unsigned>(n), j, r);
        // Three parts of unequal size, each fed in blocks (the last one partial), merged.
        StreamingQr whole(n), second(n), third(n);
        feed(whole, j, r, 0, 1700, 512);
        feed(second, j, r, 1700, 3901, 512);
        feed(third, j, r, 3901, 5000, 333);
        whole.merge(second);
        whole.merge(third);
        EXPECT_EQ(whole.rows(), 5000);

        const Matrix rs = whole.r();
        const Vector qtr = whole.qtr();
        const Matrix gram = j.transpose() * j;
        const Vector jtr = j.transpose() * r;
        EXPECT_LT(relativeDifference(rs.transpose() * rs, gram), 1e-12);
        EXPECT_LT((rs.transpose() * qtr - jtr).norm() / jtr.norm(), 1e-12);
        EXPECT_NEAR(whole.residualNormSq(), r.squaredNorm(), 1e-12 * r.squaredNorm());

        // R and Q'r equal Eigen's Householder QR of the explicit J up to the sign of each row.
        Eigen::HouseholderQR<Matrix> reference(j);
        const Matrix rr = reference.matrixQR().topRows(n).triangularView<Eigen::Upper>();
        const Vector rq = (reference.householderQ().transpose() * r).head(n);
        for (int i = 0; i < n; ++i) {
            const double sign = (rs(i, i) > 0) == (rr(i, i) > 0) ? 1.0 : -1.0;
            EXPECT_LT((sign * rs.row(i) - rr.row(i)).norm(), 1e-12 * rr.norm()) << "row " << i;
            EXPECT_NEAR(sign * qtr[i], rq[i], 1e-12 * rq.norm()) << "row " << i;
        }
        EXPECT_TRUE(rs.isUpperTriangular());
    }
}

TEST(StreamingQr, KeepsTheAccuracyOfQrWhereTheNormalEquationsLoseIt) {
    // Columns 1, t, t^2 with t near 1e3: cond(J) ~ 1e10, cond(J'J) ~ 1e20 (beyond double
    // precision). R's singular values must still be J's to about eps * cond(J) relative.
    const Eigen::Index m = 3000;
    Matrix j(m, 3);
    Vector r(m);
    for (Eigen::Index i = 0; i < m; ++i) {
        const double t = 1000.0 + static_cast<double>(i) / static_cast<double>(m);
        j(i, 0) = 1.0;
        j(i, 1) = t;
        j(i, 2) = t * t;
        r(i) = std::sin(static_cast<double>(i));
    }
    StreamingQr qr(3);
    feed(qr, j, r, 0, m, 512);
    const Vector mine = Eigen::JacobiSVD<Matrix>(qr.r()).singularValues();
    const Vector exact = Eigen::JacobiSVD<Matrix>(j).singularValues();
    EXPECT_NEAR(mine[0], exact[0], 1e-13 * exact[0]);
    EXPECT_NEAR(mine[2], exact[2], 1e-4 * exact[2]) << "smallest singular value (cond ~ " << exact[0] / exact[2] << ")";
}

TEST(StreamingQr, ReportsARankDeficientMatrixThroughItsSingularValues) {
    for (int n : {4, 6}) {
        SCOPED_TRACE("columns " + std::to_string(n));
        Matrix j;
        Vector r;
        randomProblem(2000, n, 5, j, r);
        j.col(3) = 2.0 * j.col(0) - j.col(1);  // column 3 depends on columns 0 and 1
        StreamingQr qr(n);
        feed(qr, j, r, 0, 2000, 512);
        const Vector s = Eigen::JacobiSVD<Matrix>(qr.r()).singularValues();
        EXPECT_GT(s[n - 2], 1e-9 * s[0]);
        EXPECT_LT(s[n - 1], 1e-13 * s[0]) << "the dependent column leaves a zero singular value";
    }
}

TEST(StreamingQr, LeavesAllZeroColumnsAndEmptyBlocksAlone) {
    StreamingQr qr(2);
    std::vector<double> a = {0, 0, 0}, b = {1, 2, 2}, c = {3, 0, 4};
    std::vector<double*> columns = {a.data(), b.data(), c.data()};
    qr.addRows(columns.data(), 0);
    EXPECT_EQ(qr.rows(), 0);
    qr.addRows(columns.data(), 3);
    const Matrix rs = qr.r();
    EXPECT_EQ(rs(0, 0), 0.0);  // an all-zero column: nothing to reflect
    EXPECT_NEAR(std::fabs(rs(1, 1)), 3.0, 1e-15);
    EXPECT_NEAR(qr.residualNormSq(), 25.0, 1e-14);
    EXPECT_NEAR(rs(1, 1) * qr.qtr()[1], 1 * 3 + 2 * 0 + 2 * 4, 1e-14);  // R'Q'r = J'r for column 1
}

namespace {

// Two decaying exponentials on `rows` rows with a weight column; invented data.
std::shared_ptr<Table> exponentialTable(int rows) {
    auto t = std::make_shared<Table>();
    t->columnNames = {"t", "y", "sd"};
    t->columns.assign(3, {});
    std::mt19937_64 gen(3);
    std::normal_distribution<double> noise(0.0, 0.02);
    for (int i = 0; i < rows; ++i) {
        const double ti = 10.0 * i / rows;
        t->columns[0].push_back(ti);
        t->columns[1].push_back(2.0 * std::exp(-1.3 * ti) + 0.7 * std::exp(-0.2 * ti) + noise(gen));
        t->columns[2].push_back(0.02 * (1.5 + std::cos(ti)));  // sd in [0.01, 0.05]
    }
    return t;
}

FitDefinition exponentialFit(int threads, bool weighted) {
    FitDefinition d;
    d.model = "a1*exp(-k1*t) + a2*exp(-k2*t)";
    d.response = "y";
    d.parameters = {"a1", "k1", "a2", "k2"};
    d.threads = threads;
    if (weighted) {
        d.loss = Loss::Weighted;
        d.sigma = "sd";
    }
    return d;
}

void expectFactorMatchesExplicitJacobian(const FitObjective& f, const Vector& x) {
    Matrix r;
    Vector qtr;
    double rss = 0;
    ASSERT_TRUE(f.leastSquaresFactor(x, r, qtr, rss));
    Vector res;
    Matrix jac;
    f.residuals(x, res, &jac);
    EXPECT_LT(relativeDifference(r.transpose() * r, jac.transpose() * jac), 1e-12);
    const Vector jtr = jac.transpose() * res;
    EXPECT_LT((r.transpose() * qtr - jtr).norm() / jtr.norm(), 1e-12);
    EXPECT_NEAR(rss, res.squaredNorm(), 1e-12 * res.squaredNorm());
    EXPECT_NEAR(0.5 * rss, f.value(x), 1e-12 * f.value(x));
}

}  // namespace

TEST(FitLeastSquaresFactor, EqualsTheQrOfTheExplicitJacobianOnOneAndTwoThreads) {
    // 40,000 rows: above the 16,384 rows per thread, so two threads share them.
    auto table = exponentialTable(40000);
    Vector x(4);
    x << 1.5, 1.0, 1.0, 0.3;
    for (bool weighted : {false, true})
        for (int threads : {1, 2}) {
            SCOPED_TRACE(std::string(weighted ? "weighted" : "unweighted") + ", threads " + std::to_string(threads));
            FitObjective f(table, exponentialFit(threads, weighted));
            expectFactorMatchesExplicitJacobian(f, x);
        }
}

TEST(FitLeastSquaresFactor, LeavesValueAndGradientExactlyAsAFreshEvaluation) {
    auto table = exponentialTable(20000);
    Vector x(4);
    x << 1.5, 1.0, 1.0, 0.3;
    FitObjective withFactor(table, exponentialFit(2, false)), fresh(table, exponentialFit(2, false));
    Matrix r;
    Vector qtr;
    double rss = 0;
    ASSERT_TRUE(withFactor.leastSquaresFactor(x, r, qtr, rss));
    Vector g1, g2;
    EXPECT_EQ(withFactor.valueGradient(x, g1), fresh.valueGradient(x, g2));  // bit for bit
    EXPECT_EQ(g1, g2);
    Vector y = x;
    y[1] += 0.25;  // another point, then back: nothing stale
    Vector g3, g4;
    EXPECT_EQ(withFactor.valueGradient(y, g3), fresh.valueGradient(y, g4));
    EXPECT_EQ(g3, g4);
    expectFactorMatchesExplicitJacobian(withFactor, y);
}

TEST(FitLeastSquaresFactor, IsNotOfferedForLikelihoodsOrFewerRowsThanParameters) {
    auto table = exponentialTable(3);
    FitObjective f(table, exponentialFit(1, false));
    Matrix r;
    Vector qtr;
    double rss = 0;
    EXPECT_FALSE(f.leastSquaresFactor(Vector::Ones(4), r, qtr, rss));
    auto counts = std::make_shared<Table>();
    counts->columnNames = {"x", "n"};
    counts->columns = {{0, 1, 2, 3, 4}, {1, 0, 2, 4, 7}};
    FitDefinition d;
    d.model = "a + b*x";
    d.response = "n";
    d.parameters = {"a", "b"};
    d.loss = Loss::PoissonLog;
    FitObjective poisson(counts, d);
    EXPECT_FALSE(poisson.leastSquaresFactor(Vector::Zero(2), r, qtr, rss));
}

TEST(FitLeastSquaresFactor, LevenbergMarquardtRecordsTheRankOfADeficientJacobian) {
    // a*exp(-k*t) + b*exp(-k*t): the columns for a and b are equal, so J has rank 2 of 3.
    auto table = exponentialTable(30000);
    FitDefinition d;
    d.model = "a*exp(-k*t) + b*exp(-k*t)";
    d.response = "y";
    d.parameters = {"a", "b", "k"};
    FitObjective f(table, d);
    Vector x(3);
    x << 1.0, 0.5, 0.5;
    solve::StoppingRules rules;
    rules.maxIterations = 3;
    const solve::Run run = solve::solve("levenberg-marquardt", f, x, {}, rules);
    ASSERT_GE(run.trace.size(), 2u);
    EXPECT_EQ(run.trace[0].jacobianRank, 2);
    EXPECT_GT(run.trace[0].jacobianCondition, 1e12);  // s_min is rounding noise (or zero)
}

TEST(FitLeastSquaresFactor, ANonFiniteResidualIsNamedByTheEvaluator) {
    auto table = exponentialTable(1000);
    FitDefinition d = exponentialFit(1, false);
    d.model = "a1*exp(-k1*t) + a2*log(t - k2)";  // t - k2 < 0 for the first rows: NaN
    FitObjective f(table, d);
    solve::Evaluator eval(f, 100);
    Vector x(4);
    x << 1.0, 1.0, 1.0, 0.05;
    Matrix r;
    Vector qtr;
    double value = 0;
    ASSERT_TRUE(eval.leastSquaresFactor(x, r, qtr, value));
    EXPECT_TRUE(eval.sawNonFinite());
    EXPECT_NE(eval.nonFinite().find("residual 1 "), std::string::npos) << eval.nonFinite();
    EXPECT_EQ(eval.counts().value, 1);
    EXPECT_EQ(eval.counts().gradient, 1);
}

namespace {

// The same objective without its least-squares factor: methods fall back to the explicit
// residuals and Jacobian (Householder QR of the whole J).
class WithoutFactor final : public Objective {
public:
    explicit WithoutFactor(const Objective& inner) : inner_(inner) {}
    int dimension() const override { return inner_.dimension(); }
    std::vector<std::string> variableNames() const override { return inner_.variableNames(); }
    std::string description() const override { return inner_.description(); }
    double value(const Vector& x) const override { return inner_.value(x); }
    double valueGradient(const Vector& x, Vector& g) const override { return inner_.valueGradient(x, g); }
    double valueGradientHessian(const Vector& x, Vector& g, Matrix& h) const override {
        return inner_.valueGradientHessian(x, g, h);
    }
    bool hasResiduals() const override { return inner_.hasResiduals(); }
    int residualCount() const override { return inner_.residualCount(); }
    void residuals(const Vector& x, Vector& r, Matrix* j) const override { inner_.residuals(x, r, j); }

private:
    const Objective& inner_;
};

}  // namespace

TEST(FitLeastSquaresFactor, LeastSquaresMethodsTakeTheSameStepsWithOrWithoutIt) {
    auto table = exponentialTable(40000);
    for (bool weighted : {false, true})
        for (const char* method : {"levenberg-marquardt", "gauss-newton"}) {
            SCOPED_TRACE(std::string(method) + (weighted ? ", weighted" : ""));
            FitObjective f(table, exponentialFit(2, weighted));
            WithoutFactor explicitJacobian(f);
            Vector x(4);
            x << 1.0, 2.0, 1.0, 0.1;
            solve::StoppingRules rules;
            rules.maxIterations = 200;
            const solve::Run streamed = solve::solve(method, f, x, {}, rules);
            const solve::Run plain = solve::solve(method, explicitJacobian, x, {}, rules);
            ASSERT_TRUE(solve::isConvergence(streamed.termination)) << streamed.message;
            ASSERT_TRUE(solve::isConvergence(plain.termination)) << plain.message;
            EXPECT_LT((streamed.x - plain.x).norm(), 1e-9 * plain.x.norm());
            EXPECT_NEAR(streamed.value, plain.value, 1e-12 * plain.value);
            // Iterate by iterate the same path (rounding aside), with the same rank and condition;
            // only the last, rounding-level iterations may differ in number.
            const std::size_t common = std::min(streamed.trace.size(), plain.trace.size());
            for (std::size_t k = 0; k + 1 < common && k < 6; ++k) {
                EXPECT_LT((streamed.trace[k].x - plain.trace[k].x).norm(), 1e-8 * plain.trace[k].x.norm()) << "record " << k;
                EXPECT_EQ(streamed.trace[k].jacobianRank, plain.trace[k].jacobianRank) << "record " << k;
                EXPECT_NEAR(streamed.trace[k].jacobianCondition, plain.trace[k].jacobianCondition,
                            1e-6 * plain.trace[k].jacobianCondition)
                    << "record " << k;
            }
        }
}

TEST(FitLeastSquaresFactor, GivesTheSameBitsOnOneThreadAsOnTwo) {
    // Rows go to threads in fixed chunks whose sums are added in chunk order.
    auto table = exponentialTable(50000);
    FitObjective one(table, exponentialFit(1, true)), two(table, exponentialFit(2, true));
    Vector x(4);
    x << 1.5, 1.0, 1.0, 0.3;
    Matrix r1, r2;
    Vector q1, q2, g1, g2;
    double s1 = 0, s2 = 0;
    ASSERT_TRUE(one.leastSquaresFactor(x, r1, q1, s1));
    ASSERT_TRUE(two.leastSquaresFactor(x, r2, q2, s2));
    EXPECT_EQ(r1, r2);
    EXPECT_EQ(q1, q2);
    EXPECT_EQ(s1, s2);
    Matrix h1, h2;
    EXPECT_EQ(one.valueGradientHessian(x, g1, h1), two.valueGradientHessian(x, g2, h2));
    EXPECT_EQ(g1, g2);
    EXPECT_EQ(h1, h2);
}
