#pragma once
// Running a study as `saddlewise run` does: every enabled lineup entry from the study's start
// with the study's stopping rules, and for a data fit the statistics at each run's end point.
// `run --json` prints studyRunsJson(); the report writer reads its numbers from the same JSON,
// and the window's report job calls runStudy() too, so all three give the same numbers.

#include "core/fit/fit_statistics.h"
#include "core/solve/solver.h"
#include "core/study/study.h"
#include "core/survey/survey.h"

#include <nlohmann/json.hpp>

#include <atomic>
#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace sw::report {

struct StudyRuns {
    study::Study study;
    std::string studyPath;  // as given (command line) or the window's file; may be empty
    std::shared_ptr<const Objective> objective;
    solve::StoppingRules rules;
    std::vector<std::size_t> entries;            // indices into study.methods of the enabled entries
    std::vector<solve::Run> runs;                // one per entry, in lineup order
    std::vector<fit::FitStatistics> statistics;  // data fits: one per run, at its end point; else empty
    // Each run's findings as `run --json` prints them (issue 10's JSON array), filled by the
    // caller (the rules live above core/report); empty when nobody looked.
    std::vector<nlohmann::json> findings;
    // The surveys the study asks for ("surveys" in the file), filled by runStudySurveys():
    // the critical-point map and the basin maps over the study's plane, as the window shows them.
    std::shared_ptr<const survey::CriticalMap> critical;
    std::shared_ptr<const survey::BasinSurvey> basins;
    std::string surveyNote;  // why a survey the study asks for is missing ("" otherwise)
};

struct RunControl {
    std::function<void(double fraction)> progress;  // 0..1, called from the running thread
    const std::atomic<bool>* cancel = nullptr;      // set: the current run stops, the rest are skipped
    bool statistics = true;                         // data fits: compute StudyRuns::statistics
};

// The indices of the enabled lineup entries; throws study::StudyError (place "methods") when
// there is none.
std::vector<std::size_t> enabledEntries(const study::Study& study);

// Runs the lineup. `objective` is study::makeObjective(study, ...) (the caller reports its
// errors with the study's path). Throws study::StudyError when no entry is enabled.
StudyRuns runStudy(study::Study study, std::string studyPath, std::shared_ptr<const Objective> objective,
                   const solve::StoppingRules& rules, const RunControl& control = {});

// Computes the surveys study.surveys asks for, over the study's plane as the window does
// (the plot ranges as the box, the plot's two variables, the others held at the start): the
// critical-point map (its starts and sign-change grid), and the basins of the lineup entries
// it names (the first three enabled entries when it names none) on its grid with the run's
// stopping rules. A survey that cannot be made (one variable, a box without interior, a method
// the objective cannot serve) is left out with its reason in runs.surveyNote. Cancellable.
void runStudySurveys(StudyRuns& runs, const RunControl& control = {});
// The surveys' region of a study, as above (the window's survey panels use it too).
survey::Region surveyRegion(const study::Study& study);

// {"study": {...}, "runs": [...]}, exactly what `saddlewise run --json` prints:
//   study: file, title, objective, mode, variables [{name, start, plot_from, plot_to}], start {name: value},
//          max_iterations, stopping {max_iterations, max_evaluations, gradient_norm_below,
//          gradient_ratio_below, relative_step_below, relative_change_below} (docs/names.md),
//          data (fits: file, checksum, rows, columns, response, model, loss, ...)
//   runs:  run_json.h's runToJson, with options (as set in the study), findings (when
//          StudyRuns::findings holds them) and, for fits, fit: statisticsToJson plus warnings.
nlohmann::json studyRunsJson(const StudyRuns& runs, bool withTrace = true);

// Index into runs.runs of the run a report takes as the answer (its fit statistics, the
// landscape's held values): the lowest final value among converged runs, else among all runs
// with a finite value; values within kBestRunTie (relative, at least absolute for |f| < 1) of
// the lowest count as equal and go to the first in lineup order. -1 when no run has a value.
inline constexpr double kBestRunTie = 1e-9;
int bestRun(const nlohmann::json& runsJson);

}  // namespace sw::report
