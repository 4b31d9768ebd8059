// Fuzz harness: the command line's argument handling (app/cli). The input is a list of
// arguments separated by newlines. Every argument goes through the shared parsers
// (parseArgs with a verb's option lists, parseAssignments, parseRanges, parseNumber,
// parseInteger) and the first-argument dispatch; then the whole list runs through
// runCommandLine when it names a verb that reads no files and does bounded work (derive,
// sample up to a 16 x 16 grid, minimize up to 50 iterations, methods, help, --version).
// Beyond "no crash": the parsers may only throw UsageError; runCommandLine must exit with
// 0, 1 or 2 and must never print "internal error" (bad input is exit 2 with a message).
#include "app/cli/cli.h"
#include "tests/fuzz/fuzz_check.h"

#include <cstdint>
#include <sstream>
#include <string>
#include <vector>

using namespace sw::cli;
using sw::fuzz::finding;
using sw::fuzz::printable;

namespace {

std::vector<std::string> splitArguments(const std::string& text) {
    std::vector<std::string> args;
    std::string current;
    for (char c : text) {
        if (c == '\n') {
            args.push_back(current);
            current.clear();
        } else {
            current += c;
        }
    }
    if (!current.empty()) args.push_back(current);
    return args;
}

template <class F>
void onlyUsageErrors(const char* what, const std::string& input, F&& f) {
    try {
        f();
    } catch (const UsageError&) {
    } catch (const std::exception& e) {
        finding(std::string(what) + " threw " + e.what() + " (not a UsageError) for " + printable(input));
    }
}

// A bound on the work the input asks for, so each run stays short.
bool bounded(const std::vector<std::string>& args) {
    for (std::size_t i = 0; i < args.size(); ++i) {
        const std::string& a = args[i];
        auto valueOf = [&](const std::string& option, std::string& value) {
            if (a == "--" + option && i + 1 < args.size()) return value = args[i + 1], true;
            if (a.rfind("--" + option + "=", 0) == 0) return value = a.substr(option.size() + 3), true;
            return false;
        };
        for (const auto& [option, limit] : {std::pair<const char*, long>{"grid", 16}, {"max-iterations", 50}, {"threads", 2}}) {
            std::string value;
            if (!valueOf(option, value)) continue;
            try {
                if (parseInteger(value, "bound", -1000000000L, 1000000000L) > limit) return false;
            } catch (const UsageError&) {
            }
        }
    }
    return true;
}

}  // namespace

extern "C" int LLVMFuzzerInitialize(int*, char***) { return 0; }

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    const std::vector<std::string> args = splitArguments(text);
    if (args.size() > 64) return 0;
    for (const std::string& a : args) {
        onlyUsageErrors("parseAssignments", a, [&] { parseAssignments(a, "at"); });
        onlyUsageErrors("parseRanges", a, [&] { parseRanges(a, "box"); });
        onlyUsageErrors("parseNumber", a, [&] { parseNumber(a, "--number"); });
        onlyUsageErrors("parseInteger", a, [&] { parseInteger(a, "--integer", -5, 4000); });
    }
    onlyUsageErrors("parseArgs", text, [&] {
        const ParsedArgs parsed = parseArgs(args, {"json", "summary"}, {"at", "box", "grid", "method", "option"});
        for (const auto& [name, values] : parsed.options) {
            if (values.empty()) finding("option --" + name + " without a value entry for " + printable(text));
            if (values.size() == 1) parsed.get(name);
        }
    });
    std::ostringstream out, err;
    const FirstArgument kind = classifyFirstArgument(args);
    if (kind != FirstArgument::Headless) {
        if (kind != FirstArgument::Window) {
            if (reportFirstArgument(kind, args[0], err) != 2 || err.str().empty() ||
                err.str().find('\n') != err.str().size() - 1)
                finding("a bad first argument is not reported in one line with exit 2: " + printable(err.str()));
        }
        return 0;
    }
    const std::string& verb = args[0];
    const bool runnable = verb == "derive" || verb == "sample" || verb == "minimize" || verb == "methods" ||
                          verb == "help" || verb == "--help" || verb == "-h" || verb == "--version";
    if (!runnable || !bounded(args)) return 0;
    const int code = runCommandLine(args, out, err);
    if (code < 0 || code > 2) finding("exit code " + std::to_string(code) + " for " + printable(text));
    // runCommandLine's own wording for an unexpected exception (not text echoed from the input).
    if (err.str().rfind("saddlewise " + verb + ": internal error: ", 0) == 0)
        finding("bad input reached the user as an internal error: " + printable(err.str()) + " for " + printable(text));
    if (code == 2 && err.str().empty()) finding("exit 2 without a message for " + printable(text));
    return 0;
}
