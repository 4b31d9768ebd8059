#include "core/expr/graph.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <thread>

namespace sw::expr {

// Grid point i along an axis of n points over [lo, hi]: lo + (hi - lo) * i / (n - 1)
// (the single point of a one-point axis is lo). Rows are handed to the threads one at a
// time from a shared counter, so uneven rows (e.g. NaN-heavy regions) balance out.
double evaluateGrid(const Program& program, const GridSpec& grid, std::vector<std::vector<double>>& outputs, int threads) {
    const auto started = std::chrono::steady_clock::now();
    const int nx = std::max(grid.nx, 0), ny = std::max(grid.ny, 0);
    const int inputs = program.inputCount();
    const int outs = program.outputCount();
    outputs.assign(outs, std::vector<double>(static_cast<std::size_t>(nx) * ny));
    if (nx == 0 || ny == 0 || outs == 0) return 0.0;

    std::vector<double> xs(nx);
    for (int i = 0; i < nx; ++i) xs[i] = nx == 1 ? grid.xMin : grid.xMin + (grid.xMax - grid.xMin) * i / (nx - 1);
    std::vector<double> fixed(inputs, 0.0);
    for (int k = 0; k < inputs && k < static_cast<int>(grid.fixedInputs.size()); ++k) fixed[k] = grid.fixedInputs[k];

    int workers = threads > 0 ? threads : static_cast<int>(std::thread::hardware_concurrency());
    workers = std::clamp(workers, 1, ny);
    std::atomic<int> nextRow{0};
    auto work = [&] {
        Program::Workspace ws = program.makeWorkspace();
        std::vector<Program::BlockInput> in(inputs);
        std::vector<double*> out(outs);
        double y = 0;
        for (int k = 0; k < inputs; ++k) in[k] = {&fixed[k], 0};
        if (grid.xInput >= 0 && grid.xInput < inputs) in[grid.xInput] = {xs.data(), 1};
        if (grid.yInput >= 0 && grid.yInput < inputs) in[grid.yInput] = {&y, 0};
        for (int row; (row = nextRow.fetch_add(1)) < ny;) {
            y = ny == 1 ? grid.yMin : grid.yMin + (grid.yMax - grid.yMin) * row / (ny - 1);
            for (int o = 0; o < outs; ++o) out[o] = outputs[o].data() + static_cast<std::size_t>(row) * nx;
            program.evaluateBlock(in.data(), nx, out.data(), ws);
        }
    };
    if (workers == 1) work();
    else {
        std::vector<std::thread> pool;
        for (int t = 0; t < workers; ++t) pool.emplace_back(work);
        for (auto& t : pool) t.join();
    }
    return std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
}

}  // namespace sw::expr
