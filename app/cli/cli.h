#pragma once
// Headless command line. main.cpp hands argv to runCommandLine() when the first argument
// is a verb or --help; no QApplication is created, so no display is needed.
//
// Exit codes: 0 success, 1 failure (the work ran and failed), 2 bad usage or bad input.
// Errors go to stderr as one or a few lines naming the place (formula position with a
// caret, CSV line and column, study-file field).

#include <iosfwd>
#include <map>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

namespace sw::cli {

// Thrown for bad usage or bad input; becomes exit code 2.
struct UsageError : std::runtime_error {
    using std::runtime_error::runtime_error;
};
// Thrown when the work itself failed; becomes exit code 1.
struct Failure : std::runtime_error {
    using std::runtime_error::runtime_error;
};

struct Verb {
    std::string name;
    std::string summary;  // one line for `saddlewise --help`
    std::string help;     // full text for `saddlewise VERB --help`
    int (*run)(const std::vector<std::string>& args, std::ostream& out, std::ostream& err);
};

const std::vector<Verb>& verbs();
bool isVerb(const std::string& word);
// Runs argv[1..] (argv[0] excluded). Catches UsageError/Failure/FormulaError and prints them.
int runCommandLine(const std::vector<std::string>& args, std::ostream& out, std::ostream& err);

// What argv[1..] asks for, decided before any window exists (first_argument.cpp): a verb or
// option (Headless), the window (no argument, or a study file that exists), or a mistake.
enum class FirstArgument { Headless, Window, UnknownVerb, MissingStudy, NotAStudy };
// Qt's window options (-platform NAME, -style NAME, -reverse, ...) may come first; `subject`
// (optional) receives the argument the answer is about.
FirstArgument classifyFirstArgument(const std::vector<std::string>& args, std::string* subject = nullptr);
// For the mistakes: one line on err naming the word and the verbs; returns 2 (0 otherwise).
int reportFirstArgument(FirstArgument kind, const std::string& first, std::ostream& err);

// ---- argument helpers shared by the verbs (args.cpp) ----

// Splits args into options (--name value / --name=value / --flag) and positionals.
// `flags` lists options that take no value; a repeated option keeps every value.
struct ParsedArgs {
    std::vector<std::string> positional;
    std::map<std::string, std::vector<std::string>> options;  // without the leading --
    bool has(const std::string& name) const { return options.count(name) != 0; }
    // The single value of an option (UsageError when repeated); fallback when absent.
    std::string get(const std::string& name, const std::string& fallback = "") const;
    const std::vector<std::string>& all(const std::string& name) const;
};
ParsedArgs parseArgs(const std::vector<std::string>& args, const std::vector<std::string>& flags,
                     const std::vector<std::string>& valued);

// "x=1,y=2" -> ordered (name, value) pairs; errors name the bad item.
std::vector<std::pair<std::string, double>> parseAssignments(const std::string& text, const std::string& optionName);
// "x=-5:5,y=-1:3" -> ordered (name, lo, hi).
struct Range {
    std::string name;
    double lo, hi;
};
std::vector<Range> parseRanges(const std::string& text, const std::string& optionName);
// Strict, locale-free number parsing; UsageError naming the option on failure.
double parseNumber(const std::string& text, const std::string& what);
// Text from the command line for a message: at most 40 characters; control bytes and bytes
// that are not UTF-8 shown as \xNN.
std::string shownText(const std::string& text);
long parseInteger(const std::string& text, const std::string& what, long lo, long hi);

// Numbers for people and for JSON: shortest text that round-trips (C locale), "nan"/"inf"
// in tables; JSON writers turn non-finite numbers into null.
std::string formatNumber(double value, int significant = 17);
// Words wrapped onto lines of at most `width` characters, each line ended with '\n'.
std::string wrapText(const std::string& text, std::size_t width);

// Each verb lives in its own file under app/cli/ and describes itself (name, summary,
// help, entry point); verbs.cpp lists them in the order `--help` shows.
Verb deriveVerb();    // verb_derive.cpp
Verb sampleVerb();    // verb_sample.cpp
Verb minimizeVerb();  // verb_minimize.cpp
Verb methodsVerb();   // verb_methods.cpp
Verb fitVerb();       // verb_fit.cpp
Verb runVerb();       // verb_run.cpp  (runs a study file)
Verb criticalVerb();  // verb_critical.cpp
Verb basinsVerb();    // verb_basins.cpp
Verb reportVerb();    // verb_report.cpp  (the review report of a study)

}  // namespace sw::cli
