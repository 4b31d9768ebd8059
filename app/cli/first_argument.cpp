// What the first command-line argument asks for, decided before any window exists: a verb
// (headless), the window (no argument, or a study file that exists), or a mistake that gets
// one line on stderr and exit 2 (an unknown verb, a study file that is not there).
// Works from verbs(), so a verb added to verbs.cpp needs nothing here.
#include "app/cli/cli.h"

#include <algorithm>
#include <ostream>
#include <sys/stat.h>

namespace sw::cli {

namespace {

// Edit distance (insertions, deletions, substitutions, adjacent swaps) for "did you mean".
std::size_t editDistance(const std::string& a, const std::string& b) {
    const std::size_t n = a.size(), m = b.size();
    std::vector<std::vector<std::size_t>> d(n + 1, std::vector<std::size_t>(m + 1, 0));
    for (std::size_t i = 0; i <= n; ++i) d[i][0] = i;
    for (std::size_t j = 0; j <= m; ++j) d[0][j] = j;
    for (std::size_t i = 1; i <= n; ++i)
        for (std::size_t j = 1; j <= m; ++j) {
            d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1)});
            if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
        }
    return d[n][m];
}

// A word that reads as a path (has a folder separator or a dot, as in "study.json") is taken
// to be a study file; a bare word is taken to be a verb.
bool looksLikePath(const std::string& word) { return word.find_first_of("/.") != std::string::npos; }

// Arguments are shown as given, but never more than a line of them, and no control characters.
std::string shown(const std::string& word) {
    std::string s;
    for (char c : word.substr(0, 80)) s += (static_cast<unsigned char>(c) < 0x20 || c == 0x7f) ? '?' : c;
    if (word.size() > 80) s += "...";
    return s;
}

std::string verbList() {
    std::string list;
    for (const Verb& v : verbs()) list += (list.empty() ? "" : ", ") + v.name;
    return list;
}

// Qt's own window options (QGuiApplication, QApplication, xcb), which the window takes before
// an optional study file: `saddlewise -platform offscreen study.json`. Values: those that take one.
bool isWindowOption(const std::string& word, bool* takesValue) {
    static const char* const valued[] = {"-platform", "-platformpluginpath", "-platformtheme", "-plugin",
                                         "-qmljsdebugger", "-qwindowgeometry", "-qwindowicon", "-qwindowtitle",
                                         "-session", "-style", "-stylesheet", "-display", "-geometry", "-title"};
    static const char* const bare[] = {"-reverse", "-widgetcount", "-nograb", "-dograb", "-sync"};
    for (const char* v : valued)
        if (word == v) return *takesValue = true;
    for (const char* b : bare)
        if (word == b) return !(*takesValue = false);
    return false;
}

}  // namespace

FirstArgument classifyFirstArgument(const std::vector<std::string>& args, std::string* subject) {
    std::size_t i = 0;
    for (bool valued = false; i < args.size() && isWindowOption(args[i], &valued);) i += valued ? 2 : 1;
    if (i >= args.size()) return FirstArgument::Window;
    const std::string& first = args[i];
    if (subject) *subject = first;
    if (i > 0) {  // after window options only a study file may follow
        struct stat info {};
        if (::stat(first.c_str(), &info) == 0) return S_ISDIR(info.st_mode) ? FirstArgument::NotAStudy : FirstArgument::Window;
        return FirstArgument::MissingStudy;
    }
    if (isVerb(first) || first.rfind("-", 0) == 0 || first == "help") return FirstArgument::Headless;
    struct stat info {};
    if (::stat(first.c_str(), &info) == 0) return S_ISDIR(info.st_mode) ? FirstArgument::NotAStudy : FirstArgument::Window;
    return looksLikePath(first) ? FirstArgument::MissingStudy : FirstArgument::UnknownVerb;
}

int reportFirstArgument(FirstArgument kind, const std::string& first, std::ostream& err) {
    switch (kind) {
        case FirstArgument::UnknownVerb: {
            std::string closest;
            std::size_t best = 3;  // suggest only within two edits
            for (const Verb& v : verbs())
                if (const std::size_t d = editDistance(first, v.name); d < best) best = d, closest = v.name;
            err << "saddlewise: unknown verb or file '" << shown(first) << "'"
                << (closest.empty() ? "" : " (did you mean '" + closest + "'?)") << "; verbs: " << verbList()
                << " (saddlewise --help describes them)\n";
            return 2;
        }
        case FirstArgument::MissingStudy:
            err << "saddlewise: cannot open study '" << shown(first)
                << "': no such file (a verb? they are: " << verbList() << ")\n";
            return 2;
        case FirstArgument::NotAStudy:
            err << "saddlewise: cannot open study '" << shown(first) << "': it is a folder, not a study file\n";
            return 2;
        case FirstArgument::Headless:
        case FirstArgument::Window: break;
    }
    return 0;
}

}  // namespace sw::cli
