// The review report's content (see report.h). Numbers about runs come from the results JSON
// only; this file formats, it does not compute.
#include "core/report/report.h"

#include "core/expr/expr.h"
#include "core/objective/fit_objective.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "core/study/provenance.h"
#include "core/survey/survey_json.h"

#include <openssl/evp.h>

#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <algorithm>
#include <limits>
#include <map>
#include <memory>

namespace sw::report {

using nlohmann::json;

// ---------------------------------------------------------------- helpers

std::string numberText(double value, int significant) {
    if (std::isnan(value)) return "nan";
    if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
    char buffer[64];
    auto [ptr, ec] = significant >= 17
                         ? std::to_chars(buffer, buffer + sizeof buffer, value)
                         : std::to_chars(buffer, buffer + sizeof buffer, value, std::chars_format::general, significant);
    return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
}

std::string numberText(const json& value, int significant) {
    if (value.is_number_integer()) return value.dump();  // counts and limits: 100000, not 1e+05
    if (value.is_number()) return numberText(value.get<double>(), significant);
    return "–";  // null: a non-finite number in the results
}

std::string checksumOf(std::string_view bytes) {
    std::unique_ptr<EVP_MD_CTX, decltype(&EVP_MD_CTX_free)> context(EVP_MD_CTX_new(), &EVP_MD_CTX_free);
    unsigned char digest[EVP_MAX_MD_SIZE];
    unsigned int length = 0;
    if (!context || EVP_DigestInit_ex(context.get(), EVP_sha256(), nullptr) != 1 ||
        EVP_DigestUpdate(context.get(), bytes.data(), bytes.size()) != 1 ||
        EVP_DigestFinal_ex(context.get(), digest, &length) != 1)
        return "unavailable (SHA-256 failed in OpenSSL)";
    static const char* hex = "0123456789abcdef";
    std::string text = "sha256:";
    for (unsigned int i = 0; i < length; ++i) {
        text += hex[digest[i] >> 4];
        text += hex[digest[i] & 15];
    }
    return text;
}

std::string generationTime() {
    std::time_t now = std::time(nullptr);
    if (const char* epoch = std::getenv("SOURCE_DATE_EPOCH"); epoch && *epoch) {
        long long seconds = 0;
        const char* end = epoch + std::char_traits<char>::length(epoch);
        if (auto [ptr, ec] = std::from_chars(epoch, end, seconds); ec == std::errc() && ptr == end && seconds >= 0)
            now = static_cast<std::time_t>(seconds);
    }
    std::tm utc{};
    gmtime_r(&now, &utc);
    char buffer[64];
    std::strftime(buffer, sizeof buffer, "%Y-%m-%d %H:%M:%S UTC", &utc);
    return buffer;
}

std::string shellQuote(const std::string& word) {
    if (word.empty()) return "''";
    bool plainWord = true;
    for (char c : word)
        if (!(std::isalnum(static_cast<unsigned char>(c)) || std::string_view("@%+=:,./-_").find(c) != std::string_view::npos))
            plainWord = false;
    if (plainWord) return word;
    std::string q = "'";
    for (char c : word) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

std::string commandLine(const std::vector<std::string>& words) {
    std::string line;
    for (const std::string& w : words) line += (line.empty() ? "" : " ") + shellQuote(w);
    return line;
}

namespace {

// Printed precision (significant digits) of each kind of number; the tests that compare the
// PDF's text with `run --json` round the JSON to the same digits.
constexpr int kValueDigits = 10;     // final values
constexpr int kPointDigits = 8;      // coordinates, estimates
constexpr int kGradientDigits = 3;   // |grad f|
constexpr int kErrorDigits = 4;      // standard errors
constexpr int kIntervalDigits = 6;   // interval bounds
constexpr int kDataDigits = 10;      // data preview cells

std::string text(const json& j, const char* key, const std::string& fallback = "") {
    if (!j.is_object() || !j.contains(key) || !j[key].is_string()) return fallback;
    return j[key].get<std::string>();
}

std::string lossDescription(const std::string& loss) {
    if (loss == "least-squares") return "least squares: f = ½ Σ (y − model)²";
    if (loss == "weighted") return "weighted least squares: f = ½ Σ w (y − model)²";
    if (loss == "huber") return "Huber (robust): quadratic for small residuals, linear beyond the scale";
    if (loss == "cauchy") return "Cauchy (robust): f = Σ c²/2 ln(1 + (r/c)²)";
    if (loss == "logistic" || loss == "bernoulli-logit") return "Bernoulli likelihood with logit link (logistic regression); model = linear predictor";
    if (loss == "poisson" || loss == "poisson-log") return "Poisson likelihood with log link; model = linear predictor";
    return loss;
}

// The words of solve::describe(PointKind) for the ids of solve::toString(PointKind).
std::string pointKindWords(const std::string& kind) {
    if (kind == "minimum") return "local minimum";
    if (kind == "maximum") return "local maximum";
    if (kind == "degenerate") return "degenerate point";
    if (kind == "not-critical") return "not a critical point";
    if (kind == "unknown") return "not classified";
    return kind;
}

std::string endPointText(const json& run) {
    const json& end = run.contains("end_point") ? run["end_point"] : json::object();
    const std::string kind = text(end, "kind", "unknown");
    std::string words = pointKindWords(kind);
    if (kind == "saddle" && end.contains("index") && end["index"].is_number())
        words += " (index " + std::to_string(end["index"].get<int>()) + ")";
    if (kind == "not-critical") {
        const std::string curvature = text(end, "curvature", "unknown");
        if (curvature != "unknown") words += " (curvature of a " + pointKindWords(curvature) + ")";
    }
    return words;
}

std::string evaluationsText(const json& run) {
    const json& e = run.contains("evaluations") ? run["evaluations"] : json::object();
    auto count = [&](const char* key) { return e.contains(key) ? std::to_string(e[key].get<long>()) : std::string("–"); };
    return count("value") + " / " + count("gradient") + " / " + count("hessian");
}

// The colour and label of the lineup entry behind a run (runs follow the enabled entries).
const study::MethodEntry* entryFor(const study::Study& study, const json& run) {
    const std::string label = text(run, "label");
    for (const study::MethodEntry& e : study.methods)
        if (e.enabled && e.label == label) return &e;
    return nullptr;
}

Text methodName(const study::Study& study, const json& run) {
    const std::string label = text(run, "label", text(run, "method"));
    const study::MethodEntry* entry = entryFor(study, run);
    if (entry && !entry->colour.empty()) return {swatch(entry->colour, label)};
    return {plain(label)};
}

const json& runsOf(const ReportInput& in) {
    static const json empty = json::array();
    return in.results.contains("runs") && in.results["runs"].is_array() ? in.results["runs"] : empty;
}

const json& studyOf(const ReportInput& in) {
    static const json empty = json::object();
    return in.results.contains("study") ? in.results["study"] : empty;
}

// ---------------------------------------------------------------- sections

Section summarySection(const ReportInput& in) {
    Section s{"summary", "Summary", {}};
    const json& runs = runsOf(in);
    const study::Study& study = in.study;
    if (!study.notes.empty()) {
        s.blocks.push_back(heading("The study's description"));
        s.blocks.push_back(paragraph(study.notes));
    }
    s.blocks.push_back(heading("Outcome"));
    int converged = 0, broke = 0;
    std::map<std::string, int> kinds;
    for (const json& run : runs) {
        if (run.value("converged", false)) ++converged;
        const std::string termination = text(run, "termination");
        if (termination == "non-finite" || termination == "failed") ++broke;
        kinds[endPointText(run)]++;
    }
    std::vector<Text> items;
    items.push_back({plain(study.isFit() ? "A data fit: " : "A formula minimized: "),
                     code(text(studyOf(in), "objective"))});
    items.push_back({plain(std::to_string(runs.size()) + (runs.size() == 1 ? " method" : " methods") + " run from the same start; " +
                           std::to_string(converged) + " converged" +
                           (broke ? ", " + std::to_string(broke) + " broke down" : std::string()) + ".")});
    std::string ends;
    for (const auto& [kind, count] : kinds) ends += (ends.empty() ? "" : "; ") + std::to_string(count) + " × " + kind;
    if (!ends.empty()) items.push_back({plain("End points: " + ends + ".")});
    const int best = bestRun(in.results);
    if (best >= 0) {
        const json& run = runs[static_cast<std::size_t>(best)];
        Text line = {plain("Lowest final value: f = "), strong(numberText(run["value"], kValueDigits)), plain(" by ")};
        double low = std::numeric_limits<double>::infinity(), high = -low;
        for (const json& r : runs)
            if (r.value("converged", false) && r["value"].is_number()) {
                low = std::min(low, r["value"].get<double>());
                high = std::max(high, r["value"].get<double>());
            }
        for (const Span& span : methodName(study, run)) line.push_back(span);
        line.push_back(plain(" (" + text(run, "termination") + ", " + endPointText(run) + ") at "));
        std::string at;
        const json& names = run.contains("variables") ? run["variables"] : json::array();
        for (std::size_t i = 0; i < names.size() && i < run["x"].size(); ++i)
            at += (i ? ", " : "") + names[i].get<std::string>() + " = " + numberText(run["x"][i], kPointDigits);
        line.push_back(plain(at + "."));
        items.push_back(line);
        if (converged > 1 && std::isfinite(low))
            items.push_back({plain("The final values of the " + std::to_string(converged) +
                                   " converged methods lie within " + numberText(high - low, 2) + " of each other.")});
    }
    s.blocks.push_back(list(items));
    return s;
}

Section cautionSection() {
    Section s{"caution", "Caution", {}};
    s.blocks.push_back(callout(
        "caution",
        {strong("Read before relying on these results. "),
         plain("This report documents one set of starts, settings and stopping rules; a minimizer's answer is only as "
               "good as those. "),
         plain(study::cautionText())}));
    return s;
}

// The model as the fit verb and the window write it (sw::modelEquation: one text).
FitDefinition definitionOf(const study::DataFit& fit) {
    FitDefinition d;
    d.model = fit.model;
    d.response = fit.response;
    if (!parseLoss(fit.loss, d.loss)) d.loss = Loss::LeastSquares;
    (fit.weightsKind == "sigma" ? d.sigma : d.weights) = fit.weights;
    d.scale = fit.lossScale;
    return d;
}
std::string equationOf(const study::DataFit& fit) { return modelEquation(definitionOf(fit)); }

Section objectiveSection(const ReportInput& in) {
    Section s{"objective", "Objective", {}};
    const study::Study& study = in.study;
    const json& st = studyOf(in);
    std::vector<Field> f;
    if (study.fit) {
        f.push_back({"Equation", {code(equationOf(*study.fit))}});
        f.push_back({"Loss", {plain(lossDescription(study.fit->loss))}});
        if (!study.fit->weights.empty())
            f.push_back({"Weights",
                         {plain(study.fit->weightsKind == "sigma" ? "1/σ² from column " : "from column "),
                          code(study.fit->weights)}});
        if (study.fit->loss == "huber" || study.fit->loss == "cauchy")
            f.push_back({"Scale", {plain(numberText(study.fit->lossScale, 6))}});
        f.push_back({"Objective", {plain(text(st, "objective"))}});
    } else {
        std::string args;
        for (const auto& v : study.variables) args += (args.empty() ? "" : ", ") + v.name;
        f.push_back({"Minimize", {code("f(" + args + ") = " + study.formula)}});
    }
    s.blocks.push_back(fields(f));

    s.blocks.push_back(heading(study.fit ? "Parameters" : "Variables"));
    Table vars{{study.fit ? "parameter" : "variable", "start", "plot from", "plot to"}, {}, false};
    const json& variables = st.contains("variables") ? st["variables"] : json::array();
    for (const json& v : variables)
        vars.rows.push_back({codeCell(text(v, "name")), numberCell(numberText(v["start"], kPointDigits)),
                             numberCell(numberText(v["plot_from"], kPointDigits)), numberCell(numberText(v["plot_to"], kPointDigits))});
    s.blocks.push_back(table(vars));
    s.blocks.push_back(paragraph("The plot ranges are the region the landscape shows (the box of the surveys); they do not bound the methods, which may leave them."));

    auto derivativeBlock = [](const std::vector<Derivative>& list) {
        std::string t;
        for (const Derivative& d : list) t += d.name + " = " + d.formula + "\n";
        if (!t.empty()) t.pop_back();
        return preformatted(t);
    };
    if (!in.gradient.empty()) {
        s.blocks.push_back(heading(study.fit ? "Derivatives of the model in its parameters (exact, symbolic)"
                                             : "Gradient (exact, symbolic)"));
        s.blocks.push_back(derivativeBlock(in.gradient));
    }
    if (!in.hessian.empty()) {
        s.blocks.push_back(heading(study.fit ? "Second derivatives of the model (upper triangle)"
                                             : "Hessian (upper triangle, exact, symbolic)"));
        s.blocks.push_back(derivativeBlock(in.hessian));
    }
    if (!in.derivativeNote.empty()) s.blocks.push_back(paragraph(in.derivativeNote));
    return s;
}

Section dataSection(const ReportInput& in) {
    Section s{"data", "Data", {}};
    const study::Study& study = in.study;
    if (!study.fit) {
        s.blocks.push_back(paragraph("None: this study minimizes a formula and reads no data table."));
        return s;
    }
    const json& data = studyOf(in).contains("data") ? studyOf(in)["data"] : json::object();
    std::vector<Field> f;
    f.push_back({"File", {code(study.fit->dataPath)}});
    f.push_back({"Checksum of the table", {code(study.fit->checksum)}});
    if (in.data) f.push_back({"Table", {plain(in.data->summary)}});
    if (data.contains("rows")) f.push_back({"Rows used", {plain(std::to_string(data["rows"].get<long>()))}});
    if (data.contains("columns")) {
        std::string cols;
        for (const json& c : data["columns"]) cols += (cols.empty() ? "" : ", ") + c.get<std::string>();
        f.push_back({"Columns", {plain(cols)}});
    }
    f.push_back({"Response", {code(study.fit->response)}});
    f.push_back({"Loss", {plain(study.fit->loss)}});
    f.push_back({"Weights", study.fit->weights.empty()
                                ? Text{plain("none (every row counts once)")}
                                : Text{plain(study.fit->weightsKind == "sigma" ? "1/σ² from " : "from "),
                                       code(study.fit->weights)}});
    if (study.fit->dropIncompleteRows)
        f.push_back({"Incomplete rows", {plain("skipped (" + std::to_string(data.value("dropped_rows", 0L)) + ")")}});
    s.blocks.push_back(fields(f));
    if (in.data && !in.data->rows.empty()) {
        const std::size_t shown = in.data->rows.size();
        s.blocks.push_back(heading("The first " + std::to_string(shown) + " rows"));
        Table preview{{"row"}, {}, true};
        for (const std::string& c : in.data->columns) preview.header.push_back(c);
        for (std::size_t r = 0; r < shown; ++r) {
            std::vector<Cell> row = {numberCell(std::to_string(r + 1))};
            for (double v : in.data->rows[r]) row.push_back(numberCell(numberText(v, kDataDigits)));
            preview.rows.push_back(std::move(row));
        }
        s.blocks.push_back(table(preview));
        if (in.data->totalRows > shown)
            s.blocks.push_back(paragraph("… and " + std::to_string(in.data->totalRows - shown) +
                                         " more rows in the file, whose checksum is given above."));
    }
    return s;
}

Section methodsSection(const ReportInput& in) {
    Section s{"methods", "Methods and settings", {}};
    const study::Study& study = in.study;
    Table t{{"method", "id", "family", "settings"}, {}, false};
    std::vector<std::string> disabled;
    for (const study::MethodEntry& e : study.methods) {
        if (!e.enabled) {
            disabled.push_back(e.label);
            continue;
        }
        const solve::MethodInfo* info = solve::findMethod(e.method);
        Text settings;
        std::string defaults;
        if (info) {
            for (const solve::OptionSpec& spec : info->options) {
                auto set = e.options.find(spec.name);
                if (set != e.options.end()) {
                    if (!settings.empty()) settings.push_back(plain(", "));
                    settings.push_back(code(spec.name + " = " + set->second));
                } else {
                    defaults += (defaults.empty() ? "" : ", ") + spec.name + " = " + spec.defaultText();
                }
            }
        }
        if (settings.empty())
            settings.push_back(emphasis(defaults.empty() ? std::string("takes no options") : "all at their defaults: " + defaults));
        else if (!defaults.empty())
            settings.push_back(emphasis("; the rest at their defaults: " + defaults));
        std::vector<Cell> row;
        row.push_back({e.colour.empty() ? Text{plain(e.label)} : Text{swatch(e.colour, e.label)}, false});
        row.push_back(codeCell(e.method));
        row.push_back(cell(info ? info->family : std::string("?")));
        row.push_back({settings, false});
        t.rows.push_back(std::move(row));
    }
    s.blocks.push_back(table(t));
    if (!disabled.empty()) {
        std::string names;
        for (const std::string& d : disabled) names += (names.empty() ? "" : ", ") + d;
        s.blocks.push_back(paragraph("Not run (disabled in the study): " + names + "."));
    }

    s.blocks.push_back(heading("Start and stopping rules (the same for every method)"));
    const json& st = studyOf(in);
    std::vector<Field> f;
    // In the study's variable order (the JSON's "start" object is keyed by name).
    std::string start;
    for (const json& v : st.contains("variables") ? st["variables"] : json::array())
        start += (start.empty() ? "" : ", ") + text(v, "name") + " = " + numberText(v["start"], kPointDigits);
    f.push_back({"Start", {plain(start)}});
    if (st.contains("stopping")) {
        const json& r = st["stopping"];
        f.push_back({"Iteration limit", {plain(numberText(r["max_iterations"], 17))}});
        f.push_back({"Evaluation limit", {plain(numberText(r["max_evaluations"], 17))}});
        // One line per convergence test, by its setting's name (docs/names.md).
        f.push_back({"Gradient norm below", {plain("|∇f| ≤ " + numberText(r["gradient_norm_below"], 6))}});
        const json& ratio = r["gradient_ratio_below"];
        f.push_back({"Gradient ratio below",
                     {plain(ratio.is_number() && ratio.get<double>() > 0
                                ? "|∇f| ≤ " + numberText(ratio, 6) + " · |∇f(start)|"
                                : std::string("off"))}});
        f.push_back({"Relative step below", {plain("|Δx| ≤ " + numberText(r["relative_step_below"], 6) + " · (1 + |x|)")}});
        const json& change = r["relative_change_below"];
        f.push_back({"Relative change below",
                     {plain(change.is_number() && change.get<double>() > 0
                                ? "|Δf| ≤ " + numberText(change, 6) + " · (1 + |f|)"
                                : std::string("off"))}});
    }
    s.blocks.push_back(fields(f));
    return s;
}

Section plotsSection(const ReportInput& in) {
    Section s{"plots", "Landscape, progress and curvature", {}};
    for (const Figure& fig : in.figures)  // the survey figures go with their sections
        if (fig.id.rfind("critical", 0) != 0 && fig.id.rfind("basins", 0) != 0) s.blocks.push_back(figure(fig));
    if (!in.figuresNote.empty()) s.blocks.push_back(callout("note", {plain(in.figuresNote)}));
    return s;
}

Section endPointsSection(const ReportInput& in) {
    Section s{"end-points", "End points", {}};
    const json& runs = runsOf(in);
    s.blocks.push_back(paragraph(
        "Where each method ended. Evaluations count values / gradients / Hessians. The end point is classified by the "
        "Hessian's eigenvalues there (a saddle's index is its number of negative eigenvalues); a point where the "
        "gradient is not small enough is not a critical point, and only its curvature is given."));
    Table t{{"method", "final value f", "|∇f|", "end point", "iterations", "evaluations", "termination"}, {}, false};
    for (const json& run : runs) {
        std::vector<Cell> row;
        row.push_back({methodName(in.study, run), false});
        row.push_back(numberCell(numberText(run["value"], kValueDigits)));
        row.push_back(numberCell(numberText(run["gradient_norm"], kGradientDigits)));
        row.push_back(cell(endPointText(run)));
        row.push_back(numberCell(std::to_string(run.value("iterations", 0))));
        row.push_back(numberCell(evaluationsText(run)));
        row.push_back(codeCell(text(run, "termination")));
        t.rows.push_back(std::move(row));
    }
    s.blocks.push_back(table(t));

    const json& st = studyOf(in);
    std::vector<std::string> names;
    for (const json& v : st.contains("variables") ? st["variables"] : json::array()) names.push_back(text(v, "name"));
    s.blocks.push_back(heading(in.study.fit ? "Parameters at each end point" : "Coordinates of each end point"));
    if (names.size() <= 8) {
        Table x{{"method"}, {}, names.size() > 5};
        for (const std::string& n : names) x.header.push_back(n);
        for (const json& run : runs) {
            std::vector<Cell> row = {{methodName(in.study, run), false}};
            for (std::size_t i = 0; i < names.size(); ++i)
                row.push_back(numberCell(i < run["x"].size() ? numberText(run["x"][i], kPointDigits) : "–"));
            x.rows.push_back(std::move(row));
        }
        s.blocks.push_back(table(x));
    } else {
        std::vector<Text> items;
        for (const json& run : runs) {
            Text item = methodName(in.study, run);
            std::string at;
            for (std::size_t i = 0; i < names.size() && i < run["x"].size(); ++i)
                at += (i ? ", " : "") + names[i] + " = " + numberText(run["x"][i], kPointDigits);
            item.push_back(plain(": " + at));
            items.push_back(item);
        }
        s.blocks.push_back(list(items));
    }

    s.blocks.push_back(heading("Why each method stopped"));
    std::vector<Text> why;
    for (const json& run : runs) {
        Text item = methodName(in.study, run);
        std::string message = text(run, "message");
        if (!message.empty() && message.back() != '.') message += '.';
        item.push_back(plain(" (" + text(run, "method") + "): " + message));
        const json& end = run.contains("end_point") ? run["end_point"] : json::object();
        if (!text(end, "description").empty()) item.push_back(plain(" End point: " + text(end, "description") + "."));
        why.push_back(item);
    }
    s.blocks.push_back(list(why));
    return s;
}

// Findings (issue 10), read from the runs' JSON exactly as `run --json` prints them
// (docs/findings.md): id, severity, title, iterations {first, last, focus, notable}, evidence
// {name: number}, evidence_detail [{name, value, unit, meaning}], message, remedy {change
// {kind, text, ...}, outcome {helped, text, termination, converged, value, gradient_norm, x,
// end_point, end_index, critical, iterations, evaluations} | null} | null.

std::string iterationsText(const json& j) {
    if (!j.is_object() || !j.contains("first") || !j["first"].is_number()) return "";
    const std::string first = numberText(j["first"], 17);
    const std::string last = j.contains("last") && j["last"].is_number() ? numberText(j["last"], 17) : first;
    return first == last ? "iteration " + first : "iterations " + first + "–" + last;
}

// The evidence as rows: evidence_detail in its reading order, else the evidence object.
std::vector<std::vector<Cell>> evidenceRows(const json& f) {
    std::vector<std::vector<Cell>> rows;
    if (f.contains("evidence_detail") && f["evidence_detail"].is_array() && !f["evidence_detail"].empty()) {
        for (const json& e : f["evidence_detail"])
            rows.push_back({codeCell(text(e, "name")), numberCell(numberText(e.value("value", json()), 4)),
                            cell(text(e, "unit")), cell(text(e, "meaning"))});
    } else if (f.contains("evidence") && f["evidence"].is_object()) {
        for (const auto& [name, value] : f["evidence"].items())
            rows.push_back({codeCell(name), numberCell(numberText(value, 4)), cell(""), cell("")});
    }
    return rows;
}

// What the remedy's rerun did, in numbers: how it ended, f, |∇f|, the end point, its cost.
std::string outcomeNumbers(const json& o) {
    std::string t = text(o, "termination");
    if (o.contains("iterations") && o["iterations"].is_number())
        t += (t.empty() ? "" : " after ") + numberText(o["iterations"], 17) + " iterations";
    if (o.contains("value")) t += "; f = " + numberText(o["value"], kValueDigits);
    if (o.contains("gradient_norm")) t += ", |∇f| = " + numberText(o["gradient_norm"], kGradientDigits);
    if (o.contains("end_point") && o["end_point"].is_string()) {
        json end = {{"kind", o["end_point"]}, {"index", o.value("end_index", 0)}};
        t += "; end point: " + endPointText(json{{"end_point", end}});
    }
    if (o.contains("evaluations") && o["evaluations"].is_object())
        t += "; evaluations " + evaluationsText(o);
    return t;
}

std::string capitalized(std::string t) {
    if (!t.empty() && t[0] >= 'a' && t[0] <= 'z') t[0] = static_cast<char>(t[0] - 'a' + 'A');
    return t;
}

Section findingsSection(const ReportInput& in) {
    Section s{"findings", "Findings", {}};
    const json& runs = runsOf(in);
    s.blocks.push_back(paragraph(
        "What Saddlewise read in each run: a problem means the run's result should not be taken as it stands (not at "
        "a minimum, stopped early, broke down, or a parameter combination the data do not determine); a note says how "
        "the run behaved. Where a change could help, it was tried: a rerun from the same start with that one change, "
        "and its result is given as it happened."));

    // Overview: one row per run.
    Table overview{{"method", "problems", "notes", "remedies tried", "helped"}, {}, false};
    for (const json& run : runs) {
        if (!run.contains("findings") || !run["findings"].is_array()) continue;
        int problems = 0, notes = 0, tried = 0, helped = 0;
        for (const json& f : run["findings"]) {
            (text(f, "severity") == "problem" ? problems : notes) += 1;
            if (f.contains("remedy") && f["remedy"].is_object() && f["remedy"].contains("outcome") &&
                f["remedy"]["outcome"].is_object()) {
                ++tried;
                helped += f["remedy"]["outcome"].value("helped", false) ? 1 : 0;
            }
        }
        overview.rows.push_back({{methodName(in.study, run), false}, numberCell(std::to_string(problems)),
                                 numberCell(std::to_string(notes)), numberCell(std::to_string(tried)),
                                 numberCell(std::to_string(helped))});
    }
    s.blocks.push_back(table(overview));

    for (const json& run : runs) {
        if (!run.contains("findings") || !run["findings"].is_array()) continue;
        s.blocks.push_back(heading(plainText(methodName(in.study, run))));
        if (run["findings"].empty()) {
            s.blocks.push_back(paragraph("No findings: nothing unusual in this run."));
            continue;
        }
        for (const json& f : run["findings"]) {
            const bool problem = text(f, "severity") == "problem";
            Text head = {strong((problem ? "Problem: " : "Note: ") + capitalized(text(f, "title", text(f, "id")))),
                         plain(" ("), code(text(f, "id"))};
            const std::string at = iterationsText(f.value("iterations", json()));
            head.push_back(plain(at.empty() ? ")" : ", " + at + ")"));
            head.push_back(plain(". " + text(f, "message")));
            s.blocks.push_back(callout(problem ? "warning" : "note", head));

            std::vector<std::vector<Cell>> rows = evidenceRows(f);
            if (!rows.empty()) s.blocks.push_back(table(Table{{"evidence", "value", "unit", "meaning"}, std::move(rows), true}));

            std::vector<Field> remedy;
            const json& r = f.contains("remedy") ? f["remedy"] : json();
            if (!r.is_object()) {
                remedy.push_back({"Remedy", {plain("none that a rerun could try")}});
            } else {
                const json& change = r.contains("change") ? r["change"] : json();
                remedy.push_back({"Remedy", {plain(change.is_object() ? text(change, "text", text(change, "kind"))
                                                                      : change.is_string() ? change.get<std::string>()
                                                                                           : std::string("–"))}});
                const json& o = r.contains("outcome") ? r["outcome"] : json();
                if (o.is_object()) {
                    const bool helped = o.value("helped", false);
                    remedy.push_back({"Result", {strong(helped ? "helped. " : "did not help. "), plain(text(o, "text"))}});
                    const std::string numbers = outcomeNumbers(o);
                    if (!numbers.empty()) remedy.push_back({"Rerun", {plain(numbers)}});
                } else {
                    remedy.push_back({"Result", {plain("not tried (the report was made without the reruns)")}});
                }
            }
            s.blocks.push_back(fields(std::move(remedy)));
        }
    }
    return s;
}

Section fitStatisticsSection(const ReportInput& in) {
    Section s{"fit-statistics", "Fit statistics", {}};
    if (!in.study.fit) {
        s.blocks.push_back(paragraph("None: this study is not a data fit."));
        return s;
    }
    const json& runs = runsOf(in);
    const int best = bestRun(in.results);
    if (best < 0 || !runs[static_cast<std::size_t>(best)].contains("fit")) {
        s.blocks.push_back(paragraph("No method reached a finite value, so there are no statistics to report."));
        return s;
    }
    const json& run = runs[static_cast<std::size_t>(best)];
    const json& fit = run["fit"];
    Text intro = {plain("At the end point of ")};
    for (const Span& span : methodName(in.study, run)) intro.push_back(span);
    intro.push_back(plain(run.value("converged", false) ? ", the lowest final value among the methods that converged."
                                                        : ", the lowest final value; no method converged."));
    s.blocks.push_back(paragraph(intro));

    const double level = fit.value("confidence_level", 0.95);
    const bool likelihood = fit.contains("log_likelihood");
    const int dof = fit.value("degrees_of_freedom", 0);
    const std::string interval = numberText(level * 100, 4) + "% interval (" +
                                 (likelihood ? std::string("normal") : "t, " + std::to_string(dof) + " dof") + ")";
    Table t{{"parameter", "estimate", "standard error", interval + " lower", "upper"}, {}, false};
    std::vector<std::string> names;
    if (fit.contains("parameters"))
        for (const json& v : studyOf(in)["variables"]) names.push_back(text(v, "name"));
    for (const std::string& n : names) {
        const json& bounds = fit["confidence_intervals"].contains(n) ? fit["confidence_intervals"][n] : json::array({nullptr, nullptr});
        t.rows.push_back({codeCell(n), numberCell(numberText(fit["parameters"][n], kPointDigits)),
                          numberCell(numberText(fit["standard_errors"][n], kErrorDigits)),
                          numberCell(numberText(bounds[0], kIntervalDigits)), numberCell(numberText(bounds[1], kIntervalDigits))});
    }
    s.blocks.push_back(table(t));

    // Parameters the data cannot separate (null errors above) and the combinations they do determine.
    if (fit.contains("not_determined") && fit["not_determined"].is_array() && !fit["not_determined"].empty()) {
        std::string list;
        for (const json& n : fit["not_determined"]) list += (list.empty() ? "" : ", ") + n.get<std::string>();
        s.blocks.push_back(callout("warning", {strong("Not determined by the data: "), plain(list + "."),
                                               plain(" Their standard errors and intervals are not given; the data "
                                                     "determine only the combinations below.")}));
        if (fit.contains("determined_combinations") && fit["determined_combinations"].is_array() &&
            !fit["determined_combinations"].empty()) {
            Table c{{"determined combination", "estimate", "standard error", "lower", "upper"}, {}, false};
            for (const json& k : fit["determined_combinations"]) {
                const json& ci = k.contains("confidence_interval") ? k["confidence_interval"] : json::array({nullptr, nullptr});
                c.rows.push_back({codeCell(text(k, "text")), numberCell(numberText(k.value("estimate", json()), kPointDigits)),
                                  numberCell(numberText(k.value("standard_error", json()), kErrorDigits)),
                                  numberCell(numberText(ci[0], kIntervalDigits)), numberCell(numberText(ci[1], kIntervalDigits))});
            }
            s.blocks.push_back(table(c));
        }
    }

    std::vector<Field> f;
    f.push_back({"Rows, parameters, degrees of freedom",
                 {plain(std::to_string(fit.value("rows", 0)) + ", " + std::to_string(names.size()) + ", " + std::to_string(dof))}});
    // How well the model fits, in the terms of its loss (as the fit verb and the window print it):
    // for 0/1 outcomes and counts the deviance and log-likelihood; a sum of squared differences
    // from the linear predictor would mean nothing there.
    if (likelihood) {
        f.push_back({"Deviance", {plain(numberText(fit["deviance"], kValueDigits))}});
        f.push_back({"Log-likelihood", {plain(numberText(fit["log_likelihood"], kValueDigits))}});
        if (fit["log_likelihood"].is_number())
            f.push_back({"AIC (2 × parameters − 2 × log-likelihood)",
                         {plain(numberText(2.0 * static_cast<double>(names.size()) - 2.0 * fit["log_likelihood"].get<double>(),
                                           kValueDigits))}});
        if (in.study.fit && in.study.fit->loss == "poisson" && dof > 0 && fit["deviance"].is_number())
            f.push_back({"Deviance / degrees of freedom (near 1 for Poisson counts)",
                         {plain(numberText(fit["deviance"].get<double>() / dof, 4))}});
    } else {
        const bool weighted = in.study.fit && !in.study.fit->weights.empty();
        f.push_back({weighted ? "Weighted residual sum of squares" : "Residual sum of squares",
                     {plain(numberText(fit["residual_sum_of_squares"], kValueDigits))}});
        f.push_back({weighted ? "Residual standard deviation (weighted)" : "Residual standard deviation",
                     {plain(numberText(fit["residual_standard_deviation"], kPointDigits))}});
    }
    f.push_back({"Covariance of the estimates", {plain(text(fit, "covariance_method"))}});
    if (fit.contains("jacobian"))
        f.push_back({"Jacobian (unit-norm columns)",
                     {plain("rank " + numberText(fit["jacobian"]["rank"], 17) + " of " + std::to_string(names.size()) +
                            ", condition number " + numberText(fit["jacobian"]["scaled_condition"], 4))}});
    s.blocks.push_back(fields(f));

    // Correlations between estimates as pairs, strongest first (the fit verb's order): the pair
    // that matters reads first, however many parameters there are.
    if (fit.contains("correlation") && fit["correlation"].size() == names.size() && names.size() > 1) {
        struct Pair {
            std::size_t a, b;
            double r;
        };
        std::vector<Pair> pairs;
        for (std::size_t i = 0; i < names.size(); ++i)
            for (std::size_t j = i + 1; j < names.size(); ++j) {
                const json& v = fit["correlation"][i][j];
                pairs.push_back({i, j, v.is_number() ? v.get<double>() : std::nan("")});
            }
        std::stable_sort(pairs.begin(), pairs.end(), [](const Pair& x, const Pair& y) {
            const double ax = std::isnan(x.r) ? 2 : std::fabs(x.r), ay = std::isnan(y.r) ? 2 : std::fabs(y.r);
            return ax > ay;
        });
        s.blocks.push_back(heading("Correlations between estimates, strongest first"));
        Table c{{"pair", "correlation"}, {}, true};
        for (const Pair& p : pairs) {
            char buffer[32] = "–";
            if (!std::isnan(p.r)) std::snprintf(buffer, sizeof buffer, "%+.4f", p.r);
            c.rows.push_back({cell(names[p.a] + " and " + names[p.b]), numberCell(buffer)});
        }
        s.blocks.push_back(table(c));
    }
    const json& warnings = fit.contains("warnings") ? fit["warnings"] : json::array();
    if (warnings.empty()) {
        s.blocks.push_back(paragraph("Warnings: none."));
    } else {
        std::vector<Text> items;
        for (const json& w : warnings) items.push_back({plain(w.get<std::string>())});
        s.blocks.push_back(heading("Warnings"));
        s.blocks.push_back(list(items));
    }
    return s;
}

// Critical points and basins (issue 11), from the surveys' JSON: critical.points [{x {name:
// value}, value, kind, index, eigenvalues, gradient_norm}], starts; basins [{method, grid,
// counts, ...}] with figures among in.figures whose id starts with "basins".
std::vector<Section> surveySections(const ReportInput& in) {
    std::vector<Section> out;
    if (!in.surveys || !in.surveys->is_object()) return out;
    const json& surveys = *in.surveys;
    if (surveys.contains("critical") && surveys["critical"].contains("points")) {
        Section s{"critical-points", "Critical-point map", {}};
        const json& critical = surveys["critical"];
        if (critical.contains("starts"))
            s.blocks.push_back(paragraph("Found from " + numberText(critical["starts"], 17) + " starts."));
        Table t{{"kind", "index", "point", "value f", "|∇f|", "eigenvalues"}, {}, true};
        for (const json& p : critical["points"]) {
            std::string at, eig;
            if (p.contains("x") && p["x"].is_object())
                for (const auto& [name, value] : p["x"].items()) at += (at.empty() ? "" : ", ") + name + " = " + numberText(value, kPointDigits);
            if (p.contains("eigenvalues"))
                for (const json& e : p["eigenvalues"]) eig += (eig.empty() ? "" : ", ") + numberText(e, 4);
            t.rows.push_back({cell(text(p, "kind")), numberCell(p.contains("index") ? numberText(p["index"], 17) : "–"),
                              cell(at), numberCell(numberText(p.value("value", json()), kValueDigits)),
                              numberCell(numberText(p.value("gradient_norm", json()), kGradientDigits)), cell(eig)});
        }
        s.blocks.push_back(table(t));
        for (const Figure& fig : in.figures)
            if (fig.id.rfind("critical", 0) == 0) s.blocks.push_back(figure(fig));
        out.push_back(std::move(s));
    }
    if (surveys.contains("basins") && surveys["basins"].is_array() && !surveys["basins"].empty()) {
        Section s{"basins", "Basins of attraction", {}};
        const json& first = surveys["basins"][0];
        if (first.contains("grid"))
            s.blocks.push_back(paragraph("Each method ran from the centre of every cell of a " + numberText(first["grid"], 17) +
                                         " × " + numberText(first["grid"], 17) +
                                         " grid over the landscape's plane (other variables held at the start), with "
                                         "the study's stopping rules; each cell counts where its run ended."));
        for (const json& b : surveys["basins"]) {
            s.blocks.push_back(heading(text(b, "method", "method")));
            if (b.contains("counts") && b["counts"].is_object()) {
                Table t{{"ends at", "cells"}, {}, true};
                for (const auto& [name, count] : b["counts"].items()) t.rows.push_back({cell(name), numberCell(numberText(count, 17))});
                s.blocks.push_back(table(t));
            }
        }
        for (const Figure& fig : in.figures)
            if (fig.id.rfind("basins", 0) == 0) s.blocks.push_back(figure(fig));
        out.push_back(std::move(s));
    }
    if (surveys.contains("note") && surveys["note"].is_string()) {
        Section s{out.empty() ? "critical-points" : "surveys-note", "Surveys", {}};
        s.blocks.push_back(callout("warning", {plain(surveys["note"].get<std::string>())}));
        out.push_back(std::move(s));
    }
    return out;
}

Section reproducibilitySection(const ReportInput& in) {
    Section s{"reproducibility", "Reproducibility", {}};
    const Provenance& p = in.provenance;
    std::vector<Field> f;
    f.push_back({"Saddlewise", {plain(p.version.empty() ? std::string("unknown") : p.version)}});
    f.push_back({"Build", {code(p.build.empty() ? std::string("unknown") : p.build)}});
    f.push_back({"Generated", {plain(p.generated)}});
    f.push_back({"Study file", p.studyFile.empty() ? Text{plain("not saved")} : Text{code(p.studyFile)}});
    f.push_back({"Study file checksum", p.studyChecksum.empty() ? Text{plain("none (no file)")} : Text{code(p.studyChecksum)}});
    if (in.study.fit) f.push_back({"Data file checksum", {code(in.study.fit->checksum)}});
    f.push_back({"Command", {code(p.command)}});
    if (!p.workingDirectory.empty()) f.push_back({"Run in", {code(p.workingDirectory)}});
    s.blocks.push_back(fields(f));
    if (!p.note.empty()) s.blocks.push_back(callout("warning", {plain(p.note)}));
    s.blocks.push_back(paragraph(
        {plain("The command runs the study again and writes this report; "), code("saddlewise run STUDY --json"),
         plain(" prints every number in it with full precision and the per-iteration trace of every method.")}));
    if (!p.studyText.empty()) {
        s.blocks.push_back(heading("The study as reported"));
        s.blocks.push_back(preformatted(p.studyText));
    }
    return s;
}

std::string shortened(std::string formula) {
    if (formula.size() <= kMaxFormulaLength) return formula;
    const std::size_t total = formula.size();
    formula.resize(kMaxFormulaLength);
    // Do not cut a UTF-8 sequence in half.
    while (!formula.empty() && (static_cast<unsigned char>(formula.back()) & 0xC0) == 0x80) formula.pop_back();
    if (!formula.empty() && (static_cast<unsigned char>(formula.back()) & 0x80)) formula.pop_back();
    return formula + " … (" + std::to_string(total) + " characters; `saddlewise derive` prints it in full)";
}

// What surveySections reads, from the surveys runStudySurveys made: the critical map as
// `saddlewise critical --json` writes it, and per basin map its label and how many cells end
// where ("local minimum at (x, y)" or a failure kind; the counts add up to N·N).
std::optional<json> surveysJson(const StudyRuns& runs) {
    if (!runs.critical && !runs.basins && runs.surveyNote.empty()) return std::nullopt;
    json out = json::object();
    if (runs.critical) out["critical"] = survey::criticalMapToJson(*runs.critical);
    if (runs.basins) {
        const survey::BasinSurvey& b = *runs.basins;
        const std::vector<std::string>& names = b.variables;
        auto pointName = [&](std::size_t k) {
            const survey::CriticalPoint& p = b.map.points[k];
            std::string kind = survey::kindWords(p);
            if (kind == "saddle") kind += " (index " + std::to_string(p.index) + ")";
            std::string at;
            for (Eigen::Index i = 0; i < p.x.size() && static_cast<std::size_t>(i) < names.size(); ++i)
                if (i == b.region.xVariable || i == b.region.yVariable || p.x.size() <= 3)
                    at += (at.empty() ? "" : ", ") + names[static_cast<std::size_t>(i)] + " = " +
                          numberText(std::fabs(p.x[i]) < 1e-12 * (1 + b.region.width(static_cast<int>(i))) ? 0.0 : p.x[i], 4);
            return kind + " at (" + at + ")";
        };
        json maps = json::array();
        for (const survey::BasinMap& m : b.maps) {
            json counts = json::object();
            for (std::size_t k = 0; k < m.pointCounts.size() && k < b.map.points.size(); ++k)
                if (m.pointCounts[k] > 0) counts[pointName(k)] = m.pointCounts[k];
            const std::pair<const char*, long> failures[] = {{"iteration or evaluation limit", m.limit},
                                                             {"diverged", m.diverged},
                                                             {"failed or stopped where nothing is critical", m.failed},
                                                             {"a critical point outside the box", m.outside}};
            for (const auto& [name, count] : failures)
                if (count > 0) counts[name] = count;
            maps.push_back({{"method", m.method.label.empty() ? m.method.methodId : m.method.label},
                            {"method_id", m.method.methodId},
                            {"grid", b.grid},
                            {"counts", counts}});
        }
        out["basins"] = maps;
    }
    if (!runs.surveyNote.empty()) out["note"] = runs.surveyNote;
    return out;
}

}  // namespace

// ---------------------------------------------------------------- input and document

ReportInput prepareInput(const StudyRuns& runs) {
    ReportInput in;
    in.study = runs.study;
    in.results = studyRunsJson(runs, false);
    in.surveys = surveysJson(runs);
    const std::vector<std::string> names = runs.study.variableNames();
    const int n = static_cast<int>(names.size());
    try {
        if (const auto* formula = dynamic_cast<const FormulaObjective*>(runs.objective.get())) {
            const expr::DerivativeSet& set = formula->derivatives();
            for (int i = 0; i < n && i < set.dimension(); ++i)
                in.gradient.push_back({"∂f/∂" + names[i], shortened(set.gradient()[i].toText())});
            if (set.order() >= 2)
                for (int i = 0; i < n; ++i)
                    for (int j = i; j < n; ++j)
                        in.hessian.push_back({"∂²f/∂" + names[i] + "∂" + names[j],
                                              shortened(set.hessianUpper()[expr::DerivativeSet::hessianIndex(i, j, n)].toText())});
        } else if (const auto* fit = dynamic_cast<const FitObjective*>(runs.objective.get())) {
            const sw::Table& table = fit->table();
            std::vector<std::string> symbols = names;
            for (const std::string& c : table.columnNames) symbols.push_back(c);
            const expr::Expression model = expr::Expression::parse(fit->definition().model, symbols);
            std::vector<int> wrt;
            for (int i = 0; i < n; ++i) wrt.push_back(i);
            const auto g = expr::gradient(model, wrt);
            const auto h = expr::hessianUpper(model, wrt);
            for (int i = 0; i < n; ++i) in.gradient.push_back({"∂model/∂" + names[i], shortened(g[i].toText())});
            for (int i = 0; i < n; ++i)
                for (int j = i; j < n; ++j)
                    in.hessian.push_back({"∂²model/∂" + names[i] + "∂" + names[j],
                                          shortened(h[expr::DerivativeSet::hessianIndex(i, j, n)].toText())});

            DataPreview preview;
            preview.columns = table.columnNames;
            preview.totalRows = table.rowCount();
            preview.summary = table.summary();
            for (std::size_t r = 0; r < table.rowCount() && r < kPreviewRows; ++r) {
                std::vector<double> row;
                for (const auto& column : table.columns) row.push_back(column[r]);
                preview.rows.push_back(std::move(row));
            }
            in.data = std::move(preview);
        }
    } catch (const std::exception& e) {
        in.derivativeNote = std::string("The derivatives could not be printed: ") + e.what();
    }
    return in;
}

Document buildReport(const ReportInput& in) {
    Document d;
    d.title = in.study.title.empty() ? (in.provenance.studyFile.empty() ? std::string("Untitled study") : in.provenance.studyFile)
                                     : in.study.title;
    d.subtitle = "Saddlewise " + (in.provenance.version.empty() ? std::string("(version unknown)") : in.provenance.version) +
                 " · generated " + in.provenance.generated +
                 (in.provenance.studyFile.empty() ? std::string() : " · " + in.provenance.studyFile);
    d.footer = "Saddlewise review report · " + d.title;
    d.sections.push_back(summarySection(in));
    d.sections.push_back(cautionSection());
    d.sections.push_back(objectiveSection(in));
    d.sections.push_back(dataSection(in));
    d.sections.push_back(methodsSection(in));
    d.sections.push_back(plotsSection(in));
    d.sections.push_back(endPointsSection(in));
    bool hasFindings = false;
    for (const json& run : runsOf(in)) hasFindings = hasFindings || run.contains("findings");
    if (hasFindings) d.sections.push_back(findingsSection(in));
    d.sections.push_back(fitStatisticsSection(in));
    for (Section& s : surveySections(in)) d.sections.push_back(std::move(s));
    d.sections.push_back(reproducibilitySection(in));
    d.machineReadable = in.results.dump();
    return d;
}

}  // namespace sw::report
