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
// Working memory of the streamed evaluation (buffers and program registers of every thread).
constexpr double kWorkingMemoryLimit = 256.0 * (1 << 20);
constexpr std::size_t kPieceBytes = 256 * 1024;                     // buffers per thread, normally
constexpr std::size_t kMinPiece = expr::Program::kBlockSize;        // points: one block of the program

const char* kSampleHelp =
    "Usage: saddlewise sample FORMULA --box X=LOW:HIGH,Y=LOW:HIGH --grid N\n"
    "                         [--at NAME=VALUE,...] [--order 0|1|2] [--threads T] [--json]\n"
    "\n"
    "Evaluates FORMULA on an N x N grid over the box (first variable along x, second\n"
    "along y, both ends included) using every core, and prints for each output its\n"
    "minimum, maximum and mean over the finite values, how many values are not finite,\n"
    "and the wall time of the evaluation. Values are summarised as they are computed and\n"
    "never kept, so memory does not grow with N; the working memory (every output for a\n"
    "piece of a row, per thread) is limited to 256 MB, which bounds how many variables\n"
    "--at may hold at --order 2 (about 500 on 2 threads).\n"
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
    "                                points_per_second, working_memory_bytes,\n"
    "                                outputs (name, min, max, mean,\n"
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

// ---- the summary, reduced piece by piece --------------------------------------------------

// Minimum, maximum, finite count and plain sum of the finite values of one piece of a row.
// Four interleaved lanes, no branches: the loop vectorises (AVX2 clone where the CPU has it).
struct PieceStats {
    double lo, hi, sum;
    std::size_t finite;
};

__attribute__((target_clones("avx2", "default"))) PieceStats scanPiece(const double* v, std::size_t n) {
    constexpr double kMax = std::numeric_limits<double>::max();
    double lo[4] = {kMax, kMax, kMax, kMax}, hi[4] = {-kMax, -kMax, -kMax, -kMax}, sum[4] = {0, 0, 0, 0};
    std::size_t finite[4] = {0, 0, 0, 0};
    std::size_t i = 0;
    for (; i + 4 <= n; i += 4)
        for (int l = 0; l < 4; ++l) {
            const double x = v[i + l];
            const bool ok = std::fabs(x) <= kMax;  // false for NaN and +-inf
            sum[l] += ok ? x : 0.0;
            lo[l] = ok && x < lo[l] ? x : lo[l];
            hi[l] = ok && x > hi[l] ? x : hi[l];
            finite[l] += ok;
        }
    for (; i < n; ++i) {
        const double x = v[i];
        const bool ok = std::fabs(x) <= kMax;
        sum[0] += ok ? x : 0.0;
        lo[0] = ok && x < lo[0] ? x : lo[0];
        hi[0] = ok && x > hi[0] ? x : hi[0];
        finite[0] += ok;
    }
    return {std::min({lo[0], lo[1], lo[2], lo[3]}), std::max({hi[0], hi[1], hi[2], hi[3]}),
            (sum[0] + sum[1]) + (sum[2] + sum[3]), finite[0] + finite[1] + finite[2] + finite[3]};
}

// The sum of the finite values in units of 2^512, for pieces whose plain sum overflows.
double scaledPieceSum(const double* v, std::size_t n) {
    double sum = 0;
    for (std::size_t i = 0; i < n; ++i)
        if (std::isfinite(v[i])) sum += std::ldexp(v[i], -512);
    return sum;
}

// One output's running summary. Pieces are summed plainly (at most a row each, four lanes)
// and the piece sums are added with Neumaier's compensated summation, so the mean of 16
// million values keeps its digits. When a sum overflows although every value is finite
// (values near 1e308), the total continues in units of 2^512, so the mean stays finite.
struct Accumulator {
    double lo = std::numeric_limits<double>::infinity();
    double hi = -std::numeric_limits<double>::infinity();
    std::size_t finite = 0, nonFinite = 0;
    double total = 0, compensation = 0;
    bool scaled = false;  // total and compensation are in units of 2^512

    void addSum(double value) {
        // Neumaier (1974): like Kahan's, and also right when the addend is the larger.
        const double t = total + value;
        compensation += std::fabs(total) >= std::fabs(value) ? (total - t) + value : (value - t) + total;
        total = t;
    }
    void rescale() {
        if (scaled) return;
        total = std::ldexp(total, -512);
        compensation = std::ldexp(compensation, -512);
        scaled = true;
    }
    void addPiece(const double* v, std::size_t n) {
        const PieceStats s = scanPiece(v, n);
        finite += s.finite;
        nonFinite += n - s.finite;
        if (s.finite == 0) return;
        lo = std::min(lo, s.lo);
        hi = std::max(hi, s.hi);
        const bool overflowed = !std::isfinite(s.sum);
        if (overflowed) rescale();
        const double totalBefore = total, compensationBefore = compensation;
        addSum(scaled ? (overflowed ? scaledPieceSum(v, n) : std::ldexp(s.sum, -512)) : s.sum);
        if (!std::isfinite(total) || !std::isfinite(compensation)) {
            // The running total overflowed: redo this addition in units of 2^512.
            total = totalBefore;
            compensation = compensationBefore;
            rescale();
            addSum(std::ldexp(s.sum, -512));
        }
    }
    void merge(const Accumulator& other) {
        finite += other.finite;
        nonFinite += other.nonFinite;
        lo = std::min(lo, other.lo);
        hi = std::max(hi, other.hi);
        const double totalBefore = total, compensationBefore = compensation;
        const bool scaledBefore = scaled;
        auto addOther = [&] {
            if (other.scaled) rescale();
            const double factor = scaled && !other.scaled ? std::ldexp(1.0, -512) : 1.0;
            addSum(other.total * factor);
            addSum(other.compensation * factor);
        };
        addOther();
        if (!std::isfinite(total) || !std::isfinite(compensation)) {
            // Both were unscaled and their sum overflows: add them again in units of 2^512.
            total = totalBefore, compensation = compensationBefore, scaled = scaledBefore;
            rescale();
            addOther();
        }
    }
    double mean() const {
        if (finite == 0) return std::numeric_limits<double>::quiet_NaN();
        const double m = (total + compensation) / static_cast<double>(finite);
        return scaled ? std::ldexp(m, 512) : m;
    }
};

