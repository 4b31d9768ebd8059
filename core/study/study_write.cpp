// Writing a study: a Study -> JSON text in a stable key order (2-space indent), and an
// atomic save (a temporary file in the same folder, flushed, then renamed over the target,
// so a crash never leaves a half-written study).
#include "core/study/study.h"

#include "core/solve/solver.h"

#include <nlohmann/json.hpp>

#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <sys/stat.h>
#include <unistd.h>

namespace sw::study {

using Json = nlohmann::ordered_json;

namespace {

// Options are typed by their spec (numbers, true/false, text) so the file reads naturally.
Json optionValue(const std::string& method, const std::string& name, const std::string& text) {
    const solve::MethodInfo* info = solve::findMethod(method);
    const solve::OptionSpec* spec = nullptr;
    if (info)
        for (const solve::OptionSpec& s : info->options)
            if (s.name == name) spec = &s;
    if (!spec) return text;
    using Type = solve::OptionSpec::Type;
    switch (spec->type) {
        case Type::Boolean:
            return text == "true" || text == "1" || text == "yes" || text == "on";
        case Type::Choice:
            return text;
        case Type::Integer: {
            long long v = 0;
            auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
            if (ec == std::errc() && end == text.data() + text.size()) return v;
            return text;
        }
        case Type::Real: {
            double v = 0;
            auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
            if (ec == std::errc() && end == text.data() + text.size() && std::isfinite(v)) return v;
            return text;
        }
    }
    return text;
}

}  // namespace

std::string toJson(const Study& study) {
    Json document;
    document["format"] = kFormatName;
    document["version"] = kFormatVersion;
    document["title"] = study.title;
    document["notes"] = study.notes;

    Json objective = Json::object();
    if (study.fit) {
        const DataFit& fit = *study.fit;
        objective["data"] = fit.dataPath;
        objective["checksum"] = fit.checksum;
        objective["model"] = fit.model;
        objective["response"] = fit.response;
        objective["loss"] = fit.loss;
        if (!fit.weights.empty()) objective[fit.weightsKind == "sigma" ? "sigma" : "weights"] = fit.weights;
        objective["scale"] = fit.lossScale;
        objective["separator"] = fit.separator;
        objective["drop_incomplete_rows"] = fit.dropIncompleteRows;
    } else {
        objective["formula"] = study.formula;
    }
    document["objective"] = objective;

    Json variables = Json::array();
    for (const Variable& v : study.variables)
        variables.push_back({{"name", v.name}, {"start", v.start}, {"plot_from", v.lower}, {"plot_to", v.upper}});
    document["variables"] = variables;

    Json methods = Json::array();
    for (const MethodEntry& m : study.methods) {
        Json options = Json::object();
        for (const auto& [name, text] : m.options) options[name] = optionValue(m.method, name, text);
        methods.push_back({{"label", m.label},
                           {"method", m.method},
                           {"options", options},
                           {"colour", m.colour},
                           {"marker", m.marker},
                           {"enabled", m.enabled}});
    }
    document["methods"] = methods;

    document["stopping"] = {{"max_iterations", study.maxIterations},
                            {"max_evaluations", study.maxEvaluations},
                            {"gradient_norm_below", study.gradientTolerance},
                            {"gradient_ratio_below", study.relativeGradientTolerance},
                            {"relative_step_below", study.stepTolerance},
                            {"relative_change_below", study.functionTolerance}};

    auto variableName = [&](int index) {
        return index >= 0 && index < static_cast<int>(study.variables.size()) ? study.variables[index].name
                                                                              : std::string();
    };
    document["view"] = {{"plot_x", variableName(study.view.plotX)},
                        {"plot_y", variableName(study.view.plotY)},
                        {"log_colour", study.view.logColour},
                        {"contour_count", study.view.contourCount},
                        {"grid_cells", study.view.gridCells}};
    // UTF-8 is kept as it is; invalid bytes are replaced rather than aborting the save.
    return document.dump(2, ' ', false, nlohmann::json::error_handler_t::replace) + "\n";
}

void saveFile(const Study& study, const std::string& path) {
    namespace fs = std::filesystem;
    const std::string text = toJson(study);
    const fs::path target(path);
    const fs::path folder = target.parent_path().empty() ? fs::path(".") : target.parent_path();
    std::string temporary = (folder / ("." + target.filename().string() + ".saving-XXXXXX")).string();
    const int descriptor = ::mkstemp(temporary.data());
    if (descriptor < 0)
        throw StudyError("file",
                         "cannot create a temporary file in '" + folder.string() + "': " + std::strerror(errno));
    auto fail = [&](const std::string& what) {
        const std::string reason = std::strerror(errno);
        ::close(descriptor);
        std::remove(temporary.c_str());
        throw StudyError("file", what + ": " + reason);
    };
    std::size_t written = 0;
    while (written < text.size()) {
        const ssize_t n = ::write(descriptor, text.data() + written, text.size() - written);
        if (n < 0) {
            if (errno == EINTR) continue;
            fail("cannot write '" + temporary + "'");
        }
        written += static_cast<std::size_t>(n);
    }
    if (::fsync(descriptor) != 0) fail("cannot flush '" + temporary + "' to disk");
    // mkstemp creates the file readable by its owner only: keep the permissions of the file
    // being replaced, or give a new study an ordinary document's.
    struct stat existing {};
    ::fchmod(descriptor, ::stat(path.c_str(), &existing) == 0 ? (existing.st_mode & 07777) : 0644);
    if (::close(descriptor) != 0) {
        const std::string reason = std::strerror(errno);
        std::remove(temporary.c_str());
        throw StudyError("file", "cannot close '" + temporary + "': " + reason);
    }
    if (std::rename(temporary.c_str(), path.c_str()) != 0) {
        const std::string reason = std::strerror(errno);
        std::remove(temporary.c_str());
        throw StudyError("file", "cannot replace '" + path + "': " + reason);
    }
}

}  // namespace sw::study
