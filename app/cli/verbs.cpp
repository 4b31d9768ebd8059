#include "app/cli/cli.h"
#include "app/cli/build_id.h"
#include "core/expr/expr.h"
#include "core/study/provenance.h"

#include <exception>
#include <ostream>

namespace sw::cli {

const std::vector<Verb>& verbs() {
    static const std::vector<Verb> list = {deriveVerb(), sampleVerb(),   minimizeVerb(), methodsVerb(), fitVerb(),
                                           runVerb(),    criticalVerb(), basinsVerb(),   reportVerb()};
    return list;
}

bool isVerb(const std::string& word) {
    for (const Verb& v : verbs())
        if (v.name == word) return true;
    return false;
}

static void printOverview(std::ostream& out) {
    out << "saddlewise - see why an optimization stalls, and which method gets through\n\n"
           "Usage:\n"
           "  saddlewise                 open the workbench window\n"
           "  saddlewise STUDY.json      open a study in the window\n"
           "  saddlewise VERB [ARGS]     run headless (no display needed)\n"
           "  saddlewise VERB --help     describe one verb\n\n"
           "Verbs:\n";
    for (const Verb& v : verbs()) {
        out << "  " << v.name;
        for (std::size_t i = v.name.size(); i < 10; ++i) out << ' ';
        out << ' ' << v.summary << '\n';
    }
    out << "\nExit codes: 0 success, 1 the work failed, 2 bad usage or bad input.\n\n"
        << wrapText(study::cautionLine(), 90);
}

int runCommandLine(const std::vector<std::string>& args, std::ostream& out, std::ostream& err) {
    if (args.empty() || args[0] == "--help" || args[0] == "-h" || args[0] == "help") {
        if (args.size() >= 2 && args[0] == "help" && isVerb(args[1]))
            return runCommandLine({args[1], "--help"}, out, err);
        printOverview(out);
        return 0;
    }
    if (args[0] == "--version") {
        out << "saddlewise " << study::programVersion() << " (" << buildId() << ")\n";
        return 0;
    }
    const Verb* verb = nullptr;
    for (const Verb& v : verbs())
        if (v.name == args[0]) verb = &v;
    if (!verb) {  // one line, as for an unknown first word (first_argument.cpp)
        std::string list;
        for (const Verb& v : verbs()) list += (list.empty() ? "" : ", ") + v.name;
        const bool option = args[0].rfind("-", 0) == 0;
        err << "saddlewise: unknown " << (option ? "option" : "verb") << " '" << args[0].substr(0, 80) << "'"
            << (option ? " (before a verb only --help and --version are options)" : "") << "; verbs: " << list
            << " (saddlewise --help describes them)\n";
        return 2;
    }
    std::vector<std::string> rest(args.begin() + 1, args.end());
    for (const std::string& a : rest)
        if (a == "--help" || a == "-h") {
            out << "saddlewise " << verb->name << " - " << verb->summary << "\n\n" << verb->help;
            if (!verb->help.empty() && verb->help.back() != '\n') out << '\n';
            return 0;
        }
    try {
        return verb->run(rest, out, err);
    } catch (const expr::FormulaError& e) {
        err << "saddlewise " << verb->name << ": " << e.withCaret() << '\n';
        return 2;
    } catch (const UsageError& e) {
        err << "saddlewise " << verb->name << ": " << e.what() << "\nTry 'saddlewise " << verb->name
            << " --help'.\n";
        return 2;
    } catch (const Failure& e) {
        err << "saddlewise " << verb->name << ": " << e.what() << '\n';
        return 1;
    } catch (const std::exception& e) {
        err << "saddlewise " << verb->name << ": internal error: " << e.what() << '\n';
        return 1;
    }
}

}  // namespace sw::cli
