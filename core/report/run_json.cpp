// Runs, records and fit statistics as JSON (moved here from app/cli/run_report.cpp so the
// report writer and the verbs share them).
#include "core/report/run_json.h"

#include <cmath>

namespace sw::report {

using nlohmann::json;

json number(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

namespace {

json vectorJson(const Vector& v) {
    json a = json::array();
    for (Eigen::Index i = 0; i < v.size(); ++i) a.push_back(number(v[i]));
    return a;
}

json matrixJson(const Matrix& m) {
    json rows = json::array();
    for (Eigen::Index i = 0; i < m.rows(); ++i) {
        json row = json::array();
        for (Eigen::Index j = 0; j < m.cols(); ++j) row.push_back(number(m(i, j)));
        rows.push_back(std::move(row));
    }
    return rows;
}

json countsJson(const solve::EvaluationCounts& c) {
    return {{"value", c.value}, {"gradient", c.gradient}, {"hessian", c.hessian}};
}

}  // namespace

json recordToJson(const solve::IterationRecord& r) {
    json trials = json::array();
    for (const solve::LineSearchTrial& t : r.trials)
        trials.push_back({{"alpha", number(t.alpha)},
                          {"value", number(t.value)},
                          {"slope", number(t.slope)},
                          {"accepted", t.accepted},
                          {"failed", std::string(t.failed)}});
    return {{"iteration", r.iteration},
            {"x", vectorJson(r.x)},
            {"value", number(r.value)},
            {"gradient", vectorJson(r.gradient)},
            {"gradient_norm", number(r.gradientNorm)},
            {"step", vectorJson(r.step)},
            {"step_kind", solve::toString(r.stepKind)},
            {"step_length", number(r.stepLength)},
            {"step_norm", number(r.stepNorm)},
            {"trials", trials},
            {"trust_radius", number(r.trustRadius)},
            {"ratio", number(r.ratio)},
            {"damping", number(r.damping)},
            {"damping_name", r.dampingName},
            {"predicted_decrease", number(r.predictedDecrease)},
            {"actual_decrease", number(r.actualDecrease)},
            {"accepted", r.accepted},
            {"hessian_eigenvalues", vectorJson(r.hessianEigenvalues)},
            {"condition_number", number(r.conditionNumber)},
            {"angle_to_steepest_descent", number(r.angleToSteepestDescent())},
            {"jacobian_rank", r.jacobianRank},
            {"jacobian_condition", number(r.jacobianCondition)},
            {"evaluations", countsJson(r.evaluations)},
            {"note", r.note.text()},
            {"notable", r.notable}};
}

json provenanceJson(const study::Provenance& p) {
    json j = {{"program", "Saddlewise"}, {"version", p.version}};
    if (!p.title.empty()) j["study_title"] = p.title;
    if (!p.formula.empty()) j["formula"] = p.formula;
    if (!p.model.empty()) {
        j["model"] = p.model;
        j["loss"] = p.loss;
        j["data"] = p.data;
    }
    j["caution"] = study::cautionText();
    return j;
}

json runToJson(const solve::Run& run, const std::vector<std::string>& names, bool withTrace) {
    json j = {{"method", run.methodId},
              {"label", run.label},
              {"termination", solve::toString(run.termination)},
              {"converged", solve::isConvergence(run.termination)},
              {"message", run.message},
              {"variables", names},
              {"x", vectorJson(run.x)},
              {"value", number(run.value)},
              {"gradient_norm", number(run.gradientNorm)},
              {"iterations", run.iterations()},
              {"evaluations", countsJson(run.evaluations)},
              {"end_point",
               {{"kind", solve::toString(run.endPoint.kind)},
                {"index", run.endPoint.index},
                {"critical", run.endPoint.critical},
                {"curvature", solve::toString(run.endPoint.curvature)},
                {"eigenvalues", vectorJson(run.endPoint.eigenvalues)},
                {"tolerance", number(run.endPoint.tolerance)},
                {"stationary_distance", number(run.endPoint.stationaryDistance)},
                {"stationary_bound", number(run.endPoint.stationaryBound)},
                {"reason", run.endPoint.reason},
                {"description", run.endPoint.description}}},
              {"dropped_records", run.droppedRecords},
              {"record_stride", run.recordStride}};
    if (withTrace) {
        json trace = json::array();
        for (const solve::IterationRecord& r : run.trace) trace.push_back(recordToJson(r));
        j["trace"] = std::move(trace);
    }
    return j;
}

json statisticsToJson(const fit::FitStatistics& st) {
    json parameters = json::object(), errors = json::object(), intervals = json::object();
    for (std::size_t k = 0; k < st.names.size(); ++k) {
        const auto i = static_cast<Eigen::Index>(k);
        parameters[st.names[k]] = i < st.estimates.size() ? number(st.estimates[i]) : json(nullptr);
        errors[st.names[k]] = i < st.standardErrors.size() ? number(st.standardErrors[i]) : json(nullptr);
        intervals[st.names[k]] = i < st.lower.size() && i < st.upper.size()
                                     ? json::array({number(st.lower[i]), number(st.upper[i])})
                                     : json::array({nullptr, nullptr});
    }
    // Parameters the data cannot separate have null errors and intervals; the combinations the
    // data do determine are listed (core/fit/fit_statistics.h).
    json undetermined = json::array(), combinations = json::array();
    for (std::size_t k = 0; k < st.names.size(); ++k)
        if (k < st.notDetermined.size() && st.notDetermined[k]) undetermined.push_back(st.names[k]);
    for (const fit::DeterminedCombination& c : st.determinedCombinations) {
        json coefficients = json::object();
        for (std::size_t k = 0; k < st.names.size(); ++k) {
            const auto i = static_cast<Eigen::Index>(k);
            if (i < c.coefficients.size() && c.coefficients[i] != 0) coefficients[st.names[k]] = c.coefficients[i];
        }
        combinations.push_back({{"text", c.text},
                                {"form", c.form},  // linear, product or ratio
                                {"coefficients", coefficients},
                                {"estimate", number(c.estimate)},
                                {"standard_error", number(c.standardError)},
                                {"confidence_interval", {number(c.lower), number(c.upper)}}});
    }
    json j = {{"parameters", parameters},
              {"not_determined", undetermined},
              {"determined_combinations", combinations},
              {"standard_errors", errors},
              {"confidence_intervals", intervals},
              {"confidence_level", st.confidenceLevel},
              {"critical_value", number(st.criticalValue)},
              {"covariance", matrixJson(st.covariance)},
              {"correlation", matrixJson(st.correlation)},
              {"covariance_method", st.covarianceMethod},
              {"residual_sum_of_squares", number(st.residualSumOfSquares)},
              {"residual_standard_deviation", number(st.residualStandardDeviation)},
              {"degrees_of_freedom", st.degreesOfFreedom},
              {"rows", st.rows},
              {"objective_value", number(st.objectiveValue)}};
    if (st.likelihood) {
        j["log_likelihood"] = number(st.logLikelihood);
        j["deviance"] = number(st.deviance);
    }
    j["jacobian"] = {{"rank", st.rank},
                     {"scaled_condition", number(st.scaledCondition)},
                     {"scaled_singular_values", vectorJson(st.singularValues)}};
    return j;
}

}  // namespace sw::report
