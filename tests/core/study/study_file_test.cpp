#include "core/study/study.h"
#include "study_test_support.h"

#include <gtest/gtest.h>

#include <filesystem>
#include <sys/stat.h>

namespace sw::study {
namespace {

using testing::ScratchFolder;
namespace fs = std::filesystem;

// FIPS 180-2, Appendix B.1 ("abc") and the digest of the empty message.
TEST(FileChecksum, MatchesThePublishedSha256TestVectors) {
    ScratchFolder folder;
    folder.write("abc.txt", "abc");
    folder.write("empty.txt", "");
    EXPECT_EQ(fileChecksum(folder.file("abc.txt")),
              "sha256:ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    EXPECT_EQ(fileChecksum(folder.file("empty.txt")),
              "sha256:e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
    EXPECT_THROW(fileChecksum(folder.file("absent.txt")), StudyError);
}

TEST(SaveFile, WritesAFileThatLoadsBackToTheSameStudy) {
    ScratchFolder folder;
    const Study study = fromJson(testing::validFormulaStudy(), ".");
    saveFile(study, folder.file("calibration.json"));
    EXPECT_EQ(loadFile(folder.file("calibration.json")), study);
}

TEST(SaveFile, ReplacesAnExistingFileAndLeavesNoTemporaryFileBehind) {
    ScratchFolder folder;
    folder.write("calibration.json", "old contents");
    ::chmod(folder.file("calibration.json").c_str(), 0640);
    Study study = fromJson(testing::validFormulaStudy(), ".");
    study.title = "second version";
    saveFile(study, folder.file("calibration.json"));
    EXPECT_EQ(loadFile(folder.file("calibration.json")).title, "second version");
    int files = 0;
    for (const auto& entry : fs::directory_iterator(folder.path())) {
        ++files;
        EXPECT_EQ(entry.path().filename(), "calibration.json");
    }
    EXPECT_EQ(files, 1);
    struct stat info {};
    ASSERT_EQ(::stat(folder.file("calibration.json").c_str(), &info), 0);
    EXPECT_EQ(info.st_mode & 0777, 0640u);  // the replaced file's permissions are kept
}

TEST(SaveFile, AFailedSaveReportsTheFileAndKeepsTheOldContents) {
    ScratchFolder folder;
    const Study study = fromJson(testing::validFormulaStudy(), ".");
    try {
        saveFile(study, folder.file("no-such-folder/calibration.json"));
        FAIL() << "saved into a missing folder";
    } catch (const StudyError& e) {
        EXPECT_EQ(e.place(), "file");
    }
    // A directory in the way of the rename: the save fails and nothing else changes.
    fs::create_directories(folder.file("taken.json/inner"));
    EXPECT_THROW(saveFile(study, folder.file("taken.json")), StudyError);
    EXPECT_TRUE(fs::is_directory(folder.file("taken.json/inner")));
    int files = 0;
    for (const auto& entry : fs::directory_iterator(folder.path())) files += entry.is_regular_file() ? 1 : 0;
    EXPECT_EQ(files, 0);  // no temporary file left behind
}

TEST(LoadFile, AMissingFileIsReportedAsAFileProblem) {
    try {
        loadFile("/nonexistent/folder/study.json");
        FAIL();
    } catch (const StudyError& e) {
        EXPECT_EQ(e.place(), "file");
        EXPECT_NE(e.problem().find("/nonexistent/folder/study.json"), std::string::npos);
    }
}

// ---- data-fit studies ----

constexpr const char* kTable = "hours,reading\n0,1.0\n1,2.9\n2,5.1\n3,7.0\n4,9.1\n";

std::string fitStudy(const std::string& checksum, const std::string& extra = "") {
    return R"({"format": "saddlewise-study", "version": 1, "title": "line",
      "objective": {"data": "readings.csv", "checksum": ")" +
           checksum + R"(", "model": "slope*hours + level", "response": "reading")" + extra + R"(},
      "variables": [{"name": "slope", "start": 1, "plot_from": 0, "plot_to": 4},
                    {"name": "level", "start": 0, "plot_from": -2, "plot_to": 2}],
      "methods": [{"method": "levenberg-marquardt", "colour": "#112233"},
                  {"method": "bfgs", "colour": "#445566", "marker": "star"}]})";
}

TEST(DataFitStudy, LoadsWhenTheDataFileMatchesItsChecksumAndBuildsTheFit) {
    ScratchFolder folder;
    folder.write("readings.csv", kTable);
    const std::string checksum = fileChecksum(folder.file("readings.csv"));
    const Study study = fromJson(fitStudy(checksum), folder.path());
    ASSERT_TRUE(study.isFit());
    EXPECT_EQ(study.fit->model, "slope*hours + level");
    EXPECT_EQ(study.fit->loss, "least-squares");
    const auto objective = makeObjective(study, folder.path());
    EXPECT_EQ(objective->dimension(), 2);
    EXPECT_TRUE(objective->hasResiduals());
    EXPECT_EQ(objective->residualCount(), 5);
    // At slope 2, level 1 the residuals are 0, -0.1, 0.1, 0, 0.1: f = 0.5 * 0.03.
    EXPECT_NEAR(objective->value((Vector(2) << 2, 1).finished()), 0.015, 1e-12);
    EXPECT_EQ(fromJson(toJson(study), folder.path()), study);
}

TEST(DataFitStudy, AChangedDataFileIsReportedNotUsed) {
    ScratchFolder folder;
    folder.write("readings.csv", kTable);
    const std::string checksum = fileChecksum(folder.file("readings.csv"));
    folder.write("readings.csv", std::string(kTable) + "5,11.2\n");
    try {
        fromJson(fitStudy(checksum), folder.path());
        FAIL() << "a changed data file was accepted";
    } catch (const StudyError& e) {
        EXPECT_EQ(e.place(), "objective.checksum");
        EXPECT_NE(e.problem().find("has changed since the study was saved"), std::string::npos) << e.what();
    }
}

TEST(DataFitStudy, WithoutDataVerificationTheStudyOpensButItsObjectiveIsStillRefused) {
    ScratchFolder folder;
    folder.write("readings.csv", kTable);
    const std::string checksum = fileChecksum(folder.file("readings.csv"));
    folder.write("readings.csv", std::string(kTable) + "5,11.2\n");
    const Study study = fromJson(fitStudy(checksum), folder.path(), /*verifyData=*/false);
    EXPECT_EQ(study.fit->checksum, checksum);
    EXPECT_THROW(makeObjective(study, folder.path()), StudyError);
    // Other problems are still found.
    EXPECT_THROW(fromJson(fitStudy(checksum, R"(, "loss": "quadratic")"), folder.path(), false), StudyError);
}

TEST(DataFitStudy, AMissingDataFileIsReportedWithWhereItWasLookedFor) {
    ScratchFolder folder;
    try {
        fromJson(fitStudy("sha256:" + std::string(64, '0')), folder.path());
        FAIL();
    } catch (const StudyError& e) {
        EXPECT_EQ(e.place(), "objective.data");
        EXPECT_NE(e.problem().find("missing"), std::string::npos);
        EXPECT_NE(e.problem().find(folder.file("readings.csv")), std::string::npos) << e.what();
    }
}

TEST(DataFitStudy, FitProblemsNameTheirPlace) {
    ScratchFolder folder;
    folder.write("readings.csv", kTable);
    const std::string checksum = fileChecksum(folder.file("readings.csv"));
    struct Case {
        std::string json, place, part;
    };
    const std::vector<Case> cases = {
        {fitStudy("md5:1234"), "objective.checksum", "sha256"},
        {fitStudy(checksum, R"(, "loss": "quadratic")"), "objective.loss", "least-squares"},
        {fitStudy(checksum, R"(, "scale": 0)"), "objective.scale", "> 0"},
        {fitStudy(checksum, R"(, "separator": "pipe")"), "objective.separator", "comma"},
        {fitStudy(checksum, R"(, "weights": "w", "sigma": "s")"), "objective.sigma", "not both"},
        {fitStudy(checksum, R"(, "loss": "weighted")"), "objective", "weights"},
        {fitStudy(checksum, R"(, "loss": "huber")"), "methods[0].method", "needs a least-squares fit"},
        {fitStudy(checksum, R"(, "respons": "y")"), "objective.respons", "unknown key"},
    };
    for (const Case& c : cases) {
        SCOPED_TRACE(c.place);
        try {
            fromJson(c.json, folder.path());
            ADD_FAILURE() << "accepted";
        } catch (const StudyError& e) {
            EXPECT_EQ(e.place(), c.place) << e.what();
            EXPECT_NE(e.problem().find(c.part), std::string::npos) << e.what();
        }
    }
}

TEST(DataFitStudy, AModelNamingAnUnknownColumnIsReported) {
    ScratchFolder folder;
    folder.write("readings.csv", kTable);
    std::string json = fitStudy(fileChecksum(folder.file("readings.csv")));
    json.replace(json.find("slope*hours"), 11, "slope*days");
    try {
        fromJson(json, folder.path());
        FAIL();
    } catch (const StudyError& e) {
        EXPECT_EQ(e.place().rfind("objective", 0), 0u) << e.what();
        EXPECT_NE(std::string(e.what()).find("days"), std::string::npos) << e.what();
    }
}

TEST(DataFitStudy, RefreshingTheChecksumAcceptsTheNewData) {
    ScratchFolder folder;
    folder.write("readings.csv", kTable);
    Study study = fromJson(fitStudy(fileChecksum(folder.file("readings.csv"))), folder.path());
    folder.write("readings.csv", std::string(kTable) + "5,11.2\n");
    EXPECT_THROW(makeObjective(study, folder.path()), StudyError);
    refreshChecksum(study, folder.path());
    EXPECT_EQ(makeObjective(study, folder.path())->residualCount(), 6);
}

TEST(DataFitStudy, MovingTheStudyKeepsTheDataPathPointingAtTheSameFile) {
    ScratchFolder folder;
    fs::create_directories(folder.file("data"));
    fs::create_directories(folder.file("studies/2026"));
    folder.write("data/readings.csv", kTable);
    Study study = fromJson(fitStudy(fileChecksum(folder.file("data/readings.csv"))), folder.file("data"));
    rebaseDataPath(study, folder.file("data"), folder.file("studies/2026"));
    EXPECT_EQ(study.fit->dataPath, "../../data/readings.csv");
    saveFile(study, folder.file("studies/2026/line.json"));
    EXPECT_EQ(loadFile(folder.file("studies/2026/line.json")).fit->dataPath, "../../data/readings.csv");
}

}  // namespace
}  // namespace sw::study

namespace sw::study {
namespace {

TEST(Samples, EveryBundledSampleLoadsAndRoundTripsExactly) {
    int count = 0;
    for (const auto& entry : fs::directory_iterator(fs::path(SW_SOURCE_DIR) / "samples")) {
        if (entry.path().extension() != ".json") continue;
        SCOPED_TRACE(entry.path().filename().string());
        ++count;
        const Study study = loadFile(entry.path().string());
        EXPECT_FALSE(study.title.empty());
        const Study again = fromJson(toJson(study), directoryOf(entry.path().string()));
        EXPECT_EQ(again, study);
        EXPECT_NO_THROW(makeObjective(study, directoryOf(entry.path().string())));
    }
    EXPECT_GE(count, 3);
}

}  // namespace
}  // namespace sw::study
