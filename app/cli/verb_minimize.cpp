// saddlewise minimize: run one or several methods on a formula from one start point.
#include "app/cli/cli.h"
#include "app/cli/findings_report.h"
#include "app/cli/run_report.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"

#include <ostream>

namespace sw::cli {

namespace {

const char* kHelp =
    "Usage: saddlewise minimize FORMULA --from NAME=VALUE,... --method ID [--method ID ...]\n"
    "                           [--option NAME=VALUE ...] [--constants NAME=VALUE,...]\n"
    "                           [--max-iterations N] [--max-evaluations N] [--gradient-norm-below X]\n"
    "                           [--summary] [--json] [--no-remedies]\n"
    "\n"
    "Minimizes FORMULA over the variables named in --from, starting at their values, with\n"
    "exact symbolic gradient and Hessian. Several --method flags run side by side from the\n"
    "same start and print a comparison table.\n"
    "\n"
    "  --from x=-1.2,y=1        the variables, in order, and the start point (required)\n"
    "  --method ID              a method id; 'saddlewise methods' lists them with their options\n"
    "  --option NAME=VALUE      a method option; applies to every chosen method that has it.\n"
    "                           Qualify it as METHOD.NAME=VALUE for one method only\n"
    "  --constants a=1,b=2      further names in the formula held fixed\n"
    "  --max-iterations N       iteration limit per run (default 200, at most 100000000)\n"
    "  --max-evaluations N      value + gradient + Hessian evaluations per run (default 100000)\n"
    "  --gradient-norm-below X  converged when the gradient norm is <= X (default 1e-8; the\n"
    "                           former name --gradient-tolerance is still read)\n"
    "  --summary                leave out the per-iteration table (and the JSON trace)\n"
    "  --json                   one JSON object (several methods: {\"runs\": [...]}); each run has\n"
    "                           \"findings\": what went wrong or how it converged, with remedies\n"
    "  --no-remedies            report findings without rerunning their remedies\n"
    "\n"
    "The per-iteration records of a run take at most about 16 MiB (256 KiB with --summary);\n"
    "past that, records in the middle are thinned out (the first, the last 50, every k-th and\n"
    "the notable ones stay) and the output says how many were dropped.\n"
    "\n"
    "After each method, its findings: why it stalled, ended on a saddle or crawls, with the\n"
    "numbers behind it and a remedy that was tried (a rerun from the same start with one change).\n"
    "\n"
    "Example:\n"
    "  saddlewise minimize '100*(y-x^2)^2+(1-x)^2' --from x=-1.2,y=1 --method bfgs --method newton\n"
    "\n"
    "Exit codes: 0 the runs finished: converged, at a limit, or stopped by the method's own\n"
    "end (a line search or trust region that could not go on; the termination and findings\n"
    "say which), 1 a run broke down (non-finite values or a method failure), 2 bad usage or\n"
    "input.\n";

int runMinimize(const std::vector<std::string>& args, std::ostream& out, std::ostream&) {
    const ParsedArgs parsed = parseArgs(args, {"json", "summary", "no-remedies"},
                                        {"from", "method", "option", "constants", "max-iterations",
                                         "max-evaluations", "gradient-norm-below", "gradient-tolerance"});
    if (parsed.positional.size() != 1)
        throw UsageError(parsed.positional.empty() ? "give the formula to minimize"
                                                   : "give exactly one formula (quote it); got " +
                                                         std::to_string(parsed.positional.size()) + " words");
    if (!parsed.has("from")) throw UsageError("give the variables and the start point with --from x=-1.2,y=1");
    const auto start = parseAssignments(parsed.get("from"), "from");
    std::vector<std::string> names;
    Vector x0(static_cast<Eigen::Index>(start.size()));
    for (std::size_t i = 0; i < start.size(); ++i) {
        names.push_back(start[i].first);
        x0[static_cast<Eigen::Index>(i)] = start[i].second;
    }
    std::vector<std::pair<std::string, double>> constants;
    if (parsed.has("constants")) constants = parseAssignments(parsed.get("constants"), "constants");
    for (const auto& [constant, unused] : constants)
        for (const std::string& v : names)
            if (v == constant) throw UsageError("'" + constant + "' is given both in --from and in --constants");

    const std::vector<std::string>& methodIds = parsed.all("method");
    if (methodIds.empty()) throw UsageError("give at least one --method ID (saddlewise methods lists them)");
    for (const std::string& id : methodIds)
        if (!solve::findMethod(id)) throw UsageError("unknown method '" + id + "'; known: " + solve::methodIdList());
    const std::vector<solve::OptionValues> options = distributeOptions(methodIds, parsed.all("option"));

    solve::StoppingRules rules;
    if (parsed.has("max-iterations"))
        rules.maxIterations = static_cast<int>(
            parseInteger(parsed.get("max-iterations"), "--max-iterations", 0, solve::StoppingRules::kMaxIterationLimit));
    // Records that are not printed are thinned to the smallest trace (first, last 50, notable).
    if (parsed.has("summary")) rules.traceMemoryLimit = solve::StoppingRules::kMinTraceMemory;
    if (parsed.has("max-evaluations"))
        rules.maxEvaluations = parseInteger(parsed.get("max-evaluations"), "--max-evaluations", 1, 1000000000000L);
    if (parsed.has("gradient-norm-below") && parsed.has("gradient-tolerance"))
        throw UsageError("--gradient-tolerance is the former name of --gradient-norm-below; give one of them");
    for (const char* option : {"gradient-norm-below", "gradient-tolerance"})
        if (parsed.has(option)) {
            const std::string flag = std::string("--") + option;
            rules.gradientTolerance = parseNumber(parsed.get(option), flag);
            if (rules.gradientTolerance < 0) throw UsageError(flag + " must be >= 0");
        }

    const FormulaObjective objective(parsed.positional[0], names, constants);  // FormulaError -> exit 2

    std::vector<solve::Run> runs;
    for (std::size_t i = 0; i < methodIds.size(); ++i) {
        solve::SolverOrError made = solve::makeSolver(methodIds[i], objective, x0, options[i], rules);
        if (!made.solver) throw UsageError(made.error);
        runs.push_back(solve::solve(std::move(made.solver)));
    }
    const bool withRemedies = !parsed.has("no-remedies");
    std::vector<diagnose::Findings> findings;
    for (std::size_t i = 0; i < runs.size(); ++i)
        findings.push_back(findingsFor(runs[i], objective, methodIds[i], options[i], rules, x0, withRemedies));

    const bool withTrace = !parsed.has("summary");
    if (parsed.has("json")) {
        study::Provenance provenance;
        provenance.formula = parsed.positional[0];
        auto runJson = [&](std::size_t i) {
            nlohmann::json j = runToJson(runs[i], names, withTrace);
            j["findings"] = findingsToJson(findings[i], names);
            return j;
        };
        if (runs.size() == 1) {
            nlohmann::json one = nlohmann::json{{"provenance", provenanceJson(provenance)}};
            one.update(runJson(0));
            out << one.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) << '\n';
        } else {
            nlohmann::json all = nlohmann::json::array();
            for (std::size_t i = 0; i < runs.size(); ++i) all.push_back(runJson(i));
            out << nlohmann::json{{"provenance", provenanceJson(provenance)}, {"runs", all}}.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) << '\n';
        }
        return exitCodeFor(runs);
    }
    out << "minimize " << parsed.positional[0] << '\n';
    if (runs.size() == 1) {
        if (withTrace) {
            out << '\n';
            printTrace(out, runs[0], names);
        }
        out << '\n';
        printSummary(out, runs[0], names);
        out << '\n';
        printFindings(out, findings[0], names);
    } else {
        out << '\n';
        printComparison(out, runs);
        out << '\n';
        for (std::size_t i = 0; i < runs.size(); ++i) {
            out << runs[i].label << ": " << runs[i].message << '\n';
            printFindings(out, findings[i], names, "  ");
        }
        if (withTrace)
            for (const solve::Run& r : runs) {
                out << "\n--- " << r.label << " ---\n";
                printTrace(out, r, names);
            }
    }
    return exitCodeFor(runs);
}

}  // namespace

Verb minimizeVerb() {
    return {"minimize", "minimize a formula with one or several methods from one start point", kHelp, runMinimize};
}

}  // namespace sw::cli
