// Reporting solver runs: tables and summaries (the JSON is core/report/run_json.cpp).
#include "app/cli/run_report.h"

#include "app/cli/cli.h"

#include <algorithm>
#include <cmath>
#include <iomanip>
#include <map>
#include <ostream>
#include <sstream>

namespace sw::cli {

namespace {

std::string name(const std::vector<std::string>& names, Eigen::Index i) {
    const auto k = static_cast<std::size_t>(i);
    return k < names.size() ? names[k] : "x" + std::to_string(i + 1);
}

// Numbers in tables: 6 significant digits, C locale.
std::string num(double v, int significant = 6) { return formatNumber(v, significant); }

std::string countsText(const solve::EvaluationCounts& c) {
    return std::to_string(c.value) + "/" + std::to_string(c.gradient) + "/" + std::to_string(c.hessian);
}

// Columns on a terminal: UTF-8 text (|∇f|, names) counts one column per character.
std::size_t columns(const std::string& text) {
    std::size_t n = 0;
    for (unsigned char c : text) n += (c & 0xC0) != 0x80;
    return n;
}

// A plain text table: columns padded to their widest cell, numbers right-aligned.
class Table {
public:
    explicit Table(std::vector<std::string> header) { rows_.push_back(std::move(header)); }
    void add(std::vector<std::string> row) { rows_.push_back(std::move(row)); }
    void print(std::ostream& out, std::size_t lastColumnUnpadded = 1) const {
        std::vector<std::size_t> width(rows_[0].size(), 0);
        for (const auto& row : rows_)
            for (std::size_t c = 0; c < row.size() && c < width.size(); ++c)
                width[c] = std::max(width[c], columns(row[c]));
        for (const auto& row : rows_) {
            std::string line;
            for (std::size_t c = 0; c < row.size(); ++c) {
                const bool last = c + lastColumnUnpadded >= row.size();
                line += c ? "  " : "";
                line += last ? row[c] : row[c] + std::string(width[c] - columns(row[c]), ' ');
            }
            while (!line.empty() && line.back() == ' ') line.pop_back();
            out << line << '\n';
        }
    }

private:
    std::vector<std::vector<std::string>> rows_;
};

}  // namespace

void printTrace(std::ostream& out, const solve::Run& run, const std::vector<std::string>& names) {
    const Eigen::Index n = run.trace.empty() ? 0 : run.trace.front().x.size();
    const bool showX = n <= 4;
    std::vector<std::string> header = {"k"};
    if (showX)
        for (Eigen::Index i = 0; i < n; ++i) header.push_back(name(names, i));
    // |∇f| as in the window; the program's text is UTF-8 throughout (method summaries, names).
    for (const char* h : {"f", "|∇f|", "step", "alpha", "|step|", "evals v/g/h", "note"}) header.push_back(h);
    Table table(header);
    for (const solve::IterationRecord& r : run.trace) {
        std::vector<std::string> row = {std::to_string(r.iteration)};
        if (showX)
            for (Eigen::Index i = 0; i < n; ++i) row.push_back(num(r.x[i], 8));
        row.push_back(num(r.value, 10));
        row.push_back(num(r.gradientNorm, 3));
        // The kind of step when it says more than the method's name (the window's Steps column).
        const std::string step = solve::stepKindWord(run.methodId, r);
        row.push_back(step.empty() ? "-" : step);
        row.push_back(std::isnan(r.stepLength) ? "-" : num(r.stepLength, 3));
        row.push_back(std::isnan(r.stepNorm) ? "-" : num(r.stepNorm, 3));
        row.push_back(countsText(r.evaluations));
        std::string note = r.note.text();
        // Most methods' notes already say so ("step rejected (ratio ...)"); say it once.
        if (!r.accepted && note.find("rejected") == std::string::npos)
            note = "rejected" + std::string(note.empty() ? "" : "; ") + note;
        row.push_back(note);
        table.add(row);
    }
    table.print(out);
    if (run.droppedRecords > 0)
        out << "(" << run.droppedRecords << " of " << run.iterations() + 1
            << " records were thinned out to keep the trace within its memory limit: shown are the first, the most "
               "recent (at least the last "
            << solve::kTraceKeptTail << "), every iteration that is a multiple of " << run.recordStride
            << " and the notable ones - rejected steps, changes of step kind, non-finite values)\n";
}

void printSummary(std::ostream& out, const solve::Run& run, const std::vector<std::string>& names) {
    std::string x;
    for (Eigen::Index i = 0; i < run.x.size(); ++i) x += (i ? ", " : "") + name(names, i) + " = " + formatNumber(run.x[i]);
    const solve::EvaluationCounts& c = run.evaluations;
    out << "method:        " << run.label << (run.label != run.methodId ? " (" + run.methodId + ")" : "") << '\n'
        << "termination:   " << solve::toString(run.termination) << " - " << run.message << '\n'
        << "iterations:    " << run.iterations() << '\n'
        << "evaluations:   " << c.value << " values, " << c.gradient << " gradients, " << c.hessian << " Hessians\n"
        << "x:             " << (x.empty() ? "-" : x) << '\n'
        << "value:         " << formatNumber(run.value) << '\n'
        << "gradient norm: " << num(run.gradientNorm, 3) << '\n'
        << "end point:     " << (run.endPoint.description.empty() ? "-" : run.endPoint.description) << '\n';
}

void printComparison(std::ostream& out, const std::vector<solve::Run>& runs) {
    Table table({"method", "iterations", "evals v/g/h", "final value", "|∇f|", "termination", "end point"});
    for (const solve::Run& r : runs) {
        std::string end = solve::describe(r.endPoint.kind);
        if (r.endPoint.kind == solve::PointKind::Saddle) end += " (index " + std::to_string(r.endPoint.index) + ")";
        if (r.endPoint.kind == solve::PointKind::NotCritical)
            end = "not critical (curvature: " + std::string(solve::toString(r.endPoint.curvature)) +
                  " shape)";
        table.add({r.label, std::to_string(r.iterations()), countsText(r.evaluations), num(r.value, 10),
                   num(r.gradientNorm, 3), solve::toString(r.termination), end});
    }
    table.print(out);
}

std::vector<solve::OptionValues> distributeOptions(const std::vector<std::string>& methodIds,
                                                   const std::vector<std::string>& optionTexts) {
    std::vector<solve::OptionValues> result(methodIds.size());
    // A former option name (docs/names.md) counts as the option; it is stored under the current name.
    auto currentName = [](const std::string& id, const std::string& option) -> std::string {
        const solve::MethodInfo* info = solve::findMethod(id);
        const solve::OptionSpec* spec = info ? solve::findOptionOrFormer(info->options, option) : nullptr;
        return spec ? spec->name : std::string();
    };
    auto hasOption = [&](const std::string& id, const std::string& option) { return !currentName(id, option).empty(); };
    std::vector<std::map<std::string, std::string>> spelledAs(methodIds.size());  // current name -> as given
    auto store = [&](std::size_t i, const std::string& key, const std::string& option, const std::string& value) {
        const std::string name = currentName(methodIds[i], option);
        const auto given = spelledAs[i].find(name);
        if (given != spelledAs[i].end() && given->second != option)
            throw UsageError("--option " + key + ": " + option + " and " + given->second +
                             " name the same option (" + name + "); keep one");
        spelledAs[i][name] = option;
        result[i][name] = value;
    };
    for (const std::string& text : optionTexts) {
        const auto eq = text.find('=');
        if (eq == std::string::npos || eq == 0)
            throw UsageError("--option '" + text + "' is not of the form name=value or method.name=value");
        std::string key = text.substr(0, eq);
        const std::string value = text.substr(eq + 1);
        if (value.empty()) throw UsageError("--option " + key + " has no value");
        if (const auto dot = key.find('.'); dot != std::string::npos) {
            const std::string method = key.substr(0, dot), option = key.substr(dot + 1);
            bool chosen = false;
            for (std::size_t i = 0; i < methodIds.size(); ++i)
                if (methodIds[i] == method) {
                    chosen = true;
                    if (!hasOption(method, option)) {
                        const solve::MethodInfo* info = solve::findMethod(method);
                        std::string known;
                        if (info)
                            for (const solve::OptionSpec& s : info->options) known += (known.empty() ? "" : ", ") + s.name;
                        throw UsageError("--option " + key + ": method " + method + " has no option '" + option +
                                         "'" + (known.empty() ? " (it takes none)" : "; its options: " + known));
                    }
                    store(i, key, option, value);
                }
            if (!chosen) throw UsageError("--option " + key + ": method '" + method + "' is not among the --method choices");
            continue;
        }
        bool used = false;
        for (std::size_t i = 0; i < methodIds.size(); ++i)
            if (hasOption(methodIds[i], key)) {
                store(i, key, key, value);
                used = true;
            }
        if (!used) {
            std::string known;
            for (const std::string& id : methodIds) {
                const solve::MethodInfo* info = solve::findMethod(id);
                std::string list;
                if (info)
                    for (const solve::OptionSpec& s : info->options) list += (list.empty() ? "" : ", ") + s.name;
                known += (known.empty() ? "" : "; ") + id + ": " + (list.empty() ? "(none)" : list);
            }
            throw UsageError("--option " + key + ": no chosen method has this option (" + known + ")");
        }
    }
    return result;
}

int exitCodeFor(const std::vector<solve::Run>& runs) {
    for (const solve::Run& r : runs)
        if (r.termination == solve::Termination::NonFinite || r.termination == solve::Termination::Failed) return 1;
    return 0;
}

}  // namespace sw::cli
