#include "app/cli/findings_report.h"

#include "app/cli/cli.h"

#include <cmath>
#include <ostream>

namespace sw::cli {

namespace {

using nlohmann::json;

json number(double v) { return std::isfinite(v) ? json(v) : json(nullptr); }

json vectorJson(const Vector& v) {
    json a = json::array();
    for (Eigen::Index i = 0; i < v.size(); ++i) a.push_back(number(v[i]));
    return a;
}

std::string nameOf(const std::vector<std::string>& names, Eigen::Index i) {
    const auto k = static_cast<std::size_t>(i);
    return k < names.size() ? names[k] : "x" + std::to_string(i + 1);
}

json namedVector(const Vector& v, const std::vector<std::string>& names) {
    json o = json::object();
    for (Eigen::Index i = 0; i < v.size(); ++i) o[nameOf(names, i)] = number(v[i]);
    return o;
}

json changeToJson(const diagnose::Change& c, const std::vector<std::string>& names) {
    json j = {{"kind", diagnose::toString(c.kind)}, {"text", c.text}};
    switch (c.kind) {
        case diagnose::Change::Kind::SwitchMethod:
            j["method"] = c.method;
            j["options"] = c.options;
            break;
        case diagnose::Change::Kind::SetOptions: j["options"] = c.options; break;
        case diagnose::Change::Kind::RescaleVariables: j["scale"] = namedVector(c.scale, names); break;
        case diagnose::Change::Kind::RaiseIterationLimit: j["max_iterations"] = c.maxIterations; break;
        case diagnose::Change::Kind::StartPoint: j["start"] = namedVector(c.start, names); break;
    }
    return j;
}

json outcomeToJson(const diagnose::Outcome& o) {
    return {{"helped", o.helped},
            {"text", o.text},
            {"termination", solve::toString(o.termination)},
            {"converged", solve::isConvergence(o.termination)},
            {"value", number(o.value)},
            {"gradient_norm", number(o.gradientNorm)},
            {"x", vectorJson(o.x)},
            {"end_point", solve::toString(o.endKind)},
            {"end_index", o.endIndex},
            {"critical", o.endCritical},
            {"iterations", o.iterations},
            {"evaluations",
             {{"value", o.evaluations.value}, {"gradient", o.evaluations.gradient}, {"hessian", o.evaluations.hessian}}}};
}

std::string iterationText(const diagnose::IterationSpan& s) {
    if (s.first < 0) return "";
    if (s.first == s.last) return "iteration " + std::to_string(s.first);
    return "iterations " + std::to_string(s.first) + "-" + std::to_string(s.last);
}

}  // namespace

json findingToJson(const diagnose::Finding& f, const std::vector<std::string>& names) {
    json evidence = json::object();
    json detail = json::array();
    for (const diagnose::Evidence& e : f.evidence) {
        evidence[e.name] = number(e.value);
        detail.push_back({{"name", e.name}, {"value", number(e.value)}, {"unit", e.unit}, {"meaning", e.meaning}});
    }
    json mark = nullptr;
    if (!f.mark.empty()) {
        json directions = json::array();
        for (const Vector& d : f.mark.directions) directions.push_back(vectorJson(d));
        mark = {{"point", vectorJson(f.mark.point)}, {"directions", directions}};
    }
    json remedy = nullptr;
    if (f.remedy) {
        remedy = {{"change", changeToJson(f.remedy->change, names)},
                  {"outcome", f.remedy->outcome ? outcomeToJson(*f.remedy->outcome) : json(nullptr)}};
    }
    return {{"id", diagnose::toString(f.id)},
            {"severity", diagnose::toString(f.severity)},
            {"title", diagnose::describe(f.id).title},
            {"iterations",
             {{"first", f.iterations.first},
              {"last", f.iterations.last},
              {"focus", f.iterations.focus},
              {"notable", f.iterations.notable}}},
            {"evidence", evidence},
            {"evidence_detail", detail},
            {"message", f.message},
            {"mark", mark},
            {"remedy", remedy}};
}

json findingsToJson(const diagnose::Findings& findings, const std::vector<std::string>& names) {
    json list = json::array();
    for (const diagnose::Finding& f : findings) list.push_back(findingToJson(f, names));
    return list;
}

void printFindings(std::ostream& out, const diagnose::Findings& findings, const std::vector<std::string>& names,
                   const std::string& indent) {
    (void)names;
    if (findings.empty()) {
        out << indent << "Findings: none\n";
        return;
    }
    out << indent << "Findings:\n";
    for (const diagnose::Finding& f : findings) {
        const std::string where = iterationText(f.iterations);
        out << indent << "  " << (f.isProblem() ? "[problem] " : "[note] ") << diagnose::toString(f.id)
            << (where.empty() ? "" : " (" + where + ")") << ": " << f.message << '\n';
        std::string evidence;
        for (const diagnose::Evidence& e : f.evidence) {
            if (!evidence.empty()) evidence += "; ";
            evidence += e.name + " = " + formatNumber(e.value, 4);
            // Units that say more than the name already does.
            if (std::isfinite(e.value) && (e.unit == "degrees" || e.unit == "per iteration" || e.unit == "relative" ||
                                           e.unit == "f per iteration"))
                evidence += " " + e.unit;
        }
        if (!evidence.empty()) out << indent << "      evidence: " << evidence << '\n';
        if (f.remedy) {
            out << indent << "      remedy:   " << f.remedy->change.text << '\n';
            if (f.remedy->outcome) out << indent << "      outcome:  " << f.remedy->outcome->text << '\n';
            else out << indent << "      outcome:  not tried (--no-remedies)\n";
        }
    }
}

diagnose::Findings findingsFor(const solve::Run& run, const Objective& objective, const std::string& methodId,
                               const solve::OptionValues& options, const solve::StoppingRules& rules,
                               const Vector& start, bool withRemedies) {
    const diagnose::RunSetup setup{methodId, options, rules, start};
    return diagnose::diagnose(run, objective, setup, withRemedies);
}

}  // namespace sw::cli
