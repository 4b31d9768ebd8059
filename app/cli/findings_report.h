#pragma once
// Findings for people and programs: the one JSON form (the command line's --json and the
// review report both use findingsToJson) and the text the verbs print after each method's
// summary. Qt-free.

#include "core/diagnose/diagnose.h"

#include <nlohmann/json.hpp>

#include <iosfwd>
#include <string>
#include <vector>

namespace sw::cli {

// One finding:
//   {"id", "severity", "title", "iterations": {"first", "last", "focus", "notable": [...]},
//    "evidence": {name: number, ...}, "evidence_detail": [{"name", "value", "unit", "meaning"}, ...],
//    "message", "mark": {"point": [...], "directions": [[...], ...]} | null,
//    "remedy": {"change": {...}, "outcome": {...} | null} | null}
// change: {"kind", "text"} plus by kind "method" + "options" (switch-method), "options"
// (set-options), "scale" {variable: factor} (rescale-variables), "max_iterations"
// (raise-iteration-limit), "start" {variable: value} (start-point).
// outcome: {"helped", "text", "termination", "converged", "value", "gradient_norm", "x", "end_point",
// "end_index", "critical", "iterations", "evaluations": {"value", "gradient", "hessian"}}.
// Non-finite numbers are null.
nlohmann::json findingToJson(const diagnose::Finding& finding, const std::vector<std::string>& names);
nlohmann::json findingsToJson(const diagnose::Findings& findings, const std::vector<std::string>& names);

// "Findings:" and one block per finding (severity, id, iterations, message, evidence, remedy and
// its outcome), each line starting with `indent`. Prints "Findings: none" when empty.
void printFindings(std::ostream& out, const diagnose::Findings& findings, const std::vector<std::string>& names,
                   const std::string& indent = "");

// The findings of a run started with these inputs; remedies are rerun unless withRemedies is false.
diagnose::Findings findingsFor(const solve::Run& run, const Objective& objective, const std::string& methodId,
                               const solve::OptionValues& options, const solve::StoppingRules& rules,
                               const Vector& start, bool withRemedies);

}  // namespace sw::cli
