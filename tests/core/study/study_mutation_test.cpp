#include "core/study/study.h"
#include "study_test_support.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <functional>

namespace sw::study {
namespace {

using Json = nlohmann::ordered_json;

// Every value in a valid study, replaced in turn by a value of every other JSON type (and
// every key removed in turn): loading either succeeds or throws a StudyError naming a place,
// never anything else (common practice, no published source: a cheap structured fuzz).
TEST(StudyJson, AnyMutatedValueGivesAStudyErrorOrAValidStudy) {
    const Json original = Json::parse(testing::validFormulaStudy());
    const std::vector<Json> replacements = {
        nullptr, true, "text", 0, -1, 1e308, 2.5, Json::array(), Json::object(), Json::array({1, "x"})};
    std::vector<Json::json_pointer> pointers;
    std::function<void(const Json&, const Json::json_pointer&)> collect = [&](const Json& value,
                                                                              const Json::json_pointer& at) {
        if (!at.empty()) pointers.push_back(at);
        if (value.is_object())
            for (const auto& item : value.items()) collect(item.value(), at / item.key());
        else if (value.is_array())
            for (std::size_t i = 0; i < value.size(); ++i) collect(value[i], at / i);
    };
    collect(original, Json::json_pointer());
    ASSERT_GT(pointers.size(), 40u);

    int refused = 0, accepted = 0;
    auto attempt = [&](const Json& document, const std::string& what) {
        try {
            fromJson(document.dump(), ".");
            ++accepted;
        } catch (const StudyError& e) {
            ++refused;
            EXPECT_FALSE(e.place().empty()) << what << ": " << e.what();
        } catch (const std::exception& e) {
            ADD_FAILURE() << what << ": not a StudyError: " << e.what();
        }
    };
    for (const auto& pointer : pointers) {
        for (const Json& replacement : replacements) {
            Json document = original;
            document[pointer] = replacement;
            attempt(document, pointer.to_string() + " = " + replacement.dump());
        }
        Json document = original;
        document[pointer.parent_pointer()].is_object()
            ? static_cast<void>(document[pointer.parent_pointer()].erase(pointer.back()))
            : static_cast<void>(document[pointer.parent_pointer()].erase(std::stoul(pointer.back())));
        attempt(document, "without " + pointer.to_string());
    }
    EXPECT_GT(refused, accepted);  // most mutations are errors; some (a title of "text") are fine
}

TEST(StudyJson, TruncatedDocumentsAreSyntaxErrorsWithAPlace) {
    const std::string text = testing::validFormulaStudy();
    for (std::size_t cut = 0; cut + 2 < text.size(); cut += 37) {
        try {
            fromJson(text.substr(0, cut), ".");
            ADD_FAILURE() << "accepted a document cut at " << cut;
        } catch (const StudyError& e) {
            EXPECT_EQ(e.place().rfind("line ", 0), 0u) << e.what();
        }
    }
}

}  // namespace
}  // namespace sw::study
