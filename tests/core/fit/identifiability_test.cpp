// Parameters the data cannot separate: no standard error or interval for them, and the
// combination the data do determine, with its own error. The reference for each combination
// is the fit of the reparameterised model (a + b + c*t is d + c*t with d = a + b; a*b*t + c is
// k*t + c with k = a*b): the same least-squares problem, so the estimate and the standard
// error of the combination must equal those of d (or of k, to first order) - common practice,
// no published source. Data invented for the test.
#include "core/fit/run_fit.h"

#include <gtest/gtest.h>

#include <cmath>
#include <memory>

using namespace sw;

namespace {

std::shared_ptr<Table> lineData() {
    auto t = std::make_shared<Table>();
    t->columnNames = {"t", "y"};
    t->columns = {{0, 1, 2, 3, 4, 5, 6, 7, 8, 9}, {4.2, 6.1, 8.3, 9.8, 12.2, 14.1, 15.7, 18.2, 20.1, 21.8}};
    return t;
}

fit::FitResult fitModel(const std::shared_ptr<Table>& t, const std::string& model, std::vector<std::string> names,
                        std::vector<double> start) {
    fit::FitRequest request;
    request.definition.model = model;
    request.definition.response = "y";
    request.definition.parameters = std::move(names);
    request.start = std::move(start);
    return fit::runFit(t, request);
}

bool anyWarningContains(const std::vector<std::string>& warnings, const std::string& text) {
    for (const auto& w : warnings)
        if (w.find(text) != std::string::npos) return true;
    return false;
}

}  // namespace

TEST(Identifiability, APlusBIsDeterminedButNeitherAlone) {
    const auto data = lineData();
    const fit::FitResult reduced = fitModel(data, "d + c*t", {"d", "c"}, {0, 0});
    for (const std::vector<double>& start : {std::vector<double>{0, 0, 0}, std::vector<double>{-4, 8, 1}}) {
        const fit::FitResult r = fitModel(data, "a + b + c*t", {"a", "b", "c"}, start);
        const fit::FitStatistics& st = r.statistics;
        ASSERT_EQ(st.notDetermined.size(), 3u);
        EXPECT_TRUE(st.notDetermined[0]);
        EXPECT_TRUE(st.notDetermined[1]);
        EXPECT_FALSE(st.notDetermined[2]);
        // No error or interval that depends on the start.
        EXPECT_TRUE(std::isnan(st.standardErrors[0]));
        EXPECT_TRUE(std::isnan(st.standardErrors[1]));
        EXPECT_TRUE(std::isnan(st.lower[0]) && std::isnan(st.upper[1]));
        EXPECT_TRUE(std::isnan(st.correlation(0, 2)));
        // c is determined, exactly as in the reparameterised model.
        EXPECT_NEAR(st.estimates[2], reduced.statistics.estimates[1], 1e-9);
        EXPECT_EQ(st.degreesOfFreedom, reduced.statistics.degreesOfFreedom);  // rows - rank
        EXPECT_NEAR(st.standardErrors[2], reduced.statistics.standardErrors[1], 1e-9);
        ASSERT_EQ(st.determinedCombinations.size(), 1u);
        const fit::DeterminedCombination& c = st.determinedCombinations[0];
        EXPECT_EQ(c.text, "a + b");
        EXPECT_NEAR(c.estimate, reduced.statistics.estimates[0], 1e-9);
        EXPECT_NEAR(c.standardError, reduced.statistics.standardErrors[0], 1e-9);
        EXPECT_NEAR(c.lower, reduced.statistics.lower[0], 1e-9);
        EXPECT_TRUE(anyWarningContains(r.warnings, "Parameters a and b are not determined by the data"));
        EXPECT_TRUE(anyWarningContains(r.warnings, "the data determine only a + b = "));
    }
}

