// The optional "surveys" part of a study: old files read as before, surveys round-trip, and
// every problem in it is named with its place.
#include "core/study/study.h"
#include "tests/core/study/study_test_support.h"

#include <gtest/gtest.h>

namespace {

using namespace sw::study;
using sw::study::testing::validFormulaStudy;

// The valid study with a "surveys" part added after "view".
std::string withSurveys(const std::string& surveys) {
    std::string text = validFormulaStudy();
    const auto end = text.rfind('}');
    return text.substr(0, end) + ",\n  \"surveys\": " + surveys + "\n}\n";
}

TEST(StudySurveys, FilesWithoutSurveysReadAndWriteAsBefore) {
    const Study study = fromJson(validFormulaStudy(), ".");
    EXPECT_FALSE(study.surveys.has_value());
    const std::string saved = toJson(study);
    EXPECT_EQ(saved.find("surveys"), std::string::npos);
    EXPECT_EQ(fromJson(saved, "."), study);
}

TEST(StudySurveys, SurveysRoundTrip) {
    const Study study = fromJson(withSurveys(R"({ "critical_points": { "starts": 512, "sign_change_grid": 0 },
        "basins": { "grid": 120, "methods": ["quasi-newton", "steepest"] } })"),
                                 ".");
    ASSERT_TRUE(study.surveys.has_value());
    EXPECT_TRUE(study.surveys->critical);
    EXPECT_EQ(study.surveys->criticalStarts, 512);
    EXPECT_EQ(study.surveys->signChangeGrid, 0);
    EXPECT_TRUE(study.surveys->basins);
    EXPECT_EQ(study.surveys->basinGrid, 120);
    EXPECT_EQ(study.surveys->basinMethods, (std::vector<std::string>{"quasi-newton", "steepest"}));
    const std::string saved = toJson(study);
    EXPECT_EQ(fromJson(saved, "."), study);
    EXPECT_EQ(toJson(fromJson(saved, ".")), saved);

    const Study onlyCritical = fromJson(withSurveys(R"({ "critical_points": {} })"), ".");
    EXPECT_TRUE(onlyCritical.surveys->critical);
    EXPECT_FALSE(onlyCritical.surveys->basins);
    EXPECT_EQ(onlyCritical.surveys->criticalStarts, 256);
    EXPECT_EQ(fromJson(toJson(onlyCritical), "."), onlyCritical);
}

TEST(StudySurveys, ProblemsNameTheirPlace) {
    struct Case {
        const char* surveys;
        const char* place;
        const char* says;
    };
    const Case cases[] = {
        {R"({ "basins": { "methods": ["quasi-newton", "newton"] } })", "surveys.basins.methods[1]",
         "'newton' is not the label of a method entry (steepest, quasi-newton, region)"},
        {R"({ "basins": { "methods": ["steepest", "steepest"] } })", "surveys.basins.methods[1]", "listed twice"},
        {R"({ "basins": { "grid": 0 } })", "surveys.basins.grid", "from 1 to 4000"},
        {R"({ "basins": { "methods": "steepest" } })", "surveys.basins.methods", "must be a list"},
        {R"({ "critical_points": { "starts": 2.5 } })", "surveys.critical_points.starts", "whole number"},
        {R"({ "critical": {} })", "surveys.critical", "unknown key"},
        {R"([])", "surveys", "must be an object"},
    };
    for (const Case& c : cases) {
        try {
            fromJson(withSurveys(c.surveys), ".");
            ADD_FAILURE() << "accepted " << c.surveys;
        } catch (const StudyError& e) {
            EXPECT_EQ(e.place(), c.place) << e.what();
            EXPECT_NE(e.problem().find(c.says), std::string::npos) << e.what();
        }
    }
}

}  // namespace
