// The first argument and the display, run as the built executable (SW_EXECUTABLE) without a
// display: DISPLAY and WAYLAND_DISPLAY unset, QT_QPA_PLATFORM unset or xcb. An unknown verb,
// a study file that is not there, a folder, or no display at all must each give one line on
// stderr and exit 2 - never Qt's abort ("could not load the Qt platform plugin", exit 134).
// Also the in-process dispatch (classifyFirstArgument / reportFirstArgument).
#include "app/cli/cli.h"

#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>

namespace {

struct Result {
    bool exited = false;  // false when killed by a signal (an abort)
    int code = -1;
    std::string out, err;
};

std::string quote(const std::string& s) {
    std::string q = "'";
    for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

std::string slurp(const std::string& path) {
    std::ifstream in(path);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

// Runs the executable with `environment` (e.g. "QT_QPA_PLATFORM=xcb") after removing every
// display variable.
Result runWithoutDisplay(const std::vector<std::string>& args, const std::string& environment = "") {
    const std::string base = "/tmp/sw_first_argument_" + std::to_string(::getpid()) + "_" + std::to_string(std::rand());
    std::string command = "env -u DISPLAY -u WAYLAND_DISPLAY -u QT_QPA_PLATFORM " + environment + " " + quote(SW_EXECUTABLE);
    for (const auto& a : args) command += " " + quote(a);
    command += " >" + base + ".out 2>" + base + ".err </dev/null";
    const int status = std::system(command.c_str());
    Result r;
    // std::system runs /bin/sh, which reports a child killed by a signal as 128 + signal.
    r.exited = WIFEXITED(status) && WEXITSTATUS(status) < 128;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = slurp(base + ".out");
    r.err = slurp(base + ".err");
    std::remove((base + ".out").c_str());
    std::remove((base + ".err").c_str());
    return r;
}

int lines(const std::string& text) {
    int n = 0;
    for (char c : text) n += c == '\n';
    return n;
}

// A path in the source tree. (Built with append, not operator+: GCC 12 warns -Warray-bounds
// wrongly on a temporary string plus a literal once the source folder's length is known.)
std::string sourcePath(const std::string& rest) {
    std::string path = SW_SOURCE_DIR;
    path.append(rest);
    return path;
}

std::string sampleStudy() { return sourcePath("/samples/two-valve-saddles.json"); }

}  // namespace

TEST(FirstArgument, AnUnknownVerbIsOneLineWithTheVerbListAndExit2) {
    for (const char* environment : {"", "QT_QPA_PLATFORM=xcb"}) {
        // "landscape" is not a verb: the list comes from verbs(), so a new verb needs nothing here.
        const Result r = runWithoutDisplay({"landscape", "x^2 + y^2"}, environment);
        ASSERT_TRUE(r.exited) << r.err;
        EXPECT_EQ(r.code, 2) << r.err;
        EXPECT_EQ(lines(r.err), 1) << r.err;
        EXPECT_NE(r.err.find("unknown verb or file 'landscape'"), std::string::npos) << r.err;
        for (const sw::cli::Verb& v : sw::cli::verbs()) EXPECT_NE(r.err.find(v.name), std::string::npos) << v.name;
        EXPECT_TRUE(r.out.empty());
    }
}

TEST(FirstArgument, AnUnknownOptionIsOneLineWithTheVerbListAndExit2) {
    const Result r = runWithoutDisplay({"--nonsense"});
    ASSERT_TRUE(r.exited) << r.err;
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_EQ(lines(r.err), 1) << r.err;
    EXPECT_NE(r.err.find("unknown option '--nonsense'"), std::string::npos) << r.err;
    for (const sw::cli::Verb& v : sw::cli::verbs()) EXPECT_NE(r.err.find(v.name), std::string::npos) << v.name;
}

TEST(FirstArgument, QtWindowOptionsGoToTheWindowAndTheStudyAfterThemIsChecked) {
    // `-platform NAME` and friends are the window's (Qt's own options); without a display the
    // window says so in one line instead of calling them unknown.
    const Result r = runWithoutDisplay({"-platform", "xcb"});
    ASSERT_TRUE(r.exited) << r.err;
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_NE(r.err.find("no display"), std::string::npos) << r.err;
    EXPECT_EQ(r.err.find("unknown"), std::string::npos) << r.err;
    const Result missing = runWithoutDisplay({"-platform", "offscreen", "-reverse", "nosuchfile.json"});
    ASSERT_TRUE(missing.exited);
    EXPECT_EQ(missing.code, 2);
    EXPECT_NE(missing.err.find("nosuchfile.json"), std::string::npos) << missing.err;
    EXPECT_EQ(lines(missing.err), 1) << missing.err;
}

TEST(FirstArgument, AMistypedVerbGetsASuggestion) {
    const Result r = runWithoutDisplay({"sampel", "x"});
    ASSERT_TRUE(r.exited);
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("did you mean 'sample'?"), std::string::npos) << r.err;
    EXPECT_EQ(lines(r.err), 1) << r.err;
}

TEST(FirstArgument, AStudyFileThatIsNotThereIsReportedBeforeAnyWindow) {
    for (const char* environment : {"", "QT_QPA_PLATFORM=xcb"}) {
        const Result r = runWithoutDisplay({"nosuchfile.json"}, environment);
        ASSERT_TRUE(r.exited) << r.err;
        EXPECT_EQ(r.code, 2) << r.err;
        EXPECT_EQ(lines(r.err), 1) << r.err;
        EXPECT_NE(r.err.find("cannot open study 'nosuchfile.json': no such file"), std::string::npos) << r.err;
        const Result nested = runWithoutDisplay({"no/such/folder/study.json"}, environment);
        EXPECT_EQ(nested.code, 2);
        EXPECT_NE(nested.err.find("no such file"), std::string::npos) << nested.err;
    }
}

TEST(FirstArgument, AFolderIsNotAStudy) {
    const Result r = runWithoutDisplay({sourcePath("/samples")});
    ASSERT_TRUE(r.exited);
    EXPECT_EQ(r.code, 2);
    EXPECT_EQ(lines(r.err), 1) << r.err;
    EXPECT_NE(r.err.find("it is a folder, not a study file"), std::string::npos) << r.err;
}

TEST(FirstArgument, NoDisplayIsOneLineAndExit2ForTheWindowAndForAStudy) {
    std::vector<std::vector<std::string>> argumentLists(2);
    argumentLists[1].push_back(sampleStudy());
    for (const char* environment : {"", "QT_QPA_PLATFORM=xcb"})
        for (const std::vector<std::string>& args : argumentLists) {
            const Result r = runWithoutDisplay(args, environment);
            ASSERT_TRUE(r.exited) << "killed by a signal: " << r.err;
            EXPECT_EQ(r.code, 2) << r.err;
            EXPECT_EQ(lines(r.err), 1) << r.err;
            // The window build names the missing display; a build without the window says so.
            EXPECT_TRUE(r.err.find("no display") != std::string::npos ||
                        r.err.find("built without the window") != std::string::npos)
                << r.err;
            EXPECT_NE(r.err.find("saddlewise --help"), std::string::npos) << r.err;
            EXPECT_EQ(r.err.find("Aborted"), std::string::npos);
        }
}

TEST(FirstArgument, ADisplayThatDoesNotAnswerIsOneLineAndExit2) {
    // DISPLAY names a display no X server serves: Qt's xcb plugin cannot connect and Qt gives
    // up with a fatal message; that must become our line, not an abort.
    const Result r = runWithoutDisplay({}, "QT_QPA_PLATFORM=xcb DISPLAY=:987");
    ASSERT_TRUE(r.exited) << "killed by a signal: " << r.err;
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_EQ(lines(r.err), 1) << r.err;
    EXPECT_TRUE(r.err.find("no display could be opened") != std::string::npos ||
                r.err.find("built without the window") != std::string::npos)
        << r.err;
}

TEST(FirstArgument, HeadlessVerbsNeedNoDisplay) {
    const Result r = runWithoutDisplay({"derive", "x^2*y", "--at", "x=1,y=2"}, "QT_QPA_PLATFORM=xcb");
    ASSERT_TRUE(r.exited);
    EXPECT_EQ(r.code, 0) << r.err;
    const Result help = runWithoutDisplay({"--help"});
    EXPECT_EQ(help.code, 0);
}

TEST(FirstArgument, ClassifiesFromTheVerbListAndTheFileSystem) {
    using sw::cli::FirstArgument;
    using sw::cli::classifyFirstArgument;
    EXPECT_EQ(classifyFirstArgument({}), FirstArgument::Window);
    for (const sw::cli::Verb& v : sw::cli::verbs()) EXPECT_EQ(classifyFirstArgument({v.name}), FirstArgument::Headless);
    EXPECT_EQ(classifyFirstArgument({"--help"}), FirstArgument::Headless);
    EXPECT_EQ(classifyFirstArgument({"--nonsense"}), FirstArgument::Headless);  // runCommandLine reports it
    EXPECT_EQ(classifyFirstArgument({"landscape"}), FirstArgument::UnknownVerb);
    EXPECT_EQ(classifyFirstArgument({"-platform", "offscreen"}), FirstArgument::Window);
    EXPECT_EQ(classifyFirstArgument({"-style", "fusion", sampleStudy()}), FirstArgument::Window);
    std::string subject;
    EXPECT_EQ(classifyFirstArgument({"-reverse", "nosuch.json"}, &subject), FirstArgument::MissingStudy);
    EXPECT_EQ(subject, "nosuch.json");
    EXPECT_EQ(classifyFirstArgument({"nosuchfile.json"}), FirstArgument::MissingStudy);
    EXPECT_EQ(classifyFirstArgument({sampleStudy()}), FirstArgument::Window);
    EXPECT_EQ(classifyFirstArgument({sourcePath("")}), FirstArgument::NotAStudy);
    std::ostringstream err;
    EXPECT_EQ(sw::cli::reportFirstArgument(FirstArgument::UnknownVerb, "bad\x01word", err), 2);
    EXPECT_EQ(err.str().find('\x01'), std::string::npos);  // control characters are not echoed
    EXPECT_EQ(lines(err.str()), 1);
}
