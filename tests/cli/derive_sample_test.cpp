// The derive and sample verbs, run as the built executable (SW_EXECUTABLE): exit codes,
// JSON keys and numbers. Expected values are worked by hand (common practice, no
// published source) unless stated.
#include <nlohmann/json.hpp>

#include <gtest/gtest.h>

#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>

namespace {

struct Result {
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

Result run(const std::vector<std::string>& args) {
    const std::string base = "/tmp/sw_cli_test_" + std::to_string(::getpid()) + "_" + std::to_string(std::rand());
    std::string command = quote(SW_EXECUTABLE);
    for (const auto& a : args) command += " " + quote(a);
    command += " >" + base + ".out 2>" + base + ".err";
    const int status = std::system(command.c_str());
    Result r;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = slurp(base + ".out");
    r.err = slurp(base + ".err");
    std::remove((base + ".out").c_str());
    std::remove((base + ".err").c_str());
    return r;
}

}  // namespace

TEST(DeriveVerb, PrintsValueGradientAndHessianAsJson) {
    // f = x^2*y + sin(y): f(1,2) = 2 + sin 2, grad = (2xy, x^2 + cos y) = (4, 1 + cos 2),
    // Hessian = [[2y, 2x], [2x, -sin y]] = [[4, 2], [2, -sin 2]].
    auto r = run({"derive", "x^2*y + sin(y)", "--at", "x=1,y=2", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    auto j = nlohmann::json::parse(r.out);
    for (const char* key : {"variables", "value", "gradient", "hessian", "gradient_formulas", "hessian_formulas"})
        EXPECT_TRUE(j.contains(key)) << key;
    EXPECT_EQ(j["variables"], nlohmann::json({"x", "y"}));
    EXPECT_DOUBLE_EQ(j["value"].get<double>(), 2 + std::sin(2.0));
    EXPECT_DOUBLE_EQ(j["gradient"][0].get<double>(), 4.0);
    EXPECT_DOUBLE_EQ(j["gradient"][1].get<double>(), 1 + std::cos(2.0));
    EXPECT_DOUBLE_EQ(j["hessian"][0][0].get<double>(), 4.0);
    EXPECT_DOUBLE_EQ(j["hessian"][0][1].get<double>(), 2.0);
    EXPECT_DOUBLE_EQ(j["hessian"][1][0].get<double>(), 2.0);
    EXPECT_DOUBLE_EQ(j["hessian"][1][1].get<double>(), -std::sin(2.0));
    EXPECT_EQ(j["gradient_formulas"][1].get<std::string>(), "x^2 + cos(y)");
    EXPECT_EQ(j["hessian_formulas"][0][1].get<std::string>(), "2*x");
}

TEST(DeriveVerb, WritesNonFiniteNumbersAsNull) {
    auto r = run({"derive", "ln(x) + y", "--at", "x=0,y=1", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    auto j = nlohmann::json::parse(r.out);
    EXPECT_TRUE(j["value"].is_null());
    EXPECT_TRUE(j["gradient"][0].is_null());
    EXPECT_EQ(j["gradient"][1].get<double>(), 1.0);
    EXPECT_FALSE(j["finite"].get<bool>());
}

TEST(DeriveVerb, PrintsAReadableReport) {
    auto r = run({"derive", "x*y^2", "--at", "x=3,y=-1"});
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_NE(r.out.find("value     3\n"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("gradient  [  1 -6 ]"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("Hessian   [  0 -2 ]\n          [ -2  6 ]"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("d/dx    = y^2"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("d2/dy2  = 2*x"), std::string::npos) << r.out;
}

TEST(DeriveVerb, BadFormulaExitsWithTwoAndACaret) {
    auto r = run({"derive", "x + * y", "--at", "x=1,y=2"});
    EXPECT_EQ(r.code, 2);
    EXPECT_NE(r.err.find("unexpected operator '*' (at column 5)\n  x + * y\n      ^"), std::string::npos) << r.err;
    auto unknown = run({"derive", "x + q", "--at", "x=1"});
    EXPECT_EQ(unknown.code, 2);
    EXPECT_NE(unknown.err.find("unknown name 'q'; the variables are x"), std::string::npos) << unknown.err;
}

TEST(DeriveVerb, BadUsageExitsWithTwo) {
    EXPECT_EQ(run({"derive", "x^2"}).code, 2);                           // no --at
    EXPECT_EQ(run({"derive", "--at", "x=1"}).code, 2);                   // no formula
    EXPECT_EQ(run({"derive", "x^2", "--at", "x=abc"}).code, 2);          // not a number
    EXPECT_EQ(run({"derive", "x^2", "--at", "x=1", "--bogus"}).code, 2);  // unknown option
    auto help = run({"derive", "--help"});
    EXPECT_EQ(help.code, 0);
    EXPECT_NE(help.out.find("--at NAME=VALUE"), std::string::npos);
    EXPECT_NE(help.out.find("natural"), std::string::npos);
}

TEST(SampleVerb, SummarisesEveryOutputAsJson) {
    // f = x^2 + 3y on a 3 x 3 grid over [-1,1]^2: x in {-1,0,1}, y in {-1,0,1}.
    // f: min -3, max 4, mean 2/3; df/dx = 2x: mean 0; d2f/dx2 = 2 everywhere.
    auto r = run({"sample", "x^2 + 3*y", "--box", "x=-1:1,y=-1:1", "--grid", "3", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    auto j = nlohmann::json::parse(r.out);
    for (const char* key : {"variables", "grid", "order", "points", "seconds", "threads", "outputs"})
        EXPECT_TRUE(j.contains(key)) << key;
    EXPECT_EQ(j["points"].get<int>(), 9);
    ASSERT_EQ(j["outputs"].size(), 6u);
    EXPECT_EQ(j["outputs"][0]["name"], "f");
    EXPECT_DOUBLE_EQ(j["outputs"][0]["min"].get<double>(), -3.0);
    EXPECT_DOUBLE_EQ(j["outputs"][0]["max"].get<double>(), 4.0);
    EXPECT_NEAR(j["outputs"][0]["mean"].get<double>(), 2.0 / 3.0, 1e-15);
    EXPECT_EQ(j["outputs"][1]["name"], "df/dx");
    EXPECT_DOUBLE_EQ(j["outputs"][1]["mean"].get<double>(), 0.0);
    EXPECT_EQ(j["outputs"][3]["name"], "d2f/dx2");
    EXPECT_EQ(j["outputs"][3]["min"].get<double>(), 2.0);
    EXPECT_EQ(j["outputs"][3]["max"].get<double>(), 2.0);
    EXPECT_EQ(j["outputs"][0]["non_finite"].get<int>(), 0);
}

TEST(SampleVerb, CountsNonFiniteValues) {
    // 1/x on x in {-1, 0, 1}: the middle column (3 points) is infinite.
    auto r = run({"sample", "1/x + y", "--box", "x=-1:1,y=0:1", "--grid", "3", "--order", "0", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    auto j = nlohmann::json::parse(r.out);
    ASSERT_EQ(j["outputs"].size(), 1u);
    EXPECT_EQ(j["outputs"][0]["non_finite"].get<int>(), 3);
}

TEST(SampleVerb, HoldsFurtherVariablesAndPrintsATable) {
    auto r = run({"sample", "a*x + y", "--box", "x=0:1,y=0:1", "--grid", "50", "--at", "a=2", "--order", "1"});
    ASSERT_EQ(r.code, 0) << r.err;
    EXPECT_NE(r.out.find("df/da"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("million points/s"), std::string::npos) << r.out;
}

TEST(SampleVerb, BadUsageExitsWithTwo) {
    EXPECT_EQ(run({"sample", "x+y", "--box", "x=-1:1,y=-1:1"}).code, 2);                          // no --grid
    EXPECT_EQ(run({"sample", "x+y", "--box", "x=-1:1", "--grid", "10"}).code, 2);                  // one range
    EXPECT_EQ(run({"sample", "x+y", "--box", "x=1:-1,y=0:1", "--grid", "10"}).code, 2);            // low above high
    EXPECT_EQ(run({"sample", "x+y", "--box", "x=-1:1,y=0:1", "--grid", "0"}).code, 2);             // grid too small
    EXPECT_EQ(run({"sample", "x+y", "--box", "x=-1:1,y=0:1", "--grid", "9", "--order", "3"}).code, 2);
    auto formula = run({"sample", "x+z", "--box", "x=-1:1,y=0:1", "--grid", "9"});
    EXPECT_EQ(formula.code, 2);
    EXPECT_NE(formula.err.find("unknown name 'z'"), std::string::npos) << formula.err;
    EXPECT_EQ(run({"sample", "--help"}).code, 0);
}
