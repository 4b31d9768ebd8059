#pragma once
// The fit verb's report for people, laid out for this program: the model as an equation and
// the loss in words, the run, the estimates (estimate, interval, standard error, relative
// standard error), the correlations between estimates strongest first, how well the model
// fits in the terms of its loss (sums of squares, or deviance and log-likelihood), the
// warnings, and the caution.

#include "core/fit/run_fit.h"
#include "core/objective/table.h"

#include <iosfwd>
#include <string>

namespace sw::cli {

// "temp = a - b*exp(-minutes/tau) + error", "log(p/(1 - p)) = b0 + b1*x, p = P(y = 1)", ...
std::string modelEquation(const FitDefinition& definition);
// "least squares: 1/2 sum (temp - model)^2", "logistic: the negative log-likelihood of 0/1 outcomes", ...
std::string lossInWords(const FitDefinition& definition);

void printFitReport(std::ostream& out, const Table& table, const FitDefinition& definition,
                    const fit::FitResult& result, bool withTrace);

}  // namespace sw::cli
