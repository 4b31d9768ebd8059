#pragma once
// The findings of every run of a study run (core/report's StudyRuns), with their remedies tried
// unless told not to: `run`, `report` and the window's report job all fill StudyRuns::findings
// here, so the three say the same. Qt-free.

#include "core/diagnose/diagnose.h"
#include "core/report/study_run.h"

#include <vector>

namespace sw::cli {

// Fills runs.findings (findingsToJson per run) and returns the findings for text output.
std::vector<diagnose::Findings> addStudyFindings(report::StudyRuns& runs, bool withRemedies);

}  // namespace sw::cli
