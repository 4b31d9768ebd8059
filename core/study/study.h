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
    double lower = -1, upper = 1;  // plot range
};

struct MethodEntry {
    std::string label;             // shown in legends; unique within the study
    std::string method;            // registry id
    solve::OptionValues options;
    std::string colour;            // "#rrggbb"
    std::string marker;            // "circle", "square", "triangle", "diamond", "cross", "plus", "star"
    bool enabled = true;
};

struct DataFit {
    std::string dataPath;          // relative to the study file
    std::string checksum;          // "sha256:..." of the data file when saved
    std::string model;             // formula in columns and parameters
    std::string response;          // column name
    std::string loss = "least-squares";
    std::string weights;           // column name, optional
    std::string weightsKind = "weights";  // "weights" or "sigma"
    double lossScale = 1.0;        // Huber/Cauchy scale
};

struct ViewSettings {
    int plotX = 0, plotY = 1;      // indices into variables
    bool logColour = false;
    int contourCount = 14;
    int gridCells = 200;
};

struct Study {
    std::string title;
    std::string notes;
    std::string formula;                 // formula mode; empty in data-fit mode
    std::optional<DataFit> fit;          // data-fit mode
    std::vector<Variable> variables;     // formula variables, or fit parameters
    std::vector<MethodEntry> methods;
    int maxIterations = 200;
    double gradientTolerance = 1e-8;
    ViewSettings view;
};

// Parses and validates everything; throws StudyError naming the first problem's place.
// baseDirectory resolves the data file; a missing or changed data file is an error.
Study fromJson(const std::string& text, const std::string& baseDirectory);
std::string toJson(const Study& study);  // stable key order, 2-space indent
Study loadFile(const std::string& path);  // throws StudyError (place "file" for I/O)
// Atomic for the command line (temp file + rename); the window uses QSaveFile with toJson.
void saveFile(const Study& study, const std::string& path);

// The objective a study describes (formula or fit). Throws StudyError / FormulaError.
std::shared_ptr<const Objective> makeObjective(const Study& study, const std::string& baseDirectory);

}  // namespace sw::study
