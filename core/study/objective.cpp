// The objective a study describes, and the study's plain accessors.
#include "core/study/study.h"

#include "core/expr/expr.h"
#include "core/objective/fit_objective.h"
#include "core/objective/formula_objective.h"
#include "core/objective/table.h"

#include <filesystem>

namespace sw::study {

std::string resolveDataPath(const std::string& dataPath, const std::string& baseDirectory);  // checksum.cpp
void checkDataFile(const std::string& path, const std::string& shownPath);                 // checksum.cpp

std::vector<std::string> Study::variableNames() const {
    std::vector<std::string> names;
    names.reserve(variables.size());
    for (const Variable& v : variables) names.push_back(v.name);
    return names;
}

Vector Study::start() const {
    Vector x(static_cast<Eigen::Index>(variables.size()));
    for (std::size_t k = 0; k < variables.size(); ++k) x(static_cast<Eigen::Index>(k)) = variables[k].start;
    return x;
}

solve::StoppingRules Study::stoppingRules() const {
    solve::StoppingRules rules;
    rules.maxIterations = maxIterations;
    rules.maxEvaluations = maxEvaluations;
    rules.gradientTolerance = gradientTolerance;
    rules.relativeGradientTolerance = relativeGradientTolerance;
    rules.stepTolerance = stepTolerance;
    rules.functionTolerance = functionTolerance;
    return rules;
}

namespace {

std::shared_ptr<const Objective> makeFitObjective(const Study& study, const DataFit& fit,
                                                  const std::string& baseDirectory) {
    const std::string path = resolveDataPath(fit.dataPath, baseDirectory);
    std::error_code ec;
    const auto status = std::filesystem::status(path, ec);
    if (!std::filesystem::exists(status))
        throw StudyError("objective.data", "the data file '" + fit.dataPath + "' is missing (looked for " + path + ")");
    checkDataFile(path, fit.dataPath);
    const std::string now = fileChecksum(path);
    if (now != fit.checksum)
        throw StudyError("objective.checksum",
                         "the data file '" + fit.dataPath + "' has changed since the study was saved (its " + now +
                             "; the study recorded " + fit.checksum +
                             "). Check the data; to accept it, update the checksum (re-save the study)");
    TableReadOptions options;
    if (!parseSeparator(fit.separator, options.separator))
        throw StudyError("objective.separator", "must be one of: auto, comma, semicolon, tab");
    options.dropIncompleteRows = fit.dropIncompleteRows;
    std::shared_ptr<const Table> table;
    try {
        table = std::make_shared<const Table>(readTable(path, options));
    } catch (const TableError& e) {
        throw StudyError("objective.data", e.what());
    }
    FitDefinition definition;
    definition.model = fit.model;
    definition.response = fit.response;
    definition.parameters = study.variableNames();
    if (!parseLoss(fit.loss, definition.loss))
        throw StudyError("objective.loss", "must be one of: " + lossList() + " (got \"" + fit.loss + "\")");
    if (fit.weightsKind == "sigma")
        definition.sigma = fit.weights;
    else
        definition.weights = fit.weights;
    definition.scale = fit.lossScale;
    try {
        return std::make_shared<const FitObjective>(std::move(table), std::move(definition));
    } catch (const expr::FormulaError& e) {
        throw StudyError("objective.model", e.withCaret());
    } catch (const FitError& e) {
        throw StudyError("objective", e.what());
    }
}

}  // namespace

std::shared_ptr<const Objective> makeObjective(const Study& study, const std::string& baseDirectory) {
    if (study.fit) return makeFitObjective(study, *study.fit, baseDirectory);
    try {
        return std::make_shared<const FormulaObjective>(study.formula, study.variableNames());
    } catch (const expr::FormulaError& e) {
        throw StudyError("objective.formula", e.withCaret());
    }
}

}  // namespace sw::study