struct Summary {
    std::string name;
    double min = std::numeric_limits<double>::quiet_NaN();
    double max = std::numeric_limits<double>::quiet_NaN();
    double mean = std::numeric_limits<double>::quiet_NaN();
    std::size_t nonFinite = 0;
};

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
    const int threads = std::min(threadsAsked > 0 ? threadsAsked : std::max(1, static_cast<int>(std::thread::hardware_concurrency())), n);

    // Working memory: each thread holds every output for a piece of a row. Refuse, before
    // differentiating anything, what cannot fit in the limit even with the smallest piece.
    const std::size_t dim = names.size();
    const std::size_t outputCount = 1 + (order >= 1 ? dim : 0) + (order >= 2 ? dim * (dim + 1) / 2 : 0);
    auto megabytes = [](double bytes) { return formatNumber(bytes / (1 << 20), 3) + " MB"; };
    const double smallest = static_cast<double>(threads) * outputCount * kMinPiece * sizeof(double);
    if (smallest > kWorkingMemoryLimit)
        throw UsageError(std::to_string(dim) + " variables at --order " + std::to_string(order) + " make " +
                         std::to_string(outputCount) + " outputs per point, which need at least " + megabytes(smallest) +
                         " of working memory on " + std::to_string(threads) + " thread(s); sample works within " +
                         megabytes(kWorkingMemoryLimit) + " - use a lower --order, fewer --at variables or fewer --threads");
    const expr::DerivativeSet set(formula, names, order);

    // Pieces of about kPieceBytes per thread (they stay in cache while they are reduced), in
    // whole blocks of the program, within the limit.
    const double workspaceBytes = static_cast<double>(set.program().makeWorkspace().block.size()) * sizeof(double);
    std::size_t piece = std::max<std::size_t>(kPieceBytes / (outputCount * sizeof(double)) / kMinPiece, 1) * kMinPiece;
    piece = std::min(piece, static_cast<std::size_t>(n));
    auto workingMemory = [&](std::size_t points) {
        return static_cast<double>(threads) * (static_cast<double>(outputCount * points * sizeof(double)) + workspaceBytes);
    };
    if (workingMemory(piece) > kWorkingMemoryLimit) piece = std::min<std::size_t>(kMinPiece, n);
    if (workingMemory(piece) > kWorkingMemoryLimit)
        throw UsageError("the compiled program for " + std::to_string(outputCount) + " outputs needs " +
                         megabytes(workingMemory(piece)) + " of working memory on " + std::to_string(threads) +
                         " thread(s); sample works within " + megabytes(kWorkingMemoryLimit) +
                         " - use a lower --order, fewer --at variables or fewer --threads");

    expr::GridSpec grid;
    grid.xMin = box[0].lo, grid.xMax = box[0].hi, grid.yMin = box[1].lo, grid.yMax = box[1].hi;
    grid.nx = grid.ny = n;
    grid.fixedInputs = fixedInputs;
    std::vector<std::vector<Accumulator>> perThread(static_cast<std::size_t>(threads), std::vector<Accumulator>(outputCount));
    const double seconds = expr::streamGrid(set.program(), grid, piece, threads, [&](const expr::GridChunk& chunk) {
        std::vector<Accumulator>& mine = perThread[static_cast<std::size_t>(chunk.thread)];
        for (std::size_t o = 0; o < outputCount; ++o) mine[o].addPiece(chunk.outputs[o], chunk.count);
    });
    std::vector<Accumulator> merged(outputCount);
    for (const auto& mine : perThread)
        for (std::size_t o = 0; o < outputCount; ++o) merged[o].merge(mine[o]);

    std::vector<std::string> outputNames{"f"};
    if (order >= 1)
        for (const auto& v : names) outputNames.push_back("df/d" + v);
    if (order >= 2)
        for (std::size_t i = 0; i < dim; ++i)
            for (std::size_t k = i; k < dim; ++k)
                outputNames.push_back(i == k ? "d2f/d" + names[i] + "2" : "d2f/d" + names[i] + "d" + names[k]);
    std::vector<Summary> summaries;
    for (std::size_t o = 0; o < outputCount; ++o) {
        Summary s;
        s.name = outputNames.at(o);
        s.nonFinite = merged[o].nonFinite;
        if (merged[o].finite > 0) s.min = merged[o].lo, s.max = merged[o].hi, s.mean = merged[o].mean();
        summaries.push_back(s);
    }
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
        j["working_memory_bytes"] = static_cast<long long>(workingMemory(piece));
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
    out << "\nevaluated " << static_cast<long long>(points) << " points x " << outputCount << " outputs in "
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
