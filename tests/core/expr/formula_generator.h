#pragma once
// Seeded random formulas over x, y, z for differential and finite-difference tests.
// Arguments of functions with a restricted domain are shaped so values stay finite
// (log(abs(u)+0.5), sqrt(abs(u)), asin(tanh(u)), u/(abs(v)+0.5), ...): these tests check
// the reading, compiling and differentiating of formulas, not the handling of NaN.

#include <cstdint>
#include <random>
#include <string>

namespace sw::expr::gen {

class FormulaGenerator {
public:
    // smooth: only everywhere-differentiable operators (for finite-difference checks).
    FormulaGenerator(std::uint32_t seed, bool smooth) : rng_(seed), smooth_(smooth) {}

    std::string next(int depth = 4) { return node(depth); }

private:
    int pick(int n) { return static_cast<int>(rng_() % static_cast<std::uint32_t>(n)); }
    std::string space() { return pick(4) == 0 ? " " : ""; }

    std::string number() {
        static const char* const forms[] = {"2", "0.5", "1.25e-1", ".75", "3.", "1.5E+1", "0.3", "7", "2.5", "1e-2"};
        return forms[pick(10)];
    }
    std::string leaf() {
        static const char* const vars[] = {"x", "y", "z"};
        return pick(3) == 0 ? number() : vars[pick(3)];
    }

    std::string node(int depth) {
        if (depth <= 0 || pick(6) == 0) return leaf();
        const std::string u = node(depth - 1);
        const int kinds = smooth_ ? 22 : 32;
        switch (pick(kinds)) {
        case 0: case 1: case 2: return "(" + u + space() + "+" + space() + node(depth - 1) + ")";
        case 3: case 4: return "(" + u + space() + "-" + space() + node(depth - 1) + ")";
        case 5: case 6: case 7: return "(" + u + "*" + node(depth - 1) + ")";
        case 8: return "(" + u + "/(abs(" + node(depth - 1) + ")+0.5))";
        case 9: return "(-" + u + ")";
        case 10: return "(" + u + ")^" + std::to_string(pick(5));
        case 11: return "(abs(" + u + ")+0.5)^sin(" + node(depth - 1) + ")";
        case 12: return "sin(" + u + ")";
        case 13: return "cos(" + u + ")";
        case 14: return "atan(" + u + ")";
        case 15: return "exp(sin(" + u + ")*2)";
        case 16: {
            static const char* const logs[] = {"ln", "log", "log10", "log2"};
            return std::string(logs[pick(4)]) + "(" + u + "^2+0.5)";
        }
        case 17: return "sqrt(" + u + "^2+0.25)";
        case 18: return pick(2) ? "asin(tanh(" + u + "))" : "acos(0.9*tanh(" + u + "))";
        case 19: return pick(2) ? "sinh(sin(" + u + "))" : "cosh(cos(" + u + "))";
        case 20: return pick(2) ? "tanh(" + u + ")" : "asinh(" + u + ")";
        case 21: return pick(2) ? "atanh(0.9*tanh(" + u + "))" : "acosh(" + u + "^2+1.5)";
        // piecewise operators (not for finite differences)
        case 22: return "abs(" + u + ")";
        case 23: return "sign(" + u + ")";
        case 24: return "min(" + u + "," + space() + node(depth - 1) + (pick(2) ? "," + node(depth - 2) : "") + ")";
        case 25: return "max(" + u + "," + node(depth - 1) + ")";
        case 26: {
            static const char* const cmp[] = {"<", "<=", ">", ">=", "==", "!="};
            return "(" + u + space() + cmp[pick(6)] + space() + node(depth - 1) + ")";
        }
        case 27: return "(" + u + space() + "&&" + space() + node(depth - 1) + ")";
        case 28: return "(" + u + space() + "||" + space() + node(depth - 1) + ")";
        case 29: return "(" + u + " > " + node(depth - 1) + " ? " + node(depth - 1) + " : " + node(depth - 1) + ")";
        case 30: return "(" + u + "*pi)";
        default: return "(e^" + std::to_string(pick(3)) + "*" + u + ")";
        }
    }

    std::mt19937 rng_;
    bool smooth_;
};

}  // namespace sw::expr::gen
