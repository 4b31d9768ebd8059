// saddlewise run STUDY: the built executable on every bundled sample and on bad studies.
#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <set>
#include <string>
#include <sys/wait.h>

namespace {

namespace fs = std::filesystem;
using Json = nlohmann::json;

struct Outcome {
    int exitCode = -1;
    std::string out;  // stdout and stderr together when mergeErrors
};

std::string quoted(const std::string& text) {
    std::string q = "'";
    for (char c : text) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

Outcome runSaddlewise(const std::string& arguments, bool mergeErrors = false) {
    const std::string command = quoted(SW_EXECUTABLE) + " " + arguments + (mergeErrors ? " 2>&1" : " 2>/dev/null");
    Outcome outcome;
    FILE* pipe = ::popen(command.c_str(), "r");
    if (!pipe) return outcome;
    std::array<char, 4096> buffer{};
    std::size_t n = 0;
    while ((n = std::fread(buffer.data(), 1, buffer.size(), pipe)) > 0) outcome.out.append(buffer.data(), n);
    const int status = ::pclose(pipe);
    outcome.exitCode = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return outcome;
}

std::vector<fs::path> sampleStudies() {
    std::vector<fs::path> studies;
    for (const auto& entry : fs::directory_iterator(fs::path(SW_SOURCE_DIR) / "samples"))
        if (entry.path().extension() == ".json") studies.push_back(entry.path());
    std::sort(studies.begin(), studies.end());
    return studies;
}

TEST(RunVerb, EverySampleRunsEveryEnabledMethodAndReportsItInJson) {
    const auto studies = sampleStudies();
    ASSERT_GE(studies.size(), 3u);
    for (const fs::path& path : studies) {
        SCOPED_TRACE(path.filename().string());
        const Json study = Json::parse(std::ifstream(path));
        std::vector<std::string> enabled;
        for (const Json& entry : study["methods"])
            if (entry.value("enabled", true))
                enabled.push_back(entry.value("label", entry["method"].get<std::string>()));
        ASSERT_GE(study["methods"].size(), 4u) << "a sample shows 4 to 6 methods";
        ASSERT_LE(study["methods"].size(), 6u);

        const Outcome outcome = runSaddlewise("run " + quoted(path.string()) + " --json");
        ASSERT_EQ(outcome.exitCode, 0) << outcome.out;
        const Json result = Json::parse(outcome.out);
        EXPECT_EQ(result["study"]["title"], study["title"]);
        ASSERT_EQ(result["runs"].size(), enabled.size());
        for (std::size_t k = 0; k < enabled.size(); ++k) {
            const Json& run = result["runs"][k];
            EXPECT_EQ(run["label"], enabled[k]);
            EXPECT_FALSE(run["termination"].get<std::string>().empty());
            EXPECT_GE(run["trace"].size(), 1u);
            EXPECT_EQ(run["trace"].size(), run["iterations"].get<std::size_t>() + 1);
            EXPECT_TRUE(run.contains("end_point"));
        }
    }
}

TEST(RunVerb, SamplesHaveDistinctColoursAndMarkersAndNotes) {
    for (const fs::path& path : sampleStudies()) {
        SCOPED_TRACE(path.filename().string());
        const Json study = Json::parse(std::ifstream(path));
        EXPECT_FALSE(study["title"].get<std::string>().empty());
        EXPECT_GT(study["notes"].get<std::string>().size(), 100u);
        std::set<std::string> colours, markers;
        for (const Json& entry : study["methods"]) {
            colours.insert(entry["colour"].get<std::string>());
            markers.insert(entry.value("marker", "circle"));
        }
        EXPECT_EQ(colours.size(), study["methods"].size());
        EXPECT_EQ(markers.size(), study["methods"].size());
    }
}

// A label that names a Newton variant names the method it runs: "Newton" is pure Newton,
// "damped Newton" is damped-newton, "Gauss-Newton" is gauss-newton (docs/names.md). Notes state
// the scenario and the expected result, as a working tool's words, not as lessons.
TEST(RunVerb, SampleLabelsMatchTheirMethodsAndNotesStateTheExpectedResult) {
    for (const fs::path& path : sampleStudies()) {
        SCOPED_TRACE(path.filename().string());
        const Json study = Json::parse(std::ifstream(path));
        for (const Json& entry : study["methods"]) {
            std::string label = entry.value("label", entry["method"].get<std::string>());
            std::string lower;
            for (char c : label) {
                lower += c == ' ' ? '-' : static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
            }
            if (lower.find("newton") != std::string::npos) {
                EXPECT_EQ(lower, entry["method"]) << label;
            }
        }
        const std::string notes = study["notes"];
        EXPECT_NE(notes.find("Expected result:"), std::string::npos);
        for (const char* lesson : {"What to look for", "try editing", "Compare the", "Select an iterate"})
            EXPECT_EQ(notes.find(lesson), std::string::npos) << lesson;
    }
}

TEST(RunVerb, ResultsCarryProvenanceAndTheCaution) {
    const std::string path = std::string(SW_SOURCE_DIR) + "/samples/two-valve-saddles.json";
    const Json study = Json::parse(std::ifstream(path));
    const Outcome json = runSaddlewise("run " + quoted(path) + " --json");
    ASSERT_EQ(json.exitCode, 0);
    const Json provenance = Json::parse(json.out)["provenance"];
    EXPECT_EQ(provenance["program"], "Saddlewise");
    EXPECT_FALSE(provenance["version"].get<std::string>().empty());
    EXPECT_EQ(provenance["study_title"], study["title"]);
    EXPECT_EQ(provenance["formula"], study["objective"]["formula"]);
    EXPECT_NE(provenance["caution"].get<std::string>().find("defer to the applicable codes"), std::string::npos);
    const Outcome text = runSaddlewise("run " + quoted(path));
    ASSERT_EQ(text.exitCode, 0);
    EXPECT_NE(text.out.find("\nCaution: A result is only as good as its model and its data"), std::string::npos)
        << text.out;
}

// What each formula sample is meant to show (see its notes) actually happens.
TEST(RunVerb, TheSaddleSampleShowsNewtonStoppingOnASaddleWhileOthersEscape) {
    const Outcome outcome =
        runSaddlewise("run " + quoted(std::string(SW_SOURCE_DIR) + "/samples/two-valve-saddles.json") + " --json");
    ASSERT_EQ(outcome.exitCode, 0);
    const Json result = Json::parse(outcome.out);
    for (const Json& run : result["runs"]) {
        SCOPED_TRACE(run["label"].get<std::string>());
        const std::string kind = run["end_point"]["kind"];
        if (run["method"] == "newton") {
            EXPECT_EQ(kind, "saddle");
            EXPECT_EQ(run["end_point"]["index"], 1);
        } else {
            EXPECT_EQ(kind, "minimum");
        }
    }
}

TEST(RunVerb, TheBadlyScaledSampleLeavesSteepestDescentShortOfTheMinimum) {
    const Outcome outcome =
        runSaddlewise("run " + quoted(std::string(SW_SOURCE_DIR) + "/samples/heater-power-and-duty.json") + " --json");
    ASSERT_EQ(outcome.exitCode, 0);
    const Json result = Json::parse(outcome.out);
    for (const Json& run : result["runs"]) {
        if (run["method"] == "gradient-descent") {
            EXPECT_EQ(run["termination"], "iteration-limit");
            EXPECT_GT(run["value"].get<double>(), 1.0);
        }
        if (run["method"] == "newton") {
            EXPECT_LE(run["iterations"].get<int>(), 2);
            ASSERT_EQ(run["variables"][0], "power");
            EXPECT_NEAR(run["x"][0].get<double>(), 1200, 1e-6);
            EXPECT_NEAR(run["x"][1].get<double>(), 0.35, 1e-9);
        }
    }
}

// The data were generated by samples/make_samples.py from a = 41.5, b = 18.2, tau = 7.5 with
// noise of sd 0.15 (invented demo data: this checks the sample tells its story, not accuracy).
TEST(RunVerb, TheSensorSampleFitsTheDriftCurveItWasMadeFrom) {
    const Outcome outcome =
        runSaddlewise("run " + quoted(std::string(SW_SOURCE_DIR) + "/samples/sensor-warmup.json") + " --json");
    ASSERT_EQ(outcome.exitCode, 0) << outcome.out;
    const Json result = Json::parse(outcome.out);
    EXPECT_EQ(result["study"]["mode"], "data-fit");
    for (const Json& run : result["runs"]) {
        if (run["method"] != "levenberg-marquardt") continue;
        EXPECT_TRUE(run["converged"].get<bool>());
        EXPECT_NEAR(run["x"][0].get<double>(), 41.5, 0.2);
        EXPECT_NEAR(run["x"][1].get<double>(), 18.2, 0.4);
        EXPECT_NEAR(run["x"][2].get<double>(), 7.5, 0.3);
    }
}

TEST(RunVerb, TheTableNamesEveryEnabledMethod) {
    const Outcome outcome =
        runSaddlewise("run " + quoted(std::string(SW_SOURCE_DIR) + "/samples/pump-flow-calibration.json"));
    ASSERT_EQ(outcome.exitCode, 0);
    for (const char* label : {"steepest descent", "BFGS", "dogleg", "Nelder-Mead", "termination", "end point"})
        EXPECT_NE(outcome.out.find(label), std::string::npos) << label;
}

TEST(RunVerb, MaxIterationsOverridesTheStudy) {
    const Outcome outcome =
        runSaddlewise("run " + quoted(std::string(SW_SOURCE_DIR) + "/samples/pump-flow-calibration.json") +
                      " --json --max-iterations 3");
    ASSERT_EQ(outcome.exitCode, 0);
    const Json result = Json::parse(outcome.out);
    for (const Json& run : result["runs"]) EXPECT_LE(run["iterations"].get<int>(), 3);
}

class BadStudyFile : public ::testing::Test {
protected:
    void SetUp() override {
        std::random_device seed;
        folder_ = fs::temp_directory_path() / ("saddlewise-run-test-" + std::to_string(seed()));
        fs::create_directories(folder_);
    }
    void TearDown() override {
        std::error_code ignored;
        fs::remove_all(folder_, ignored);
    }
    std::string write(const std::string& text) {
        const fs::path path = folder_ / "study.json";
        std::ofstream(path) << text;
        return path.string();
    }
    fs::path folder_;
};

TEST_F(BadStudyFile, IsRefusedWithExitCodeTwoAndThePlaceOfTheProblem) {
    std::ifstream in(fs::path(SW_SOURCE_DIR) / "samples" / "pump-flow-calibration.json");
    Json study = Json::parse(in);
    study["methods"][3]["options"]["initial_radius"] = -1;
    const Outcome outcome = runSaddlewise("run " + quoted(write(study.dump())), true);
    EXPECT_EQ(outcome.exitCode, 2);
    EXPECT_NE(outcome.out.find("methods[3].options.initial_radius: must be > 0 (got -1)"), std::string::npos)
        << outcome.out;
}

TEST_F(BadStudyFile, ANewerFormatVersionIsRefused) {
    std::ifstream in(fs::path(SW_SOURCE_DIR) / "samples" / "two-valve-saddles.json");
    Json study = Json::parse(in);
    study["version"] = 2;
    const Outcome outcome = runSaddlewise("run " + quoted(write(study.dump())), true);
    EXPECT_EQ(outcome.exitCode, 2);
    EXPECT_NE(outcome.out.find("version: this file is format version 2"), std::string::npos) << outcome.out;
}

TEST_F(BadStudyFile, AMissingFileOrNoArgumentIsBadUsage) {
    EXPECT_EQ(runSaddlewise("run " + quoted((folder_ / "absent.json").string())).exitCode, 2);
    EXPECT_EQ(runSaddlewise("run").exitCode, 2);
    EXPECT_EQ(runSaddlewise("run a.json b.json").exitCode, 2);
}

TEST_F(BadStudyFile, AStudyWithNothingEnabledSaysSo) {
    std::ifstream in(fs::path(SW_SOURCE_DIR) / "samples" / "two-valve-saddles.json");
    Json study = Json::parse(in);
    for (Json& entry : study["methods"]) entry["enabled"] = false;
    const Outcome outcome = runSaddlewise("run " + quoted(write(study.dump())), true);
    EXPECT_EQ(outcome.exitCode, 2);
    EXPECT_NE(outcome.out.find("no enabled methods"), std::string::npos) << outcome.out;
}

}  // namespace
