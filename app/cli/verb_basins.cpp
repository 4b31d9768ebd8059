// saddlewise basins: which critical point a method's run from each cell of a grid ends at.
#include "app/cli/run_report.h"
#include "app/cli/survey_cli.h"
#include "core/survey/picture.h"
#include "app/cli/run_report.h"
#include "core/survey/survey_json.h"

#include <chrono>
#include <ostream>

namespace sw::cli {

namespace {

const char* kHelp =
    "Usage: saddlewise basins FORMULA --box X=LOW:HIGH,Y=LOW:HIGH[,...] --grid N --method ID\n"
    "                         [--method ID ...] [--option NAME=VALUE ...] [--png FILE]\n"
    "                         [--png-size PIXELS] [--json] [--plane X,Y] [--at NAME=VALUE,...]\n"
    "                         [--starts N] [--max-iterations N] [--max-evaluations N]\n"
    "                         [--gradient-norm-below X] [--constants NAME=VALUE,...] [--threads T]\n"
    "\n"
    "Runs each method from the centre of every cell of an N x N grid over the plane (the\n"
    "first two --box variables, or --plane; the others held at --at or the box centre) and\n"
    "reports which critical point each run ends at. The critical points are found first, as\n"
    "'saddlewise critical' does; a run that ends on a point the search missed adds it. Runs\n"
    "that end on no point are counted apart: limit (iteration or evaluation limit),\n"
    "diverged (values not finite, or ten box widths away), failed (the method broke down or\n"
    "stopped where nothing is critical), outside (a critical point outside the box).\n"
    "\n"
    "  --grid N                  cells per side; N*N runs per method (at most 16,000,000\n"
    "                            cells in all methods together)\n"
    "  --method ID               a method ('saddlewise methods' lists them); repeat to compare\n"
    "  --option NAME=VALUE       a method option (METHOD.NAME=VALUE for one method only)\n"
    "  --png FILE                the maps side by side, coloured by end point, darker for more\n"
    "                            iterations, critical points marked, with a legend\n"
    "  --png-size PIXELS         size of each map in the picture (default 300)\n"
    "  --max-iterations N        per run (default 200); --max-evaluations, --gradient-norm-below\n"
    "                            as for 'saddlewise minimize'\n"
    "  --starts N, --sign-change-grid M   starts of the critical-point search (see 'critical')\n"
    "  --json                    one JSON object: points, and per method cells (N*N point\n"
    "                            indices, or -1 limit, -2 diverged, -3 failed, -4 outside),\n"
    "                            iterations, counts (per point and per outcome; they add up to\n"
    "                            N*N), seconds\n"
    "\n"
    "Started by an MPI launcher (mpirun -n K saddlewise basins ...), the starts and the cells\n"
    "are split over the K processes and process 0 writes the same result as a single process.\n"
    "\n"
    "Example:\n"
    "  saddlewise basins '(a^2-1)^2 + (b^2-1)^2 + 0.5*a*b' --box a=-1.6:1.6,b=-1.6:1.6 \\\n"
    "      --grid 200 --method newton --method saddle-free-newton --png basins.png\n"
    "\n"
    "Exit codes: 0 done, 1 the picture could not be written, 2 bad usage or input.\n";

int runBasins(const std::vector<std::string>& args, std::ostream& out, std::ostream& err) {
    const auto started = std::chrono::steady_clock::now();
    auto since = [](auto t) { return std::chrono::duration<double>(std::chrono::steady_clock::now() - t).count(); };
    std::unique_ptr<ProcessGroup> group = joinProcessGroup();
    return runOnGroup(*group, err, [&] {
        std::vector<std::string> valued = kSurveyOptions;
        for (const char* o : {"grid", "method", "option", "png", "png-size", "max-iterations", "max-evaluations",
                              "gradient-norm-below", "gradient-tolerance"})
            valued.push_back(o);
        const ParsedArgs parsed = parseArgs(args, {"json"}, valued);
        SurveyInput input = readSurveyInput(parsed, *group, true);
        if (!parsed.has("grid")) throw UsageError("give the grid with --grid N (cells per side)");
        survey::BasinSettings settings;
        // Range checked by BasinSettings::check, whose message names the memory limit.
        settings.grid = static_cast<int>(parseInteger(parsed.get("grid"), "--grid", 1, 1'000'000'000));
        const std::vector<std::string>& methodIds = parsed.all("method");
        if (methodIds.empty()) throw UsageError("give at least one --method ID (saddlewise methods lists them)");
        for (const std::string& id : methodIds)
            if (!solve::findMethod(id)) throw UsageError("unknown method '" + id + "'; known: " + solve::methodIdList());
        const std::vector<solve::OptionValues> options = distributeOptions(methodIds, parsed.all("option"));
        if (parsed.has("max-iterations"))
            settings.rules.maxIterations =
                static_cast<int>(parseInteger(parsed.get("max-iterations"), "--max-iterations", 1, 100'000'000));
        if (parsed.has("max-evaluations"))
            settings.rules.maxEvaluations =
                parseInteger(parsed.get("max-evaluations"), "--max-evaluations", 1, 1'000'000'000'000L);
        if (parsed.has("gradient-norm-below") && parsed.has("gradient-tolerance"))
            throw UsageError("--gradient-tolerance is the former name of --gradient-norm-below; give one of them");
        for (const char* option : {"gradient-norm-below", "gradient-tolerance"})  // the second: former name
            if (parsed.has(option)) {
                const std::string flag = std::string("--") + option;
                settings.rules.gradientTolerance = parseNumber(parsed.get(option), flag);
                if (!(settings.rules.gradientTolerance >= 0)) throw UsageError(flag + " must be >= 0");
            }
        const int pngSize =
            parsed.has("png-size") ? static_cast<int>(parseInteger(parsed.get("png-size"), "--png-size", 64, 4000)) : 300;
        std::vector<survey::BasinMethod> methods;
        for (std::size_t m = 0; m < methodIds.size(); ++m) methods.push_back({methodIds[m], methodIds[m], options[m]});

        std::unique_ptr<survey::BasinSearch> search;
        try {
            search = std::make_unique<survey::BasinSearch>(*input.objective, input.region, methods, settings,
                                                           input.critical);
        } catch (const std::invalid_argument& e) {
            throw UsageError(e.what());
        }
        survey::Control control;
        control.threads = input.threads;
        // Every process needs the map to match its cells: the starts are split, and everyone
        // assembles the same map from everyone's outcomes.
        survey::CriticalMap map = distributedCriticalMap(search->critical(), *group, control, true);
        map.seconds = since(started);
        const int n = input.objective->dimension();
        const long cells = search->cellCount();
        const int rank = group->rank(), size = group->size();
        std::vector<std::vector<survey::CellOutcome>> outcomes(methods.size());
        std::vector<double> seconds(methods.size());
        for (std::size_t m = 0; m < methods.size(); ++m) {
            const auto methodStarted = std::chrono::steady_clock::now();
            const long mine = piecesOf(cells, rank, size);
            std::vector<survey::CellOutcome> local(static_cast<std::size_t>(mine));
            survey::forEachIndex(0, mine, control, [&](long k) {
                local[static_cast<std::size_t>(k)] = search->run(m, pieceIndex(k, rank, size), map);
            });
            std::vector<double> packed;
            packed.reserve(static_cast<std::size_t>(mine) * static_cast<std::size_t>(2 + n));
            for (const survey::CellOutcome& o : local) packCell(o, n, packed);
            const std::vector<double> all = group->gather(packed);
            if (rank == 0) {
                outcomes[m].resize(static_cast<std::size_t>(cells));
                std::size_t at = 0;
                for (int r = 0; r < size; ++r)
                    for (long k = 0; k < piecesOf(cells, r, size); ++k, at += static_cast<std::size_t>(2 + n))
                        outcomes[m][static_cast<std::size_t>(pieceIndex(k, r, size))] = unpackCell(all.data() + at, n);
            }
            seconds[m] = since(methodStarted);
        }
        if (rank != 0) return 0;
        survey::BasinSurvey result = search->assemble(std::move(map), outcomes);
        for (std::size_t m = 0; m < methods.size(); ++m) result.maps[m].seconds = seconds[m];
        result.seconds = since(started);

        if (parsed.has("png")) {
            try {
                survey::writePng(survey::basinPicture(result, pngSize), parsed.get("png"));
            } catch (const std::exception& e) {
                throw Failure(std::string("--png: ") + e.what());
            }
        }
        if (parsed.has("json")) {
            survey::Json j = survey::basinSurveyToJson(result);
            j["formula"] = input.formula;
            study::Provenance provenance;
            provenance.formula = input.formula;
            j["provenance"] = provenanceJson(provenance);
            out << j.dump(2) << '\n';
            return 0;
        }
        out << "basins of " << input.formula << "\nover " << boxText(input.region, input.names) << ", "
            << settings.grid << " x " << settings.grid << " cells in the plane of "
            << input.names[static_cast<std::size_t>(input.region.xVariable)] << " and "
            << input.names[static_cast<std::size_t>(input.region.yVariable)] << "\n\ncritical points:\n";
        printPoints(out, result.map);
        out << '\n';
        printSearchSummary(out, result.map);
        for (const survey::BasinMap& m : result.maps) {
            long iterations = 0;
            for (int it : m.iterations) iterations += it;
            out << '\n'
                << m.method.label << ": " << cells << " runs in " << formatNumber(m.seconds, 3) << " s ("
                << formatNumber(m.seconds / static_cast<double>(cells) * 1e6, 3) << " us per run, "
                << formatNumber(static_cast<double>(iterations) / static_cast<double>(cells), 3)
                << " iterations on average)\n";
            for (std::size_t k = 0; k < m.pointCounts.size(); ++k) {
                if (m.pointCounts[k] == 0) continue;
                const survey::CriticalPoint& p = result.map.points[k];
                out << "  " << k << ' ' << survey::kindWords(p) << (p.kind == solve::PointKind::Saddle ? " " + std::to_string(p.index) : "")
                    << ": " << m.pointCounts[k] << " cells (" << formatNumber(100.0 * m.pointCounts[k] / static_cast<double>(cells), 3)
                    << " %)\n";
            }
            out << "  limit " << m.limit << ", diverged " << m.diverged << ", failed " << m.failed << ", outside "
                << m.outside << '\n';
        }
        out << "\ntotal time: " << formatNumber(result.seconds, 3) << " s";
        if (*group->description()) out << " on " << group->description();
        out << '\n';
        if (parsed.has("png")) out << "wrote " << parsed.get("png") << '\n';
        out << '\n' << wrapText(study::cautionLine(), 100);
        return 0;
    });
}

}  // namespace

Verb basinsVerb() {
    return {"basins", "which critical point each method ends at, from every cell of a grid (basins of attraction)",
            kHelp, runBasins};
}

}  // namespace sw::cli
