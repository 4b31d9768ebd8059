// Contour lines by marching squares over the sampled field.
//
// Each cell (four neighbouring grid points) is classified by which corners lie at or above
// the level; the line crosses an edge whose ends are on different sides, at the linearly
// interpolated point. The two ambiguous cells (opposite corners above, the other two below)
// are settled by the cell centre, taken as the mean of the four corners: when the centre is
// above, the above corners are joined through the middle and the line cuts off each below
// corner, and vice versa. A cell with any non-finite corner is skipped, so lines end at the
// edge of a region where f is undefined. Segments are then joined through their shared edge
// points into polylines; a polyline that comes back to its start is a closed ring and
// repeats its first point at the end, so it draws as a closed curve.
//
// Speed: the field is read once. One pass over the cells (rows split between threads) puts
// each cell in the bucket of every level that passes between its lowest and highest corner;
// most cells cross no level, and a cell's levels are found by walking from its left
// neighbour's, which is nearly always where they are. Each level then visits only its own
// cells, and its segments are joined by sorting their end points by edge, so no per-edge
// table over the whole grid is needed. Levels are traced in parallel.
#include "core/analyze/analyze.h"

#include <algorithm>
#include <array>
#include <atomic>
#include <cmath>
#include <limits>
#include <thread>

namespace sw::analyze {

namespace {

// Edge ids: horizontal edge (i,j)-(i+1,j) is j*(nx-1)+i; vertical edge (i,j)-(i,j+1) is
// H + j*nx + i, where H = (nx-1)*ny is the number of horizontal edges.
class Tracer {
public:
    explicit Tracer(const Field& field)
        : field_(field), nx_(field.nx), horizontalEdges_(static_cast<long>(field.nx - 1) * field.ny) {}

    // cells: indices j*(nx-1)+i of the cells whose corner range holds the level, row-major.
    ContourSet trace(double level, const std::vector<std::vector<long>*>& cellChunks) {
        level_ = level;
        segments_.clear();
        const int cellsPerRow = nx_ - 1;
        for (const std::vector<long>* chunk : cellChunks)
            for (long c : *chunk) cell(static_cast<int>(c % cellsPerRow), static_cast<int>(c / cellsPerRow));
        ContourSet set;
        set.level = level;
        link();
        join(set);
        return set;
    }

private:
    long bottom(int i, int j) const { return static_cast<long>(j) * (nx_ - 1) + i; }
    long left(int i, int j) const { return horizontalEdges_ + static_cast<long>(j) * nx_ + i; }

    void cell(int i, int j) {
        const double v00 = field_.at(i, j), v10 = field_.at(i + 1, j);
        const double v11 = field_.at(i + 1, j + 1), v01 = field_.at(i, j + 1);
        const int index =
            (v00 >= level_ ? 1 : 0) | (v10 >= level_ ? 2 : 0) | (v11 >= level_ ? 4 : 0) | (v01 >= level_ ? 8 : 0);
        if (index == 0 || index == 15) return;
        const long south = bottom(i, j), north = bottom(i, j + 1);
        const long west = left(i, j), east = left(i + 1, j);
        if (index == 5 || index == 10) {
            const bool centreAbove = 0.25 * (v00 + v10 + v11 + v01) >= level_;
            // index 5: v00 and v11 above; index 10: v10 and v01 above.
            const bool joinDiagonal00and11 = (index == 5) == centreAbove;
            if (joinDiagonal00and11) {
                // v00, v11 joined through the centre: cut off corners 10 and 01.
                segments_.push_back({south, east});
                segments_.push_back({west, north});
            } else {
                // v10, v01 joined: cut off corners 00 and 11.
                segments_.push_back({south, west});
                segments_.push_back({east, north});
            }
            return;
        }
        std::array<long, 2> crossed{};
        int count = 0;
        const bool a00 = index & 1, a10 = index & 2, a11 = index & 4, a01 = index & 8;
        if (a00 != a10) crossed[count++] = south;
        if (a10 != a11) crossed[count++] = east;
        if (a01 != a11) crossed[count++] = north;
        if (a00 != a01) crossed[count++] = west;
        if (count == 2) segments_.push_back(crossed);
    }

