#include "app/cli/study_findings.h"

#include "app/cli/findings_report.h"

namespace sw::cli {

std::vector<diagnose::Findings> addStudyFindings(report::StudyRuns& runs, bool withRemedies) {
    const Vector start = runs.study.start();
    const std::vector<std::string> names = runs.study.variableNames();
    std::vector<diagnose::Findings> all;
    runs.findings.clear();
    for (std::size_t k = 0; k < runs.runs.size() && k < runs.entries.size(); ++k) {
        const study::MethodEntry& entry = runs.study.methods[runs.entries[k]];
        all.push_back(findingsFor(runs.runs[k], *runs.objective, entry.method, entry.options, runs.rules, start,
                                  withRemedies));
        runs.findings.push_back(findingsToJson(all.back(), names));
    }
    return all;
}

}  // namespace sw::cli
