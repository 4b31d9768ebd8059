#pragma once
// A study: the document a user saves. JSON with a format name and a version, read and
// written here (Qt-free) so the command line, the window and the tests share one code path.
// Draft interface: implementers may add to it; keep what is here.

#include "core/objective/objective.h"
#include "core/solve/options.h"

#include <memory>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

namespace sw::study {

inline constexpr const char* kFormatName = "saddlewise-study";
inline constexpr int kFormatVersion = 1;

// Stated limits (docs/robustness.md); a study over one is refused with the field, the value
// and the limit. The file size limit is kMaxStudyBytes (core/objective/text_file.h, 16 MiB);
// a data file must be a regular file of at most kMaxTableBytes (1 GiB).
inline constexpr std::size_t kMaxStudyNesting = 32;    // levels of [ and { (a study needs 4)
inline constexpr std::size_t kMaxMethodEntries = 1000;  // entries in "methods"
inline constexpr std::size_t kMaxVariables = 1000;      // entries in "variables"

// A problem in a study, with its place in the document, e.g.
// "methods[2].options.initial_radius: must be > 0 (got -1)".
class StudyError : public std::runtime_error {
public:
    StudyError(std::string place, std::string problem);
    const std::string& place() const { return place_; }
    const std::string& problem() const { return problem_; }

private:
    std::string place_, problem_;
};

struct Variable {
    std::string name;
    double start = 0;
    double lower = -1, upper = 1;  // plot range ("plot_from", "plot_to"), not a bound on the variable
    bool operator==(const Variable&) const = default;
};

struct MethodEntry {
    std::string label;   // shown in legends; unique within the study
    std::string method;  // registry id
    solve::OptionValues options;
    std::string colour;  // "#rrggbb"
    std::string marker;  // "circle", "square", "triangle", "diamond", "cross", "plus", "star"
    bool enabled = true;
    bool operator==(const MethodEntry&) const = default;
};
// Marker names a lineup entry may use, in the order above.
const std::vector<std::string>& markerNames();

struct DataFit {
    std::string dataPath;  // relative to the study file
    std::string checksum;  // "sha256:..." of the data file when saved
    std::string model;     // formula in columns and parameters
    std::string response;  // column name
    std::string loss = "least-squares";
    std::string weights;                  // column name, optional
    std::string weightsKind = "weights";  // "weights" or "sigma"
    double lossScale = 1.0;               // Huber/Cauchy scale
    std::string separator = "auto";       // "auto", "comma", "semicolon", "tab"
    bool dropIncompleteRows = false;      // skip rows with empty cells (the count is reported)
    bool operator==(const DataFit&) const = default;
};

struct ViewSettings {
    int plotX = 0, plotY = 1;  // indices into variables
    bool logColour = false;
    int contourCount = 14;
    int gridCells = 200;
    bool operator==(const ViewSettings&) const = default;
};

struct Study {
    std::string title;
    std::string notes;
    std::string formula;              // formula mode; empty in data-fit mode
    std::optional<DataFit> fit;       // data-fit mode
    std::vector<Variable> variables;  // formula variables, or fit parameters
    std::vector<MethodEntry> methods;
    int maxIterations = 200;
    double gradientTolerance = 1e-8;
    ViewSettings view;

    // Added: the rest of the stopping rules (defaults as solve::StoppingRules).
    long maxEvaluations = 100000;
    double relativeGradientTolerance = 0;
    double stepTolerance = 1e-14;
    double functionTolerance = 0;

    bool operator==(const Study&) const = default;
    bool isFit() const { return fit.has_value(); }
    std::vector<std::string> variableNames() const;
    Vector start() const;                        // every variable's start, in order
    solve::StoppingRules stoppingRules() const;  // maxIterations, tolerances, ...
};

// Parses and validates everything; throws StudyError naming the first problem's place.
// baseDirectory resolves the data file; a missing or changed data file is an error.
// The document (format in study.cpp's header comment):
//   { "format": "saddlewise-study", "version": 1, "title": "...", "notes": "...",
//     "objective": { "formula": "..." }
//              or { "data": "table.csv", "checksum": "sha256:...", "model": "...", "response": "y",
//                   "loss": "least-squares", "weights" | "sigma": "column", "scale": 1,
//                   "separator": "auto", "drop_incomplete_rows": false },
//     "variables": [ { "name": "x", "start": -1, "plot_from": -2, "plot_to": 2 }, ... ],
//     "methods": [ { "label": "...", "method": "bfgs", "options": { "name": value },
//                    "colour": "#rrggbb", "marker": "circle", "enabled": true }, ... ],
//     "stopping": { "max_iterations": 200, "max_evaluations": 100000, "gradient_norm_below": 1e-8,
//                   "gradient_ratio_below": 0, "relative_step_below": 1e-14, "relative_change_below": 0 },
// Former key names are read and saved under the current ones (docs/names.md): variables'
// "lower"/"upper", the stopping tolerances' "*_tolerance", the loss ids "bernoulli-logit" and
// "poisson-log", and method options' former names.
//     "view": { "plot_x": "x", "plot_y": "y", "log_colour": false, "contour_count": 14, "grid_cells": 200 } }
// verifyData = false (added) skips reading the data file of a data-fit study (it may be
// missing or changed), so a window can open the study and let the user locate or accept the
// file; makeObjective still refuses a missing or changed file. Everything else is checked
// except what needs the data (the model's names against the table's columns).
Study fromJson(const std::string& text, const std::string& baseDirectory, bool verifyData = true);
std::string toJson(const Study& study);                           // stable key order, 2-space indent
Study loadFile(const std::string& path, bool verifyData = true);  // throws StudyError (place "file" for I/O)
// Atomic for the command line (temp file + rename); the window uses QSaveFile with toJson.
void saveFile(const Study& study, const std::string& path);

// The objective a study describes (formula or fit). Throws StudyError / FormulaError.
std::shared_ptr<const Objective> makeObjective(const Study& study, const std::string& baseDirectory);

// ---- Added helpers ----

// The folder a study file lives in (for fromJson's baseDirectory and makeObjective).
std::string directoryOf(const std::string& studyPath);
// "sha256:<64 hex digits>" of a file's bytes; throws StudyError (place "file") when unreadable.
std::string fileChecksum(const std::string& path);
// Re-reads the data file of a data-fit study and stores its current checksum (after the
// user picked a new file or accepted a changed one). No-op in formula mode.
void refreshChecksum(Study& study, const std::string& baseDirectory);
// Keeps a data-fit study's data path pointing at the same file when the study moves from
// one folder to another (Save As elsewhere). No-op in formula mode.
void rebaseDataPath(Study& study, const std::string& fromDirectory, const std::string& toDirectory);

}  // namespace sw::study
