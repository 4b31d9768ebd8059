// saddlewise run STUDY: runs every enabled lineup entry of a study from the study's start
// and prints the side-by-side comparison (or one JSON object with every run).
#include "app/cli/cli.h"
#include "app/cli/findings_report.h"
#include "app/cli/run_report.h"
#include "app/cli/study_findings.h"
#include "core/report/study_run.h"
#include "core/solve/solver.h"
#include "core/study/provenance.h"
#include "core/study/study.h"

#include <nlohmann/json.hpp>

#include <ostream>

namespace sw::cli {

namespace {

const char* kHelp =
    "Usage: saddlewise run STUDY.json [--json] [--max-iterations N] [--no-remedies]\n"
    "\n"
    "Runs every enabled method of the study's lineup from the study's start point, with the\n"
    "study's stopping rules, and prints one row per method: iterations, evaluations (value,\n"
    "gradient, Hessian), final value, gradient norm, how the run ended, and what kind of point\n"
    "it ended on (local minimum, saddle of index k, local maximum, degenerate).\n"
    "\n"
    "The study is checked in full first; a problem is reported with its place in the file,\n"
    "e.g. 'methods[2].options.initial_radius: must be > 0 (got -1)'. For a data-fit study the\n"
    "data file must still match the checksum recorded in the study.\n"
    "\n"
    "Options:\n"
    "  --json               one JSON object: {\"study\": {...}, \"runs\": [...]}, each run with its\n"
    "                       label, options, summary, end point and full per-iteration trace;\n"
    "                       for a data fit also its statistics (\"fit\": estimates, standard\n"
    "                       errors, intervals, correlations, warnings)\n"
    "  --max-iterations N   override the study's iteration limit (1 to 1000000)\n"
    "  --no-remedies        report findings without rerunning their remedies\n"
    "\n"
    "After the table, each method's message and its findings: why it stalled, ended on a saddle\n"
    "or crawls, with the numbers behind it and a remedy that was tried (a rerun from the same\n"
    "start with one change); in JSON each run has \"findings\".\n"
    "\n"
    "Example:\n"
    "  saddlewise run samples/two-valve-saddles.json\n"
    "\n"
    "Exit codes: 0 every method ran (converged or stopped at a limit), 1 a run broke down\n"
    "(non-finite values or a method failure), 2 bad usage or a bad study.\n";

int run(const std::vector<std::string>& args, std::ostream& out, std::ostream&) {
    const ParsedArgs parsed = parseArgs(args, {"json", "no-remedies"}, {"max-iterations"});
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

    // Without --json no record is printed: keep only the smallest trace.
    if (!parsed.has("json")) rules.traceMemoryLimit = solve::StoppingRules::kMinTraceMemory;
    report::StudyRuns result;
    try {
        report::RunControl control;
        control.statistics = parsed.has("json");  // the table leaves them out
        result = report::runStudy(study, path, objective, rules, control);
    } catch (const study::StudyError& e) {
        throw UsageError(path + ": " + e.problem());
    }
    const std::vector<diagnose::Findings> findings = addStudyFindings(result, !parsed.has("no-remedies"));
    const std::vector<solve::Run>& runs = result.runs;
    if (parsed.has("json")) {
        out << report::studyRunsJson(result).dump(2, ' ', false, nlohmann::json::error_handler_t::replace) << '\n';
        return exitCodeFor(runs);
    }

    const Vector start = study.start();
    const std::vector<std::string> names = study.variableNames();
    out << (study.title.empty() ? path : study.title) << '\n';
    out << "  objective: " << objective->description() << '\n';
    out << "  start:    ";
    for (std::size_t i = 0; i < names.size(); ++i)
        out << (i ? ", " : " ") << names[i] << " = " << formatNumber(start(static_cast<Eigen::Index>(i)), 6);
    out << "\n\n";
    printComparison(out, runs);
    out << '\n';
    for (std::size_t k = 0; k < runs.size(); ++k) {
        out << "  " << runs[k].label << " (" << runs[k].methodId << "): " << runs[k].message << '\n';
        printFindings(out, findings[k], names, "    ");
    }
    out << '\n' << wrapText(study::cautionLine(), 100);
    return exitCodeFor(runs);
}

}  // namespace

Verb runVerb() {
    return {"run", "run a study's method lineup and compare the results", kHelp, &run};
}

}  // namespace sw::cli
