#include "app/cli/survey_cli.h"

#include "core/expr/expr.h"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace sw::cli {

namespace {

std::vector<std::string> splitNames(const std::string& text) {
    std::vector<std::string> names;
    std::string item;
    std::istringstream in(text);
    while (std::getline(in, item, ',')) {
        const auto a = item.find_first_not_of(" \t"), b = item.find_last_not_of(" \t");
        names.push_back(a == std::string::npos ? "" : item.substr(a, b - a + 1));
    }
    return names;
}

std::string joined(const std::vector<std::string>& names) {
    std::string text;
    for (std::size_t i = 0; i < names.size(); ++i) text += (i ? ", " : "") + names[i];
    return text;
}

std::string pad(std::string text, std::size_t width, bool right = false) {
    if (text.size() >= width) return text;
    return right ? std::string(width - text.size(), ' ') + text : text + std::string(width - text.size(), ' ');
}

}  // namespace

SurveyInput readSurveyInput(const ParsedArgs& parsed, const ProcessGroup& group, bool needsPlane) {
    SurveyInput in;
    if (parsed.positional.size() != 1)
        throw UsageError(parsed.positional.empty() ? "give the formula to survey"
                                                   : "give exactly one formula (quote it); got " +
                                                         std::to_string(parsed.positional.size()) + " words");
    in.formula = parsed.positional[0];
    if (!parsed.has("box"))
        throw UsageError("give the box to search with --box NAME=LOW:HIGH,... (every variable of the formula)");
    const std::vector<Range> box = parseRanges(parsed.get("box"), "box");
    const int n = static_cast<int>(box.size());
    in.region.lower = Vector(n);
    in.region.upper = Vector(n);
    for (int i = 0; i < n; ++i) {
        const Range& r = box[static_cast<std::size_t>(i)];
        for (const std::string& earlier : in.names)
            if (earlier == r.name) throw UsageError("--box names '" + r.name + "' twice");
        in.names.push_back(r.name);
        in.region.lower[i] = r.lo;
        in.region.upper[i] = r.hi;
        if (!std::isfinite(r.lo) || !std::isfinite(r.hi))
            throw UsageError("--box " + r.name + ": the range must be finite");
    }
    if (needsPlane && n < 2)
        throw UsageError("--box: a basin map needs a plane, so at least two variables (got only '" + in.names[0] + "')");
    in.region.held = 0.5 * (in.region.lower + in.region.upper);
    if (n >= 2) {
        in.region.xVariable = 0;
        in.region.yVariable = 1;
        if (parsed.has("plane")) {
            const std::vector<std::string> plane = splitNames(parsed.get("plane"));
            if (plane.size() != 2)
                throw UsageError("--plane takes two variable names, X,Y (got '" + parsed.get("plane") + "')");
            for (int k = 0; k < 2; ++k) {
                const auto it = std::find(in.names.begin(), in.names.end(), plane[static_cast<std::size_t>(k)]);
                if (it == in.names.end())
                    throw UsageError("--plane: '" + plane[static_cast<std::size_t>(k)] +
                                     "' is not one of the --box variables (" + joined(in.names) + ")");
                (k == 0 ? in.region.xVariable : in.region.yVariable) = static_cast<int>(it - in.names.begin());
            }
            if (in.region.xVariable == in.region.yVariable)
                throw UsageError("--plane names '" + plane[0] + "' twice; give two different variables");
        }
    } else if (parsed.has("plane")) {
        throw UsageError("--plane needs at least two variables in --box");
    }
    if (parsed.has("at")) {
        for (const auto& [name, value] : parseAssignments(parsed.get("at"), "at")) {
            const auto it = std::find(in.names.begin(), in.names.end(), name);
            if (it == in.names.end())
                throw UsageError("--at: '" + name + "' is not one of the --box variables (" + joined(in.names) + ")");
            const int i = static_cast<int>(it - in.names.begin());
            if (n >= 2 && (i == in.region.xVariable || i == in.region.yVariable))
                throw UsageError("--at " + name + ": this variable spans the plane; --at holds the others");
            if (!(value >= in.region.lower[i] && value <= in.region.upper[i]))
                throw UsageError("--at " + name + " = " + formatNumber(value) + " is outside its --box range");
            in.region.held[i] = value;
        }
    }
    std::vector<std::pair<std::string, double>> constants;
    if (parsed.has("constants")) constants = parseAssignments(parsed.get("constants"), "constants");
    for (const auto& [constant, unused] : constants)
        if (std::find(in.names.begin(), in.names.end(), constant) != in.names.end())
            throw UsageError("'" + constant + "' is given both in --box and in --constants");
    if (parsed.has("starts"))
        in.critical.starts = static_cast<int>(parseInteger(parsed.get("starts"), "--starts", 1, 10'000'000));
    if (parsed.has("sign-change-grid"))
        in.critical.signChangeGrid =
            static_cast<int>(parseInteger(parsed.get("sign-change-grid"), "--sign-change-grid", 0, 4000));
    in.threads = parsed.has("threads") ? static_cast<int>(parseInteger(parsed.get("threads"), "--threads", 1, 1024))
                                       : group.defaultThreads();
    in.objective = std::make_unique<FormulaObjective>(in.formula, in.names, constants);  // FormulaError -> exit 2
    return in;
}

