// The verbs minimize and methods: exit codes, JSON keys, tables and error messages.
#include "app/cli/cli.h"
#include "app/cli/run_report.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <set>
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
    std::ifstream in(path);
    std::stringstream s;
    s << in.rdbuf();
    return s.str();
}

// Runs the built program as a process, as a user's shell would.
Result runProgram(const std::string& arguments) {
    const std::string base = std::string(SW_BINARY_DIR) + "/minimize_test_" + std::to_string(::getpid());
    const std::string command = std::string("'") + SW_EXECUTABLE + "' " + arguments + " >'" + base + ".out' 2>'" + base + ".err'";
    const int status = std::system(command.c_str());
    Result r{WIFEXITED(status) ? WEXITSTATUS(status) : -1, slurp(base + ".out"), slurp(base + ".err")};
    std::remove((base + ".out").c_str());
    std::remove((base + ".err").c_str());
    return r;
}

const char* kRosenbrock = "100*(y-x^2)^2+(1-x)^2";

TEST(MinimizeVerb, JsonHasEveryDocumentedKey) {
    // Rosenbrock (1960): minimiser (1, 1), f* = 0 (value from memory).
    Result r = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    for (const char* key : {"method", "termination", "message", "x", "value", "gradient_norm", "iterations",
                            "evaluations", "end_point", "trace"})
        EXPECT_TRUE(j.contains(key)) << key;
    EXPECT_EQ(j["method"], "bfgs");
    EXPECT_EQ(j["termination"], "gradient-norm-below");
    EXPECT_NEAR(j["x"][0].get<double>(), 1.0, 1e-6);
    EXPECT_NEAR(j["x"][1].get<double>(), 1.0, 1e-6);
    for (const char* key : {"value", "gradient", "hessian"}) EXPECT_TRUE(j["evaluations"].contains(key)) << key;
    EXPECT_EQ(j["end_point"]["kind"], "minimum");
    EXPECT_EQ(j["end_point"]["index"], 0);
    EXPECT_EQ(j["end_point"]["eigenvalues"].size(), 2u);
    ASSERT_EQ(j["trace"].size(), j["iterations"].get<std::size_t>() + 1);
    const nlohmann::json& first = j["trace"][0];
    for (const char* key : {"iteration", "x", "value", "gradient", "gradient_norm", "step", "step_kind", "step_length",
                            "step_norm", "trials", "trust_radius", "ratio", "damping", "damping_name",
                            "predicted_decrease", "actual_decrease", "accepted", "hessian_eigenvalues",
                            "condition_number", "angle_to_steepest_descent", "evaluations", "note"})
        EXPECT_TRUE(first.contains(key)) << key;
    EXPECT_EQ(first["step_kind"], "quasi-newton");
    EXPECT_TRUE(first["trust_radius"].is_null());  // NaN becomes null
    EXPECT_FALSE(first["trials"].empty());
}

TEST(MinimizeVerb, SeveralMethodsPrintAComparisonTable) {
    Result r = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs", "--method",
                             "newton", "--method", "nelder-mead", "--max-iterations", "500", "--summary"});
    ASSERT_EQ(r.code, 0) << r.err;
    for (const char* word : {"method", "iterations", "evals v/g/h", "final value", "termination", "end point", "bfgs",
                             "newton", "nelder-mead", "local minimum"})
        EXPECT_NE(r.out.find(word), std::string::npos) << word << "\n" << r.out;
}

TEST(MinimizeVerb, SeveralMethodsInJsonAreARunsArray) {
    Result r = runInProcess(
        {"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs", "--method", "lbfgs", "--json", "--summary"});
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    ASSERT_EQ(j["runs"].size(), 2u);
    EXPECT_EQ(j["runs"][1]["method"], "lbfgs");
    EXPECT_FALSE(j["runs"][0].contains("trace"));
}

TEST(MinimizeVerb, SingleMethodTextHasATableAndASummary) {
    Result r = runInProcess({"minimize", "x^2-y^2", "--from", "x=0.3,y=-0.2", "--method", "newton"});
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_NE(r.out.find("|∇f|"), std::string::npos) << r.out;  // the window's notation
    EXPECT_EQ(r.out.find("|g|"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("termination:   gradient-norm-below"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("saddle of index 1"), std::string::npos) << r.out;
}

TEST(MinimizeVerb, OptionsQualifiedAndUnqualified) {
    Result r = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "lbfgs", "--method",
                             "bfgs", "--option", "lbfgs.memory=3", "--option", "curvature=0.5", "--json", "--summary"});
    ASSERT_EQ(r.code, 0) << r.err;
    r = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs", "--option", "memory=3"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("no chosen method has this option"), std::string::npos) << r.err;
    r = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs", "--option", "lbfgs.memory=3"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("not among the --method choices"), std::string::npos) << r.err;
}

