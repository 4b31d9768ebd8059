#pragma once
// What the survey verbs (critical, basins) share: reading the formula, box, plane and held
// values; packing the pieces' results into numbers for a process group; the text tables.

#include "app/cli/cli.h"
#include "app/cli/process_group.h"
#include "core/objective/formula_objective.h"
#include "core/survey/survey.h"

#include <memory>
#include <ostream>
#include <string>
#include <vector>

namespace sw::cli {

struct SurveyInput {
    std::string formula;
    std::vector<std::string> names;
    std::unique_ptr<FormulaObjective> objective;
    survey::Region region;
    survey::CriticalSettings critical;
    int threads = 0;
};

// The options every survey verb takes (besides its own).
inline const std::vector<std::string> kSurveyOptions = {"box", "plane", "at", "constants", "starts",
                                                        "sign-change-grid", "threads"};
// FORMULA --box NAME=LOW:HIGH,... [--plane X,Y] [--at NAME=VALUE,...] [--constants ...]
// [--starts N] [--sign-change-grid M] [--threads T]. UsageError naming the option.
SurveyInput readSurveyInput(const ParsedArgs& parsed, const ProcessGroup& group, bool needsPlane);

// Runs the critical-point search with its starts split over the group. On rank 0 (or, with
// everyone = true, on every process) returns the assembled map; elsewhere an empty map.
survey::CriticalMap distributedCriticalMap(const survey::CriticalSearch& search, ProcessGroup& group,
                                           const survey::Control& control, bool everyone);

// Packing, for gathers: a start's outcome is 3 + n numbers, a cell's 2 + n.
void packStart(const survey::StartOutcome& o, int n, std::vector<double>& out);
survey::StartOutcome unpackStart(const double* in, int n);
void packCell(const survey::CellOutcome& o, int n, std::vector<double>& out);
survey::CellOutcome unpackCell(const double* in, int n);

// Text: the points as a table, the search's counts and completeness, a box description.
void printPoints(std::ostream& out, const survey::CriticalMap& map);
void printSearchSummary(std::ostream& out, const survey::CriticalMap& map);
std::string boxText(const survey::Region& region, const std::vector<std::string>& names);

// Exit code 2 on the ranks other than 0 stays silent (rank 0 prints the one message): the
// survey verbs wrap their work in this so K processes do not print K copies of an error.
int runOnGroup(ProcessGroup& group, std::ostream& err, const std::function<int()>& work);

}  // namespace sw::cli
