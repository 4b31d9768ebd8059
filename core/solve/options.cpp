// Checking and reading method options given as text.
#include "core/solve/options.h"

#include "core/expr/number_text.h"

#include <charconv>
#include <cmath>
#include <stdexcept>

namespace sw::solve {

namespace {

std::string numberText(double v) {
    if (std::isnan(v)) return "nan";
    if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
    char buffer[32];
    auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, v);
    return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
}

std::string trimmed(const std::string& s) {
    auto b = s.find_first_not_of(" \t");
    auto e = s.find_last_not_of(" \t");
    return b == std::string::npos ? std::string() : s.substr(b, e - b + 1);
}

// Locale-free strict parse by the one number rule (core/expr/number_text.h).
NumberStatus readReal(const std::string& text, double& value) { return readDecimal(trimmed(text), value); }
bool parseReal(const std::string& text, double& value) { return readReal(text, value) == NumberStatus::Ok; }

// An option's text for a message: at most 40 bytes, control bytes as '?'.
std::string shownValue(const std::string& text) {
    std::string shown = text.substr(0, 40);
    for (char& c : shown)
        if (static_cast<unsigned char>(c) < 0x20 || c == 0x7F) c = '?';
    return text.size() > 40 ? shown + "..." : shown;
}

bool parseFlag(const std::string& text, bool& value) {
    std::string t = trimmed(text);
    if (t == "true" || t == "1" || t == "yes" || t == "on") return value = true, true;
    if (t == "false" || t == "0" || t == "no" || t == "off") return value = false, true;
    return false;
}

bool inRange(const OptionSpec& s, double v) {
    if (s.lowerOpen ? !(v > s.lower) : !(v >= s.lower)) return false;
    if (s.upperOpen ? !(v < s.upper) : !(v <= s.upper)) return false;
    return true;
}

constexpr double kNoBound = 1e299;

}  // namespace

std::string OptionSpec::defaultText() const {
    switch (type) {
        case Type::Boolean: return defaultValue != 0 ? "true" : "false";
        case Type::Choice: {
            auto i = static_cast<std::size_t>(defaultValue);
            return i < choices.size() ? choices[i] : std::string("?");
        }
        case Type::Integer: return std::to_string(static_cast<long long>(defaultValue));
        case Type::Real: return numberText(defaultValue);
    }
    return "?";
}

std::string OptionSpec::rangeText() const {
    if (type == Type::Boolean) return "true or false";
    if (type == Type::Choice) {
        std::string text = "one of: ";
        for (std::size_t i = 0; i < choices.size(); ++i) text += (i ? ", " : "") + choices[i];
        return text;
    }
    const bool hasLower = lower > -kNoBound, hasUpper = upper < kNoBound;
    const std::string kind = type == Type::Integer ? "a whole number " : "";
    if (hasLower && hasUpper)
        return kind + "in " + (lowerOpen ? "(" : "[") + numberText(lower) + ", " + numberText(upper) +
               (upperOpen ? ")" : "]");
    if (hasLower) return kind + (lowerOpen ? "> " : ">= ") + numberText(lower);
    if (hasUpper) return kind + (upperOpen ? "< " : "<= ") + numberText(upper);
    return type == Type::Integer ? "a whole number" : "any finite number";
}

const OptionSpec* findOption(const std::vector<OptionSpec>& specs, const std::string& name) {
    for (const OptionSpec& s : specs)
        if (s.name == name) return &s;
    return nullptr;
}

const OptionSpec* findOptionOrFormer(const std::vector<OptionSpec>& specs, const std::string& name) {
    if (const OptionSpec* spec = findOption(specs, name)) return spec;
    for (const OptionSpec& s : specs)
        for (const std::string& former : s.formerNames)
            if (former == name) return &s;
    return nullptr;
}

std::string renameFormerOptions(const std::vector<OptionSpec>& specs, OptionValues& values) {
    for (const OptionSpec& spec : specs)
        for (const std::string& former : spec.formerNames) {
            const auto it = values.find(former);
            if (it == values.end()) continue;
            if (values.count(spec.name))
                return "option " + spec.name + " is given twice, also under its former name " + former +
                       "; keep one";
            std::string text = std::move(it->second);
            values.erase(it);
            values.emplace(spec.name, std::move(text));
        }
    return "";
}

