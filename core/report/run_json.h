#pragma once
// Runs, their records and fit statistics as JSON: the one place where results become numbers
// in text. `saddlewise minimize`, `fit` and `run --json` print these objects, and the review
// report (report.h) reads its numbers from the very same objects, so a number in a report is
// always the number `run --json` prints for that study.
//
// Non-finite numbers become null.

#include "core/fit/fit_statistics.h"
#include "core/solve/solver.h"
#include "core/study/provenance.h"

#include <nlohmann/json.hpp>

#include <string>
#include <vector>

namespace sw::report {

// One run: method, label, termination, converged, message, variables, x, value, gradient_norm,
// iterations, evaluations {value, gradient, hessian}, end_point {kind, index, critical,
// curvature, eigenvalues, tolerance, stationary_distance, stationary_bound, reason,
// description}, dropped_records and record_stride (trace thinning, see solve::Run), and
// (withTrace) trace: one object per record with all its fields.
// end_point.kind is "minimum", "saddle", "maximum", "degenerate" only where critical is true;
// "not-critical" where the stationarity test failed (curvature then says what the Hessian
// looks like there, reason why it is not critical); "unknown" where nothing could be tested
// (a non-finite end, no Hessian, too many variables; reason says which).
nlohmann::json runToJson(const solve::Run& run, const std::vector<std::string>& names, bool withTrace = true);
nlohmann::json recordToJson(const solve::IterationRecord& record);

// Where a result came from, and the caution, for the top of a JSON document: {program,
// version, study_title (when there is a study), formula | model, loss, data, caution}.
nlohmann::json provenanceJson(const study::Provenance& provenance);

// Fit statistics by parameter name: parameters, not_determined (names the data cannot
// separate; their errors and intervals are null), determined_combinations [{text,
// coefficients, estimate, standard_error, confidence_interval}], standard_errors, confidence_intervals,
// confidence_level, critical_value, covariance, correlation, covariance_method,
// residual_sum_of_squares, residual_standard_deviation, degrees_of_freedom, rows,
// objective_value, (likelihoods) log_likelihood and deviance, jacobian {rank,
// scaled_condition, scaled_singular_values}.
nlohmann::json statisticsToJson(const fit::FitStatistics& statistics);

// A finite number, or null.
nlohmann::json number(double value);

}  // namespace sw::report