TEST(Identifiability, AProductIsDeterminedLocally) {
    const auto data = lineData();
    const fit::FitResult reduced = fitModel(data, "k*t + c", {"k", "c"}, {0, 0});
    const fit::FitResult r = fitModel(data, "a*b*t + c", {"a", "b", "c"}, {2, 0.5, 0});
    const fit::FitStatistics& st = r.statistics;
    ASSERT_TRUE(r.converged()) << r.run.message;
    EXPECT_TRUE(st.notDetermined[0] && st.notDetermined[1]);
    EXPECT_FALSE(st.notDetermined[2]);
    EXPECT_NEAR(st.estimates[0] * st.estimates[1], reduced.statistics.estimates[0], 1e-8);
    EXPECT_NEAR(st.standardErrors[2], reduced.statistics.standardErrors[1], 1e-8);
    ASSERT_EQ(st.determinedCombinations.size(), 1u);
    // The local combination is the differential of a*b: b0 da + a0 db, scaled so the largest
    // coefficient is 1; its error is the error of k scaled the same way.
    const fit::DeterminedCombination& c = st.determinedCombinations[0];
    const double a = st.estimates[0], b = st.estimates[1];
    const double largest = std::max(std::fabs(a), std::fabs(b));
    EXPECT_NEAR(c.coefficients[0], std::fabs(b) / largest, 1e-8);
    EXPECT_NEAR(c.coefficients[1], std::fabs(a) / largest, 1e-8);
    EXPECT_EQ(c.coefficients[2], 0.0);
    // Named as the product the model uses, with k's estimate and error (to first order), and
    // the same from another start (it read 0.125*a + b from one start, a + 0.667*b from another).
    EXPECT_EQ(c.form, "product");
    EXPECT_EQ(c.text, "a*b");
    EXPECT_NEAR(c.estimate, reduced.statistics.estimates[0], 1e-8);
    EXPECT_NEAR(c.standardError, reduced.statistics.standardErrors[0], 1e-6 * reduced.statistics.standardErrors[0]);
    for (const std::vector<double>& start : {std::vector<double>{4, 0.5, 1}, std::vector<double>{-2, -3, 5}}) {
        const fit::FitResult other = fitModel(data, "a*b*t + c", {"a", "b", "c"}, start);
        ASSERT_TRUE(other.converged()) << other.run.message;
        ASSERT_EQ(other.statistics.determinedCombinations.size(), 1u);
        const fit::DeterminedCombination& o = other.statistics.determinedCombinations[0];
        EXPECT_EQ(o.text, "a*b");
        EXPECT_NEAR(o.estimate, c.estimate, 1e-7);
        EXPECT_NEAR(o.standardError, c.standardError, 1e-6 * c.standardError);
    }
    EXPECT_TRUE(anyWarningContains(st.warnings, "The data determine only a*b = ")) << st.warnings.back();
}

TEST(Identifiability, AParameterTheModelDoesNotUseHasNoCombination) {
    // b multiplies a column of zeros: the data say nothing about it at all.
    auto t = lineData();
    t->columnNames.push_back("z");
    t->columns.push_back(std::vector<double>(10, 0.0));
    const fit::FitResult r = fitModel(t, "a + b*z + c*t", {"a", "b", "c"}, {0, 1, 0});
    EXPECT_TRUE(r.statistics.notDetermined[1]);
    EXPECT_FALSE(r.statistics.notDetermined[0]);
    EXPECT_TRUE(r.statistics.determinedCombinations.empty());
    EXPECT_TRUE(anyWarningContains(r.warnings, "Parameter b is not determined by the data"));
    EXPECT_TRUE(std::isfinite(r.statistics.standardErrors[0]));
}

TEST(Identifiability, WellDeterminedFitsHaveNoUndeterminedParameters) {
    const fit::FitResult r = fitModel(lineData(), "d + c*t", {"d", "c"}, {0, 0});
    EXPECT_EQ(r.statistics.notDetermined, (std::vector<bool>{false, false}));
    EXPECT_TRUE(r.statistics.determinedCombinations.empty());
}

// Constant data leave a slope that is zero in effect (3e-18 or so): no "magnitudes differ by
// 10^18" warning about it.
TEST(Identifiability, ZeroInEffectParametersDoNotTriggerTheScaleWarning) {
    auto t = std::make_shared<Table>();
    t->columnNames = {"t", "y"};
    t->columns = {{0.5, 1.5, 2.5, 3.5, 4.5, 5.5}, std::vector<double>(6, 5.0)};
    const fit::FitResult r = fitModel(t, "a + b*t", {"a", "b"}, {1, 1});
    EXPECT_NEAR(r.statistics.estimates[0], 5.0, 1e-9);
    EXPECT_NEAR(r.statistics.estimates[1], 0.0, 1e-9);
    EXPECT_FALSE(anyWarningContains(r.warnings, "magnitudes differ")) << (r.warnings.empty() ? "" : r.warnings[0]);
}
