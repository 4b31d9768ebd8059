#pragma once
// Surveys as JSON: one source for `saddlewise critical --json`, `saddlewise basins --json` and
// reports. Keys are snake_case, numbers that are not finite are null, key order is fixed.
//
// A critical point:
//   { "x": {"a": 1.0, "b": -1.0}, "value": -0.5, "kind": "minimum" | "saddle" | "maximum" |
//     "degenerate", "index": 0, "eigenvalues": [..ascending..], "gradient_norm": 1e-16,
//     "zero_eigenvalues": 0, "hits": 12, "found_by": "search" | "basins",
//     "escape_direction": {"a": .., "b": ..}      (unit eigenvector of the smallest eigenvalue)
//     "continuum": {"members": 37, "lower": {...}, "upper": {...}}   (continua only) }
// The map: { "variables", "box": {"a": [lo, hi], ...}, "plane": {"x", "y", "held": {...}},
//   "points": [...], "counts": {"minimum", "saddle", "maximum", "degenerate"}, "starts",
//   "starts_low_discrepancy", "starts_sign_change", "converged", "outside", "stalled",
//   "left_box", "non_finite", "found_once", "found_twice", "estimated_missing",
//   "likely_complete", "settings": {...}, "cancelled", "seconds" }
// A basin survey: { "variables", "box", "plane", "grid", "cell_order", "cell_codes",
//   "stopping", "points": [...], "critical": {map without its points},
//   "methods": [ { "label", "method", "options", "cells": [N*N], "iterations": [N*N],
//                  "counts": {"points": [...per point...], "limit", "diverged", "failed",
//                             "outside", "not_run"}, "seconds" } ], "cancelled", "seconds" }

#include "core/survey/survey.h"

#include <nlohmann/json.hpp>

namespace sw::survey {

using Json = nlohmann::ordered_json;

Json pointToJson(const CriticalPoint& point, const std::vector<std::string>& variables);
Json criticalMapToJson(const CriticalMap& map);
// withCells = false leaves out the per-cell arrays (cells, iterations) for a summary.
Json basinSurveyToJson(const BasinSurvey& survey, bool withCells = true);

// A copy of `document` without any "seconds" keys, at any depth: what must be identical
// between a single-process run and a run split over processes.
Json withoutTimings(const Json& document);

}  // namespace sw::survey
