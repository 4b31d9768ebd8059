#pragma once
// What the fit view shows: the statistics of one run of a data fit at the iterate it ended on
// (or, while it is being stepped, its current iterate), computed off the GUI thread by the
// window's job runner with the same code as `saddlewise fit` (core/fit).

#include "core/fit/fit_statistics.h"
#include "core/solve/record.h"

#include <QString>
#include <string>
#include <vector>

namespace sw::widgets {

struct FitSnapshot {
    // The run the statistics describe.
    QString runLabel;                 // the lineup entry's label
    std::string methodId;
    solve::Termination termination = solve::Termination::Running;
    std::string terminationMessage;
    int iteration = 0;                // the iterate the statistics describe
    bool finished = true;

    // The fit, in words (the command line's report says the same).
    FitDefinition definition;
    QString equation;                 // "temp = a - b*exp(-minutes/tau) + error"
    QString lossText;                 // "least squares: 1/2 sum (temp - model)^2"

    fit::FitStatistics statistics;
    std::vector<std::string> warnings;  // fit::fitWarnings: the run's, then the statistics'
    QString problem;                    // non-empty: the statistics could not be computed (why)
    double seconds = 0;                 // time the statistics took
};

}  // namespace sw::widgets
