#pragma once
// Reporting solver runs on the command line, shared by the verbs minimize, fit and run:
// JSON for programs, and for people a per-iteration table, a summary, and a side-by-side
// comparison of several runs from the same start.

#include "core/report/run_json.h"
#include "core/solve/solver.h"

#include <nlohmann/json.hpp>

#include <iosfwd>
#include <string>
#include <vector>

namespace sw::cli {

// One run as JSON, one record, and where a result came from with the caution:
// core/report/run_json.h (shared with the report writer).
using report::provenanceJson;
using report::recordToJson;
using report::runToJson;

// Per-iteration table: k, f, |∇f|, step kind, alpha, |step|, cumulative evaluations, note;
// x columns too when n <= 4.
void printTrace(std::ostream& out, const solve::Run& run, const std::vector<std::string>& names);
// Termination and message, iterations, evaluations, x, f, |∇f|, end point.
void printSummary(std::ostream& out, const solve::Run& run, const std::vector<std::string>& names);
// One row per run: label, iterations, evaluations, final value, |∇f|, termination, end point
// ("local minimum", "saddle (index 1)", ...).
void printComparison(std::ostream& out, const std::vector<solve::Run>& runs);

// Distributes --option texts over the chosen methods. "name=value" applies to every chosen
// method that has the option (UsageError when none has it); "method_id.name=value" to that
// method only (UsageError when it is not chosen or has no such option).
std::vector<solve::OptionValues> distributeOptions(const std::vector<std::string>& methodIds,
                                                   const std::vector<std::string>& optionTexts);

// 1 when a run broke down (non-finite values, a method failure), else 0: limits and
// convergence are results, not failures.
int exitCodeFor(const std::vector<solve::Run>& runs);

}  // namespace sw::cli
