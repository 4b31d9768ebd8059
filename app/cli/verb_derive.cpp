// saddlewise derive FORMULA --at x=1,y=2 [--json]
// Value, gradient and Hessian at one point, as numbers and as formula text.
#include "app/cli/cli.h"
#include "core/expr/expr.h"

#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <ostream>

namespace sw::cli {

namespace {

const char* kDeriveHelp =
    "Usage: saddlewise derive FORMULA --at NAME=VALUE[,NAME=VALUE...] [--json]\n"
    "\n"
    "Reads FORMULA in the variables named by --at (in that order), differentiates it\n"
    "symbolically and prints at that point:\n"
    "  the value, the gradient (a vector), the Hessian (a symmetric matrix), and the\n"
    "  gradient and Hessian entries as formula text.\n"
    "\n"
    "Options:\n"
    "  --at NAME=VALUE,...   the variables and the point, e.g. --at x=1,y=-2.5\n"
    "  --json                print one JSON object instead of text, with the keys\n"
    "                        formula, variables, point, value, gradient, hessian (rows),\n"
    "                        gradient_formulas, hessian_formulas (rows), finite;\n"
    "                        numbers that are not finite are written as null\n"
    "\n"
    "Formulas: + - * / ^ (right-associative; -x^2 is -(x^2)), parentheses,\n"
    "  < <= > >= == != (1 or 0), && || (non-zero is true), c ? a : b,\n"
    "  sin cos tan asin acos atan atan2(y,x) sinh cosh tanh asinh acosh atanh\n"
    "  exp log ln (both natural) log10 log2 sqrt abs sign min max (2 or more arguments),\n"
    "  the constants pi and e (a variable of that name takes precedence),\n"
    "  numbers like 1.5, 2e-3 (always a decimal point; a comma separates arguments).\n"
    "Where a derivative is undefined: d|u| = sign(u) du (0 at 0), d sign = 0,\n"
    "comparisons and logic have derivative 0, c ? a : b differentiates the branch\n"
    "taken, min/max the argument selected (the first one on ties).\n"
    "\n"
    "Example:\n"
    "  saddlewise derive '(x-1)^2 + 10*(y-x^2)^2' --at x=0.5,y=1\n"
    "\n"
    "Exit codes: 0 done (a value that is not finite is reported, not an error),\n"
    "2 bad usage or a formula that cannot be read.\n";

nlohmann::json jsonNumber(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

std::string pad(const std::string& s, std::size_t width) { return s + std::string(width > s.size() ? width - s.size() : 0, ' '); }
std::string padLeft(const std::string& s, std::size_t width) { return std::string(width > s.size() ? width - s.size() : 0, ' ') + s; }

int runDerive(const std::vector<std::string>& args, std::ostream& out, std::ostream& /*err*/) {
    const ParsedArgs parsed = parseArgs(args, {"json"}, {"at"});
    if (parsed.positional.empty()) throw UsageError("a FORMULA is needed, e.g. saddlewise derive 'x^2+y^2' --at x=1,y=2");
    if (parsed.positional.size() > 1)
        throw UsageError("one FORMULA is expected, got " + std::to_string(parsed.positional.size()) +
                         " (quote a formula that contains spaces)");
    if (!parsed.has("at")) throw UsageError("--at is needed: the variables and the point, e.g. --at x=1,y=2");
    const std::string formula = parsed.positional[0];
    const auto point = parseAssignments(parsed.get("at"), "at");

    std::vector<std::string> names;
    std::vector<double> values;
    for (const auto& [name, value] : point) {
        names.push_back(name);
        values.push_back(value);
    }
    const expr::DerivativeSet set(formula, names, 2);
    const int n = set.dimension();
    const auto& program = set.program();
    std::vector<double> outputs(program.outputCount());
    auto ws = program.makeWorkspace();
    program.evaluate(values.data(), outputs.data(), ws);
    const double value = outputs[0];
    auto gradientAt = [&](int i) { return outputs[1 + i]; };
    auto hessianAt = [&](int i, int j) { return outputs[1 + n + expr::DerivativeSet::hessianIndex(i, j, n)]; };
    auto hessianText = [&](int i, int j) { return set.hessianUpper()[expr::DerivativeSet::hessianIndex(i, j, n)].toText(); };
    const bool finite = std::all_of(outputs.begin(), outputs.end(), [](double v) { return std::isfinite(v); });

    if (parsed.has("json")) {
        nlohmann::json j;
        j["formula"] = formula;
        j["variables"] = names;
        j["point"] = nlohmann::json::array();
        for (double v : values) j["point"].push_back(v);
        j["value"] = jsonNumber(value);
        j["gradient"] = nlohmann::json::array();
        j["gradient_formulas"] = nlohmann::json::array();
        j["hessian"] = nlohmann::json::array();
        j["hessian_formulas"] = nlohmann::json::array();
        for (int i = 0; i < n; ++i) {
            j["gradient"].push_back(jsonNumber(gradientAt(i)));
            j["gradient_formulas"].push_back(set.gradient()[i].toText());
            nlohmann::json row = nlohmann::json::array(), rowText = nlohmann::json::array();
            for (int k = 0; k < n; ++k) {
                row.push_back(jsonNumber(hessianAt(i, k)));
                rowText.push_back(hessianText(i, k));
            }
            j["hessian"].push_back(row);
            j["hessian_formulas"].push_back(rowText);
        }
        j["finite"] = finite;
        out << j.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) << '\n';
        return 0;
    }

    std::string at;
    for (int i = 0; i < n; ++i) at += (i ? ", " : "") + names[i] + " = " + formatNumber(values[i]);
    out << "formula   " << formula << '\n' << "at        " << at << "\n\n";
    out << "value     " << formatNumber(value) << "\n\n";

    // Numbers in columns, right-aligned to the widest entry.
    std::size_t width = 1;
    for (int i = 0; i < n; ++i) {
        width = std::max(width, formatNumber(gradientAt(i)).size());
        for (int k = 0; k < n; ++k) width = std::max(width, formatNumber(hessianAt(i, k)).size());
    }
    out << "gradient  [";
    for (int i = 0; i < n; ++i) out << ' ' << padLeft(formatNumber(gradientAt(i)), width);
    out << " ]\n\n";
    for (int i = 0; i < n; ++i) {
        out << (i == 0 ? "Hessian   [" : "          [");
        for (int k = 0; k < n; ++k) out << ' ' << padLeft(formatNumber(hessianAt(i, k)), width);
        out << " ]\n";
    }
    out << "\ngradient formulas\n";
    std::size_t labelWidth = 0;
    std::vector<std::string> labels;
    for (int i = 0; i < n; ++i) labels.push_back("d/d" + names[i]);
    for (int i = 0; i < n; ++i)
        for (int k = i; k < n; ++k) labels.push_back(i == k ? "d2/d" + names[i] + "2" : "d2/d" + names[i] + "d" + names[k]);
    for (const auto& l : labels) labelWidth = std::max(labelWidth, l.size());
    for (int i = 0; i < n; ++i) out << "  " << pad(labels[i], labelWidth) << " = " << set.gradient()[i].toText() << '\n';
    out << "Hessian formulas (upper triangle)\n";
    std::size_t label = n;
    for (int i = 0; i < n; ++i)
        for (int k = i; k < n; ++k) out << "  " << pad(labels[label++], labelWidth) << " = " << hessianText(i, k) << '\n';
    if (!finite) out << "\nnote: some numbers above are not finite (nan or inf) at this point\n";
    return 0;
}

}  // namespace

Verb deriveVerb() {
    return {"derive", "value, gradient and Hessian of a formula at a point, as numbers and as formulas", kDeriveHelp,
            &runDerive};
}

}  // namespace sw::cli
