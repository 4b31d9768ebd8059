// Basins of attraction: a run of one method from the centre of every cell of an N x N grid
// over the plane, each end point refined and matched to the critical-point map.
#include "core/survey/survey.h"

#include "core/solve/method.h"
#include "core/solve/solver.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <stdexcept>

namespace sw::survey {

namespace {

// A run that ends this many box widths outside the box has run away.
constexpr double kRunawayWidths = 10;
// A converged run's end point must refine to a critical point within this fraction of the box
// (max over variables) to count as ending there.
constexpr double kSnapDistance = 1e-3;

std::string groupedNumber(long long v) {
    std::string digits = std::to_string(v), out;
    for (std::size_t i = 0; i < digits.size(); ++i) {
        if (i > 0 && (digits.size() - i) % 3 == 0) out += ',';
        out += digits[i];
    }
    return out;
}

}  // namespace

const char* basinCodeName(int code) {
    switch (code) {
        case kCellLimit:
            return "limit";
        case kCellDiverged:
            return "diverged";
        case kCellFailed:
            return "failed";
        case kCellOutside:
            return "outside";
        case kCellNotRun:
            return "not-run";
        default:
            return code >= 0 ? "point" : "?";
    }
}

std::string BasinSettings::check(std::size_t methodCount) const {
    if (grid < 1) return "the grid needs at least 1 cell per side (got " + std::to_string(grid) + ")";
    const long long cells = static_cast<long long>(grid) * grid * static_cast<long long>(std::max<std::size_t>(1, methodCount));
    if (cells > maxCells)
        return "a " + std::to_string(grid) + " x " + std::to_string(grid) + " grid for " + std::to_string(methodCount) +
               (methodCount == 1 ? " method is " : " methods is ") + groupedNumber(cells) +
               " runs, above the limit of " + groupedNumber(maxCells) +
               " cells per survey (a cell needs about " + std::to_string(kBytesPerCell) + " bytes while it is mapped, " +
               std::to_string(kBytesPerCellJson) + " with --json: the limit keeps a survey under about " +
               groupedNumber(maxCells * kBytesPerCellJson / 1'000'000) + " MB): use a smaller grid or fewer methods";
    if (grid > kMaxGrid)
        return "the grid must be 1 to " + std::to_string(kMaxGrid) + " cells per side (got " + std::to_string(grid) + ")";
    const std::string rulesProblem = rules.check();
    if (!rulesProblem.empty()) return rulesProblem;
    return "";
}

long BasinMap::total() const {
    long sum = limit + diverged + failed + outside + notRun;
    for (long c : pointCounts) sum += c;
    return sum;
}

double BasinSurvey::cellX(int i) const {
    const int xv = region.xVariable;
    const double centre = 0.5 * (region.lower[xv] + region.upper[xv]);
    return centre + (2.0 * i + 1 - grid) * 0.5 * (region.width(xv) / grid);
}

double BasinSurvey::cellY(int j) const {
    const int yv = region.yVariable;
    const double centre = 0.5 * (region.lower[yv] + region.upper[yv]);
    return centre + (2.0 * j + 1 - grid) * 0.5 * (region.width(yv) / grid);
}

// ---------------------------------------------------------------- BasinSearch

BasinSearch::BasinSearch(const Objective& objective, Region region, std::vector<BasinMethod> methods,
                         BasinSettings settings, CriticalSettings criticalSettings)
    : objective_(objective),
      region_(region),
      methods_(std::move(methods)),
      settings_(std::move(settings)),
      critical_(objective, std::move(region), criticalSettings) {
    region_ = critical_.region();
    const int n = objective_.dimension();
    if (n < 2) throw std::invalid_argument("a basin map needs a plane: the objective has only one variable");
    if (methods_.empty()) throw std::invalid_argument("give at least one method");
    const std::string problem = settings_.check(methods_.size());
    if (!problem.empty()) throw std::invalid_argument(problem);
    // Every method must be able to start: checked once at the box's centre (the same checks
    // makeSolver makes for every cell: known id, valid options, what the method needs).
    Vector centre = region_.held;
    for (int i : {region_.xVariable, region_.yVariable}) centre[i] = 0.5 * (region_.lower[i] + region_.upper[i]);
    for (BasinMethod& m : methods_) {
        if (m.label.empty()) m.label = m.methodId;
        const solve::MethodInfo* info = solve::findMethod(m.methodId);
        if (!info) throw std::invalid_argument("unknown method '" + m.methodId + "'; known: " + solve::methodIdList());
        if (info->needsResiduals && !objective_.hasResiduals())
            throw std::invalid_argument("method " + m.methodId +
                                        " needs a least-squares objective (residuals and their Jacobian); this "
                                        "objective has none");
        const std::string optionProblem = solve::checkOptions(info->options, m.options);
        if (!optionProblem.empty()) throw std::invalid_argument(m.methodId + ": " + optionProblem);
        if (const solve::MethodRegistration* r = solve::findRegistration(m.methodId); r && r->check) {
            const std::string cross = r->check(m.options);
            if (!cross.empty()) throw std::invalid_argument(m.methodId + ": " + cross);
        }
    }
    settings_.rules.spectrumMaxDimension = 0;  // the runs are not kept: no diagnostic spectra
}

Vector BasinSearch::cellStart(long cell) const {
    BasinSurvey geometry;
    geometry.region = region_;
    geometry.grid = settings_.grid;
    Vector x = region_.held;
    x[region_.xVariable] = geometry.cellX(static_cast<int>(cell % settings_.grid));
    x[region_.yVariable] = geometry.cellY(static_cast<int>(cell / settings_.grid));
    return x;
}

CellOutcome BasinSearch::run(std::size_t method, long cell, const CriticalMap& map) const {
    CellOutcome out;
    const BasinMethod& m = methods_.at(method);
    solve::SolverOrError made = solve::makeSolver(m.methodId, objective_, cellStart(cell), m.options, settings_.rules);
    if (!made.solver) {
        // Everything but the start was checked up front: the objective is not finite here.
        out.code = kCellDiverged;
        return out;
    }
    const solve::Run run = solve::solve(std::move(made.solver));
    out.iterations = run.iterations();
    bool runaway = !run.x.allFinite();
    for (Eigen::Index i = 0; i < run.x.size() && !runaway; ++i) {
        const double w = region_.width(static_cast<int>(i));
        runaway = run.x[i] < region_.lower[i] - kRunawayWidths * w || run.x[i] > region_.upper[i] + kRunawayWidths * w;
    }
    switch (run.termination) {
        case solve::Termination::NonFinite:
            out.code = kCellDiverged;
            return out;
        case solve::Termination::IterationLimit:
        case solve::Termination::EvaluationLimit:
            out.code = runaway ? kCellDiverged : kCellLimit;
            return out;
        case solve::Termination::StoppedByCaller:
        case solve::Termination::Running:
            out.code = kCellNotRun;
            return out;
        default:
            break;
    }
    if (runaway) {
        out.code = kCellDiverged;
        return out;
    }
    // Converged, or a breakdown (line search, trust region, singular Hessian). A breakdown at
    // a critical point (the gradient already within the rule) is an end there too.
    const bool converged = solve::isConvergence(run.termination) ||
                           (std::isfinite(run.gradientNorm) && run.gradientNorm <= settings_.rules.gradientTolerance);
    if (!converged) {
        out.code = kCellFailed;
        return out;
    }
    // Most runs end within the merge tolerance of an isolated point of the map: that is the
    // point (the map merges points no closer than that). Otherwise refine to rounding first.
    for (std::size_t k = 0; k < map.points.size(); ++k)
        if (!map.points[k].continuum && critical_.scaledDistance(map.points[k].x, run.x) <= map.settings.mergeTolerance) {
            out.code = static_cast<int>(k);
            return out;
        }
    const StartOutcome refined = critical_.refine(run.x);
    if (refined.status != StartOutcome::Status::Converged || critical_.scaledDistance(refined.x, run.x) > kSnapDistance) {
        out.code = kCellFailed;  // stopped where nothing is critical (a flat stretch, a stall)
        return out;
    }
    out.code = kCellUnmatched;
    out.x = refined.x;
    return out;
}

bool BasinSearch::runRange(std::size_t method, long begin, long end, const CriticalMap& map,
                           std::vector<CellOutcome>& outcomes, const Control& control) const {
    outcomes.assign(static_cast<std::size_t>(end - begin), CellOutcome{kCellNotRun, 0, {}});
    return forEachIndex(begin, end, control,
                        [&](long c) { outcomes[static_cast<std::size_t>(c - begin)] = run(method, c, map); });
}

BasinSurvey BasinSearch::assemble(CriticalMap map, const std::vector<std::vector<CellOutcome>>& outcomes) const {
    if (outcomes.size() != methods_.size())
        throw std::invalid_argument("assemble: outcomes for " + std::to_string(outcomes.size()) + " methods, expected " +
                                    std::to_string(methods_.size()));
    BasinSurvey survey;
    survey.variables = objective_.variableNames();
    survey.region = region_;
    survey.grid = settings_.grid;
    survey.rules = settings_.rules;
    survey.cancelled = map.cancelled;
    const long cells = cellCount();
    for (std::size_t m = 0; m < methods_.size(); ++m) {
        if (static_cast<long>(outcomes[m].size()) != cells)
            throw std::invalid_argument("assemble: method " + std::to_string(m) + " has " +
                                        std::to_string(outcomes[m].size()) + " cells, expected " + std::to_string(cells));
        BasinMap basin;
        basin.method = methods_[m];
        basin.cells.resize(static_cast<std::size_t>(cells));
        basin.iterations.resize(static_cast<std::size_t>(cells));
        for (long c = 0; c < cells; ++c) {
            const CellOutcome& o = outcomes[m][static_cast<std::size_t>(c)];
            int code = o.code;
            if (code == kCellUnmatched) {
                int index = matchPoint(map, o.x);
                if (index >= 0 && map.points[static_cast<std::size_t>(index)].continuum &&
                    critical_.classify(o.x).kind != solve::PointKind::Degenerate)
                    index = -1;  // near a continuum, but an isolated point of its own
                if (index < 0) {
                    if (!critical_.insideBox(o.x)) {
                        code = kCellOutside;
                    } else {
                        // A critical point the search missed: it joins the map.
                        CriticalPoint added = critical_.classify(o.x);
                        added.hits = 0;
                        added.foundBy = "basins";
                        map.points.push_back(std::move(added));
                        index = static_cast<int>(map.points.size()) - 1;
                    }
                }
                if (index >= 0) code = index;
            } else if (code >= static_cast<int>(map.points.size())) {
                throw std::invalid_argument("assemble: cell " + std::to_string(c) + " names point " +
                                            std::to_string(code) + " of a map with " +
                                            std::to_string(map.points.size()));
            }
            basin.cells[static_cast<std::size_t>(c)] = code;
            basin.iterations[static_cast<std::size_t>(c)] = o.iterations;
            basin.maxIterations = std::max(basin.maxIterations, o.iterations);
            if (code == kCellNotRun) survey.cancelled = true;
        }
        survey.maps.push_back(std::move(basin));
    }
    // Counts, once the map has every point the runs met.
    for (BasinMap& basin : survey.maps) {
        basin.pointCounts.assign(map.points.size(), 0);
        for (int code : basin.cells) {
            switch (code) {
                case kCellLimit:
                    ++basin.limit;
                    break;
                case kCellDiverged:
                    ++basin.diverged;
                    break;
                case kCellFailed:
                    ++basin.failed;
                    break;
                case kCellOutside:
                    ++basin.outside;
                    break;
                case kCellNotRun:
                    ++basin.notRun;
                    break;
                default:
                    ++basin.pointCounts[static_cast<std::size_t>(code)];
            }
        }
    }
    survey.map = std::move(map);
    return survey;
}

BasinSurvey BasinSearch::find(const Control& control) const {
    const auto started = std::chrono::steady_clock::now();
    auto elapsed = [](auto since) { return std::chrono::duration<double>(std::chrono::steady_clock::now() - since).count(); };
    // Progress: the map is a small share of the work; the methods share the rest evenly.
    const double mapShare = 0.05;
    const double methodShare = (1 - mapShare) / static_cast<double>(methods_.size());
    Control part = control;
    if (control.progress) part.progress = [&](double f) { control.progress(mapShare * f); };
    CriticalMap map = critical_.find(part);
    map.seconds = elapsed(started);
    std::vector<std::vector<CellOutcome>> outcomes(methods_.size());
    std::vector<double> seconds(methods_.size(), 0);
    bool complete = !map.cancelled;
    for (std::size_t m = 0; m < methods_.size(); ++m) {
        const auto methodStarted = std::chrono::steady_clock::now();
        if (control.progress)
            part.progress = [&, m](double f) { control.progress(mapShare + methodShare * (static_cast<double>(m) + f)); };
        if (complete)
            complete = runRange(m, 0, cellCount(), map, outcomes[m], part);
        else
            outcomes[m].assign(static_cast<std::size_t>(cellCount()), CellOutcome{kCellNotRun, 0, {}});
        seconds[m] = elapsed(methodStarted);
    }
    BasinSurvey survey = assemble(std::move(map), outcomes);
    for (std::size_t m = 0; m < survey.maps.size(); ++m) survey.maps[m].seconds = seconds[m];
    survey.cancelled = survey.cancelled || !complete;
    survey.seconds = elapsed(started);
    return survey;
}

BasinSurvey mapBasins(const Objective& objective, const Region& region, const std::vector<BasinMethod>& methods,
                      const BasinSettings& settings, const CriticalSettings& criticalSettings, const Control& control) {
    return BasinSearch(objective, region, methods, settings, criticalSettings).find(control);
}

}  // namespace sw::survey
