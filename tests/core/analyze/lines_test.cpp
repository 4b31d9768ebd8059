#include "core/analyze/analyze.h"
#include "test_objectives.h"

#include <gtest/gtest.h>

#include <cmath>

namespace sw::analyze {
namespace {

TEST(Linspace, IncludesBothEnds) {
    const auto ts = linspace(-1, 2, 4);
    ASSERT_EQ(ts.size(), 4u);
    EXPECT_DOUBLE_EQ(ts[0], -1);
    EXPECT_DOUBLE_EQ(ts[1], 0);
    EXPECT_DOUBLE_EQ(ts[3], 2);
    EXPECT_EQ(linspace(0, 1, 1).size(), 1u);
    EXPECT_TRUE(linspace(0, 1, 0).empty());
}

TEST(ValuesAlong, SamplesTheObjectiveOnTheLine) {
    auto valley = testing::curvedValley();
    const Vector x = (Vector(2) << -1.2, 1).finished();
    const Vector d = (Vector(2) << 1, 0.5).finished();
    const auto ts = linspace(0, 1, 5);
    const auto values = valuesAlong(*valley, x, d, ts);
    ASSERT_EQ(values.size(), 5u);
    for (std::size_t k = 0; k < ts.size(); ++k) EXPECT_DOUBLE_EQ(values[k], valley->value(x + ts[k] * d));
}

TEST(SufficientDecreaseLine, StartsAtTheValueWithSlopeC1TimesTheDirectionalDerivative) {
    // Armijo line, Nocedal & Wright (2006), eq. 3.4.
    const Vector g = (Vector(2) << 2, -1).finished();
    const Vector d = -g;
    const auto line = sufficientDecreaseLine(3.0, g, d, {0.0, 1.0, 2.0}, 0.1);
    EXPECT_DOUBLE_EQ(line[0], 3.0);
    EXPECT_DOUBLE_EQ(line[1], 3.0 - 0.1 * 5);
    EXPECT_DOUBLE_EQ(line[2], 3.0 - 0.2 * 5);
}

TEST(SpectrumAlong, ReusesRecordedEigenvaluesAndComputesTheMissingOnes) {
    auto saddle = testing::quadratic(1, -1);
    solve::Run run;
    solve::IterationRecord first, second;
    first.iteration = 0;
    first.x = (Vector(2) << 1, 1).finished();
    first.hessianEigenvalues = (Vector(2) << -5, 7).finished();  // deliberately not the true ones
    first.conditionNumber = 1.4;
    second.iteration = 1;
    second.x = (Vector(2) << 0.5, 0.5).finished();
    run.trace = {first, second};

    const auto spectrum = spectrumAlong(run, saddle.get());
    ASSERT_EQ(spectrum.size(), 2u);
    EXPECT_TRUE(spectrum[0].fromRecord);
    EXPECT_DOUBLE_EQ(spectrum[0].eigenvalues(0), -5);
    EXPECT_DOUBLE_EQ(spectrum[0].conditionNumber, 1.4);
    EXPECT_FALSE(spectrum[1].fromRecord);
    ASSERT_EQ(spectrum[1].eigenvalues.size(), 2);
    EXPECT_DOUBLE_EQ(spectrum[1].eigenvalues(0), -2);
    EXPECT_DOUBLE_EQ(spectrum[1].eigenvalues(1), 2);
    EXPECT_DOUBLE_EQ(spectrum[1].conditionNumber, 1);
    EXPECT_TRUE(spectrum[1].negativeCurvature);

    // Without an objective the missing spectrum stays empty.
    const auto recordedOnly = spectrumAlong(run, nullptr);
    EXPECT_EQ(recordedOnly[1].eigenvalues.size(), 0);
    EXPECT_TRUE(std::isnan(recordedOnly[1].conditionNumber));
}

}  // namespace
}  // namespace sw::analyze
