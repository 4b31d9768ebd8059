// What tests/fuzz/fuzz_study.cpp found in the study reader, pinned with the message a user sees.
// (The inputs themselves are kept in tests/fuzz/regressions/study/ and run by ctest through
// fuzz_regression_study.)
#include "core/study/study.h"

#include <gtest/gtest.h>

namespace sw::study {
namespace {

TEST(StudyFuzzFindings, ANumberBeyondDoublesRangeIsAStudyErrorWithItsPlace) {
    // Was nlohmann-json's out_of_range exception, which reached the command line as
    // "internal error: [json.exception.out_of_range.406] number overflow parsing '1e999'".
    const std::string text = "{\"format\": \"saddlewise-study\",\n \"version\": 1, \"title\": 1e999}";
    try {
        fromJson(text, "/nonexistent-folder", false);
        FAIL() << "expected a StudyError";
    } catch (const StudyError& e) {
        // The SAX reader (docs/robustness.md) names the field the number was given for.
        EXPECT_EQ(e.place(), "title") << e.what();
        EXPECT_NE(e.problem().find("1e999 is out of range"), std::string::npos) << e.what();
    }
}

}  // namespace
}  // namespace sw::study
