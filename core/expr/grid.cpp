#include "core/expr/graph.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <thread>

namespace sw::expr {

double gridCoordinate(double lo, double hi, int i, int n) {
    if (n <= 1 || i <= 0) return lo;
    if (i >= n - 1) return hi;
    const double stretched = (hi - lo) * i;
    if (std::isfinite(stretched)) return lo + stretched / (n - 1);
    // The width (or the width times i) overflows though both ends are finite (-1e308 to 1e308,
    // or 1e308 to 1.7e308): work with half the ends, whose difference cannot overflow, and
    // keep the result inside [lo, hi].
    const double t = static_cast<double>(i) / (n - 1);
    const double half = 0.5 * lo + t * (0.5 * hi - 0.5 * lo);
    return std::clamp(2 * half, lo, hi);
}

namespace {

int workerCount(int threads, int rows) {
    const int asked = threads > 0 ? threads : static_cast<int>(std::thread::hardware_concurrency());
    return std::clamp(asked, 1, std::max(rows, 1));
}

// Runs work(thread) on `workers` threads, the calling thread being thread 0.
template <class Work>
void runOnThreads(int workers, Work&& work) {
    if (workers == 1) {
        work(0);
        return;
    }
    std::vector<std::thread> pool;
    for (int t = 1; t < workers; ++t) pool.emplace_back(work, t);
    work(0);
    for (auto& t : pool) t.join();
}

}  // namespace

// Grid point i along an axis of n points over [lo, hi]: gridCoordinate (the single point of a
// one-point axis is lo). Rows are handed to the threads one at a time from a shared counter,
// so uneven rows (e.g. NaN-heavy regions) balance out.
double evaluateGrid(const Program& program, const GridSpec& grid, std::vector<std::vector<double>>& outputs, int threads) {
    const auto started = std::chrono::steady_clock::now();
    const int nx = std::max(grid.nx, 0), ny = std::max(grid.ny, 0);
    const int inputs = program.inputCount();
    const int outs = program.outputCount();
    outputs.assign(outs, std::vector<double>(static_cast<std::size_t>(nx) * ny));
    if (nx == 0 || ny == 0 || outs == 0) return 0.0;

    std::vector<double> xs(nx);
    for (int i = 0; i < nx; ++i) xs[i] = gridCoordinate(grid.xMin, grid.xMax, i, nx);
    std::vector<double> fixed(inputs, 0.0);
    for (int k = 0; k < inputs && k < static_cast<int>(grid.fixedInputs.size()); ++k) fixed[k] = grid.fixedInputs[k];

    std::atomic<int> nextRow{0};
    auto work = [&](int) {
        Program::Workspace ws = program.makeWorkspace();
        std::vector<Program::BlockInput> in(inputs);
        std::vector<double*> out(outs);
        double y = 0;
        for (int k = 0; k < inputs; ++k) in[k] = {&fixed[k], 0};
        if (grid.xInput >= 0 && grid.xInput < inputs) in[grid.xInput] = {xs.data(), 1};
        if (grid.yInput >= 0 && grid.yInput < inputs) in[grid.yInput] = {&y, 0};
        for (int row; (row = nextRow.fetch_add(1)) < ny;) {
            y = gridCoordinate(grid.yMin, grid.yMax, row, ny);
            for (int o = 0; o < outs; ++o) out[o] = outputs[o].data() + static_cast<std::size_t>(row) * nx;
            program.evaluateBlock(in.data(), nx, out.data(), ws);
        }
    };
    runOnThreads(workerCount(threads, ny), work);
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
}

// The same grid, streamed: each thread evaluates a piece of a row (at most chunkPoints points)
// into its own buffers, hands them to consume, and reuses them for the next piece.
double streamGrid(const Program& program, const GridSpec& grid, std::size_t chunkPoints, int threads,
                  const std::function<void(const GridChunk&)>& consume) {
    const auto started = std::chrono::steady_clock::now();
    const int nx = std::max(grid.nx, 0), ny = std::max(grid.ny, 0);
    const int inputs = program.inputCount();
    const int outs = program.outputCount();
    if (nx == 0 || ny == 0 || outs == 0) return 0.0;
    const std::size_t chunk = std::clamp<std::size_t>(chunkPoints, 1, static_cast<std::size_t>(nx));
    const std::size_t piecesPerRow = (static_cast<std::size_t>(nx) + chunk - 1) / chunk;
    const std::size_t pieces = piecesPerRow * static_cast<std::size_t>(ny);

    std::vector<double> xs(nx);
    for (int i = 0; i < nx; ++i) xs[i] = gridCoordinate(grid.xMin, grid.xMax, i, nx);
    std::vector<double> fixed(inputs, 0.0);
    for (int k = 0; k < inputs && k < static_cast<int>(grid.fixedInputs.size()); ++k) fixed[k] = grid.fixedInputs[k];

    const int workers = workerCount(threads, static_cast<int>(std::min<std::size_t>(pieces, 1 << 30)));
    std::atomic<std::size_t> nextPiece{0};
    auto work = [&](int thread) {
        Program::Workspace ws = program.makeWorkspace();
        std::vector<double> buffer(static_cast<std::size_t>(outs) * chunk);
        std::vector<double*> out(outs);
        for (int o = 0; o < outs; ++o) out[o] = buffer.data() + static_cast<std::size_t>(o) * chunk;
        std::vector<Program::BlockInput> in(inputs);
        double y = 0;
        for (int k = 0; k < inputs; ++k) in[k] = {&fixed[k], 0};
        const int xInput = (grid.xInput >= 0 && grid.xInput < inputs) ? grid.xInput : -1;
        if (grid.yInput >= 0 && grid.yInput < inputs) in[grid.yInput] = {&y, 0};
        for (std::size_t piece; (piece = nextPiece.fetch_add(1)) < pieces;) {
            const int row = static_cast<int>(piece / piecesPerRow);
            const std::size_t first = (piece % piecesPerRow) * chunk;
            const std::size_t count = std::min(chunk, static_cast<std::size_t>(nx) - first);
            y = gridCoordinate(grid.yMin, grid.yMax, row, ny);
            if (xInput >= 0) in[xInput] = {xs.data() + first, 1};
            program.evaluateBlock(in.data(), count, out.data(), ws);
            consume(GridChunk{thread, row, first, count, out.data()});
        }
    };
    runOnThreads(workers, work);
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
}

}  // namespace sw::expr
