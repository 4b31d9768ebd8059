// saddlewise methods: every method id, what it needs, and its options.
#include "app/cli/cli.h"
#include "core/solve/solver.h"

#include <nlohmann/json.hpp>

#include <ostream>

namespace sw::cli {

namespace {

const char* kHelp =
    "Usage: saddlewise methods [--json]\n"
    "\n"
    "Lists every optimization method: its id (for --method), its family, a one-line\n"
    "description, what it needs from the objective (gradient, Hessian, residuals), and its\n"
    "options with defaults and valid ranges (for --option NAME=VALUE).\n";

const char* typeName(solve::OptionSpec::Type t) {
    switch (t) {
        case solve::OptionSpec::Type::Real: return "real";
        case solve::OptionSpec::Type::Integer: return "integer";
        case solve::OptionSpec::Type::Boolean: return "boolean";
        case solve::OptionSpec::Type::Choice: return "choice";
    }
    return "real";
}

std::string needsText(const solve::MethodInfo& m) {
    std::string text;
    if (m.needsResiduals) text = "residuals and their Jacobian";
    else if (m.needsHessian) text = "gradient, Hessian";
    else if (m.needsGradient) text = "gradient";
    else text = "values only";
    return text;
}

int runMethods(const std::vector<std::string>& args, std::ostream& out, std::ostream&) {
    const ParsedArgs parsed = parseArgs(args, {"json"}, {});
    if (!parsed.positional.empty()) throw UsageError("takes no arguments besides --json");
    if (parsed.has("json")) {
        nlohmann::json list = nlohmann::json::array();
        for (const solve::MethodInfo& m : solve::methods()) {
            nlohmann::json options = nlohmann::json::array();
            for (const solve::OptionSpec& o : m.options) {
                nlohmann::json option = {{"name", o.name},
                                         {"type", typeName(o.type)},
                                         {"default", o.defaultText()},
                                         {"range", o.rangeText()},
                                         {"description", o.description}};
                if (o.type == solve::OptionSpec::Type::Choice) option["choices"] = o.choices;
                if (!o.formerNames.empty()) option["former_names"] = o.formerNames;
                options.push_back(option);
            }
            list.push_back({{"id", m.id},
                            {"family", m.family},
                            {"summary", m.summary},
                            {"needs",
                             {{"gradient", m.needsGradient}, {"hessian", m.needsHessian}, {"residuals", m.needsResiduals}}},
                            {"options", options}});
        }
        out << nlohmann::json{{"methods", list}}.dump(2) << '\n';
        return 0;
    }
    std::size_t width = 0;
    for (const solve::MethodInfo& m : solve::methods()) width = std::max(width, m.id.size());
    std::string family;
    for (const solve::MethodInfo& m : solve::methods()) {
        if (m.family != family) {
            family = m.family;
            out << (family.empty() ? "" : "\n") << family << ":\n";
        }
        out << "  " << m.id << std::string(width - m.id.size(), ' ') << "  " << m.summary << '\n';
        out << "  " << std::string(width, ' ') << "  needs: " << needsText(m) << '\n';
        for (const solve::OptionSpec& o : m.options)
            out << "  " << std::string(width, ' ') << "  --option " << o.name << "=" << o.defaultText() << "  ("
                << o.rangeText() << ") " << o.description
                << (o.formerNames.empty() ? std::string() : " [former name: " + o.formerNames.front() + "]") << '\n';
    }
    return 0;
}

}  // namespace

Verb methodsVerb() {
    return {"methods", "list the optimization methods, what they need, and their options", kHelp, runMethods};
}

}  // namespace sw::cli