    // neighbour_[2s+e]: the segment end (2t+f) that shares end e of segment s's edge point,
    // or -1 when none does (an edge point is shared by at most the two cells beside it).
    void link() {
        ends_.clear();
        for (std::size_t s = 0; s < segments_.size(); ++s)
            for (int e = 0; e < 2; ++e) ends_.push_back({segments_[s][e], static_cast<int>(2 * s) + e});
        std::sort(ends_.begin(), ends_.end(), [](const End& a, const End& b) { return a.edge < b.edge; });
        neighbour_.assign(ends_.size(), -1);
        for (std::size_t k = 0; k + 1 < ends_.size(); ++k) {
            if (ends_[k].edge != ends_[k + 1].edge) continue;
            neighbour_[ends_[k].segmentEnd] = ends_[k + 1].segmentEnd;
            neighbour_[ends_[k + 1].segmentEnd] = ends_[k].segmentEnd;
            ++k;
        }
    }

    // The crossing point on an edge, interpolated linearly between its two grid points.
    void point(long edge, double& x, double& y) const {
        int i0, j0, i1, j1;
        if (edge < horizontalEdges_) {
            j0 = j1 = static_cast<int>(edge / (nx_ - 1));
            i0 = static_cast<int>(edge % (nx_ - 1));
            i1 = i0 + 1;
        } else {
            const long k = edge - horizontalEdges_;
            j0 = static_cast<int>(k / nx_);
            i0 = i1 = static_cast<int>(k % nx_);
            j1 = j0 + 1;
        }
        const double a = field_.at(i0, j0), b = field_.at(i1, j1);
        const double t = (level_ - a) / (b - a);
        x = field_.x(i0) + t * (field_.x(i1) - field_.x(i0));
        y = field_.y(j0) + t * (field_.y(j1) - field_.y(j0));
    }

    // Walks from `segment`, entering it through its end `entryEnd`, until the chain ends or closes.
    void walk(int segment, int entryEnd, std::vector<char>& used, Polyline& line) const {
        double x, y;
        point(segments_[segment][entryEnd], x, y);
        line.x.push_back(x);
        line.y.push_back(y);
        while (segment >= 0 && !used[segment]) {
            used[segment] = 1;
            const int exitEnd = 1 - entryEnd;
            point(segments_[segment][exitEnd], x, y);
            line.x.push_back(x);
            line.y.push_back(y);
            const int next = neighbour_[2 * segment + exitEnd];
            segment = next < 0 ? -1 : next / 2;
            entryEnd = next < 0 ? 0 : next % 2;
        }
    }

    void join(ContourSet& set) {
        const int count = static_cast<int>(segments_.size());
        std::vector<char> used(segments_.size(), 0);
        // Open lines first: start at an edge point that belongs to one segment only.
        for (int s = 0; s < count; ++s) {
            for (int e = 0; e < 2; ++e) {
                if (used[s] || neighbour_[2 * s + e] >= 0) continue;
                Polyline line;
                walk(s, e, used, line);
                set.lines.push_back(std::move(line));
            }
        }
        // What is left are closed rings.
        for (int s = 0; s < count; ++s) {
            if (used[s]) continue;
            Polyline line;
            walk(s, 0, used, line);
            line.closed = true;
            set.lines.push_back(std::move(line));
        }
    }

    struct End {
        long edge;
        int segmentEnd;
    };

