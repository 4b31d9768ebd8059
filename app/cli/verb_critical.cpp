// saddlewise critical: every critical point of a formula in a box, classified.
#include "app/cli/survey_cli.h"
#include "app/cli/run_report.h"
#include "core/survey/survey_json.h"

#include <chrono>
#include <ostream>

namespace sw::cli {

namespace {

const char* kHelp =
    "Usage: saddlewise critical FORMULA --box NAME=LOW:HIGH,... [--starts N] [--json]\n"
    "                           [--plane X,Y] [--at NAME=VALUE,...] [--sign-change-grid M]\n"
    "                           [--constants NAME=VALUE,...] [--threads T]\n"
    "\n"
    "Finds the points in the box where the gradient of FORMULA vanishes, in any number of\n"
    "variables, and classifies each by the eigenvalues of its Hessian: minimum, saddle of\n"
    "index k (k eigenvalues below zero), maximum, or degenerate (an eigenvalue is zero). A\n"
    "line or surface of degenerate points (a valley of minima) is listed once, as a set.\n"
    "\n"
    "From each start, Newton's method on grad f = 0 (Levenberg-Marquardt damped, with a line\n"
    "search on |grad f|^2) runs until |grad f| stops falling; points closer than 1e-6 of the\n"
    "box's width are one. The starts are N points of a Halton sequence in the box, plus the\n"
    "centres of the cells of an M x M grid over the plane where both gradient components\n"
    "change sign. The report says how many starts reached each point: points reached only once\n"
    "suggest more may be missing.\n"
    "\n"
    "  --box x=-5:5,y=-5:5       the variables, in order, and the box to search (required)\n"
    "  --starts N                Halton starts (default 256)\n"
    "  --sign-change-grid M      cells per side of the sign-change grid (default 64; 0: none)\n"
    "  --plane X,Y               the plane of that grid (default: the first two variables)\n"
    "  --at NAME=VALUE,...       where the grid holds the other variables (default: box centre)\n"
    "  --constants a=1,b=2       further names in the formula held fixed\n"
    "  --threads T               threads (default: every hardware thread)\n"
    "  --json                    one JSON object: points (x, value, kind, index, eigenvalues,\n"
    "                            gradient_norm, hits, ...), starts, completeness, seconds\n"
    "\n"
    "Started by an MPI launcher (mpirun -n K saddlewise critical ...), the starts are split over\n"
    "the K processes and process 0 prints the same result as a single process would.\n"
    "\n"
    "Example:\n"
    "  saddlewise critical '(x^2 + y - 11)^2 + (x + y^2 - 7)^2' --box x=-5:5,y=-5:5\n"
    "\n"
    "Exit codes: 0 done (also when nothing was found), 2 bad usage or input.\n";

int runCritical(const std::vector<std::string>& args, std::ostream& out, std::ostream& err) {
    const auto started = std::chrono::steady_clock::now();
    std::unique_ptr<ProcessGroup> group = joinProcessGroup();
    return runOnGroup(*group, err, [&] {
        std::vector<std::string> valued = kSurveyOptions;
        const ParsedArgs parsed = parseArgs(args, {"json"}, valued);
        SurveyInput input = readSurveyInput(parsed, *group, false);
        survey::Control control;
        control.threads = input.threads;
        std::unique_ptr<survey::CriticalSearch> search;
        try {
            search = std::make_unique<survey::CriticalSearch>(*input.objective, input.region, input.critical, control);
        } catch (const std::invalid_argument& e) {
            throw UsageError(e.what());
        }
        survey::CriticalMap map = distributedCriticalMap(*search, *group, control, false);
        if (group->rank() != 0) return 0;
        map.seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
        if (parsed.has("json")) {
            survey::Json j = survey::criticalMapToJson(map);
            j["formula"] = input.formula;
            study::Provenance provenance;
            provenance.formula = input.formula;
            j["provenance"] = provenanceJson(provenance);
            out << j.dump(2) << '\n';
            return 0;
        }
        out << "critical points of " << input.formula << "\nin " << boxText(input.region, input.names) << "\n\n";
        printPoints(out, map);
        out << '\n';
        printSearchSummary(out, map);
        out << "time: " << formatNumber(map.seconds * 1e3, 4) << " ms";
        if (*group->description()) out << " on " << group->description();
        out << "\n\n" << wrapText(study::cautionLine(), 100);
        return 0;
    });
}

}  // namespace

Verb criticalVerb() {
    return {"critical", "every critical point of a formula in a box: minima, saddles, maxima, degenerate", kHelp,
            runCritical};
}

}  // namespace sw::cli
