#pragma once
// Analysis of an objective around its runs: sampled fields over a box, contour lines
// (marching squares), the local quadratic model and its one-line verdict.
// Draft interface: implementers may add to it; keep what is here (views use it).

#include "core/objective/objective.h"

#include <atomic>
#include <functional>
#include <string>
#include <vector>

namespace sw::analyze {

struct Box {
    double xMin = -1, xMax = 1, yMin = -1, yMax = 1;
};

// f over an nx x ny grid of two chosen variables, the others held at `held`.
struct Field {
    Box box;
    int nx = 0, ny = 0;
    int xVariable = 0, yVariable = 1;
    std::vector<double> values;   // nx*ny, row-major, x fastest: values[j*nx + i]
    double finiteMin = 0, finiteMax = 0;  // over finite cells only
    long nonFiniteCells = 0;
    double x(int i) const { return box.xMin + (box.xMax - box.xMin) * i / (nx - 1); }
    double y(int j) const { return box.yMin + (box.yMax - box.yMin) * j / (ny - 1); }
    double at(int i, int j) const { return values[static_cast<std::size_t>(j) * nx + i]; }
};

// Progress in [0,1]; cancel is polled between rows. Uses every hardware thread.
struct Control {
    const std::atomic<bool>* cancel = nullptr;
    std::function<void(double)> progress;
};
// Returns false when cancelled (field then incomplete).
bool sampleField(const Objective& objective, const Vector& held, int xVariable, int yVariable, const Box& box, int nx,
                 int ny, Field& field, const Control& control = {});

struct Polyline {
    std::vector<double> x, y;
    bool closed = false;
};
struct ContourSet {
    double level = 0;
    std::vector<Polyline> lines;
};

// Levels that show both the valley floor and the walls: spaced in log(f - fmin + eps) when
// the range spans decades, else evenly. `count` levels, ascending.
std::vector<double> chooseLevels(const Field& field, int count);
// Marching squares with saddle-cell disambiguation by the cell centre; NaN cells are skipped.
std::vector<ContourSet> contourLines(const Field& field, const std::vector<double>& levels);

// The quadratic model m(p) = f + g'p + 1/2 p'Hp at x.
struct QuadraticModel {
    Vector center;
    double value = 0;
    Vector gradient;
    Matrix hessian;
    Vector eigenvalues;     // ascending
    Matrix eigenvectors;    // columns, matching eigenvalues
    bool hasNewtonPoint = false;  // H nonsingular
    Vector newtonPoint;     // x - H^{-1} g (the model's stationary point), in x coordinates
    std::string verdict;    // "bowl", "saddle", "ridge", "flat direction", "dome" + a short reason
    double at(const Vector& p) const;  // m(p), p a displacement from center
};
QuadraticModel quadraticModel(const Objective& objective, const Vector& x, double zeroTolerance = 1e-8);

}  // namespace sw::analyze
