#pragma once
// The fit verb's report for people, laid out for this program: the model as an equation and
// the loss in words, the run, the estimates (estimate, interval, standard error, relative
// standard error), the correlations between estimates strongest first, how well the model
// fits in the terms of its loss (sums of squares, or deviance and log-likelihood), the
// warnings, and the caution.

#include "core/fit/run_fit.h"
#include "core/objective/table.h"

#include <functional>
#include <iosfwd>
#include <string>

namespace sw::cli {

// modelEquation and lossInWords live with FitDefinition (core/objective/fit_objective.h).
using sw::lossInWords;
using sw::modelEquation;

// afterSummary, when given, prints more right after the run's summary (the fit verb's findings).
void printFitReport(std::ostream& out, const Table& table, const FitDefinition& definition,
                    const fit::FitResult& result, bool withTrace,
                    const std::function<void(std::ostream&)>& afterSummary = {});

}  // namespace sw::cli
