// Reading a study as typed: what a window saved while some fields did not parse yet reads back
// with the same text, while the strict reading (the command line) still names the first problem.
#include "core/study/study.h"
#include "study_test_support.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <cmath>

namespace sw::study {
namespace {

using testing::ScratchFolder;
using testing::validFormulaStudy;
using Json = nlohmann::ordered_json;

// The valid study with one change made by `edit` on its JSON.
template <class Edit>
std::string editedStudy(Edit edit) {
    Json document = Json::parse(validFormulaStudy());
    edit(document);
    return document.dump(2);
}

std::string strictProblem(const std::string& text, const std::string& base = ".") {
    try {
        (void)fromJson(text, base);
    } catch (const StudyError& e) {
        return e.what();
    }
    return "";
}

TEST(StudyAsTyped, AValidStudyReadsTheSameEitherWay) {
    const Study strict = fromJson(validFormulaStudy(), ".");
    const Study typed = fromJsonAsTyped(validFormulaStudy(), ".");
    EXPECT_EQ(strict, typed);
    EXPECT_TRUE(typed.unparsed.empty());
    EXPECT_EQ(toJson(typed), toJson(strict));
}

TEST(StudyAsTyped, AFormulaWithAnErrorIsKeptAsTyped) {
    const std::string text = editedStudy([](Json& d) { d["objective"]["formula"] = "gain^2 + offset**2"; });
    EXPECT_NE(strictProblem(text).find("objective.formula"), std::string::npos) << strictProblem(text);
    const Study typed = fromJsonAsTyped(text, ".");
    EXPECT_EQ(typed.formula, "gain^2 + offset**2");
    EXPECT_EQ(fromJsonAsTyped(toJson(typed), "."), typed);
}

TEST(StudyAsTyped, ANumberTypedAsTextIsWrittenAndReadAsThatText) {
    Study study = fromJson(validFormulaStudy(), ".");
    study.variables[1].start = std::nan("");
    study.unparsed["variables[1].start"] = "1.2.";
    const std::string text = toJson(study);
    const Json written = Json::parse(text);
    EXPECT_EQ(written["variables"][1]["start"], "1.2.");
    EXPECT_EQ(written["variables"][0]["start"], -1.5);
    // Strictly, the place and the text are named.
    EXPECT_EQ(strictProblem(text), "variables[1].start: must be a number (got \"1.2.\")");
    // As typed, the text comes back and the study is the same.
    const Study back = fromJsonAsTyped(text, ".");
    ASSERT_EQ(back.unparsed.size(), 1u);
    EXPECT_EQ(back.unparsed.at("variables[1].start"), "1.2.");
    EXPECT_TRUE(std::isnan(back.variables[1].start));
    EXPECT_EQ(toJson(back), text);
    // The window's check of what is typed gives the same sentence as strict reading.
    try {
        checkVariables(back);
        ADD_FAILURE() << "checkVariables accepted a number typed as text";
    } catch (const StudyError& e) {
        EXPECT_EQ(std::string(e.what()), strictProblem(text));
    }
}

TEST(StudyAsTyped, ContentProblemsAreKeptAndStructureProblemsAreStillRefused) {
    // Content: a bad name, a repeated name, a reversed range, an option out of range, an option
    // typed as text, a least-squares method in a formula study, a single variable.
    const std::vector<std::pair<std::string, std::string>> content = {
        {editedStudy([](Json& d) { d["variables"][0]["name"] = "2gain"; }), "variables[0].name"},
        {editedStudy([](Json& d) { d["variables"][1]["name"] = "gain"; }), "variables[1].name"},
        {editedStudy([](Json& d) { d["variables"][0]["plot_from"] = 5; }), "variables[0].plot_from"},
        {editedStudy([](Json& d) { d["methods"][2]["options"]["initial_radius"] = -1; }), "methods[2].options.initial_radius"},
        {editedStudy([](Json& d) { d["methods"][2]["options"]["initial_radius"] = "0.5x"; }), "methods[2].options.initial_radius"},
        {editedStudy([](Json& d) { d["methods"][0]["method"] = "levenberg-marquardt"; d["methods"][0]["options"] = Json::object(); }),
         "methods[0].method"},
        {editedStudy([](Json& d) { d["variables"].erase(1); d["view"].erase("plot_y"); }), "variables"},
        {editedStudy([](Json& d) { d["objective"]["formula"] = "  "; }), "objective.formula"},
    };
    for (const auto& [text, place] : content) {
        SCOPED_TRACE(place);
        EXPECT_EQ(strictProblem(text).rfind(place + ":", 0), 0u) << strictProblem(text);
        const Study typed = fromJsonAsTyped(text, ".");
        EXPECT_EQ(fromJsonAsTyped(toJson(typed), "."), typed);
    }
    EXPECT_EQ(fromJsonAsTyped(content[4].first, ".").methods[2].options.at("initial_radius"), "0.5x");

    // Structure: still refused as typed, with the place.
    const std::vector<std::pair<std::string, std::string>> structure = {
        {editedStudy([](Json& d) { d["variables"][0]["colour"] = "red"; }), "variables[0].colour"},
        {editedStudy([](Json& d) { d["methods"][0]["enabled"] = "yes"; }), "methods[0].enabled"},
        {editedStudy([](Json& d) { d["methods"][0]["method"] = "no-such-method"; }), "methods[0].method"},
        {editedStudy([](Json& d) { d["version"] = 99; }), "version"},
        {editedStudy([](Json& d) { d["stopping"]["max_iterations"] = "many"; }), "stopping.max_iterations"},
    };
    for (const auto& [text, place] : structure) {
        SCOPED_TRACE(place);
        try {
            (void)fromJsonAsTyped(text, ".");
            ADD_FAILURE() << "read as typed: " << place;
        } catch (const StudyError& e) {
            EXPECT_EQ(e.place(), place);
        }
    }
}

TEST(StudyAsTyped, AFitWithoutATableYetOrWithAMissingTableReadsAsTyped) {
    const ScratchFolder folder;
    Study study = fromJson(validFormulaStudy(), ".");
    study.formula.clear();
    study.fit = DataFit{};
    study.fit->model = "a*t + b";
    study.variables[0].name = "a";
    study.variables[1].name = "b";
    study.methods.clear();
    const std::string noTable = toJson(study);  // data "" and checksum "": nothing chosen yet
    EXPECT_EQ(strictProblem(noTable, folder.path()).rfind("objective.data:", 0), 0u);
    EXPECT_EQ(fromJsonAsTyped(noTable, folder.path()), study);

    study.fit->dataPath = "gone.csv";
    study.fit->checksum = "sha256:" + std::string(64, '0');
    const std::string missing = toJson(study);
    EXPECT_EQ(strictProblem(missing, folder.path()).rfind("objective.data:", 0), 0u);
    EXPECT_EQ(fromJsonAsTyped(missing, folder.path()), study);
    // A table with a bad row: strictly refused; as typed it opens (the window shows the problem).
    folder.write("bad.csv", "t,y\n1,2\n2,oops\n");
    study.fit->dataPath = "bad.csv";
    study.fit->checksum = fileChecksum(folder.file("bad.csv"));
    study.fit->response = "y";
    const std::string badRow = toJson(study);
    EXPECT_NE(strictProblem(badRow, folder.path()).find("line 3"), std::string::npos) << strictProblem(badRow, folder.path());
    EXPECT_EQ(fromJsonAsTyped(badRow, folder.path()), study);
    folder.write("bad.json", badRow);
    EXPECT_EQ(loadFileAsTyped(folder.file("bad.json")), study);
}

TEST(StudyAsTyped, CheckVariablesNamesTheFirstProblem) {
    Study study = fromJson(validFormulaStudy(), ".");
    EXPECT_NO_THROW(checkVariables(study));
    auto problem = [](const Study& s) {
        try {
            checkVariables(s);
        } catch (const StudyError& e) {
            return std::string(e.what());
        }
        return std::string();
    };
    Study s = study;
    s.variables[1].upper = -5;
    EXPECT_EQ(problem(s), "variables[1].plot_from: must be below plot_to (got plot_from -1, plot_to -5)");
    s = study;
    s.variables[0].name = "x y";
    EXPECT_EQ(problem(s).rfind("variables[0].name: 'x y' is not a valid name", 0), 0u);
    s = study;
    s.variables.pop_back();
    EXPECT_EQ(problem(s).rfind("variables: a study needs at least two variables", 0), 0u);
    s = study;
    s.variables[0].start = std::nan("");
    EXPECT_EQ(problem(s), "variables[0].start: must be a finite number (got nan)");
}

}  // namespace
}  // namespace sw::study
