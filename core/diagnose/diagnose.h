#pragma once
// The one call from a run to its findings.
//
//   diagnose::RunSetup setup{methodId, options, rules, start};
//   diagnose::Findings found = diagnose::findFindings(run, objective, setup);   // the rules (fast)
//   diagnose::tryRemedies(found, run, objective, setup);                         // the reruns (slower)
//
// findFindings works on a finished or a running run (rules about the end wait for the end).
// tryRemedies reruns from setup.start once per distinct change (findings proposing the same
// change share one rerun) and fills each remedy's outcome; it is safe to call off the GUI
// thread (the objective is only read) and stops early when `cancel` turns true.

#include "core/diagnose/finding.h"
#include "core/diagnose/remedy.h"
#include "core/diagnose/rules.h"

#include <atomic>

namespace sw::diagnose {

Findings findFindings(const solve::Run& run, const Objective& objective, const RunSetup& setup);

void tryRemedies(Findings& findings, const solve::Run& run, const Objective& objective, const RunSetup& setup,
                 const std::atomic<bool>* cancel = nullptr);

// Both; with tryRemedies false the remedies keep an empty outcome.
Findings diagnose(const solve::Run& run, const Objective& objective, const RunSetup& setup, bool withRemedies = true,
                  const std::atomic<bool>* cancel = nullptr);

}  // namespace sw::diagnose
