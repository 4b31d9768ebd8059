// Running a study's lineup and writing what `run --json` prints.
#include "core/report/study_run.h"

#include "core/fit/run_fit.h"
#include "core/objective/fit_objective.h"
#include "core/report/run_json.h"

#include <algorithm>
#include <cmath>
#include <limits>

namespace sw::report {

using nlohmann::json;

std::vector<std::size_t> enabledEntries(const study::Study& study) {
    std::vector<std::size_t> entries;
    for (std::size_t k = 0; k < study.methods.size(); ++k)
        if (study.methods[k].enabled) entries.push_back(k);
    if (entries.empty())
        throw study::StudyError("methods", "the study has no enabled methods; set \"enabled\": true on one in \"methods\"");
    return entries;
}

StudyRuns runStudy(study::Study study, std::string studyPath, std::shared_ptr<const Objective> objective,
                   const solve::StoppingRules& rules, const RunControl& control) {
    StudyRuns result;
    result.entries = enabledEntries(study);
    result.study = std::move(study);
    result.studyPath = std::move(studyPath);
    result.objective = std::move(objective);
    result.rules = rules;

    const Vector start = result.study.start();
    const double count = static_cast<double>(result.entries.size());
    const double limit = std::max(1, rules.maxIterations);
    for (std::size_t k = 0; k < result.entries.size(); ++k) {
        const study::MethodEntry& entry = result.study.methods[result.entries[k]];
        solve::Run run;
        if (control.cancel && control.cancel->load()) {
            run.methodId = entry.method;
            run.termination = solve::Termination::StoppedByCaller;
            run.message = "not run: cancelled";
        } else {
            solve::SolverOrError made = solve::makeSolver(entry.method, *result.objective, start, entry.options, rules);
            if (made.solver) {
                run = solve::solve(std::move(made.solver), [&](const solve::Run& soFar) {
                    if (control.progress)
                        control.progress((static_cast<double>(k) + std::min(1.0, soFar.iterations() / limit)) / count);
                    return !(control.cancel && control.cancel->load());
                });
            } else {
                run.methodId = entry.method;
                run.termination = solve::Termination::Failed;
                run.message = made.error;
            }
        }
        run.label = entry.label;
        result.runs.push_back(std::move(run));
        if (control.progress) control.progress((static_cast<double>(k) + 1) / count);
    }

    const auto* fitObjective = dynamic_cast<const FitObjective*>(result.objective.get());
    if (fitObjective && control.statistics) {
        for (const solve::Run& run : result.runs) {
            // A run rejected before its first evaluation has no end point: describe the start.
            const Vector at = run.x.size() == start.size() ? run.x : start;
            result.statistics.push_back(fit::computeStatistics(*fitObjective, at));
        }
    }
    return result;
}

survey::Region surveyRegion(const study::Study& study) {
    const int n = static_cast<int>(study.variables.size());
    survey::Region region;
    region.lower = Vector(n);
    region.upper = Vector(n);
    region.held = Vector(n);
    for (int i = 0; i < n; ++i) {
        const study::Variable& v = study.variables[static_cast<std::size_t>(i)];
        region.lower[i] = v.lower;
        region.upper[i] = v.upper;
        region.held[i] = v.start;
    }
    region.xVariable = n >= 2 ? study.view.plotX : 0;
    region.yVariable = n >= 2 ? study.view.plotY : 0;
    return region;
}

void runStudySurveys(StudyRuns& runs, const RunControl& control) {
    const study::Study& study = runs.study;
    if (!study.surveys || (!study.surveys->critical && !study.surveys->basins) || !runs.objective) return;
    const study::SurveySettings& wanted = *study.surveys;
    std::vector<std::string> notes;
    const survey::Region region = surveyRegion(study);
    survey::CriticalSettings criticalSettings;
    criticalSettings.starts = wanted.criticalStarts;
    criticalSettings.signChangeGrid = wanted.signChangeGrid;
    survey::Control surveyControl;
    surveyControl.cancel = control.cancel;
    const bool both = wanted.critical && wanted.basins;
    if (wanted.critical) {
        if (control.progress) surveyControl.progress = [&](double f) { control.progress(both ? 0.3 * f : f); };
        try {
            auto map = std::make_shared<survey::CriticalMap>(
                survey::CriticalSearch(*runs.objective, region, criticalSettings, surveyControl).find(surveyControl));
            if (!map->cancelled) runs.critical = std::move(map);
        } catch (const std::exception& e) {
            notes.push_back(std::string("The critical-point map could not be made: ") + e.what());
        }
    }
    if (wanted.basins) {
        std::vector<survey::BasinMethod> methods;
        std::vector<std::string> labels = wanted.basinMethods;
        if (labels.empty())
            for (const study::MethodEntry& m : study.methods)
                if (m.enabled && labels.size() < 3) labels.push_back(m.label);
        for (const std::string& label : labels)
            for (const study::MethodEntry& m : study.methods)
                if (m.label == label) methods.push_back({m.label, m.method, m.options});
        if (methods.empty()) {
            notes.push_back("The basin maps name no lineup entry of this study.");
        } else {
            survey::BasinSettings settings;
            settings.grid = wanted.basinGrid;
            settings.rules = runs.rules;
            if (control.progress) surveyControl.progress = [&](double f) { control.progress(both ? 0.3 + 0.7 * f : f); };
            try {
                auto result = std::make_shared<survey::BasinSurvey>(
                    survey::mapBasins(*runs.objective, region, methods, settings, criticalSettings, surveyControl));
                if (!result->cancelled) runs.basins = std::move(result);
            } catch (const std::exception& e) {
                notes.push_back(std::string("The basin maps could not be made: ") + e.what());
            }
        }
    }
    for (const std::string& note : notes) runs.surveyNote += (runs.surveyNote.empty() ? "" : " ") + note;
}

json studyRunsJson(const StudyRuns& r, bool withTrace) {
    const study::Study& study = r.study;
    json variables = json::array();
    json startPoint = json::object();
    for (const study::Variable& v : study.variables) {
        variables.push_back({{"name", v.name}, {"start", v.start}, {"plot_from", v.lower}, {"plot_to", v.upper}});
        startPoint[v.name] = v.start;
    }
    json studyJson = {{"file", r.studyPath},
                      {"title", study.title},
                      {"objective", r.objective ? r.objective->description() : std::string()},
                      {"mode", study.isFit() ? "data-fit" : "formula"},
                      {"variables", variables},
                      {"start", startPoint},
                      {"max_iterations", r.rules.maxIterations},
                      {"stopping",
                       {{"max_iterations", r.rules.maxIterations},
                        {"max_evaluations", r.rules.maxEvaluations},
                        {"gradient_norm_below", r.rules.gradientTolerance},
                        {"gradient_ratio_below", r.rules.relativeGradientTolerance},
                        {"relative_step_below", r.rules.stepTolerance},
                        {"relative_change_below", r.rules.functionTolerance}}}};
    if (study.fit) {
        const study::DataFit& fit = *study.fit;
        json data = {{"file", fit.dataPath}, {"checksum", fit.checksum}, {"model", fit.model},
                     {"response", fit.response}, {"loss", fit.loss}};
        if (!fit.weights.empty()) data[fit.weightsKind == "sigma" ? "sigma" : "weights"] = fit.weights;
        if (fit.loss == "huber" || fit.loss == "cauchy") data["scale"] = fit.lossScale;
        if (const auto* objective = dynamic_cast<const FitObjective*>(r.objective.get())) {
            const sw::Table& table = objective->table();
            data["rows"] = table.rowCount();
            data["columns"] = table.columnNames;
            data["separator"] = toString(table.separator);
            data["separator_detected"] = table.separatorDetected;
            data["dropped_rows"] = table.droppedRows;
        }
        studyJson["data"] = std::move(data);
    }

    const std::vector<std::string> names = study.variableNames();
    json runList = json::array();
    for (std::size_t k = 0; k < r.runs.size(); ++k) {
        json run = runToJson(r.runs[k], names, withTrace);
        run["options"] = study.methods[r.entries[k]].options;
        if (k < r.findings.size() && !r.findings[k].is_null()) run["findings"] = r.findings[k];
        if (k < r.statistics.size()) {
            json fit = statisticsToJson(r.statistics[k]);
            fit["warnings"] = fit::fitWarnings(r.runs[k], r.statistics[k]);
            run["fit"] = std::move(fit);
        }
        runList.push_back(std::move(run));
    }
    return {{"provenance", provenanceJson(study::provenanceOf(study))}, {"study", studyJson}, {"runs", runList}};
}

int bestRun(const json& runsJson) {
    const json& runs = runsJson.contains("runs") ? runsJson["runs"] : runsJson;
    bool anyConverged = false;
    for (const json& run : runs) anyConverged = anyConverged || (run["value"].is_number() && run.value("converged", false));
    double lowest = std::numeric_limits<double>::infinity();
    for (const json& run : runs)
        if (run["value"].is_number() && (!anyConverged || run.value("converged", false)))
            lowest = std::min(lowest, run["value"].get<double>());
    if (!std::isfinite(lowest)) return -1;
    // Ties go to the first in the lineup: methods that reach the same minimum differ in the
    // last digits, and the order the modeler gave the lineup is the better guide than rounding.
    const double tie = kBestRunTie * std::max(1.0, std::fabs(lowest));
    for (std::size_t k = 0; k < runs.size(); ++k) {
        const json& run = runs[k];
        if (run["value"].is_number() && (!anyConverged || run.value("converged", false)) &&
            run["value"].get<double>() <= lowest + tie)
            return static_cast<int>(k);
    }
    return -1;
}

}  // namespace sw::report
