#pragma once
// What the window's findings job takes and gives back (JobRunner::diagnose, findings_job.cpp).
// The job runs the rules for every run of a batch, delivers those findings at once, then reruns
// the remedies of finished runs (off the GUI thread, cancellable) and delivers the findings
// again with their outcomes.

#include "core/diagnose/diagnose.h"

#include <QtGlobal>
#include <memory>
#include <string>
#include <vector>

namespace sw::window {

struct DiagnosisRequest {
    quint64 runsGeneration = 0;                  // the runs batch these runs came from
    std::shared_ptr<const Objective> objective;
    Vector start;
    solve::StoppingRules rules;
    std::vector<std::string> methodIds;          // one per run
    std::vector<solve::OptionValues> options;    // one per run
    std::vector<std::shared_ptr<const solve::Run>> runs;
    bool tryRemedies = true;                     // only finished runs get reruns
};

struct FindingsBatch {
    quint64 runsGeneration = 0;
    std::shared_ptr<const Objective> objective;
    std::vector<std::shared_ptr<const solve::Run>> runs;  // as requested
    std::vector<diagnose::Findings> findings;            // one list per run
    bool remediesDone = false;  // outcomes filled (as far as reruns were asked for)
};

}  // namespace sw::window
