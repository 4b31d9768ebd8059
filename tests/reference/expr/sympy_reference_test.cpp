// Derivatives against SymPy: value, gradient and full Hessian of a fixed list of formulas
// (tests/reference/expr/sympy_formulas.json, covering every function and operator) at
// given points. Reference computed with SymPy (Debian's python3-sympy 1.11.1) by
// sympy_derivatives.py at 40 digits; we agree to 1e-10 relative (absolute below 1).
#include "core/expr/expr.h"

#include <nlohmann/json.hpp>

#include <gtest/gtest.h>

#include <cmath>
#include <cstdlib>
#include <fstream>
#include <set>
#include <unistd.h>

namespace {

nlohmann::json runSympy() {
    const std::string formulas = std::string(SW_SOURCE_DIR) + "/tests/reference/expr/sympy_formulas.json";
    const std::string script = std::string(SW_SOURCE_DIR) + "/tests/reference/expr/sympy_derivatives.py";
    const std::string output = "/tmp/sw_sympy_reference_" + std::to_string(::getpid()) + ".json";
    const std::string command = std::string(SW_PYTHON) + " " + script + " " + formulas + " " + output;
    const int status = std::system(command.c_str());
    if (status != 0) {
        ADD_FAILURE() << "the SymPy script failed (is python3-sympy installed for " << SW_PYTHON << "?): " << command;
        return {};
    }
    std::ifstream in(output);
    nlohmann::json j = nlohmann::json::parse(in);
    std::remove(output.c_str());
    return j;
}

bool close(double ours, double reference) {
    return std::fabs(ours - reference) <= 1e-10 * std::max(1.0, std::fabs(reference));
}

}  // namespace

TEST(SympyReference, GradientsAndHessiansAgreeToTenDigits) {
    const nlohmann::json reference = runSympy();
    ASSERT_TRUE(reference.contains("results"));
    const std::string version = reference["sympy_version"].get<std::string>();
    std::printf("reference computed with SymPy %s\n", version.c_str());
    std::ifstream in(std::string(SW_SOURCE_DIR) + "/tests/reference/expr/sympy_formulas.json");
    const nlohmann::json entries = nlohmann::json::parse(in);
    ASSERT_EQ(entries.size(), reference["results"].size());
    ASSERT_GE(entries.size(), 50u);

    std::set<std::string> functionsSeen;
    int compared = 0;
    for (std::size_t k = 0; k < entries.size(); ++k) {
        const auto& entry = entries[k];
        const auto& ref = reference["results"][k];
        const std::string formula = entry["formula"].get<std::string>();
        const std::vector<double> at = entry["at"].get<std::vector<double>>();
        const std::vector<std::string> all{"x", "y", "z"};
        const std::vector<std::string> names(all.begin(), all.begin() + at.size());
        sw::expr::DerivativeSet set(formula, names, 2);
        const auto& program = set.program();
        std::vector<double> out(program.outputCount());
        auto ws = program.makeWorkspace();
        program.evaluate(at.data(), out.data(), ws);
        const int n = static_cast<int>(at.size());
        EXPECT_TRUE(close(out[0], ref["value"].get<double>()))
            << formula << ": value " << out[0] << " vs SymPy " << version << " " << ref["value"];
        for (int i = 0; i < n; ++i) {
            const double expected = ref["gradient"][i].get<double>();
            EXPECT_TRUE(close(out[1 + i], expected))
                << formula << ": d/d" << names[i] << " " << out[1 + i] << " vs SymPy " << version << " " << expected;
            for (int j = 0; j < n; ++j) {
                const double h = out[1 + n + sw::expr::DerivativeSet::hessianIndex(i, j, n)];
                const double hExpected = ref["hessian"][i][j].get<double>();
                EXPECT_TRUE(close(h, hExpected)) << formula << ": H(" << i << "," << j << ") " << h << " vs SymPy " << version
                                                 << " " << hExpected << "  [" << ref["sympy"] << "]";
                ++compared;
            }
        }
        for (const char* name : {"sin", "cos", "tan", "asin", "acos", "atan", "atan2", "sinh", "cosh", "tanh", "asinh",
                                 "acosh", "atanh", "exp", "log", "ln", "log10", "log2", "sqrt", "abs", "sign", "min", "max",
                                 "pi", "<=", ">=", "==", "!=", "&&", "||", "?", "^", "/", "e^"})
            if (formula.find(name) != std::string::npos) functionsSeen.insert(name);
    }
    EXPECT_EQ(functionsSeen.size(), 34u) << "every function and operator is covered";
    std::printf("SymPy %s: %zu formulas, %d Hessian entries compared\n", version.c_str(), entries.size(), compared);
}