void packStart(const survey::StartOutcome& o, int n, std::vector<double>& out) {
    out.push_back(static_cast<double>(o.status));
    out.push_back(o.iterations);
    out.push_back(o.gradientNorm);
    for (int i = 0; i < n; ++i) out.push_back(i < o.x.size() ? o.x[i] : solve::kNaN);
}

survey::StartOutcome unpackStart(const double* in, int n) {
    survey::StartOutcome o;
    o.status = static_cast<survey::StartOutcome::Status>(static_cast<int>(in[0]));
    o.iterations = static_cast<int>(in[1]);
    o.gradientNorm = in[2];
    o.x = Eigen::Map<const Vector>(in + 3, n);
    return o;
}

void packCell(const survey::CellOutcome& o, int n, std::vector<double>& out) {
    out.push_back(o.code);
    out.push_back(o.iterations);
    for (int i = 0; i < n; ++i) out.push_back(i < o.x.size() ? o.x[i] : solve::kNaN);
}

survey::CellOutcome unpackCell(const double* in, int n) {
    survey::CellOutcome o;
    o.code = static_cast<int>(in[0]);
    o.iterations = static_cast<int>(in[1]);
    if (o.code == survey::kCellUnmatched) o.x = Eigen::Map<const Vector>(in + 2, n);
    return o;
}

survey::CriticalMap distributedCriticalMap(const survey::CriticalSearch& search, ProcessGroup& group,
                                           const survey::Control& control, bool everyone) {
    const int n = search.objective().dimension();
    const long count = static_cast<long>(search.starts().size());
    const int rank = group.rank(), size = group.size();
    const long mine = piecesOf(count, rank, size);
    std::vector<survey::StartOutcome> local(static_cast<std::size_t>(mine));
    survey::forEachIndex(0, mine, control, [&](long k) {
        local[static_cast<std::size_t>(k)] = search.run(static_cast<std::size_t>(pieceIndex(k, rank, size)));
    });
    std::vector<double> packed;
    packed.reserve(static_cast<std::size_t>(mine) * static_cast<std::size_t>(3 + n));
    for (const survey::StartOutcome& o : local) packStart(o, n, packed);
    const std::vector<double> all = everyone ? group.gatherAll(packed) : group.gather(packed);
    if (!everyone && rank != 0) return {};
    std::vector<survey::StartOutcome> outcomes(static_cast<std::size_t>(count));
    std::size_t at = 0;
    for (int r = 0; r < size; ++r)
        for (long k = 0; k < piecesOf(count, r, size); ++k, at += static_cast<std::size_t>(3 + n))
            outcomes[static_cast<std::size_t>(pieceIndex(k, r, size))] = unpackStart(all.data() + at, n);
    return search.assemble(outcomes);
}

