#include "tests/reference/fit/nist_strd.h"

#include <charconv>
#include <cmath>
#include <fstream>
#include <map>
#include <regex>
#include <sstream>
#include <stdexcept>

namespace sw::testing {

namespace {

// Our model formulas, written from each file's "Model:" line (NIST's [ ] are parentheses,
// ** is ^, arctan is atan; Nelson's response is log(y)).
const std::map<std::string, std::string>& modelFormulas() {
    static const std::map<std::string, std::string> m = {
        {"Misra1a", "b1*(1-exp(-b2*x))"},
        {"Chwirut2", "exp(-b1*x)/(b2+b3*x)"},
        {"Chwirut1", "exp(-b1*x)/(b2+b3*x)"},
        {"Lanczos3", "b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)"},
        {"Gauss1", "b1*exp(-b2*x) + b3*exp(-(x-b4)^2/b5^2) + b6*exp(-(x-b7)^2/b8^2)"},
        {"Gauss2", "b1*exp(-b2*x) + b3*exp(-(x-b4)^2/b5^2) + b6*exp(-(x-b7)^2/b8^2)"},
        {"DanWood", "b1*x^b2"},
        {"Misra1b", "b1*(1-(1+b2*x/2)^(-2))"},
        {"Kirby2", "(b1 + b2*x + b3*x^2) / (1 + b4*x + b5*x^2)"},
        {"Hahn1", "(b1+b2*x+b3*x^2+b4*x^3) / (1+b5*x+b6*x^2+b7*x^3)"},
        {"Nelson", "b1 - b2*x1*exp(-b3*x2)"},
        {"MGH17", "b1 + b2*exp(-x*b4) + b3*exp(-x*b5)"},
        {"Lanczos1", "b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)"},
        {"Lanczos2", "b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)"},
        {"Gauss3", "b1*exp(-b2*x) + b3*exp(-(x-b4)^2/b5^2) + b6*exp(-(x-b7)^2/b8^2)"},
        {"Misra1c", "b1*(1-(1+2*b2*x)^(-0.5))"},
        {"Misra1d", "b1*b2*x*((1+b2*x)^(-1))"},
        {"Roszman1", "b1 - b2*x - atan(b3/(x-b4))/pi"},
        {"ENSO", "b1 + b2*cos(2*pi*x/12) + b3*sin(2*pi*x/12) + b5*cos(2*pi*x/b4) + b6*sin(2*pi*x/b4)"
                 " + b8*cos(2*pi*x/b7) + b9*sin(2*pi*x/b7)"},
        {"MGH09", "b1*(x^2+x*b2) / (x^2+x*b3+b4)"},
        {"Thurber", "(b1 + b2*x + b3*x^2 + b4*x^3) / (1 + b5*x + b6*x^2 + b7*x^3)"},
        {"BoxBOD", "b1*(1-exp(-b2*x))"},
        {"Rat42", "b1 / (1+exp(b2-b3*x))"},
        {"MGH10", "b1*exp(b2/(x+b3))"},
        {"Eckerle4", "(b1/b2) * exp(-0.5*((x-b3)/b2)^2)"},
        {"Rat43", "b1 / ((1+exp(b2-b3*x))^(1/b4))"},
        {"Bennett5", "b1 * (b2+x)^(-1/b3)"},
    };
    return m;
}

double number(const std::string& text, const std::string& where) {
    double v = 0;
    std::string t = text;
    const char* first = t.data();
    if (!t.empty() && t[0] == '+') ++first;
    auto [ptr, ec] = std::from_chars(first, t.data() + t.size(), v);
    if (ec != std::errc() || ptr != t.data() + t.size())
        throw std::runtime_error(where + ": '" + text + "' is not a number");
    return v;
}

std::vector<std::string> words(const std::string& line) {
    std::istringstream in(line);
    std::vector<std::string> w;
    std::string s;
    while (in >> s) w.push_back(s);
    return w;
}

std::pair<int, int> lineRange(const std::vector<std::string>& lines, const std::string& label, const std::string& file) {
    const std::regex pattern(label + R"(\s*\(lines\s+(\d+)\s+to\s+(\d+)\))");
    for (const auto& line : lines) {
        std::smatch m;
        if (std::regex_search(line, m, pattern)) return {std::stoi(m[1]), std::stoi(m[2])};
    }
    throw std::runtime_error(file + ": no '" + label + " (lines a to b)' in the header");
}

}  // namespace

const std::vector<std::string>& nistProblemNames() {
    static const std::vector<std::string> names = {
        "Misra1a", "Chwirut2", "Chwirut1", "Lanczos3", "Gauss1",  "Gauss2",  "DanWood", "Misra1b", "Kirby2",
        "Hahn1",   "Nelson",   "MGH17",    "Lanczos1", "Lanczos2", "Gauss3", "Misra1c", "Misra1d", "Roszman1",
        "ENSO",    "MGH09",    "Thurber",  "BoxBOD",   "Rat42",   "MGH10",   "Eckerle4", "Rat43",  "Bennett5"};
    return names;
}

double logRelativeError(double estimate, double certified, double digits) {
    if (!std::isfinite(estimate)) return 0;
    const double rel = std::fabs(estimate - certified) / std::fabs(certified);
    if (rel == 0) return digits;
    return std::min(digits, std::max(0.0, -std::log10(rel)));
}

NistProblem readNistProblem(const std::string& directory, const std::string& name) {
    const std::string file = directory + "/" + name + ".dat";
    std::ifstream in(file, std::ios::binary);
    if (!in) throw std::runtime_error("cannot open " + file);
    std::vector<std::string> lines;
    for (std::string line; std::getline(in, line);) {
        if (!line.empty() && line.back() == '\r') line.pop_back();
        lines.push_back(line);
    }
    NistProblem p;
    p.name = name;
    const auto starts = lineRange(lines, "Starting Values", file);
    const auto certified = lineRange(lines, "Certified Values", file);
    const auto data = lineRange(lines, "Data", file);
    for (const auto& line : lines) {
        for (const char* level : {"Lower", "Average", "Higher"})
            if (p.difficulty.empty() && line.find(std::string(level) + " Level of Difficulty") != std::string::npos)
                p.difficulty = level;
    }
    // Parameter lines: "b1 = start1 start2 certified stddev".
    for (int i = starts.first; i <= starts.second; ++i) {
        const auto w = words(lines.at(static_cast<std::size_t>(i - 1)));
        const std::string where = file + " line " + std::to_string(i);
        if (w.size() != 6 || w[1] != "=") throw std::runtime_error(where + ": expected 'bN = s1 s2 value sd'");
        p.parameters.push_back(w[0]);
        p.start1.push_back(number(w[2], where));
        p.start2.push_back(number(w[3], where));
        p.certified.push_back(number(w[4], where));
        p.certifiedStdDev.push_back(number(w[5], where));
    }
    for (int i = starts.second + 1; i <= certified.second; ++i) {
        const std::string& line = lines.at(static_cast<std::size_t>(i - 1));
        const auto colon = line.find(':');
        if (colon == std::string::npos) continue;
        const std::string label = line.substr(0, colon);
        const auto w = words(line.substr(colon + 1));
        if (w.empty()) continue;
        const std::string where = file + " line " + std::to_string(i);
        if (label.find("Residual Sum of Squares") != std::string::npos) p.certifiedRss = number(w[0], where);
        else if (label.find("Residual Standard Deviation") != std::string::npos)
            p.certifiedResidualStdDev = number(w[0], where);
        else if (label.find("Degrees of Freedom") != std::string::npos)
            p.degreesOfFreedom = static_cast<int>(number(w[0], where));
    }
    // Column names from the "Data:  y  x" line just before the data.
    const auto header = words(lines.at(static_cast<std::size_t>(data.first - 2)));
    if (header.size() < 3 || header[0] != "Data:") throw std::runtime_error(file + ": no 'Data: y x' line before the data");
    p.data.columnNames.assign(header.begin() + 1, header.end());
    p.data.columns.assign(p.data.columnNames.size(), {});
    p.data.source = file;
    for (int i = data.first; i <= data.second; ++i) {
        const auto w = words(lines.at(static_cast<std::size_t>(i - 1)));
        const std::string where = file + " line " + std::to_string(i);
        if (w.size() != p.data.columnNames.size()) throw std::runtime_error(where + ": wrong number of values");
        for (std::size_t c = 0; c < w.size(); ++c) p.data.columns[c].push_back(number(w[c], where));
        p.data.rowLines.push_back(i);
    }
    const auto model = modelFormulas().find(name);
    if (model == modelFormulas().end()) throw std::runtime_error("no model formula written for " + name);
    p.model = model->second;
    if (name == "Nelson") {
        // NIST's model is log[y] = b1 - b2*x1*exp[-b3*x2]: fit log(y).
        std::vector<double> logy;
        for (double v : p.data.columns[0]) logy.push_back(std::log(v));
        p.data.columnNames.push_back("logy");
        p.data.columns.push_back(logy);
        p.response = "logy";
    }
    return p;
}

}  // namespace sw::testing
