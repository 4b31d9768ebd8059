#pragma once
// Internal to core/analyze: the fast path of sampleField. When the objective is a compiled
// formula, a whole grid row is one block evaluation of its value-only program (x varies,
// every other input is broadcast), so interpreter dispatch is paid once per row.

#include "core/objective/objective.h"

#include <memory>
#include <vector>

namespace sw::analyze {

class RowSampler {
public:
    struct Scratch {
        virtual ~Scratch() = default;
    };
    virtual ~RowSampler() = default;
    virtual std::unique_ptr<Scratch> makeScratch() const = 0;
    // f at (xs[i], y) with the other variables held; row has xs.size() entries.
    virtual void sampleRow(const std::vector<double>& xs, double y, double* row, Scratch& scratch) const = 0;
};

// nullptr when the objective is not a formula objective (use Objective::value instead).
std::unique_ptr<RowSampler> makeFormulaRowSampler(const Objective& objective, const Vector& held, int xVariable,
                                                  int yVariable);

}  // namespace sw::analyze
