// The survey verbs critical and basins: JSON contracts, text, pictures, bad input, and (when
// the program is built with MPI) the same result from two MPI processes as from one.
#include "app/cli/cli.h"
#include "core/survey/survey_json.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>

namespace {

struct Result {
    int code;
    std::string out, err;
};

Result runInProcess(const std::vector<std::string>& args) {
    std::ostringstream out, err;
    const int code = sw::cli::runCommandLine(args, out, err);
    return {code, out.str(), err.str()};
}

std::string slurp(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

// Runs a shell command line as a user would, with the output captured.
Result runShell(const std::string& command) {
    const std::string base = std::string(SW_BINARY_DIR) + "/survey_test_" + std::to_string(::getpid());
    const int status = std::system((command + " >'" + base + ".out' 2>'" + base + ".err'").c_str());
    Result r{WIFEXITED(status) ? WEXITSTATUS(status) : -1, slurp(base + ".out"), slurp(base + ".err")};
    std::remove((base + ".out").c_str());
    std::remove((base + ".err").c_str());
    return r;
}

std::string program() { return std::string("'") + SW_EXECUTABLE + "'"; }

const char* kHimmelblau = "(x^2 + y - 11)^2 + (x + y^2 - 7)^2";
const char* kTwoValve = "(a^2 - 1)^2 + (b^2 - 1)^2 + 0.5*a*b";

TEST(CriticalVerb, JsonHasTheDocumentedKeys) {
    const Result r = runInProcess({"critical", kHimmelblau, "--box", "x=-5:5,y=-5:5", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    for (const char* key : {"points", "starts", "seconds", "found_once", "likely_complete", "formula"})
        EXPECT_TRUE(j.contains(key)) << key;
    // Himmelblau (1972): four minima, one maximum; the four saddles (SymPy 1.11.1, see
    // tests/reference/survey): nine points in all.
    ASSERT_EQ(j["points"].size(), 9u);
    int minima = 0, saddles = 0, maxima = 0;
    for (const auto& p : j["points"]) {
        for (const char* key : {"x", "value", "kind", "index", "eigenvalues", "gradient_norm"})
            EXPECT_TRUE(p.contains(key)) << key;
        EXPECT_TRUE(p["x"].contains("x") && p["x"].contains("y"));
        EXPECT_EQ(p["eigenvalues"].size(), 2u);
        minima += p["kind"] == "minimum";
        saddles += p["kind"] == "saddle";
        maxima += p["kind"] == "maximum";
    }
    EXPECT_EQ(minima, 4);
    EXPECT_EQ(saddles, 4);
    EXPECT_EQ(maxima, 1);
    EXPECT_EQ(j["starts"].get<int>(), j["starts_low_discrepancy"].get<int>() + j["starts_sign_change"].get<int>());
}

TEST(CriticalVerb, TextListsThePointsAndSaysWhetherTheSearchLooksComplete) {
    const Result r = runInProcess({"critical", kHimmelblau, "--box", "x=-5:5,y=-5:5"});
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_NE(r.out.find("maximum"), std::string::npos);
    EXPECT_NE(r.out.find("probably complete"), std::string::npos);
    EXPECT_NE(r.out.find("Caution: "), std::string::npos) << "the caution goes with every result";
    const Result few = runInProcess({"critical", kHimmelblau, "--box", "x=-5:5,y=-5:5", "--starts", "3",
                                     "--sign-change-grid", "0"});
    ASSERT_EQ(few.code, 0) << few.err;
    EXPECT_NE(few.out.find("reached by only one start"), std::string::npos) << few.out;
}

TEST(CriticalVerb, AnyNumberOfVariables) {
    const Result r = runInProcess({"critical", "(x^2-1)^2 + (y^2-1)^2 + (z^2-1)^2", "--box",
                                   "x=-2:2,y=-2:2,z=-2:2", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_EQ(nlohmann::json::parse(r.out)["points"].size(), 27u);  // 3^3 (analytic)
}

TEST(CriticalVerb, BadInputNamesThePlace) {
    struct Case {
        std::vector<std::string> args;
        std::string says;
    };
    const std::vector<Case> cases = {
        {{"critical", kHimmelblau, "--box", "x=-5:5,y=2:2"}, "--box y: the low end must be below the high end"},
        {{"critical", kHimmelblau}, "--box"},
        {{"critical", kHimmelblau, "--box", "x=-5:5,y=-5:5", "--starts", "0"}, "--starts"},
        {{"critical", kHimmelblau, "--box", "x=-5:5,y=-5:5", "--plane", "x,q"}, "'q' is not one of the --box variables"},
        {{"critical", "x^2 + y**2", "--box", "x=-5:5,y=-5:5"}, "^"},
        {{"critical", "x^2 + y^2 + z", "--box", "x=-5:5,y=-5:5"}, "z"},
        {{"critical", "x^2 + y^2 + z^2", "--box", "x=-5:5,y=-5:5,z=0:1", "--at", "z=3"}, "outside its --box range"},
    };
    for (const Case& c : cases) {
        const Result r = runInProcess(c.args);
        EXPECT_EQ(r.code, 2) << c.args.back();
        EXPECT_NE(r.err.find(c.says), std::string::npos) << r.err;
        EXPECT_EQ(r.err.find("internal error"), std::string::npos) << r.err;
    }
}

TEST(BasinsVerb, JsonCountsAddUpToTheGridForEveryMethod) {
    const Result r = runInProcess({"basins", kTwoValve, "--box", "a=-1.6:1.6,b=-1.6:1.6", "--grid", "24", "--method",
                                   "newton", "--method", "trust-region-exact", "--option",
                                   "trust-region-exact.initial_radius=0.5", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    EXPECT_EQ(j["provenance"]["formula"], kTwoValve);
    EXPECT_FALSE(j["provenance"]["caution"].get<std::string>().empty());
    ASSERT_EQ(j["methods"].size(), 2u);
    EXPECT_EQ(j["methods"][1]["options"]["initial_radius"], "0.5");
    for (const auto& m : j["methods"]) {
        for (const char* key : {"cells", "counts", "points", "seconds", "iterations"}) EXPECT_TRUE(m.contains(key)) << key;
        ASSERT_EQ(m["cells"].size(), 24u * 24u);
        long sum = 0;
        ASSERT_EQ(m["counts"]["points"].size(), m["points"].size());
        for (const auto& c : m["counts"]["points"]) sum += c.get<long>();
        for (const char* k : {"limit", "diverged", "failed", "outside", "not_run"}) sum += m["counts"][k].get<long>();
        EXPECT_EQ(sum, 24 * 24);
        for (const auto& c : m["cells"]) {
            EXPECT_GE(c.get<int>(), -4);
            EXPECT_LT(c.get<int>(), static_cast<int>(m["points"].size()));
        }
    }
}

TEST(BasinsVerb, WritesThePicture) {
    const std::string path = SW_BINARY_DIR "/basins_verb_test.png";
    std::remove(path.c_str());
    const Result r = runInProcess({"basins", kTwoValve, "--box", "a=-1.6:1.6,b=-1.6:1.6", "--grid", "20", "--method",
                                   "newton", "--method", "saddle-free-newton", "--png", path, "--png-size", "100"});
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_NE(r.out.find("wrote " + path), std::string::npos);
    EXPECT_EQ(slurp(path).substr(0, 8), std::string("\x89PNG\r\n\x1a\n", 8));
    std::remove(path.c_str());
    const Result bad = runInProcess({"basins", kTwoValve, "--box", "a=-1.6:1.6,b=-1.6:1.6", "--grid", "5", "--method",
                                     "newton", "--png", "/nonexistent-folder/b.png"});
    EXPECT_EQ(bad.code, 1);
    EXPECT_NE(bad.err.find("--png: cannot open '/nonexistent-folder/b.png'"), std::string::npos) << bad.err;
}

TEST(BasinsVerb, HoldsTheOtherVariablesWhereAsked) {
    const Result r = runInProcess({"basins", "(a^2 - 1)^2 + (b^2 - 1)^2 + (c - 0.25)^2", "--box",
                                   "a=-1.6:1.6,b=-1.6:1.6,c=-1:1", "--at", "c=0.5", "--grid", "10", "--method",
                                   "trust-region-exact", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    EXPECT_EQ(j["plane"]["held"]["c"], 0.5);
    for (const auto& p : j["methods"][0]["points"])
        if (p["kind"] == "minimum") {
            EXPECT_NEAR(p["x"]["c"].get<double>(), 0.25, 1e-12);
        }
}

TEST(CriticalVerb, ALauncherWithSeveralProcessesButNoMpiIsRefused) {
    // This test program installs no MPI process group (as a build without MPI): started by
    // mpirun -n 2, each process would map the whole box and print it. Refused, exit 2.
    ::setenv("OMPI_COMM_WORLD_SIZE", "2", 1);
    const Result r = runInProcess({"critical", "x^2 - y^2", "--box", "x=-1:1,y=-1:1"});
    ::unsetenv("OMPI_COMM_WORLD_SIZE");
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_NE(r.err.find("built without MPI"), std::string::npos) << r.err;
    EXPECT_TRUE(r.out.empty());
    EXPECT_EQ(runInProcess({"critical", "x^2 - y^2", "--box", "x=-1:1,y=-1:1"}).code, 0);  // one process: fine
}

TEST(BasinsVerb, BadInputNamesThePlaceAndTheLimit) {
    struct Case {
        std::vector<std::string> args;
        std::string says;
    };
    const std::vector<std::string> box = {"basins", kTwoValve, "--box", "a=-1.6:1.6,b=-1.6:1.6"};
    auto with = [&](std::vector<std::string> more) {
        std::vector<std::string> a = box;
        a.insert(a.end(), more.begin(), more.end());
        return a;
    };
    const std::vector<Case> cases = {
        {with({"--grid", "5000", "--method", "newton"}), "above the limit of 16,000,000 cells"},
        {with({"--grid", "5000", "--method", "newton"}), "about 110 bytes while it is mapped, 150 with --json: the limit keeps a survey under about 2,400 MB"},
        {with({"--grid", "3000", "--method", "newton", "--method", "bfgs"}), "18,000,000 runs, above the limit"},
        {with({"--grid", "0", "--method", "newton"}), "--grid"},
        {with({"--grid", "10"}), "--method"},
        {with({"--grid", "10", "--method", "levenberg-marquardt"}), "needs a least-squares objective"},
        {with({"--grid", "10", "--method", "newtn"}), "unknown method 'newtn'"},
        {with({"--grid", "10", "--method", "bfgs", "--option", "initial_radius=2"}), "initial_radius"},
        {{"basins", "x^2", "--box", "x=-1:1", "--grid", "10", "--method", "newton"}, "at least two variables"},
        {{"basins", kTwoValve, "--box", "a=1:1,b=0:1", "--grid", "10", "--method", "newton"}, "--box a"},
    };
    for (const Case& c : cases) {
        const Result r = runInProcess(c.args);
        EXPECT_EQ(r.code, 2) << c.says;
        EXPECT_NE(r.err.find(c.says), std::string::npos) << r.err;
        EXPECT_EQ(r.err.find("internal error"), std::string::npos) << r.err;
    }
}

TEST(SurveyVerbs, RunAsAProgram) {
    const Result r = runShell(program() + " critical 'x^3 - 3*x*y^2' --box x=-1:1,y=-1:1 --json");
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    ASSERT_EQ(j["points"].size(), 1u);  // the monkey saddle's one degenerate point (analytic)
    EXPECT_EQ(j["points"][0]["kind"], "degenerate");
    EXPECT_EQ(runShell(program() + " basins 'x^2+y^2' --box x=-1:1,y=-1:1 --grid 0 --method newton").code, 2);
}

#ifdef SW_MPIEXEC
// OpenMPI refuses to run as root unless told; the flag is added only then.
std::string mpirun(int processes) {
    // In containers without ptrace rights OpenMPI's single-copy shared-memory path fails for
    // larger messages; the copy-in/copy-out path works everywhere (common practice).
    std::string command = std::string("OMPI_MCA_btl_vader_single_copy_mechanism=none '") + SW_MPIEXEC + "' --oversubscribe";
    if (::geteuid() == 0) command += " --allow-run-as-root";
    return command + " -n " + std::to_string(processes) + " " + program();
}

nlohmann::json parsed(const Result& r) {
    EXPECT_EQ(r.code, 0) << r.err;
    return r.code == 0 ? nlohmann::json::parse(r.out) : nlohmann::json();
}

TEST(SurveyMpi, TwoProcessesGiveTheSingleProcessResult) {
    const std::string basins = std::string(" basins '") + kTwoValve +
                               "' --box a=-1.6:1.6,b=-1.6:1.6 --grid 61 --method newton --method gradient-descent "
                               "--max-iterations 40 --json";
    const nlohmann::json one = parsed(runShell(program() + basins));
    const Result split = runShell(mpirun(2) + basins);
    const nlohmann::json two = parsed(split);
    ASSERT_FALSE(one.is_null());
    ASSERT_FALSE(two.is_null());
    EXPECT_EQ(sw::survey::withoutTimings(two), sw::survey::withoutTimings(one)) << "same JSON apart from timings";
    EXPECT_EQ(two["methods"][0]["counts"], one["methods"][0]["counts"]);
    EXPECT_GT(one["methods"][1]["counts"]["limit"].get<long>(), 0) << "the limit outcome travels too";

    const std::string critical = std::string(" critical '") + kHimmelblau + "' --box x=-5:5,y=-5:5 --json";
    const nlohmann::json alone = parsed(runShell(program() + critical));
    const nlohmann::json together = parsed(runShell(mpirun(2) + critical));
    EXPECT_EQ(sw::survey::withoutTimings(together), sw::survey::withoutTimings(alone));
    EXPECT_EQ(together["points"].size(), 9u);

    // Only process 0 speaks: one result, one error message.
    const Result error = runShell(mpirun(2) + " critical 'x^2' --box x=1:0");
    EXPECT_NE(error.code, 0);
    const auto first = error.err.find("the low end must be below");
    ASSERT_NE(first, std::string::npos) << error.err;
    EXPECT_EQ(error.err.find("the low end must be below", first + 1), std::string::npos) << error.err;
}
#endif

}  // namespace
