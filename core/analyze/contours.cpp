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
    // cellLow/cellHigh: per cell, the smallest and largest corner (+inf/-inf when a corner is
    // not finite), shared by every level so most cells are passed over with two comparisons.
    Tracer(const Field& field, const std::vector<double>& cellLow, const std::vector<double>& cellHigh)
        : field_(field),
          nx_(field.nx),
          ny_(field.ny),
          horizontalEdges_(static_cast<long>(nx_ - 1) * ny_),
          firstSegment_(horizontalEdges_ + static_cast<long>(nx_) * (ny_ - 1), -1),
          secondSegment_(firstSegment_.size(), -1),
          cellLow_(cellLow),
          cellHigh_(cellHigh) {}

    ContourSet trace(double level) {
        level_ = level;
        segments_.clear();
        for (int j = 0; j + 1 < ny_; ++j) {
            const std::size_t row = static_cast<std::size_t>(j) * (nx_ - 1);
            for (int i = 0; i + 1 < nx_; ++i)
                if (cellHigh_[row + i] >= level && cellLow_[row + i] < level) cell(i, j);
        }
        ContourSet set;
        set.level = level;
        join(set);
        for (const auto& s : segments_)
            for (long e : s) firstSegment_[e] = secondSegment_[e] = -1;
        return set;
    }

private:
    long bottom(int i, int j) const { return static_cast<long>(j) * (nx_ - 1) + i; }
    long left(int i, int j) const { return horizontalEdges_ + static_cast<long>(j) * nx_ + i; }

    void cell(int i, int j) {
        const double v00 = field_.at(i, j), v10 = field_.at(i + 1, j);
        const double v11 = field_.at(i + 1, j + 1), v01 = field_.at(i, j + 1);
        if (!std::isfinite(v00) || !std::isfinite(v10) || !std::isfinite(v11) || !std::isfinite(v01)) return;
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
                add(south, east);
                add(west, north);
            } else {
                // v10, v01 joined: cut off corners 00 and 11.
                add(south, west);
                add(east, north);
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
        if (count == 2) add(crossed[0], crossed[1]);
    }

    void add(long a, long b) {
        const int id = static_cast<int>(segments_.size());
        segments_.push_back({a, b});
        for (long e : {a, b}) (firstSegment_[e] < 0 ? firstSegment_[e] : secondSegment_[e]) = id;
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

    int otherSegment(long edge, int segment) const {
        return firstSegment_[edge] == segment ? secondSegment_[edge] : firstSegment_[edge];
    }

    // Walks from `segment`, entering it through `entry`, until the chain ends or closes.
    void walk(int segment, long entry, std::vector<char>& used, Polyline& line) {
        double x, y;
        point(entry, x, y);
        line.x.push_back(x);
        line.y.push_back(y);
        long edge = entry;
        while (segment >= 0 && !used[segment]) {
            used[segment] = 1;
            const auto& s = segments_[segment];
            edge = s[0] == edge ? s[1] : s[0];
            point(edge, x, y);
            line.x.push_back(x);
            line.y.push_back(y);
            segment = otherSegment(edge, segment);
        }
    }

    void join(ContourSet& set) {
        std::vector<char> used(segments_.size(), 0);
        // Open lines first: start at an edge point that belongs to one segment only.
        for (int s = 0; s < static_cast<int>(segments_.size()); ++s) {
            if (used[s]) continue;
            for (long e : segments_[s]) {
                if (secondSegment_[e] >= 0 || used[s]) continue;
                Polyline line;
                walk(s, e, used, line);
                set.lines.push_back(std::move(line));
            }
        }
        // What is left are closed rings.
        for (int s = 0; s < static_cast<int>(segments_.size()); ++s) {
            if (used[s]) continue;
            Polyline line;
            walk(s, segments_[s][0], used, line);
            line.closed = true;
            set.lines.push_back(std::move(line));
        }
    }

    const Field& field_;
    int nx_, ny_;
    long horizontalEdges_;
    std::vector<int> firstSegment_, secondSegment_;  // the (at most two) segments through each edge point
    std::vector<std::array<long, 2>> segments_;
    const std::vector<double>& cellLow_;
    const std::vector<double>& cellHigh_;
    double level_ = 0;
};

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

    const int nx = field.nx, ny = field.ny;
    const double inf = std::numeric_limits<double>::infinity();
    std::vector<double> cellLow(static_cast<std::size_t>(nx - 1) * (ny - 1)), cellHigh(cellLow.size());
    for (int j = 0; j + 1 < ny; ++j)
        for (int i = 0; i + 1 < nx; ++i) {
            const double a = field.at(i, j), b = field.at(i + 1, j), c = field.at(i, j + 1), d = field.at(i + 1, j + 1);
            const std::size_t k = static_cast<std::size_t>(j) * (nx - 1) + i;
            const bool finite = std::isfinite(a) && std::isfinite(b) && std::isfinite(c) && std::isfinite(d);
            cellLow[k] = finite ? std::min(std::min(a, b), std::min(c, d)) : inf;
            cellHigh[k] = finite ? std::max(std::max(a, b), std::max(c, d)) : -inf;
        }

    // Levels are independent: trace them on every hardware thread, each with its own tracer.
    sets.resize(finiteLevels.size());
    const unsigned hardware = std::max(1u, std::thread::hardware_concurrency());
    const long cells = static_cast<long>(cellLow.size()) * static_cast<long>(finiteLevels.size());
    const unsigned workers =
        cells < 200000 ? 1u : std::min<unsigned>(hardware, static_cast<unsigned>(finiteLevels.size()));
    std::atomic<std::size_t> next{0};
    auto work = [&]() {
        Tracer tracer(field, cellLow, cellHigh);
        for (std::size_t k = next.fetch_add(1); k < finiteLevels.size(); k = next.fetch_add(1))
            sets[k] = tracer.trace(finiteLevels[k]);
    };
    std::vector<std::thread> threads;
    for (unsigned t = 1; t < workers; ++t) threads.emplace_back(work);
    work();
    for (std::thread& t : threads) t.join();
    return sets;
}

}  // namespace sw::analyze