std::string boxText(const survey::Region& region, const std::vector<std::string>& names) {
    std::string text;
    for (std::size_t i = 0; i < names.size(); ++i)
        text += (i ? ", " : "") + names[i] + " in [" + formatNumber(region.lower[static_cast<Eigen::Index>(i)], 6) + ", " +
                formatNumber(region.upper[static_cast<Eigen::Index>(i)], 6) + "]";
    return text;
}

void printPoints(std::ostream& out, const survey::CriticalMap& map) {
    if (map.points.empty()) {
        out << "  (no critical point in the box)\n";
        return;
    }
    std::vector<std::vector<std::string>> rows;
    std::vector<std::string> header{"#", "kind", "index"};
    for (const std::string& name : map.variables) header.push_back(name);
    for (const char* h : {"f", "|∇f|", "hits", "eigenvalues"}) header.push_back(h);
    rows.push_back(header);
    for (std::size_t k = 0; k < map.points.size(); ++k) {
        const survey::CriticalPoint& p = map.points[k];
        std::vector<std::string> row{std::to_string(k),
                                     std::string(survey::kindWords(p)) + (p.continuum ? " (set of " + std::to_string(p.members) + ")" : "") +
                                         (p.foundBy == "basins" ? " *" : ""),
                                     std::to_string(p.index)};
        for (Eigen::Index i = 0; i < p.x.size(); ++i) row.push_back(formatNumber(p.x[i], 8));
        row.push_back(formatNumber(p.value, 8));
        row.push_back(formatNumber(p.gradientNorm, 2));
        row.push_back(std::to_string(p.hits));
        std::string eigen;
        for (Eigen::Index i = 0; i < p.eigenvalues.size() && i < 6; ++i) eigen += (i ? ", " : "") + formatNumber(p.eigenvalues[i], 4);
        if (p.eigenvalues.size() > 6) eigen += ", ...";
        row.push_back(eigen);
        rows.push_back(row);
    }
    std::vector<std::size_t> width(header.size(), 0);
    for (const auto& row : rows)
        for (std::size_t c = 0; c < row.size(); ++c) width[c] = std::max(width[c], row[c].size());
    for (const auto& row : rows) {
        out << " ";
        for (std::size_t c = 0; c < row.size(); ++c) {
            const bool numeric = c != 1 && c + 1 < row.size();
            out << ' ' << (c + 1 < row.size() ? pad(row[c], width[c], numeric) : row[c]);
        }
        out << '\n';
    }
    bool added = false;
    for (const auto& p : map.points) added = added || p.foundBy == "basins";
    if (added) out << "  * first met by a basin run (the search's starts missed it)\n";
}

void printSearchSummary(std::ostream& out, const survey::CriticalMap& map) {
    out << "starts: " << map.lowDiscrepancyStarts << " low-discrepancy (Halton)";
    if (map.signChangeStarts > 0) out << " + " << map.signChangeStarts << " sign-change cells";
    out << " = " << map.starts << "; " << map.converged << " reached a critical point in the box";
    if (map.outside > 0) out << ", " << map.outside << " one outside it";
    if (map.stalled > 0) out << ", " << map.stalled << " stalled";
    if (map.leftBox > 0) out << ", " << map.leftBox << " left the box";
    if (map.nonFinite > 0) out << ", " << map.nonFinite << " met non-finite values";
    out << '\n';
    if (map.cancelled)
        out << "completeness: the search was cancelled; the list is partial\n";
    else if (map.likelyComplete)
        out << "completeness: every point was reached by at least two starts; the list is probably complete\n";
    else
        out << "completeness: " << map.foundOnce << (map.foundOnce == 1 ? " point was" : " points were")
            << " reached by only one start; about " << formatNumber(map.estimatedMissing, 2)
            << " more may be missing (Chao 1984 estimate); more --starts would tell\n";
}

int runOnGroup(ProcessGroup& group, std::ostream& err, const std::function<int()>& work) {
    if (group.rank() == 0) return work();
    try {
        return work();
    } catch (const Failure&) {
        return 1;
    } catch (const std::exception&) {
        return 2;  // the same problem is reported once, by rank 0
    }
    (void)err;
}

}  // namespace sw::cli