    const Field& field_;
    int nx_;
    long horizontalEdges_;
    std::vector<std::array<long, 2>> segments_;
    std::vector<End> ends_;
    std::vector<int> neighbour_;
    double level_ = 0;
};

// Puts the cells of rows [rowBegin, rowEnd) into the buckets of the levels they cross.
// sortedLevels ascending; a cell crosses level L when its lowest corner < L <= its highest.
void bucketRows(const Field& field, const std::vector<double>& sortedLevels, int rowBegin, int rowEnd,
                std::vector<std::vector<long>>& buckets) {
    const int nx = field.nx;
    const int levelCount = static_cast<int>(sortedLevels.size());
    int k = 0;  // first level above the previous cell's lowest corner
    for (int j = rowBegin; j < rowEnd; ++j) {
        const double* below = field.values.data() + static_cast<std::size_t>(j) * nx;
        const double* above = below + nx;
        for (int i = 0; i + 1 < nx; ++i) {
            const double a = below[i], b = below[i + 1], c = above[i], d = above[i + 1];
            // v - v is 0 for a finite v and NaN for inf or NaN: the sum is 0 only when all four are finite.
            if ((a - a) + (b - b) + (c - c) + (d - d) != 0) continue;
            const double lo = std::min(std::min(a, b), std::min(c, d));
            const double hi = std::max(std::max(a, b), std::max(c, d));
            while (k > 0 && sortedLevels[k - 1] > lo) --k;
            while (k < levelCount && sortedLevels[k] <= lo) ++k;
            for (int m = k; m < levelCount && sortedLevels[m] <= hi; ++m)
                buckets[m].push_back(static_cast<long>(j) * (nx - 1) + i);
        }
    }
}

}  // namespace

std::vector<ContourSet> contourLines(const Field& field, const std::vector<double>& levels) {
    std::vector<ContourSet> sets;
    if (field.nx < 2 || field.ny < 2 ||
        field.values.size() != static_cast<std::size_t>(field.nx) * static_cast<std::size_t>(field.ny))
        return sets;
    std::vector<double> finiteLevels;
    for (double level : levels)
        if (std::isfinite(level)) finiteLevels.push_back(level);
    if (finiteLevels.empty()) return sets;

    // Buckets are kept by ascending level; order[k] is the position of the k-th smallest level.
    const std::size_t levelCount = finiteLevels.size();
    std::vector<std::size_t> order(levelCount);
    for (std::size_t k = 0; k < levelCount; ++k) order[k] = k;
    std::stable_sort(order.begin(), order.end(),
                     [&](std::size_t a, std::size_t b) { return finiteLevels[a] < finiteLevels[b]; });
    std::vector<double> sortedLevels(levelCount);
    for (std::size_t k = 0; k < levelCount; ++k) sortedLevels[k] = finiteLevels[order[k]];

    const long cells = static_cast<long>(field.nx - 1) * (field.ny - 1);
    const unsigned hardware = std::max(1u, std::thread::hardware_concurrency());
    const bool parallel = cells * static_cast<long>(levelCount) >= 200000;

    // Pass 1: rows split into one contiguous chunk per thread; each chunk keeps row order.
    const unsigned chunks = parallel ? std::min<unsigned>(hardware, static_cast<unsigned>(field.ny - 1)) : 1u;
    std::vector<std::vector<std::vector<long>>> buckets(chunks,
                                                                std::vector<std::vector<long>>(levelCount));
    auto rowOf = [&](unsigned chunk) { return static_cast<int>(static_cast<long>(field.ny - 1) * chunk / chunks); };
    {
        std::vector<std::thread> threads;
        for (unsigned t = 1; t < chunks; ++t)
            threads.emplace_back([&, t] { bucketRows(field, sortedLevels, rowOf(t), rowOf(t + 1), buckets[t]); });
        bucketRows(field, sortedLevels, rowOf(0), rowOf(1), buckets[0]);
        for (std::thread& t : threads) t.join();
    }

    // Pass 2: levels are independent; trace them on every hardware thread, each with its own tracer.
    sets.resize(levelCount);
    const unsigned workers = parallel ? std::min<unsigned>(hardware, static_cast<unsigned>(levelCount)) : 1u;
    std::atomic<std::size_t> next{0};
    auto work = [&]() {
        Tracer tracer(field);
        std::vector<std::vector<long>*> cellChunks(chunks);
        for (std::size_t k = next.fetch_add(1); k < levelCount; k = next.fetch_add(1)) {
            for (unsigned c = 0; c < chunks; ++c) cellChunks[c] = &buckets[c][k];
            sets[order[k]] = tracer.trace(sortedLevels[k], cellChunks);
        }
    };
    std::vector<std::thread> threads;
    for (unsigned t = 1; t < workers; ++t) threads.emplace_back(work);
    work();
    for (std::thread& t : threads) t.join();
    return sets;
}

}  // namespace sw::analyze
