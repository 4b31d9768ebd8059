// The critical-point map against every real critical point computed with SymPy (Debian's
// python3-sympy 1.11.1; resultants, nroots and nsolve at 30 digits) for textbook polynomial
// test functions of two variables, run live through tests/reference/survey/sympy_critical.py.
// Found completely from the default settings: same number of points, each within 1e-9, same
// kind and index. If SymPy is missing this test FAILS (scripts/deps installs it).

#include "core/objective/formula_objective.h"
#include "core/survey/survey.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <memory>
#include <string>
#include <unistd.h>

namespace {

using sw::FormulaObjective;
using sw::Vector;
using namespace sw::survey;

struct Problem {
    std::string name;
    std::string ours;   // our formula language
    std::string sympy;  // SymPy syntax
    double box[4];
    std::string source;
};

// The functions and where they are tabulated.
const Problem kProblems[] = {
    {"himmelblau", "(x^2 + y - 11)^2 + (x + y^2 - 7)^2", "(x**2 + y - 11)**2 + (x + y**2 - 7)**2", {-5, 5, -5, 5},
     "Himmelblau (1972), Applied Nonlinear Programming: 4 minima, 1 maximum; 4 saddles between them"},
    {"six-hump camel", "(4 - 2.1*x^2 + x^4/3)*x^2 + x*y + (-4 + 4*y^2)*y^2",
     "(4 - Rational(21,10)*x**2 + x**4/3)*x**2 + x*y + (-4 + 4*y**2)*y**2", {-3, 3, -2, 2},
     "Dixon & Szego (1978), The Global Optimisation Problem: six local minima in this box (value from memory)"},
    {"three-hump camel", "2*x^2 - 1.05*x^4 + x^6/6 + x*y + y^2", "2*x**2 - Rational(105,100)*x**4 + x**6/6 + x*y + y**2",
     {-5, 5, -5, 5}, "three-hump camel, a standard global-optimisation test function: three local minima (value from memory)"},
    {"two-valve sample", "(x^2 - 1)^2 + (y^2 - 1)^2 + 0.5*x*y", "(x**2 - 1)**2 + (y**2 - 1)**2 + x*y/2",
     {-1.6, 1.6, -1.6, 1.6}, "samples/two-valve-saddles.json (invented; four wells, four passes, one peak)"},
};

std::string runCommand(const std::string& command) {
    std::unique_ptr<FILE, int (*)(FILE*)> pipe(popen(command.c_str(), "r"), pclose);
    if (!pipe) return "";
    std::string output;
    char buffer[4096];
    while (std::size_t n = std::fread(buffer, 1, sizeof buffer, pipe.get())) output.append(buffer, n);
    return output;
}

nlohmann::json sympyPoints() {
    nlohmann::json request;
    for (const Problem& p : kProblems)
        request["problems"].push_back(
            {{"name", p.name}, {"formula", p.sympy}, {"box", {p.box[0], p.box[1], p.box[2], p.box[3]}}});
    const std::filesystem::path file =
        std::filesystem::temp_directory_path() / ("sw_sympy_critical_" + std::to_string(::getpid()) + ".json");
    std::ofstream(file) << request.dump();
    const std::string script = std::string(SW_SOURCE_DIR) + "/tests/reference/survey/sympy_critical.py";
    const std::string output = runCommand(std::string(SW_PYTHON) + " " + script + " " + file.string());
    std::filesystem::remove(file);
    return nlohmann::json::parse(output, nullptr, false);
}

TEST(CriticalReference, EveryCriticalPointSymPyFindsAndNoOther) {
    const nlohmann::json reference = sympyPoints();
    ASSERT_FALSE(reference.is_discarded()) << "the SymPy reference script did not run (is python3-sympy installed?)";
    ASSERT_EQ(reference.value("sympy", ""), "1.11.1") << "reference recorded with SymPy 1.11.1";
    ASSERT_EQ(reference["results"].size(), std::size(kProblems));
    for (std::size_t k = 0; k < std::size(kProblems); ++k) {
        const Problem& p = kProblems[k];
        SCOPED_TRACE(p.name + " (" + p.source + "; points from SymPy 1.11.1)");
        const FormulaObjective f(p.ours, {"x", "y"});
        Region region;
        region.lower = Vector(2);
        region.upper = Vector(2);
        region.lower << p.box[0], p.box[2];
        region.upper << p.box[1], p.box[3];
        region.held = Vector::Zero(2);
        const CriticalMap map = findCriticalPoints(f, region);
        const nlohmann::json& expected = reference["results"][k]["points"];
        std::printf("%-18s SymPy %2zu points, ours %2zu (%d starts, found once %d)\n", p.name.c_str(), expected.size(),
                    map.points.size(), map.starts, map.foundOnce);
        EXPECT_EQ(map.points.size(), expected.size());
        for (const auto& e : expected) {
            const double x = e["x"], y = e["y"];
            const CriticalPoint* match = nullptr;
            for (const CriticalPoint& q : map.points)
                if (std::abs(q.x[0] - x) <= 1e-9 * (1 + std::abs(x)) && std::abs(q.x[1] - y) <= 1e-9 * (1 + std::abs(y)))
                    match = &q;
            ASSERT_NE(match, nullptr) << "missing the " << e["kind"] << " at (" << x << ", " << y << ")";
            EXPECT_EQ(kindName(*match), e["kind"].get<std::string>()) << x << ", " << y;
            EXPECT_EQ(match->index, e["index"].get<int>());
            EXPECT_NEAR(match->value, e["value"].get<double>(), 1e-10 * (1 + std::abs(e["value"].get<double>())));
            for (int i = 0; i < 2; ++i)
                EXPECT_NEAR(match->eigenvalues[i], e["eigenvalues"][i].get<double>(),
                            1e-7 * (1 + std::abs(e["eigenvalues"][i].get<double>())));
        }
    }
}

}  // namespace
