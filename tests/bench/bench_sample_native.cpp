// The hand-written route of the whole-process comparison in scripts/bench_expr: a program that
// does what `saddlewise sample FORMULA --box x=-3:3,y=-3:3 --grid N --order 2` does for the
// benchmark landscape, written by hand for this one formula: value, gradient and Hessian
// (tests/bench/bench_landscape_formula.h) at every grid point on every hardware thread, and
// for each of the 6 outputs the minimum, maximum and mean of the finite values and the count of
// the others. Nothing of the grid's size is stored: each thread keeps running sums (plain per
// row, rows added with Neumaier's compensated sum, as our verb does).
// Usage: bench_sample_native [N] [THREADS]   (defaults 2000, hardware threads)
#include "tests/bench/bench_landscape_formula.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <thread>
#include <vector>

namespace {

struct Running {
    double lo = std::numeric_limits<double>::infinity(), hi = -std::numeric_limits<double>::infinity();
    double total = 0, compensation = 0;
    long finite = 0, nonFinite = 0;
    void add(double s) {
        const double t = total + s;
        compensation += std::fabs(total) >= std::fabs(s) ? (total - t) + s : (s - t) + total;
        total = t;
    }
};

}  // namespace

int main(int argc, char** argv) {
    const int n = argc > 1 ? std::atoi(argv[1]) : 2000;
    const int threads = argc > 2 ? std::atoi(argv[2]) : std::max(1u, std::thread::hardware_concurrency());
    if (n < 2 || threads < 1) return 2;
    const double lo = -3, hi = 3;
    std::vector<std::vector<Running>> perThread(threads, std::vector<Running>(6));
    std::atomic<int> nextRow{0};
    auto work = [&](int t) {
        std::vector<Running>& mine = perThread[t];
        double out[6];
        for (int row; (row = nextRow.fetch_add(1)) < n;) {
            const double y = lo + (hi - lo) * row / (n - 1);
            double rowSum[6] = {0, 0, 0, 0, 0, 0};
            for (int col = 0; col < n; ++col) {
                sw::bench::landscapeByHand(lo + (hi - lo) * col / (n - 1), y, out);
                for (int q = 0; q < 6; ++q) {
                    const double v = out[q];
                    if (std::isfinite(v)) {
                        rowSum[q] += v;
                        mine[q].lo = std::min(mine[q].lo, v);
                        mine[q].hi = std::max(mine[q].hi, v);
                        ++mine[q].finite;
                    } else {
                        ++mine[q].nonFinite;
                    }
                }
            }
            for (int q = 0; q < 6; ++q) mine[q].add(rowSum[q]);
        }
    };
    std::vector<std::thread> pool;
    for (int t = 1; t < threads; ++t) pool.emplace_back(work, t);
    work(0);
    for (auto& t : pool) t.join();

    const char* names[6] = {"f", "df/dx", "df/dy", "d2f/dx2", "d2f/dxdy", "d2f/dy2"};
    std::printf("%-10s %24s %24s %24s %s\n", "output", "min", "max", "mean", "not finite");
    for (int q = 0; q < 6; ++q) {
        Running all;
        for (const auto& mine : perThread) {
            all.lo = std::min(all.lo, mine[q].lo);
            all.hi = std::max(all.hi, mine[q].hi);
            all.finite += mine[q].finite;
            all.nonFinite += mine[q].nonFinite;
            all.add(mine[q].total);
            all.add(mine[q].compensation);
        }
        std::printf("%-10s %24.17g %24.17g %24.17g %ld\n", names[q], all.lo, all.hi,
                    (all.total + all.compensation) / static_cast<double>(all.finite), all.nonFinite);
    }
    return 0;
}
