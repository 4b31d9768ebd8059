// saddlewise sample FORMULA --box x=-5:5,y=-5:5 --grid N [--order 0|1|2] [--json]
// Evaluates value (and derivatives) on an N x N grid with every core and summarises them.
#include "app/cli/cli.h"
#include "core/expr/expr.h"

#include <nlohmann/json.hpp>

#include <chrono>
#include <cmath>
#include <limits>
#include <ostream>
#include <thread>

namespace sw::cli {

namespace {

constexpr long kMaxGrid = 4000;

const char* kSampleHelp =
    "Usage: saddlewise sample FORMULA --box X=LOW:HIGH,Y=LOW:HIGH --grid N\n"
    "                         [--at NAME=VALUE,...] [--order 0|1|2] [--threads T] [--json]\n"
    "\n"
    "Evaluates FORMULA on an N x N grid over the box (first variable along x, second\n"
    "along y, both ends included) using every core, and prints for each output its\n"
    "minimum, maximum and mean over the finite values, how many values are not finite,\n"
    "and the wall time of the evaluation.\n"
    "\n"
    "Options:\n"
    "  --box X=LOW:HIGH,Y=LOW:HIGH   the two variables that vary, and their ranges\n"
    "  --grid N                      points along each side, 1 to 4000\n"
    "  --at NAME=VALUE,...           further variables, held at these values\n"
    "  --order 0|1|2                 0: value only; 1: value and gradient;\n"
    "                                2 (default): value, gradient and Hessian\n"
    "  --threads T                   threads to use (default 0: every hardware thread)\n"
    "  --json                        print one JSON object: formula, variables, box, grid,\n"
    "                                order, points, threads, seconds, total_seconds,\n"
    "                                points_per_second, outputs (name, min, max, mean,\n"
    "                                non_finite); numbers that are not finite are null\n"
    "\n"
    "Outputs are named f, df/dX, d2f/dX2, d2f/dXdY ... after the variables (gradient\n"
    "and Hessian in every variable, including those held by --at).\n"
    "See 'saddlewise derive --help' for what a formula may contain.\n"
    "\n"
    "Example:\n"
    "  saddlewise sample 'x^4 + y^4 - 3*x*y' --box x=-2:2,y=-2:2 --grid 1000\n"
    "\n"
    "Exit codes: 0 done (values that are not finite are counted, not an error),\n"
    "2 bad usage or a formula that cannot be read.\n";

nlohmann::json jsonNumber(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

struct Summary {
    std::string name;
    double min = std::numeric_limits<double>::quiet_NaN();
    double max = std::numeric_limits<double>::quiet_NaN();
    double mean = std::numeric_limits<double>::quiet_NaN();
    std::size_t nonFinite = 0;
};

Summary summarise(const std::string& name, const std::vector<double>& values) {
    Summary s;
    s.name = name;
    double lo = std::numeric_limits<double>::infinity(), hi = -lo, sum = 0, compensation = 0;
    std::size_t finite = 0;
    for (double v : values) {
        if (!std::isfinite(v)) {
            ++s.nonFinite;
            continue;
        }
        ++finite;
        lo = std::min(lo, v);
        hi = std::max(hi, v);
        // Kahan summation: a million values should not lose the mean's digits.
        const double y = v - compensation;
        const double t = sum + y;
        compensation = (t - sum) - y;
        sum = t;
    }
    if (finite > 0) {
        s.min = lo;
        s.max = hi;
        s.mean = sum / static_cast<double>(finite);
    }
    return s;
}

int runSample(const std::vector<std::string>& args, std::ostream& out, std::ostream& /*err*/) {
    const auto started = std::chrono::steady_clock::now();
    const ParsedArgs parsed = parseArgs(args, {"json"}, {"box", "grid", "order", "at", "threads"});
    if (parsed.positional.empty())
        throw UsageError("a FORMULA is needed, e.g. saddlewise sample 'x^2+y^2' --box x=-1:1,y=-1:1 --grid 100");
    if (parsed.positional.size() > 1)
        throw UsageError("one FORMULA is expected, got " + std::to_string(parsed.positional.size()) +
                         " (quote a formula that contains spaces)");
    if (!parsed.has("box")) throw UsageError("--box is needed, e.g. --box x=-5:5,y=-5:5");
    if (!parsed.has("grid")) throw UsageError("--grid is needed: points along each side, 1 to " + std::to_string(kMaxGrid));
    const std::string formula = parsed.positional[0];
    const auto box = parseRanges(parsed.get("box"), "box");
    if (box.size() != 2)
        throw UsageError("--box needs exactly two variables (X=LOW:HIGH,Y=LOW:HIGH), got " + std::to_string(box.size()));
    if (box[0].name == box[1].name) throw UsageError("--box names '" + box[0].name + "' twice");
    const int n = static_cast<int>(parseInteger(parsed.get("grid"), "--grid", 1, kMaxGrid));
    const int order = static_cast<int>(parseInteger(parsed.get("order", "2"), "--order", 0, 2));
    const int threadsAsked = static_cast<int>(parseInteger(parsed.get("threads", "0"), "--threads", 0, 256));
    std::vector<std::pair<std::string, double>> fixed;
    if (parsed.has("at")) fixed = parseAssignments(parsed.get("at"), "at");

    std::vector<std::string> names{box[0].name, box[1].name};
    std::vector<double> fixedInputs{0.0, 0.0};
    for (const auto& [name, value] : fixed) {
        if (name == box[0].name || name == box[1].name)
            throw UsageError("--at " + name + ": this variable already varies in --box");
        names.push_back(name);
        fixedInputs.push_back(value);
    }
    const expr::DerivativeSet set(formula, names, order);

    expr::GridSpec grid;
    grid.xMin = box[0].lo, grid.xMax = box[0].hi, grid.yMin = box[1].lo, grid.yMax = box[1].hi;
    grid.nx = grid.ny = n;
    grid.fixedInputs = fixedInputs;
    const int threads = threadsAsked > 0 ? threadsAsked : std::max(1, static_cast<int>(std::thread::hardware_concurrency()));
    std::vector<std::vector<double>> values;
    const double seconds = expr::evaluateGrid(set.program(), grid, values, threads);

    std::vector<std::string> outputNames{"f"};
    const int dim = static_cast<int>(names.size());
    if (order >= 1)
        for (const auto& v : names) outputNames.push_back("df/d" + v);
    if (order >= 2)
        for (int i = 0; i < dim; ++i)
            for (int k = i; k < dim; ++k)
                outputNames.push_back(i == k ? "d2f/d" + names[i] + "2" : "d2f/d" + names[i] + "d" + names[k]);
    std::vector<Summary> summaries;
    for (std::size_t o = 0; o < values.size(); ++o) summaries.push_back(summarise(outputNames.at(o), values[o]));
    const double points = static_cast<double>(n) * n;
    const double total = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();

    if (parsed.has("json")) {
        nlohmann::json j;
        j["formula"] = formula;
        j["variables"] = names;
        j["box"] = nlohmann::json::object();
        for (const auto& r : box) j["box"][r.name] = {r.lo, r.hi};
        j["fixed"] = nlohmann::json::object();
        for (const auto& [name, value] : fixed) j["fixed"][name] = value;
        j["grid"] = n;
        j["order"] = order;
        j["points"] = static_cast<long long>(points);
        j["threads"] = threads;
        j["seconds"] = seconds;
        j["total_seconds"] = total;
        j["points_per_second"] = jsonNumber(seconds > 0 ? points / seconds : std::nan(""));
        j["outputs"] = nlohmann::json::array();
        for (const auto& s : summaries)
            j["outputs"].push_back({{"name", s.name},
                                    {"min", jsonNumber(s.min)},
                                    {"max", jsonNumber(s.max)},
                                    {"mean", jsonNumber(s.mean)},
                                    {"non_finite", s.nonFinite}});
        out << j.dump(2) << '\n';
        return 0;
    }

    out << "formula   " << formula << '\n';
    out << "grid      " << n << " x " << n << " over " << box[0].name << " in [" << formatNumber(box[0].lo) << ", "
        << formatNumber(box[0].hi) << "], " << box[1].name << " in [" << formatNumber(box[1].lo) << ", "
        << formatNumber(box[1].hi) << "]";
    for (const auto& [name, value] : fixed) out << ", " << name << " = " << formatNumber(value);
    out << "\n\n";
    std::vector<std::vector<std::string>> table{{"output", "min", "max", "mean", "not finite"}};
    for (const auto& s : summaries)
        table.push_back({s.name, formatNumber(s.min, 8), formatNumber(s.max, 8), formatNumber(s.mean, 8),
                         std::to_string(s.nonFinite)});
    std::vector<std::size_t> width(5, 0);
    for (const auto& row : table)
        for (std::size_t c = 0; c < row.size(); ++c) width[c] = std::max(width[c], row[c].size());
    for (const auto& row : table) {
        out << "  " << row[0] << std::string(width[0] - row[0].size(), ' ');
        for (std::size_t c = 1; c < row.size(); ++c) out << "  " << std::string(width[c] - row[c].size(), ' ') << row[c];
        out << '\n';
    }
    out << "\nevaluated " << static_cast<long long>(points) << " points x " << values.size() << " outputs in "
        << formatNumber(seconds * 1e3, 4) << " ms on " << threads << (threads == 1 ? " thread" : " threads") << " ("
        << formatNumber(points / std::max(seconds, 1e-12) / 1e6, 4) << " million points/s); total "
        << formatNumber(total * 1e3, 4) << " ms\n";
    return 0;
}

}  // namespace

Verb sampleVerb() {
    return {"sample", "value, gradient and Hessian of a formula over an N x N grid, summarised and timed", kSampleHelp,
            &runSample};
}

}  // namespace sw::cli
