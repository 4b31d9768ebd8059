#pragma once
// The catalogue of published unconstrained test problems used by the reference tests and
// the solver benchmark, written as formula text (sum of squared residuals, no 1/2) and read
// through sw::FormulaObjective, so every run here also exercises the expression engine's
// exact derivatives.
//
// Source of every formula, start point and optimal value: J. J. Moré, B. S. Garbow,
// K. E. Hillstrom, "Testing Unconstrained Optimization Software", ACM Transactions on
// Mathematical Software 7(1), 17-41, 1981 (problem numbers are the paper's). f* is given
// to the digits the paper prints.

#include <cmath>
#include <limits>
#include <locale>
#include <sstream>
#include <string>
#include <vector>

namespace sw::reference {

struct PublishedProblem {
    int number = 0;                      // Moré, Garbow & Hillstrom (1981) problem number
    std::string name;
    std::vector<std::string> variables;
    std::string formula;                 // sum of r_i^2
    std::vector<double> start;           // the paper's standard start x0
    double fStar = 0;                    // the paper's optimal value
    double localMinimum = std::numeric_limits<double>::quiet_NaN();  // a published local minimum value, if any

    std::string source() const {
        return "f* from Moré, Garbow & Hillstrom (1981), problem " + std::to_string(number);
    }
};

// Numbers go into formula text in the C locale with 17 significant digits.
inline std::string formulaNumber(double v) {
    std::ostringstream out;
    out.imbue(std::locale::classic());
    out.precision(17);
    out << v;
    return out.str();
}

inline std::string sumOfSquares(const std::vector<std::string>& residuals) {
    std::string text;
    for (const std::string& r : residuals) text += (text.empty() ? "" : " + ") + ("(" + r + ")^2");
    return text;
}

inline std::vector<PublishedProblem> publishedProblems() {
    std::vector<PublishedProblem> list;
    const std::vector<std::string> x2 = {"x1", "x2"}, x3 = {"x1", "x2", "x3"}, x4 = {"x1", "x2", "x3", "x4"};
    list.push_back({1, "Rosenbrock", x2, sumOfSquares({"10*(x2 - x1^2)", "1 - x1"}), {-1.2, 1.0}, 0.0});
    list.push_back({2, "Freudenstein-Roth", x2,
                    sumOfSquares({"-13 + x1 + ((5 - x2)*x2 - 2)*x2", "-29 + x1 + ((x2 + 1)*x2 - 14)*x2"}), {0.5, -2.0},
                    0.0, 48.9842});
    list.push_back({3, "Powell badly scaled", x2, sumOfSquares({"10000*x1*x2 - 1", "exp(-x1) + exp(-x2) - 1.0001"}),
                    {0.0, 1.0}, 0.0});
    list.push_back({4, "Brown badly scaled", x2, sumOfSquares({"x1 - 1000000", "x2 - 0.000002", "x1*x2 - 2"}),
                    {1.0, 1.0}, 0.0});
    {
        const double y[] = {1.5, 2.25, 2.625};
        std::vector<std::string> r;
        for (int i = 1; i <= 3; ++i) r.push_back(formulaNumber(y[i - 1]) + " - x1*(1 - x2^" + std::to_string(i) + ")");
        list.push_back({5, "Beale", x2, sumOfSquares(r), {1.0, 1.0}, 0.0});
    }
    {
        std::vector<std::string> r;
        for (int i = 1; i <= 10; ++i)
            r.push_back(std::to_string(2 + 2 * i) + " - (exp(" + std::to_string(i) + "*x1) + exp(" + std::to_string(i) +
                        "*x2))");
        list.push_back({6, "Jennrich-Sampson", x2, sumOfSquares(r), {0.3, 0.4}, 124.362});
    }
    {
        // 2 pi theta = atan(x2/x1), plus pi when x1 < 0; (1 - sign(x1))/2 is that indicator.
        const std::string theta = "((atan(x2/x1) + pi*(1 - sign(x1))/2)/(2*pi))";
        list.push_back({7, "helical valley", x3,
                        sumOfSquares({"10*(x3 - 10*" + theta + ")", "10*(sqrt(x1^2 + x2^2) - 1)", "x3"}),
                        {-1.0, 0.0, 0.0}, 0.0});
    }
    {
        const double y[] = {0.14, 0.18, 0.22, 0.25, 0.29, 0.32, 0.35, 0.39, 0.37, 0.58, 0.73, 0.96, 1.34, 2.10, 4.39};
        std::vector<std::string> r;
        for (int i = 1; i <= 15; ++i) {
            const int u = i, v = 16 - i, w = std::min(u, v);
            r.push_back(formulaNumber(y[i - 1]) + " - (x1 + " + std::to_string(u) + "/(" + std::to_string(v) + "*x2 + " +
                        std::to_string(w) + "*x3))");
        }
        list.push_back({8, "Bard", x3, sumOfSquares(r), {1.0, 1.0, 1.0}, 8.21487e-3});
    }
    {
        const double y[] = {0.0009, 0.0044, 0.0175, 0.0540, 0.1295, 0.2420, 0.3521, 0.3989,
                            0.3521, 0.2420, 0.1295, 0.0540, 0.0175, 0.0044, 0.0009};
        std::vector<std::string> r;
        for (int i = 1; i <= 15; ++i) {
            const double t = (8.0 - i) / 2.0;
            r.push_back("x1*exp(-x2*(" + formulaNumber(t) + " - x3)^2/2) - " + formulaNumber(y[i - 1]));
        }
        list.push_back({9, "Gaussian", x3, sumOfSquares(r), {0.4, 1.0, 0.0}, 1.12793e-8});
    }
    list.push_back({13, "Powell singular", x4,
                    sumOfSquares({"x1 + 10*x2", "sqrt(5)*(x3 - x4)", "(x2 - 2*x3)^2", "sqrt(10)*(x1 - x4)^2"}),
                    {3.0, -1.0, 0.0, 1.0}, 0.0});
    list.push_back({14, "Wood", x4,
                    sumOfSquares({"10*(x2 - x1^2)", "1 - x1", "sqrt(90)*(x4 - x3^2)", "1 - x3",
                                  "sqrt(10)*(x2 + x4 - 2)", "(x2 - x4)/sqrt(10)"}),
                    {-3.0, -1.0, -3.0, -1.0}, 0.0});
    return list;
}

// How close a final value must be to count as reaching a published value: the paper prints
// f* to about six significant digits, so a relative 1e-5 for f* != 0 and an absolute 1e-10
// for f* = 0.
inline double valueTolerance(double published) { return published == 0 ? 1e-10 : 1e-5 * std::abs(published); }
inline bool reachesValue(double f, double published) {
    return std::isfinite(f) && std::abs(f - published) <= valueTolerance(published);
}

}  // namespace sw::reference
