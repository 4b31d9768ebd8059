#pragma once
// A small reader for the NIST StRD nonlinear regression files (.dat): the header states the
// line ranges of the starting values, the certified values and the data; this reader takes
// them from there rather than assuming positions.

#include "core/objective/table.h"

#include <string>
#include <vector>

namespace sw::testing {

struct NistProblem {
    std::string name;                      // e.g. "Misra1a"
    std::string difficulty;                // "Lower", "Average", "Higher"
    std::vector<std::string> parameters;   // b1, b2, ...
    std::vector<double> start1, start2;
    std::vector<double> certified;         // certified parameter values
    std::vector<double> certifiedStdDev;   // certified standard deviations
    double certifiedRss = 0;               // residual sum of squares
    double certifiedResidualStdDev = 0;
    int degreesOfFreedom = 0;
    Table data;                            // columns as in the file's "Data:" line (y, x / y, x1, x2)
    std::string model;                     // our formula for the model (written from the Model: line)
    std::string response = "y";            // Nelson fits log(y): column "logy" is added for it
};

// Reads `directory/name.dat`; throws std::runtime_error with the line on a format problem.
NistProblem readNistProblem(const std::string& directory, const std::string& name);
// The 27 problem names, in NIST's order of difficulty.
const std::vector<std::string>& nistProblemNames();
// Log relative error -log10(|estimate - certified| / |certified|), capped at `digits`
// (the certified values carry 11 significant digits).
double logRelativeError(double estimate, double certified, double digits = 11.0);

}  // namespace sw::testing