// Former names (docs/names.md) are read as the current ones; both at once is a usage error.
TEST(MinimizeVerb, ReadsFormerOptionNamesAsTheCurrentOnes) {
    auto iterations = [](const Result& r) { return nlohmann::json::parse(r.out)["iterations"].get<int>(); };
    const std::vector<std::string> base = {"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "nelder-mead",
                                           "--json", "--summary"};
    auto with = [&](std::vector<std::string> extra) {
        std::vector<std::string> args = base;
        args.insert(args.end(), extra.begin(), extra.end());
        return runInProcess(args);
    };
    const Result current = with({"--option", "dimension_scaled_moves=true"});
    const Result former = with({"--option", "adaptive=true"});
    const Result qualified = with({"--option", "nelder-mead.adaptive=true"});
    ASSERT_EQ(current.code, 0) << current.err;
    ASSERT_EQ(former.code, 0) << former.err;
    ASSERT_EQ(qualified.code, 0) << qualified.err;
    EXPECT_EQ(iterations(former), iterations(current));
    EXPECT_EQ(iterations(qualified), iterations(current));
    EXPECT_EQ(nlohmann::json::parse(current.out)["termination"], "simplex-size-below");
    const Result both = with({"--option", "adaptive=true", "--option", "dimension_scaled_moves=false"});
    EXPECT_EQ(both.code, 2);
    EXPECT_NE(both.err.find("name the same option (dimension_scaled_moves)"), std::string::npos) << both.err;

    const Result gradient = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs",
                                          "--gradient-tolerance", "1e-3", "--json", "--summary"});
    const Result renamed = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs",
                                         "--gradient-norm-below", "1e-3", "--json", "--summary"});
    ASSERT_EQ(gradient.code, 0) << gradient.err;
    EXPECT_EQ(iterations(gradient), iterations(renamed));
    EXPECT_LE(nlohmann::json::parse(renamed.out)["gradient_norm"].get<double>(), 1e-3);
    const Result twice = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgs",
                                       "--gradient-tolerance", "1e-3", "--gradient-norm-below", "1e-3"});
    EXPECT_EQ(twice.code, 2);
    EXPECT_NE(twice.err.find("former name of --gradient-norm-below"), std::string::npos) << twice.err;
}

TEST(MinimizeVerb, BadOptionValueNamesOptionAndRange) {
    Result r = runInProcess(
        {"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "lbfgs", "--option", "memory=0"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("option memory: must be a whole number in [1, 1000] (got '0')"), std::string::npos) << r.err;
}

TEST(MinimizeVerb, UnknownMethodListsTheKnownIds) {
    Result r = runInProcess({"minimize", kRosenbrock, "--from", "x=-1.2,y=1", "--method", "bfgz"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("unknown method 'bfgz'; known: "), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("nelder-mead"), std::string::npos) << r.err;
}

TEST(MinimizeVerb, FormulaNotFiniteAtTheStartIsBadInput) {
    Result r = runInProcess({"minimize", "ln(x)+y^2", "--from", "x=-1,y=0", "--method", "bfgs"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("not finite at the start point"), std::string::npos) << r.err;
}

TEST(MinimizeVerb, MissingPiecesAreUsageErrors) {
    EXPECT_EQ(runInProcess({"minimize", kRosenbrock, "--method", "bfgs"}).code, 2);
    EXPECT_EQ(runInProcess({"minimize", kRosenbrock, "--from", "x=1,y=1"}).code, 2);
    EXPECT_EQ(runInProcess({"minimize", "--from", "x=1,y=1", "--method", "bfgs"}).code, 2);
    Result r = runInProcess({"minimize", "x^2+z", "--from", "x=1,y=1", "--method", "bfgs"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("z"), std::string::npos) << r.err;
}

TEST(MinimizeVerb, ABreakdownExitsWithOne) {
    // A fixed step of 10 on x^2 diverges to inf: the run breaks down (non-finite).
    Result r = runInProcess({"minimize", "x^2", "--from", "x=1", "--method", "gradient-descent", "--option",
                             "line_search=fixed", "--option", "step_size=10", "--max-iterations", "100000", "--json",
                             "--summary"});
    EXPECT_EQ(r.code, 1) << r.out << r.err;
    EXPECT_EQ(nlohmann::json::parse(r.out)["termination"], "non-finite");
}

TEST(MethodsVerb, JsonListsEveryMethodWithNeedsAndOptions) {
    Result r = runInProcess({"methods", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const nlohmann::json j = nlohmann::json::parse(r.out);
    std::set<std::string> ids;
    for (const auto& m : j["methods"]) {
        ids.insert(m["id"].get<std::string>());
        EXPECT_TRUE(m.contains("summary"));
        EXPECT_TRUE(m["needs"].contains("hessian"));
        for (const auto& o : m["options"]) {
            EXPECT_TRUE(o.contains("default"));
            EXPECT_TRUE(o.contains("range"));
        }
    }
    for (const char* id : {"gradient-descent", "momentum", "nesterov", "adam", "newton", "damped-newton",
                           "modified-newton", "saddle-free-newton", "bfgs", "lbfgs", "cg-fletcher-reeves",
                           "cg-polak-ribiere", "nelder-mead"})
        EXPECT_EQ(ids.count(id), 1u) << id;
}

TEST(MethodsVerb, TextShowsOptionsWithDefaultsAndRanges) {
    Result r = runInProcess({"methods"});
    ASSERT_EQ(r.code, 0);
    EXPECT_NE(r.out.find("--option memory=10  (a whole number in [1, 1000])"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("needs: gradient, Hessian"), std::string::npos);
}

TEST(MinimizeProgram, ExitCodesAsAProcess) {
    Result ok = runProgram("minimize 'x^2+2*y^2' --from x=1,y=1 --method newton --json");
    EXPECT_EQ(ok.code, 0) << ok.err;
    EXPECT_EQ(nlohmann::json::parse(ok.out)["iterations"], 1);
    Result bad = runProgram("minimize 'x^2+2*y^2' --from x=1,y=1 --method newtn");
    EXPECT_EQ(bad.code, 2);
    EXPECT_NE(bad.err.find("unknown method 'newtn'"), std::string::npos) << bad.err;
    Result methods = runProgram("methods --json");
    EXPECT_EQ(methods.code, 0);
}

}  // namespace
