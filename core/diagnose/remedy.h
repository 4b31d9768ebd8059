#pragma once
// Remedies are tried, not just suggested: a rerun from the same start with one change (a
// method switch, an option change, rescaled variables, a higher iteration limit, another start
// point), judged against the original run.
//
// "Helped" means the rerun converged at a critical point with no negative curvature (a
// minimum, or a minimum in a flat trough; for a non-smooth f, a kink where f rises in every
// direction tried), with f no higher than the original's (plus
// rounding, 1e-8 (1 + |f|)); and when the original already ended healthily (a finding that is
// only a note), also in fewer iterations.

#include "core/diagnose/finding.h"
#include "core/diagnose/rules.h"

#include <atomic>

namespace sw::diagnose {

// Runs the change; `cancel` (optional) stops the rerun (the outcome then says so and did not help).
Outcome tryChange(const Objective& objective, const RunSetup& setup, const solve::Run& original, const Change& change,
                  const std::atomic<bool>* cancel = nullptr);

// The stopping rules and options a change runs with (for tests and for showing the change).
RunSetup changedSetup(const RunSetup& setup, const Change& change);

// Whether a rerun helped, by the rule above. rerunAtKinkMinimum: the rerun converged where a
// non-smooth f rises in every direction (looksLikeKinkMinimum), which counts as a minimum.
bool helped(const solve::Run& original, const solve::Run& rerun, bool rerunAtKinkMinimum = false);

}  // namespace sw::diagnose
