// The report verb in process, as a build without Qt runs it: test_cli links the Qt-free
// command line only, so no figure or PDF drawing is installed here. The HTML is still
// written (without plots, saying so), a PDF is refused with a clear message, and bad usage
// names the option. tests/report/ runs the full program with its figures and PDF.
#include "app/cli/cli.h"
#include "app/cli/report_graphics.h"

#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>

namespace {

namespace fs = std::filesystem;

struct Outcome {
    int code;
    std::string out, err;
};

Outcome report(std::vector<std::string> args) {
    std::ostringstream out, err;
    args.insert(args.begin(), "report");
    const int code = sw::cli::runCommandLine(args, out, err);
    return {code, out.str(), err.str()};
}

class ReportVerb : public ::testing::Test {
protected:
    void SetUp() override {
        ASSERT_FALSE(sw::cli::reportGraphics().figures) << "test_cli must run the verb as a build without Qt does";
        std::random_device seed;
        folder_ = fs::temp_directory_path() / ("saddlewise-report-verb-" + std::to_string(seed()));
        fs::create_directories(folder_);
        sample_ = (fs::path(SW_SOURCE_DIR) / "samples" / "two-valve-saddles.json").string();
    }
    void TearDown() override {
        std::error_code ignored;
        fs::remove_all(folder_, ignored);
    }
    std::string file(const std::string& name) const { return (folder_ / name).string(); }
    std::size_t filesInFolder() const {
        return static_cast<std::size_t>(std::distance(fs::directory_iterator(folder_), fs::directory_iterator()));
    }
    fs::path folder_;
    std::string sample_;
};

TEST_F(ReportVerb, WithoutQtTheHtmlHasNoPlotsAndSaysWhy) {
    const Outcome o = report({sample_, "-o", file("review.html")});
    ASSERT_EQ(o.code, 0) << o.err;
    EXPECT_NE(o.out.find("wrote " + file("review.html")), std::string::npos) << o.out;
    EXPECT_NE(o.err.find("built without Qt"), std::string::npos) << o.err;
    std::ifstream in(file("review.html"));
    const std::string html((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    EXPECT_NE(html.find("built without Qt (the headless preset)"), std::string::npos);
    EXPECT_EQ(html.find("<svg"), std::string::npos);
    EXPECT_NE(html.find("<section id=\"end-points\">"), std::string::npos);
    EXPECT_EQ(filesInFolder(), 1u) << "no temporary file left beside the report";
}

TEST_F(ReportVerb, WithoutQtAPdfIsRefusedBeforeAnyWork) {
    const Outcome o = report({sample_, "-o", file("review.pdf")});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("built without Qt"), std::string::npos) << o.err;
    EXPECT_NE(o.err.find("write .html instead"), std::string::npos) << o.err;
    EXPECT_EQ(filesInFolder(), 0u);
}

TEST_F(ReportVerb, BadUsageNamesWhatIsWrong) {
    Outcome o = report({sample_});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("-o FILE.html or -o FILE.pdf"), std::string::npos) << o.err;
    o = report({"-o", file("x.html")});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("give the study file"), std::string::npos) << o.err;
    o = report({sample_, "-o", file("x.docx")});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("unknown extension '.docx'"), std::string::npos) << o.err;
    o = report({sample_, "-o", file("x.html"), "--max-iterations", "0"});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("--max-iterations"), std::string::npos) << o.err;
    EXPECT_EQ(filesInFolder(), 0u);
}

TEST_F(ReportVerb, TheIterationLimitAndTheExactCommandReachTheReport) {
    const Outcome o = report({sample_, "--output", file("short.html"), "--max-iterations", "2"});
    ASSERT_EQ(o.code, 0) << o.err;
    std::ifstream in(file("short.html"));
    const std::string html((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    EXPECT_NE(html.find("saddlewise report " + sample_ + " --output " + file("short.html") + " --max-iterations 2"),
              std::string::npos);
    EXPECT_NE(html.find("iteration-limit"), std::string::npos);
}

TEST_F(ReportVerb, AReportStoppedBySignalLeavesNoFileBehind) {
    // The two-valve study with a 2000 x 2000 basin grid takes many seconds; TERM after one
    // second arrives while the report is being made. The temporary file must go with it.
    std::ifstream in(sample_);
    std::stringstream text;
    text << in.rdbuf();
    std::string study = text.str();
    const std::string grid = "\"grid\": 200";
    ASSERT_NE(study.find(grid), std::string::npos);
    study.replace(study.find(grid), grid.size(), "\"grid\": 2000");
    std::ofstream(file("slow.json")) << study;
    const std::string command = "cd '" + folder_.string() + "' && timeout -s TERM 1 '" + std::string(SW_EXECUTABLE) +
                                "' report slow.json -o out.html >/dev/null 2>&1";
    const int status = std::system(command.c_str());
    EXPECT_NE(status, 0) << "the report finished within a second; the test needs a slower study";
    for (const auto& entry : fs::directory_iterator(folder_))
        EXPECT_EQ(entry.path().filename(), "slow.json") << "left behind: " << entry.path();
}

TEST(CommandLine, VersionNamesTheBuild) {
    std::ostringstream out, err;
    ASSERT_EQ(sw::cli::runCommandLine({"--version"}, out, err), 0);
    EXPECT_EQ(out.str().rfind("saddlewise 0.", 0), 0u) << out.str();
    EXPECT_NE(out.str().find(" ("), std::string::npos) << "the build id follows the version: " << out.str();
}

}  // namespace
