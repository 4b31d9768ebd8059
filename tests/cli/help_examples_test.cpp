// Every example a user is shown runs: the examples in each verb's --help (found by reading
// the help text, so a new verb is covered as soon as it is listed by `saddlewise --help`) and
// the command lines in README.md. Each runs as a user would type it, through /bin/sh, in a
// scratch folder that links to the bundled samples (so examples name samples/... and any file
// an example writes lands in the scratch folder, not in the source tree).
#include <gtest/gtest.h>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>
#include <vector>

namespace {

namespace fs = std::filesystem;

struct Outcome {
    int exitCode = -1;
    std::string out;  // stdout and stderr together
};

std::string quoted(const std::string& text) {
    std::string q = "'";
    for (char c : text) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

Outcome shell(const std::string& command) {
    Outcome outcome;
    FILE* pipe = ::popen((command + " 2>&1").c_str(), "r");
    if (!pipe) return outcome;
    std::array<char, 4096> buffer{};
    std::size_t n = 0;
    while ((n = std::fread(buffer.data(), 1, buffer.size(), pipe)) > 0) outcome.out.append(buffer.data(), n);
    const int status = ::pclose(pipe);
    outcome.exitCode = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return outcome;
}

std::vector<std::string> lines(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) out.push_back(line);
    return out;
}

std::string trimmed(const std::string& s) {
    const auto a = s.find_first_not_of(" \t");
    if (a == std::string::npos) return "";
    const auto b = s.find_last_not_of(" \t\r");
    return s.substr(a, b - a + 1);
}

bool startsWith(const std::string& s, const std::string& prefix) { return s.rfind(prefix, 0) == 0; }

// The verbs `saddlewise --help` lists: the first word of each indented line under "Verbs:".
std::vector<std::string> listedVerbs() {
    const Outcome overview = shell(quoted(SW_EXECUTABLE) + " --help");
    EXPECT_EQ(overview.exitCode, 0) << overview.out;
    std::vector<std::string> verbs;
    bool inList = false;
    for (const std::string& line : lines(overview.out)) {
        if (trimmed(line) == "Verbs:") {
            inList = true;
            continue;
        }
        if (!inList) continue;
        if (trimmed(line).empty()) break;
        std::istringstream words(line);
        std::string verb;
        words >> verb;
        verbs.push_back(verb);
    }
    return verbs;
}

// Command lines under an "Example:" or "Examples:" heading: indented lines starting with
// "saddlewise ", continued over lines ending in a backslash, up to the next blank line.
std::vector<std::string> examplesIn(const std::string& help) {
    std::vector<std::string> examples;
    bool inExamples = false;
    std::string pending;
    for (const std::string& line : lines(help)) {
        const std::string text = trimmed(line);
        if (text == "Example:" || text == "Examples:") {
            inExamples = true;
            continue;
        }
        if (!inExamples) continue;
        if (text.empty() && pending.empty()) {
            inExamples = false;
            continue;
        }
        if (pending.empty() && !startsWith(text, "saddlewise ")) continue;  // a sentence between examples
        pending += text;
        if (!pending.empty() && pending.back() == '\\') {
            pending.pop_back();
            continue;
        }
        examples.push_back(pending);
        pending.clear();
    }
    return examples;
}

// Command lines in README.md's shell blocks that call saddlewise.
std::vector<std::string> readmeExamples() {
    std::ifstream in(fs::path(SW_SOURCE_DIR) / "README.md");
    EXPECT_TRUE(in.good());
    std::vector<std::string> examples;
    bool inShell = false;
    for (std::string line; std::getline(in, line);) {
        const std::string text = trimmed(line);
        if (startsWith(text, "```")) {
            inShell = !inShell && (text == "```sh" || text == "```bash" || text == "```shell");
            continue;
        }
        if (inShell && (startsWith(text, "saddlewise ") || startsWith(text, "mpirun "))) examples.push_back(text);
    }
    return examples;
}

// A scratch folder with samples/ linked in, removed afterwards.
class ScratchFolder {
public:
    ScratchFolder() {
        path_ = fs::temp_directory_path() / ("saddlewise-examples-" + std::to_string(::getpid()));
        fs::remove_all(path_);
        fs::create_directories(path_);
        fs::create_directory_symlink(fs::path(SW_SOURCE_DIR) / "samples", path_ / "samples");
    }
    ~ScratchFolder() {
        std::error_code ignored;
        fs::remove_all(path_, ignored);
    }
    const fs::path& path() const { return path_; }

private:
    fs::path path_;
};

// Runs an example as typed, with "saddlewise" meaning the built executable. "mpirun -n N
// saddlewise ..." runs through the MPI launcher found at configure time (as root OpenMPI needs
// its flag; in containers its single-copy shared-memory path fails, so the copy path is used).
Outcome runExample(const std::string& example, const fs::path& folder) {
    std::string launcher;
    std::string rest = example;
    if (startsWith(example, "mpirun ")) {
        const auto at = example.find(" saddlewise ");
        if (at == std::string::npos) return Outcome{2, "an mpirun line without saddlewise: " + example};
#ifdef SW_MPIEXEC
        launcher = std::string("OMPI_MCA_btl_vader_single_copy_mechanism=none ") + quoted(SW_MPIEXEC) +
                   " --oversubscribe" + (::geteuid() == 0 ? " --allow-run-as-root" : "") +
                   example.substr(std::string("mpirun").size(), at - std::string("mpirun").size()) + " ";
#endif
        rest = example.substr(at + 1);  // without MPI the same survey runs in one process
    }
    const std::string arguments = rest.substr(std::string("saddlewise").size());
    return shell("cd " + quoted(folder.string()) + " && " + launcher + quoted(SW_EXECUTABLE) + arguments);
}

TEST(HelpExamples, EveryVerbIsListedAndShowsAtLeastOneExample) {
    const std::vector<std::string> verbs = listedVerbs();
    ASSERT_GE(verbs.size(), 6u);
    for (const std::string& verb : verbs) {
        const Outcome help = shell(quoted(SW_EXECUTABLE) + " " + verb + " --help");
        EXPECT_EQ(help.exitCode, 0) << verb;
        EXPECT_FALSE(examplesIn(help.out).empty())
            << "'saddlewise " << verb << " --help' shows no example (an \"Example:\" heading followed by an "
            << "indented 'saddlewise " << verb << " ...' line)";
    }
}

TEST(HelpExamples, EveryExampleInEveryVerbsHelpRuns) {
    const ScratchFolder folder;
    int run = 0;
    for (const std::string& verb : listedVerbs()) {
        const Outcome help = shell(quoted(SW_EXECUTABLE) + " " + verb + " --help");
        for (const std::string& example : examplesIn(help.out)) {
            SCOPED_TRACE(example);
            EXPECT_TRUE(startsWith(example, "saddlewise " + verb + " ")) << "an example of another verb in " << verb;
            const Outcome outcome = runExample(example, folder.path());
            EXPECT_EQ(outcome.exitCode, 0) << outcome.out;
            EXPECT_FALSE(outcome.out.empty());
            ++run;
        }
    }
    EXPECT_GE(run, 6);
}

TEST(HelpExamples, EveryCommandLineInTheReadmeRuns) {
    const ScratchFolder folder;
    const std::vector<std::string> examples = readmeExamples();
    ASSERT_GE(examples.size(), 6u);
    for (const std::string& example : examples) {
        SCOPED_TRACE(example);
        const Outcome outcome = runExample(example, folder.path());
        EXPECT_EQ(outcome.exitCode, 0) << outcome.out;
        EXPECT_FALSE(outcome.out.empty());
    }
}

// The reader above must find what it is meant to find, or the checks could pass on nothing.
TEST(HelpExamples, TheExampleReaderFindsContinuedLinesAndSkipsProse) {
    const std::string help =
        "Usage: saddlewise x\n\nExamples:\n  saddlewise x --a 1 \\\n               --b 2\n"
        "  A sentence about the next one.\n  saddlewise x --c\n\nExit codes: 0.\n  saddlewise not-an-example\n";
    const std::vector<std::string> found = examplesIn(help);
    ASSERT_EQ(found.size(), 2u);
    EXPECT_EQ(found[0], "saddlewise x --a 1 --b 2");
    EXPECT_EQ(found[1], "saddlewise x --c");
}

}  // namespace