std::string checkOptions(const std::vector<OptionSpec>& specs, const OptionValues& values) {
    for (const auto& [name, text] : values) {
        const OptionSpec* spec = findOptionOrFormer(specs, name);
        if (!spec) {
            if (specs.empty()) return "unknown option '" + name + "'; this method takes no options";
            std::string known;
            for (std::size_t i = 0; i < specs.size(); ++i) known += (i ? ", " : "") + specs[i].name;
            return "unknown option '" + name + "'; this method's options: " + known;
        }
        const std::string got = " (got '" + shownValue(text) + "')";
        switch (spec->type) {
            case OptionSpec::Type::Boolean: {
                bool flag = false;
                if (!parseFlag(text, flag)) return "option " + name + ": must be true or false" + got;
                break;
            }
            case OptionSpec::Type::Choice: {
                bool found = false;
                for (const std::string& c : spec->choices) found = found || c == trimmed(text);
                if (!found) return "option " + name + ": must be " + spec->rangeText() + got;
                break;
            }
            case OptionSpec::Type::Integer:
            case OptionSpec::Type::Real: {
                double v = 0;
                const NumberStatus status = readReal(text, v);
                if (status == NumberStatus::TooLarge || status == NumberStatus::TooSmall)
                    return "option " + name + ": " + outOfRangeText(trimmed(text), status) + "; it must be " +
                           spec->rangeText();
                if (status != NumberStatus::Ok)
                    return "option " + name + ": must be a finite number, " + spec->rangeText() + got;
                if (spec->type == OptionSpec::Type::Integer && v != std::floor(v))
                    return "option " + name + ": must be a whole number, " + spec->rangeText() + got;
                if (!inRange(*spec, v)) return "option " + name + ": must be " + spec->rangeText() + got;
                break;
            }
        }
    }
    return "";
}

double optionNumber(const std::vector<OptionSpec>& specs, const OptionValues& values, const std::string& name) {
    const OptionSpec* spec = findOption(specs, name);
    if (!spec) throw std::logic_error("optionNumber: no option named " + name);
    if (values.empty()) return spec->defaultValue;  // the common case: a method at its defaults
    auto it = values.find(name);
    if (it == values.end()) return spec->defaultValue;
    double v = spec->defaultValue;
    if (spec->type == OptionSpec::Type::Boolean) {
        bool flag = false;
        return parseFlag(it->second, flag) ? (flag ? 1.0 : 0.0) : v;
    }
    if (spec->type == OptionSpec::Type::Choice) {
        for (std::size_t i = 0; i < spec->choices.size(); ++i)
            if (spec->choices[i] == trimmed(it->second)) return static_cast<double>(i);
        return v;
    }
    return parseReal(it->second, v) ? v : spec->defaultValue;
}

std::string optionChoice(const std::vector<OptionSpec>& specs, const OptionValues& values, const std::string& name) {
    const OptionSpec* spec = findOption(specs, name);
    if (!spec) throw std::logic_error("optionChoice: no option named " + name);
    auto i = static_cast<std::size_t>(optionNumber(specs, values, name));
    return i < spec->choices.size() ? spec->choices[i] : std::string();
}

bool optionFlag(const std::vector<OptionSpec>& specs, const OptionValues& values, const std::string& name) {
    return optionNumber(specs, values, name) != 0;
}

std::string StoppingRules::check() const {
    if (maxIterations < 0 || maxIterations > kMaxIterationLimit)
        return "max_iterations must be from 0 to " + std::to_string(kMaxIterationLimit) + " (got " +
               std::to_string(maxIterations) + ")";
    if (traceMemoryLimit < kMinTraceMemory)
        return "the trace memory limit must be at least " + std::to_string(kMinTraceMemory) + " bytes (got " +
               std::to_string(traceMemoryLimit) + ")";
    if (maxEvaluations < 1) return "max_evaluations must be >= 1 (got " + std::to_string(maxEvaluations) + ")";
    if (!(gradientTolerance >= 0) || !std::isfinite(gradientTolerance))
        return "gradient_norm_below must be a finite number >= 0 (got " + numberText(gradientTolerance) + ")";
    if (!(relativeGradientTolerance >= 0) || !(relativeGradientTolerance < 1))
        return "gradient_ratio_below must be in [0, 1) (got " + numberText(relativeGradientTolerance) + ")";
    if (!(stepTolerance >= 0) || !std::isfinite(stepTolerance))
        return "relative_step_below must be a finite number >= 0 (got " + numberText(stepTolerance) + ")";
    if (!(functionTolerance >= 0) || !std::isfinite(functionTolerance))
        return "relative_change_below must be a finite number >= 0 (got " + numberText(functionTolerance) + ")";
    if (spectrumMaxDimension < 0)
        return "spectrum_max_dimension must be >= 0 (got " + std::to_string(spectrumMaxDimension) + ")";
    return "";
}

}  // namespace sw::solve
