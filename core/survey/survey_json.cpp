#include "core/survey/survey_json.h"

#include <cmath>

namespace sw::survey {

namespace {

Json number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

Json named(const Vector& x, const std::vector<std::string>& names) {
    Json out = Json::object();
    for (Eigen::Index i = 0; i < x.size(); ++i) {
        const std::string name =
            static_cast<std::size_t>(i) < names.size() ? names[static_cast<std::size_t>(i)] : "x" + std::to_string(i + 1);
        out[name] = number(x[i]);
    }
    return out;
}

Json numbers(const Vector& v) {
    Json out = Json::array();
    for (Eigen::Index i = 0; i < v.size(); ++i) out.push_back(number(v[i]));
    return out;
}

Json boxJson(const Region& region, const std::vector<std::string>& names) {
    Json box = Json::object();
    for (Eigen::Index i = 0; i < region.lower.size(); ++i)
        box[static_cast<std::size_t>(i) < names.size() ? names[static_cast<std::size_t>(i)] : "x" + std::to_string(i + 1)] =
            Json::array({number(region.lower[i]), number(region.upper[i])});
    return box;
}

Json planeJson(const Region& region, const std::vector<std::string>& names) {
    if (region.lower.size() < 2 || names.size() < 2) return nullptr;
    Json plane;
    plane["x"] = names.at(static_cast<std::size_t>(region.xVariable));
    plane["y"] = names.at(static_cast<std::size_t>(region.yVariable));
    Json held = Json::object();
    for (std::size_t i = 0; i < names.size(); ++i)
        if (static_cast<int>(i) != region.xVariable && static_cast<int>(i) != region.yVariable &&
            static_cast<Eigen::Index>(i) < region.held.size())
            held[names[i]] = number(region.held[static_cast<Eigen::Index>(i)]);
    plane["held"] = held;
    return plane;
}

Json mapSummary(const CriticalMap& map) {
    Json j;
    j["counts"] = {{"minimum", map.count(solve::PointKind::Minimum)},
                   {"saddle", map.count(solve::PointKind::Saddle)},
                   {"maximum", map.count(solve::PointKind::Maximum)},
                   {"degenerate", map.count(solve::PointKind::Degenerate)}};
    j["starts"] = map.starts;
    j["starts_low_discrepancy"] = map.lowDiscrepancyStarts;
    j["starts_sign_change"] = map.signChangeStarts;
    j["converged"] = map.converged;
    j["outside"] = map.outside;
    j["stalled"] = map.stalled;
    j["left_box"] = map.leftBox;
    j["non_finite"] = map.nonFinite;
    j["found_once"] = map.foundOnce;
    j["found_twice"] = map.foundTwice;
    j["estimated_missing"] = number(map.estimatedMissing);
    j["likely_complete"] = map.likelyComplete;
    j["gradient_scale"] = number(map.gradientScale);
    j["settings"] = {{"starts", map.settings.starts},
                     {"sign_change_grid", map.settings.signChangeGrid},
                     {"max_sign_change_starts", map.settings.maxSignChangeStarts},
                     {"max_iterations", map.settings.maxIterations},
                     {"merge_tolerance", map.settings.mergeTolerance},
                     {"zero_tolerance", map.settings.zeroTolerance},
                     {"accept_tolerance", map.settings.acceptTolerance},
                     {"sequence", "halton-rr2"}};
    j["cancelled"] = map.cancelled;
    j["seconds"] = number(map.seconds);
    return j;
}

Json optionsJson(const solve::OptionValues& options) {
    Json o = Json::object();
    for (const auto& [name, value] : options) o[name] = value;
    return o;
}

}  // namespace

Json pointToJson(const CriticalPoint& p, const std::vector<std::string>& variables) {
    Json j;
    j["x"] = named(p.x, variables);
    j["value"] = number(p.value);
    j["kind"] = kindName(p);
    j["index"] = p.index;
    j["eigenvalues"] = numbers(p.eigenvalues);
    j["gradient_norm"] = number(p.gradientNorm);
    j["zero_eigenvalues"] = p.zeroEigenvalues;
    j["hits"] = p.hits;
    j["found_by"] = p.foundBy;
    j["escape_direction"] = named(p.lowestEigenvector, variables);
    if (p.continuum)
        j["continuum"] = {{"members", p.members},
                          {"lower", named(p.memberLower, variables)},
                          {"upper", named(p.memberUpper, variables)}};
    return j;
}

Json criticalMapToJson(const CriticalMap& map) {
    Json j;
    j["variables"] = map.variables;
    j["box"] = boxJson(map.region, map.variables);
    j["plane"] = planeJson(map.region, map.variables);
    Json points = Json::array();
    for (const CriticalPoint& p : map.points) points.push_back(pointToJson(p, map.variables));
    j["points"] = points;
    const Json summary = mapSummary(map);
    for (const auto& [key, value] : summary.items()) j[key] = value;
    return j;
}

Json basinSurveyToJson(const BasinSurvey& survey, bool withCells) {
    Json j;
    j["variables"] = survey.variables;
    j["box"] = boxJson(survey.region, survey.variables);
    j["plane"] = planeJson(survey.region, survey.variables);
    j["grid"] = survey.grid;
    j["cell_order"] = "cells[j*grid + i]: i along plane.x, j along plane.y, starts at the cell centres";
    j["cell_codes"] = {{"-1", basinCodeName(kCellLimit)},
                       {"-2", basinCodeName(kCellDiverged)},
                       {"-3", basinCodeName(kCellFailed)},
                       {"-4", basinCodeName(kCellOutside)},
                       {"-5", basinCodeName(kCellNotRun)},
                       {"0..", "index into points"}};
    j["stopping"] = {{"max_iterations", survey.rules.maxIterations},
                     {"max_evaluations", survey.rules.maxEvaluations},
                     {"gradient_norm_below", number(survey.rules.gradientTolerance)},
                     {"relative_step_below", number(survey.rules.stepTolerance)},
                     {"relative_change_below", number(survey.rules.functionTolerance)}};
    Json points = Json::array();
    for (const CriticalPoint& p : survey.map.points) points.push_back(pointToJson(p, survey.variables));
    j["points"] = points;
    j["critical"] = mapSummary(survey.map);
    Json methods = Json::array();
    for (const BasinMap& m : survey.maps) {
        Json one;
        one["label"] = m.method.label;
        one["method"] = m.method.methodId;
        one["options"] = optionsJson(m.method.options);
        if (withCells) {
            one["cells"] = m.cells;
            one["iterations"] = m.iterations;
        }
        one["counts"] = {{"points", m.pointCounts},
                         {"limit", m.limit},
                         {"diverged", m.diverged},
                         {"failed", m.failed},
                         {"outside", m.outside},
                         {"not_run", m.notRun}};
        one["max_iterations"] = m.maxIterations;
        one["points"] = points;
        one["seconds"] = number(m.seconds);
        methods.push_back(std::move(one));
    }
    j["methods"] = methods;
    j["cancelled"] = survey.cancelled;
    j["seconds"] = number(survey.seconds);
    return j;
}

Json withoutTimings(const Json& document) {
    if (document.is_object()) {
        Json out = Json::object();
        for (const auto& [key, value] : document.items())
            if (key != "seconds") out[key] = withoutTimings(value);
        return out;
    }
    if (document.is_array()) {
        Json out = Json::array();
        for (const Json& value : document) out.push_back(withoutTimings(value));
        return out;
    }
    return document;
}

}  // namespace sw::survey
