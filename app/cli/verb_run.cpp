// saddlewise run STUDY: runs every enabled lineup entry of a study from the study's start
// and prints the side-by-side comparison (or one JSON object with every run).
#include "app/cli/cli.h"
#include "core/solve/solver.h"
#include "core/study/study.h"

#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <iomanip>
#include <ostream>
#include <sstream>

namespace sw::cli {

namespace {

using Json = nlohmann::ordered_json;

const char* kHelp =
    "Usage: saddlewise run STUDY.json [--json] [--max-iterations N]\n"
    "\n"
    "Runs every enabled method of the study's lineup from the study's start point, with the\n"
    "study's stopping rules, and prints one row per method: iterations, evaluations (value,\n"
    "gradient, Hessian), final value, gradient norm, how the run ended, and what kind of point\n"
    "it ended on (minimum, saddle of index k, maximum, degenerate).\n"
    "\n"
    "The study is checked in full first; a problem is reported with its place in the file,\n"
    "e.g. 'methods[2].options.initial_radius: must be > 0 (got -1)'. For a data-fit study the\n"
    "data file must still match the checksum recorded in the study.\n"
    "\n"
    "Options:\n"
    "  --json               one JSON object: {\"study\": {...}, \"runs\": [...]}, each run with its\n"
    "                       summary, end point and full per-iteration trace\n"
    "  --max-iterations N   override the study's iteration limit (1 to 1000000)\n"
    "\n"
    "Exit codes: 0 every method ran (whether or not it converged), 2 bad usage or a bad study.\n";

Json number(double v) {
    return std::isfinite(v) ? Json(v) : Json(nullptr);
}

Json vectorJson(const Vector& v) {
    Json list = Json::array();
    for (Eigen::Index i = 0; i < v.size(); ++i) list.push_back(number(v(i)));
    return list;
}

Json pointJson(const Vector& x, const std::vector<std::string>& names) {
    Json point = Json::object();
    for (Eigen::Index i = 0; i < x.size() && i < static_cast<Eigen::Index>(names.size()); ++i)
        point[names[static_cast<std::size_t>(i)]] = number(x(i));
    return point;
}

Json countsJson(const solve::EvaluationCounts& c) {
    return {{"value", c.value}, {"gradient", c.gradient}, {"hessian", c.hessian}};
}

Json recordJson(const solve::IterationRecord& r) {
    Json record = {{"iteration", r.iteration},
                   {"x", vectorJson(r.x)},
                   {"value", number(r.value)},
                   {"gradient_norm", number(r.gradientNorm)},
                   {"step_kind", solve::toString(r.stepKind)},
                   {"step_length", number(r.stepLength)},
                   {"step_norm", number(r.stepNorm)},
                   {"trust_radius", number(r.trustRadius)},
                   {"ratio", number(r.ratio)},
                   {"damping", number(r.damping)},
                   {"damping_name", r.dampingName},
                   {"accepted", r.accepted},
                   {"hessian_eigenvalues", vectorJson(r.hessianEigenvalues)},
                   {"condition_number", number(r.conditionNumber)},
                   {"angle_to_steepest_descent", number(r.angleToSteepestDescent)},
                   {"line_search_trials", r.trials.size()},
                   {"evaluations", countsJson(r.evaluations)},
                   {"note", r.note}};
    return record;
}

Json runJson(const study::MethodEntry& entry, const solve::Run& run, const std::vector<std::string>& names) {
    Json trace = Json::array();
    for (const solve::IterationRecord& r : run.trace) trace.push_back(recordJson(r));
    return {{"label", entry.label},
            {"method", run.methodId},
            {"options", entry.options},
            {"termination", solve::toString(run.termination)},
            {"converged", solve::isConvergence(run.termination)},
            {"message", run.message},
            {"x", pointJson(run.x, names)},
            {"value", number(run.value)},
            {"gradient_norm", number(run.gradientNorm)},
            {"iterations", run.iterations()},
            {"evaluations", countsJson(run.evaluations)},
            {"end_point",
             {{"kind", solve::toString(run.endPoint.kind)},
              {"index", run.endPoint.index},
              {"eigenvalues", vectorJson(run.endPoint.eigenvalues)},
              {"description", run.endPoint.description}}},
            {"trace", trace}};
}

std::string endPointText(const solve::EndPoint& p) {
    if (p.kind == solve::PointKind::Saddle) return "saddle (index " + std::to_string(p.index) + ")";
    return solve::toString(p.kind);
}

void printTable(std::ostream& out, const std::vector<std::vector<std::string>>& rows) {
    std::vector<std::size_t> widths;
    for (const auto& row : rows)
        for (std::size_t c = 0; c < row.size(); ++c) {
            if (widths.size() <= c) widths.push_back(0);
            widths[c] = std::max(widths[c], row[c].size());
        }
    for (std::size_t r = 0; r < rows.size(); ++r) {
        std::string line;
        for (std::size_t c = 0; c < rows[r].size(); ++c) {
            std::string cell = rows[r][c];
            if (c + 1 < rows[r].size()) cell.resize(widths[c] + 2, ' ');
            line += cell;
        }
        out << "  " << line << '\n';
        if (r == 0) out << "  " << std::string(line.size(), '-') << '\n';
    }
}

int run(const std::vector<std::string>& args, std::ostream& out, std::ostream&) {
    const ParsedArgs parsed = parseArgs(args, {"json"}, {"max-iterations"});
    if (parsed.positional.size() != 1)
        throw UsageError(parsed.positional.empty() ? "give the study file to run" : "give exactly one study file");
    const std::string path = parsed.positional[0];

    study::Study study;
    std::shared_ptr<const Objective> objective;
    const std::string base = study::directoryOf(path);
    try {
        study = study::loadFile(path);
        objective = study::makeObjective(study, base);
    } catch (const study::StudyError& e) {
        throw UsageError(path + ": " + e.what());
    }
    solve::StoppingRules rules = study.stoppingRules();
    if (parsed.has("max-iterations"))
        rules.maxIterations =
            static_cast<int>(parseInteger(parsed.get("max-iterations"), "--max-iterations", 1, 1000000));

    std::vector<const study::MethodEntry*> lineup;
    for (const study::MethodEntry& entry : study.methods)
        if (entry.enabled) lineup.push_back(&entry);
    if (lineup.empty())
        throw UsageError(path + ": the study has no enabled methods; set \"enabled\": true on one in \"methods\"");

    const Vector start = study.start();
    const std::vector<std::string> names = study.variableNames();
    std::vector<solve::Run> runs;
    for (const study::MethodEntry* entry : lineup) {
        solve::Run result = solve::solve(entry->method, *objective, start, entry->options, rules);
        result.label = entry->label;
        runs.push_back(std::move(result));
    }

    if (parsed.has("json")) {
        Json variables = Json::array();
        for (const study::Variable& v : study.variables)
            variables.push_back({{"name", v.name}, {"start", v.start}, {"lower", v.lower}, {"upper", v.upper}});
        Json studyJson = {{"file", path},
                          {"title", study.title},
                          {"objective", objective->description()},
                          {"mode", study.isFit() ? "data-fit" : "formula"},
                          {"variables", variables},
                          {"start", pointJson(start, names)},
                          {"max_iterations", rules.maxIterations}};
        Json runList = Json::array();
        for (std::size_t k = 0; k < runs.size(); ++k) runList.push_back(runJson(*lineup[k], runs[k], names));
        out << Json({{"study", studyJson}, {"runs", runList}}).dump(2) << '\n';
        return 0;
    }

    out << (study.title.empty() ? path : study.title) << '\n';
    out << "  objective: " << objective->description() << '\n';
    out << "  start:    ";
    for (std::size_t i = 0; i < names.size(); ++i)
        out << (i ? ", " : " ") << names[i] << " = " << formatNumber(start(static_cast<Eigen::Index>(i)), 6);
    out << "\n\n";
    std::vector<std::vector<std::string>> rows = {
        {"label", "method", "iters", "evals f/g/H", "final f", "|grad f|", "ended by", "end point"}};
    for (std::size_t k = 0; k < runs.size(); ++k) {
        const solve::Run& r = runs[k];
        rows.push_back({lineup[k]->label, r.methodId, std::to_string(r.iterations()),
                        std::to_string(r.evaluations.value) + "/" + std::to_string(r.evaluations.gradient) + "/" +
                            std::to_string(r.evaluations.hessian),
                        formatNumber(r.value, 8), formatNumber(r.gradientNorm, 3), solve::toString(r.termination),
                        endPointText(r.endPoint)});
    }
    printTable(out, rows);
    out << '\n';
    for (std::size_t k = 0; k < runs.size(); ++k) out << "  " << lineup[k]->label << ": " << runs[k].message << '\n';
    return 0;
}

}  // namespace

Verb runVerb() {
    return {"run", "run a study's method lineup and compare the results", kHelp, &run};
}

}  // namespace sw::cli
