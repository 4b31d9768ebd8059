// saddlewise fit: fit a model formula to a CSV table and report estimates with their
// uncertainty, goodness of fit and warnings.
#include "app/cli/cli.h"
#include "app/cli/findings_report.h"
#include "app/cli/fit_report.h"
#include "app/cli/run_report.h"
#include "core/fit/run_fit.h"

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <iomanip>
#include <ostream>
#include <sstream>

namespace sw::cli {

namespace {

const char* kHelp =
    "Usage: saddlewise fit --data FILE.csv --model FORMULA --response COLUMN --start NAME=VALUE,...\n"
    "                      [--loss least-squares|weighted|huber|cauchy|logistic|poisson]\n"
    "                      [--weights COLUMN] [--sigma COLUMN] [--scale S] [--method ID]\n"
    "                      [--option NAME=VALUE ...] [--separator auto|comma|semicolon|tab]\n"
    "                      [--drop-incomplete] [--max-iterations N] [--confidence LEVEL]\n"
    "                      [--summary] [--json] [--no-remedies]\n"
    "\n"
    "Fits FORMULA, written in the table's columns and the parameters named in --start, to the\n"
    "response column, with exact symbolic derivatives, and reports the estimates, standard\n"
    "errors, correlations, confidence intervals, goodness of fit and warnings.\n"
    "\n"
    "  --data FILE.csv        a table with a header row; comma, semicolon or tab separated\n"
    "                         ('#' lines are comments; numbers use '.' as the decimal point)\n"
    "  --model FORMULA        the model, e.g. 'a*exp(-k*t) + c'\n"
    "  --response COLUMN      the column the model predicts\n"
    "  --start b1=1,b2=0.5    the parameters, in order, and their start values\n"
    "  --loss NAME            least-squares (default): 1/2 sum r^2, r = y - model\n"
    "                         weighted: 1/2 sum w r^2 (needs --weights or --sigma)\n"
    "                         huber, cauchy: robust losses with scale --scale\n"
    "                         logistic: y in {0,1} with P(y = 1) = 1/(1 + exp(-model)); the model\n"
    "                         is the log-odds (former id bernoulli-logit, still read)\n"
    "                         poisson: counts y with mean exp(model) (former id poisson-log, still read)\n"
    "  --weights COLUMN       row weights (>= 0); any loss\n"
    "  --sigma COLUMN         standard deviations of y (> 0); weights 1/sigma^2\n"
    "  --scale S              the Huber / Cauchy scale, in the response's units (default 1)\n"
    "  --method ID            default: levenberg-marquardt for (weighted) least squares, a\n"
    "                         Hessian method otherwise; 'saddlewise methods' lists them\n"
    "  --option NAME=VALUE    an option of the method\n"
    "  --separator S          auto (default; the detected separator is reported), comma, semicolon, tab\n"
    "  --drop-incomplete      skip rows with empty or NA cells (the count is reported)\n"
    "  --max-iterations N     iteration limit (default 1000)\n"
    "  --confidence LEVEL     confidence level of the intervals, in (0, 1) (default 0.95)\n"
    "  --summary              leave out the per-iteration table (and the JSON trace)\n"
    "  --json                 one JSON object (with \"findings\")\n"
    "  --no-remedies          report findings without rerunning their remedies\n"
    "\n"
    "After the run's summary, its findings: why it stalled, ended on a saddle or crawls, which\n"
    "parameter combination the data do not determine, with the numbers behind it and a remedy\n"
    "that was tried (a rerun from the same start with one change).\n"
    "\n"
    "Example:\n"
    "  saddlewise fit --data samples/sensor-warmup.csv --model 'a - b*exp(-minutes/tau)' --response temp \\\n"
    "                 --start a=40,b=20,tau=5\n"
    "\n"
    "Exit codes: 0 the fit ran (converged, at a limit, or stopped by the method's own end; the\n"
    "termination, findings and warnings say which), 1 the run broke down, 2 bad usage or input.\n";

int runFitVerb(const std::vector<std::string>& args, std::ostream& out, std::ostream&) {
    const ParsedArgs parsed =
        parseArgs(args, {"json", "summary", "drop-incomplete", "no-remedies"},
                  {"data", "model", "response", "start", "loss", "weights", "sigma", "scale", "method", "option",
                   "separator", "max-iterations", "confidence"});
    if (!parsed.positional.empty())
        throw UsageError("unexpected argument '" + parsed.positional[0] + "' (quote the model formula after --model)");
    for (const char* required : {"data", "model", "response", "start"})
        if (!parsed.has(required)) throw UsageError(std::string("--") + required + " is required");

    TableReadOptions readOptions;
    if (!parseSeparator(parsed.get("separator", "auto"), readOptions.separator))
        throw UsageError("--separator must be one of: auto, comma, semicolon, tab (got '" + parsed.get("separator") +
                         "')");
    readOptions.dropIncompleteRows = parsed.has("drop-incomplete");

    fit::FitRequest request;
    FitDefinition& def = request.definition;
    def.model = parsed.get("model");
    def.response = parsed.get("response");
    for (const auto& [name, value] : parseAssignments(parsed.get("start"), "start")) {
        def.parameters.push_back(name);
        request.start.push_back(value);
    }
    if (parsed.has("loss") && !parseLoss(parsed.get("loss"), def.loss))
        throw UsageError("--loss must be one of: " + lossList() + " (got '" + parsed.get("loss") + "')");
    def.weights = parsed.get("weights");
    def.sigma = parsed.get("sigma");
    if (parsed.has("scale")) def.scale = parseNumber(parsed.get("scale"), "--scale");
    if (parsed.has("scale") && !(def.scale > 0)) throw UsageError("--scale must be > 0");
    if (parsed.has("scale") && def.loss != Loss::Huber && def.loss != Loss::Cauchy)
        throw UsageError("--scale applies only to --loss huber or cauchy");
    request.method = parsed.get("method");
    if (!request.method.empty() && !solve::findMethod(request.method))
        throw UsageError("unknown method '" + request.method + "'; known: " + solve::methodIdList());
    const std::string method = request.method.empty() ? fit::defaultFitMethod(def.loss) : request.method;
    if (parsed.has("option")) request.options = distributeOptions({method}, parsed.all("option")).front();
    if (parsed.has("max-iterations"))
        request.rules.maxIterations =
            static_cast<int>(parseInteger(parsed.get("max-iterations"), "--max-iterations", 0,
                                          solve::StoppingRules::kMaxIterationLimit));
    if (parsed.has("summary")) request.rules.traceMemoryLimit = solve::StoppingRules::kMinTraceMemory;
    if (parsed.has("confidence")) {
        request.confidenceLevel = parseNumber(parsed.get("confidence"), "--confidence");
        if (!(request.confidenceLevel > 0 && request.confidenceLevel < 1))
            throw UsageError("--confidence must be in (0, 1), e.g. 0.95");
    }

    std::shared_ptr<Table> table;
    try {
        table = std::make_shared<Table>(readTable(parsed.get("data"), readOptions));
    } catch (const TableError& e) {
        throw UsageError(e.what());
    }
    fit::FitResult result;
    try {
        result = fit::runFit(table, request);
    } catch (const FitError& e) {
        throw UsageError(e.what());
    }
    const fit::FitStatistics& st = result.statistics;
    const solve::Run& run = result.run;
    const std::vector<std::string>& names = def.parameters;
    const bool withTrace = !parsed.has("summary");

    // The rules the run had: runFit gives a method that is not a least-squares one a relative
    // gradient test when the request has none (run_fit.cpp); the findings' reruns use the same.
    solve::StoppingRules rules = request.rules;
    if (const solve::MethodInfo* info = solve::findMethod(run.methodId);
        info && !info->needsResiduals && rules.gradientTolerance == 0 && rules.relativeGradientTolerance == 0)
        rules.relativeGradientTolerance = 1e-12;
    const Vector start = Eigen::Map<const Vector>(request.start.data(), static_cast<Eigen::Index>(request.start.size()));
    const diagnose::Findings findings =
        findingsFor(run, *result.objective, run.methodId, request.options, rules, start, !parsed.has("no-remedies"));

    if (parsed.has("json")) {
        study::Provenance provenance;
        provenance.model = def.response + " = " + def.model;
        provenance.loss = toString(def.loss);
        provenance.data = parsed.get("data");
        nlohmann::json j = runToJson(run, names, withTrace);
        j["provenance"] = provenanceJson(provenance);
        j["data"] = {{"file", parsed.get("data")},
                     {"rows", table->rowCount()},
                     {"columns", table->columnNames},
                     {"separator", toString(table->separator)},
                     {"separator_detected", table->separatorDetected},
                     {"dropped_rows", table->droppedRows}};
        j["model"] = def.model;
        j["response"] = def.response;
        j["loss"] = toString(def.loss);
        if (def.loss == Loss::Huber || def.loss == Loss::Cauchy) j["scale"] = def.scale;
        j.update(report::statisticsToJson(st));
        j["warnings"] = result.warnings;
        j["findings"] = findingsToJson(findings, names);
        j["converged"] = result.converged();
        out << j.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) << '\n';
        return exitCodeFor({run});
    }

    printFitReport(out, *table, def, result, withTrace, [&](std::ostream& o) {
        printFindings(o, findings, names);
        o << '\n';
    });
    return exitCodeFor({run});
}

}  // namespace

Verb fitVerb() {
    return {"fit", "fit a model formula to a CSV table; estimates, standard errors, warnings", kHelp, runFitVerb};
}

}  // namespace sw::cli
