// Sampling f over a box of two chosen variables, rows spread over every hardware thread.
#include "core/analyze/analyze.h"
#include "core/analyze/formula_fast_path.h"
#include "core/expr/expr.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <thread>

namespace sw::analyze {

namespace {

void checkArguments(const Objective& objective, const Vector& held, int xVariable, int yVariable, const Box& box,
                    int nx, int ny) {
    const int n = objective.dimension();
    if (held.size() != n)
        throw std::invalid_argument("sampleField: the held point has " + std::to_string(held.size()) +
                                    " values but the objective has " + std::to_string(n) + " variables");
    if (xVariable < 0 || xVariable >= n || yVariable < 0 || yVariable >= n || xVariable == yVariable)
        throw std::invalid_argument("sampleField: the plotted variables must be two different indices below " +
                                    std::to_string(n));
    if (nx < 2 || ny < 2) throw std::invalid_argument("sampleField: the grid needs at least 2 x 2 points");
    const bool finiteBox =
        std::isfinite(box.xMin) && std::isfinite(box.xMax) && std::isfinite(box.yMin) && std::isfinite(box.yMax);
    if (!finiteBox || !(box.xMin < box.xMax) || !(box.yMin < box.yMax))
        throw std::invalid_argument("sampleField: the box needs finite bounds with xMin < xMax and yMin < yMax");
}

void finiteRange(Field& field) {
    double lo = std::numeric_limits<double>::infinity(), hi = -lo;
    long bad = 0;
    for (double v : field.values) {
        if (!std::isfinite(v)) {
            ++bad;
            continue;
        }
        lo = std::min(lo, v);
        hi = std::max(hi, v);
    }
    field.nonFiniteCells = bad;
    if (bad == static_cast<long>(field.values.size())) {
        field.finiteMin = field.finiteMax = 0;
    } else {
        field.finiteMin = lo;
        field.finiteMax = hi;
    }
}

}  // namespace

double Field::x(int i) const { return expr::gridCoordinate(box.xMin, box.xMax, i, nx); }
double Field::y(int j) const { return expr::gridCoordinate(box.yMin, box.yMax, j, ny); }

bool sampleField(const Objective& objective, const Vector& held, int xVariable, int yVariable, const Box& box, int nx,
                 int ny, Field& field, const Control& control) {
    checkArguments(objective, held, xVariable, yVariable, box, nx, ny);
    field.box = box;
    field.nx = nx;
    field.ny = ny;
    field.xVariable = xVariable;
    field.yVariable = yVariable;
    field.values.assign(static_cast<std::size_t>(nx) * ny, solve::kNaN);
    field.finiteMin = field.finiteMax = 0;
    field.nonFiniteCells = 0;

    std::vector<double> xs(nx);
    for (int i = 0; i < nx; ++i) xs[i] = field.x(i);

    // A compiled formula evaluates a whole row per instruction; anything else goes point by point.
    std::unique_ptr<RowSampler> fast = makeFormulaRowSampler(objective, held, xVariable, yVariable);

    std::atomic<int> nextRow{0}, rowsDone{0};
    std::atomic<bool> stopped{false};
    auto work = [&](bool reportsProgress) {
        std::unique_ptr<RowSampler::Scratch> scratch = fast ? fast->makeScratch() : nullptr;
        Vector point = held;
        while (!stopped.load(std::memory_order_relaxed)) {
            if (control.cancel && control.cancel->load(std::memory_order_relaxed)) {
                stopped = true;
                break;
            }
            const int j = nextRow.fetch_add(1);
            if (j >= ny) break;
            double* row = field.values.data() + static_cast<std::size_t>(j) * nx;
            const double y = field.y(j);
            if (fast) {
                fast->sampleRow(xs, y, row, *scratch);
            } else {
                point[yVariable] = y;
                for (int i = 0; i < nx; ++i) {
                    point[xVariable] = xs[i];
                    row[i] = objective.value(point);
                }
            }
            const int done = rowsDone.fetch_add(1) + 1;
            if (reportsProgress && control.progress) control.progress(static_cast<double>(done) / ny);
        }
    };

    // Small fields are not worth a thread start (~50 us each).
    const long cells = static_cast<long>(nx) * ny;
    const unsigned hardware = std::max(1u, std::thread::hardware_concurrency());
    const unsigned helpers = cells < 4096 ? 0 : std::min<unsigned>(hardware - 1, static_cast<unsigned>(ny) - 1);
    std::vector<std::thread> threads;
    threads.reserve(helpers);
    for (unsigned t = 0; t < helpers; ++t) threads.emplace_back(work, false);
    work(true);  // the calling thread works too, and is the only one reporting progress
    for (std::thread& t : threads) t.join();

    if (stopped || rowsDone.load() < ny) return false;
    finiteRange(field);
    if (control.progress) control.progress(1.0);
    return true;
}

}  // namespace sw::analyze
