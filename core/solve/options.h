#pragma once
// Method options as the command line, the window and study files see them: named values
// checked against a spec. Each method turns them into its own typed struct.

#include <cstddef>
#include <map>
#include <limits>
#include <string>
#include <vector>

namespace sw::solve {

struct OptionSpec {
    enum class Type { Real, Integer, Boolean, Choice };
    std::string name;         // snake_case, e.g. "initial_radius"
    std::string description;  // one line
    Type type = Type::Real;
    double defaultValue = 0;  // Boolean: 0/1; Choice: index into choices
    double lower = -std::numeric_limits<double>::infinity(), upper = std::numeric_limits<double>::infinity();  // none
    bool lowerOpen = false, upperOpen = false;  // true: the bound itself is not allowed
    std::vector<std::string> choices;
    // Names this option had before (docs/names.md): read from the command line and study
    // files, never written. See renameFormerOptions.
    std::vector<std::string> formerNames;

    std::string defaultText() const;
    std::string rangeText() const;  // e.g. "> 0", "in (0, 1)", "one of: fixed, armijo, wolfe"
};

// Values by name as text ("0.5", "wolfe", "true"); missing names take their defaults.
using OptionValues = std::map<std::string, std::string>;

// Checks every value against the specs (a former name counts as its option). Returns "" when
// fine, else one sentence naming the option and the valid range, e.g.
// "option initial_radius: must be > 0 (got -1)".
std::string checkOptions(const std::vector<OptionSpec>& specs, const OptionValues& values);
// Moves values given under a former name to the option's current name. Returns "" or a
// sentence when one option is given under both names.
std::string renameFormerOptions(const std::vector<OptionSpec>& specs, OptionValues& values);
// Resolved values with defaults filled in (only call after checkOptions returned "").
double optionNumber(const std::vector<OptionSpec>& specs, const OptionValues& values, const std::string& name);
std::string optionChoice(const std::vector<OptionSpec>& specs, const OptionValues& values, const std::string& name);
bool optionFlag(const std::vector<OptionSpec>& specs, const OptionValues& values, const std::string& name);
// The spec of that name, or nullptr.
const OptionSpec* findOption(const std::vector<OptionSpec>& specs, const std::string& name);
// The spec of that name or former name, or nullptr.
const OptionSpec* findOptionOrFormer(const std::vector<OptionSpec>& specs, const std::string& name);

// When a run stops; shared by every method. The names in quotes are the keys in a study's
// "stopping" object and, in kebab-case, the termination ids of the tests they set (the
// C++ names are older; docs/names.md).
struct StoppingRules {
    int maxIterations = 200;             // "max_iterations": iteration limit
    long maxEvaluations = 100000;        // "max_evaluations": value + gradient + Hessian evaluations
    double gradientTolerance = 1e-8;     // "gradient_norm_below": stop when |g| <= this
    double relativeGradientTolerance = 0;  // "gradient_ratio_below": stop when |g| <= this * |g0| (0 = off)
    double stepTolerance = 1e-14;        // "relative_step_below": stop when |x_{k+1}-x_k| <= this * (1 + |x_k|)
    double functionTolerance = 0;        // "relative_change_below": stop when |f_{k+1}-f_k| <= this * (1 + |f_k|) (0 = off)
    // Diagnostics, not a stopping rule: records carry the Hessian's eigenvalues and condition
    // number when n <= this (computed without counting toward the method's evaluations;
    // 0 = never, which keeps benchmarks honest about the method's own cost).
    int spectrumMaxDimension = 50;
    // Memory for the per-iteration records of one run, in bytes (not a stopping rule). Past it
    // the trace is thinned (Run::droppedRecords), so a run of any length stays within about
    // this much. At least kMinTraceMemory; callers that print no trace may pass that minimum.
    std::size_t traceMemoryLimit = kDefaultTraceMemory;
    static constexpr std::size_t kDefaultTraceMemory = std::size_t{16} << 20;  // 16 MiB
    static constexpr std::size_t kMinTraceMemory = std::size_t{256} << 10;     // 256 KiB
    // Upper bound of the iteration limit (the records' iteration counter is an int; memory is
    // bounded by traceMemoryLimit whatever the limit).
    static constexpr int kMaxIterationLimit = 100000000;
    std::string check() const;           // "" or a sentence
};

}  // namespace sw::solve
