// All 27 NIST StRD nonlinear regression problems, from both published starts, with
// levenberg-marquardt at its default options. Source of every expected value: certified
// values, NIST Statistical Reference Datasets, Nonlinear Regression (the .dat files in
// tests/data/nist, read by nist_strd.cpp). Measure: log relative error
// LRE = -log10(|estimate - certified| / |certified|), capped at 11 (the certified digits).
//
// Goals: LRE >= 6 for every parameter and the residual sum of squares on all 54 runs, and
// LRE >= 4 for the standard errors against the certified standard deviations.
// Exception (pinned at today's value minus a margin, so a regression fails):
//   Lanczos1 RSS: the certified RSS 1.4307867721E-25 cannot be reproduced in double precision
//   from the certified parameters (recomputing it there gives about 4E-21; see
//   /work/shared/reference/nist-strd/INDEX.md), so its RSS LRE is about 3 for any solver
//   that reaches the certified parameters. Its parameters still reach LRE >= 10. Its
//   standard errors and residual standard deviation scale with sqrt(RSS), so they share
//   the same limit (SE LRE about 3.1, pinned at 2.8).
// Rat43's file states 9 degrees of freedom, but its certified residual standard deviation
// 2.8262414662E+01 = sqrt(RSS / 11) uses 15 - 4 = 11; we check against m - p.
#include "core/fit/run_fit.h"
#include "tests/reference/fit/nist_strd.h"

#include <gtest/gtest.h>

#include <cstdio>
#include <map>

using namespace sw;
using sw::testing::NistProblem;

namespace {

struct Case {
    std::string name;
    int start;
};

std::vector<Case> allCases() {
    std::vector<Case> cases;
    for (const auto& name : sw::testing::nistProblemNames())
        for (int start : {1, 2}) cases.push_back({name, start});
    return cases;
}

// Runs below the goal of 6, pinned: (problem, start) -> least RSS LRE accepted.
const std::map<std::pair<std::string, int>, double> kPinnedRssLre = {
    {{"Lanczos1", 1}, 2.5},  // certified RSS not reproducible in double precision (see above)
    {{"Lanczos1", 2}, 2.5},
};
// Standard-error LRE below the goal of 4, pinned (same cause as the RSS above).
const std::map<std::pair<std::string, int>, double> kPinnedSeLre = {
    {{"Lanczos1", 1}, 2.8},
    {{"Lanczos1", 2}, 2.8},
};

fit::FitResult fitNist(const NistProblem& p, int start) {
    fit::FitRequest request;
    request.definition.model = p.model;
    request.definition.response = p.response;
    request.definition.parameters = p.parameters;
    request.start = start == 1 ? p.start1 : p.start2;
    request.method = "levenberg-marquardt";
    return fit::runFit(std::make_shared<Table>(p.data), request);
}

}  // namespace

class NistStrd : public ::testing::TestWithParam<Case> {};

TEST_P(NistStrd, LevenbergMarquardtReachesTheCertifiedValues) {
    const Case& c = GetParam();
    const NistProblem p = sw::testing::readNistProblem(SW_TEST_DATA_DIR "/nist", c.name);
    const fit::FitResult result = fitNist(p, c.start);
    SCOPED_TRACE(c.name + " from start " + std::to_string(c.start) +
                 " (certified values, NIST StRD nonlinear regression, " + c.name + ")");
    EXPECT_TRUE(result.converged()) << result.run.message;

    const auto pinnedSe = kPinnedSeLre.find({c.name, c.start});
    const double seGoal = pinnedSe == kPinnedSeLre.end() ? 4.0 : pinnedSe->second;
    double minParameterLre = 99, minSeLre = 99;
    for (std::size_t j = 0; j < p.parameters.size(); ++j) {
        const double lre = sw::testing::logRelativeError(result.run.x[static_cast<Eigen::Index>(j)], p.certified[j]);
        minParameterLre = std::min(minParameterLre, lre);
        EXPECT_GE(lre, 6.0) << p.parameters[j] << " = " << result.run.x[static_cast<Eigen::Index>(j)]
                            << ", certified " << p.certified[j];
        const double se = result.statistics.standardErrors[static_cast<Eigen::Index>(j)];
        const double seLre = sw::testing::logRelativeError(se, p.certifiedStdDev[j]);
        minSeLre = std::min(minSeLre, seLre);
        EXPECT_GE(seLre, seGoal) << "standard error of " << p.parameters[j] << " = " << se << ", certified "
                              << p.certifiedStdDev[j];
    }
    const double rss = result.statistics.residualSumOfSquares;
    const double rssLre = sw::testing::logRelativeError(rss, p.certifiedRss);
    const auto pinned = kPinnedRssLre.find({c.name, c.start});
    const double rssGoal = pinned == kPinnedRssLre.end() ? 6.0 : pinned->second;
    EXPECT_GE(rssLre, rssGoal) << "RSS " << rss << ", certified " << p.certifiedRss;
    EXPECT_EQ(result.statistics.degreesOfFreedom, static_cast<int>(p.data.rowCount() - p.parameters.size()));
    if (c.name != "Rat43") {
        EXPECT_EQ(result.statistics.degreesOfFreedom, p.degreesOfFreedom);
    }
    EXPECT_GE(sw::testing::logRelativeError(result.statistics.residualStandardDeviation, p.certifiedResidualStdDev),
              seGoal)
        << "residual standard deviation " << result.statistics.residualStandardDeviation;
    std::printf("[ NIST     ] %-9s start %d: %4d iterations, min parameter LRE %5.2f, RSS LRE %5.2f, "
                "min standard-error LRE %5.2f (certified values, NIST StRD)\n",
                c.name.c_str(), c.start, result.run.iterations(), minParameterLre, rssLre, minSeLre);
}

INSTANTIATE_TEST_SUITE_P(AllProblemsBothStarts, NistStrd, ::testing::ValuesIn(allCases()),
                         [](const ::testing::TestParamInfo<Case>& param) {
                             return param.param.name + "_start" + std::to_string(param.param.start);
                         });

TEST(NistStrdReader, ReadsTheHeaderRangesOfMisra1a) {
    // certified values, NIST StRD Misra1a
    const NistProblem p = sw::testing::readNistProblem(SW_TEST_DATA_DIR "/nist", "Misra1a");
    ASSERT_EQ(p.parameters.size(), 2u);
    EXPECT_EQ(p.start1[0], 500.0);
    EXPECT_EQ(p.start2[1], 0.0005);
    EXPECT_EQ(p.certified[0], 2.3894212918E+02);
    EXPECT_EQ(p.certifiedStdDev[1], 7.2668688436E-06);
    EXPECT_EQ(p.certifiedRss, 1.2455138894E-01);
    EXPECT_EQ(p.degreesOfFreedom, 12);
    EXPECT_EQ(p.data.rowCount(), 14u);
    EXPECT_EQ(p.data.columns[0][0], 10.07);
    EXPECT_EQ(p.data.columns[1][13], 760.0);
    EXPECT_EQ(p.difficulty, "Lower");
}

TEST(NistStrdReader, ReadsNelsonsTwoPredictorsAndFitsLogY) {
    const NistProblem p = sw::testing::readNistProblem(SW_TEST_DATA_DIR "/nist", "Nelson");
    EXPECT_EQ(p.data.columnNames, (std::vector<std::string>{"y", "x1", "x2", "logy"}));
    EXPECT_EQ(p.data.rowCount(), 128u);
    EXPECT_EQ(p.response, "logy");
}
