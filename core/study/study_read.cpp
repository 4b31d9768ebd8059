// Reading a study: JSON text -> a validated Study, or a StudyError naming the first problem
// with its place in the document ("methods[2].options.initial_radius: must be > 0 (got -1)").
//
// Every key is checked against the keys its object may have (a typo is an error naming the
// key, not a silently ignored setting); every value against its type and range; method ids
// and their options against the solver registry; the formula or the fit against the
// expression engine and the data file (which must exist and match its recorded checksum).
#include "core/study/study.h"

#include "core/expr/expr.h"
#include "core/expr/number_text.h"
#include "core/objective/fit_objective.h"
#include "core/objective/formula_objective.h"
#include "core/objective/table.h"
#include "core/objective/text_file.h"
#include "core/solve/method.h"
#include "core/solve/solver.h"
#include "core/survey/survey.h"  // BasinSettings::kMaxGrid (a header constant)

#include <nlohmann/json.hpp>

#include <algorithm>
#include <charconv>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <set>
#include <unordered_set>
#include <sstream>

namespace sw::study {

using Json = nlohmann::ordered_json;

StudyError::StudyError(std::string place, std::string problem)
    : std::runtime_error(place.empty() ? problem : place + ": " + problem),
      place_(std::move(place)),
      problem_(std::move(problem)) {}

const std::vector<std::string>& markerNames() {
    static const std::vector<std::string> names = {"circle", "square", "triangle", "diamond", "cross", "plus", "star"};
    return names;
}

namespace {

// How the document on this thread is being read (see fromJsonAsTyped in study.h): strictly, or
// as typed, where content problems are passed over and number fields may hold the text typed.
// Set for the length of one read by ReadingMode; the reading helpers below consult it.
struct Reading {
    bool asTyped = false;
    Study* study = nullptr;  // receives the text of number fields that do not read as numbers
};
thread_local Reading* currentReading = nullptr;

class ReadingMode {
public:
    explicit ReadingMode(Reading& reading) : previous_(currentReading) { currentReading = &reading; }
    ~ReadingMode() { currentReading = previous_; }
    ReadingMode(const ReadingMode&) = delete;
    ReadingMode& operator=(const ReadingMode&) = delete;

private:
    Reading* previous_;
};

bool readingAsTyped() { return currentReading && currentReading->asTyped; }

// A problem with the content rather than the structure of the document: an error when reading
// strictly, passed over when reading as typed (the window shows it once the study is open).
void contentProblem(const std::string& place, const std::string& problem) {
    if (!readingAsTyped()) throw StudyError(place, problem);
}

std::string jsonTypeName(const Json& value) {
    switch (value.type()) {
        case Json::value_t::null:
            return "null";
        case Json::value_t::boolean:
            return "true/false";
        case Json::value_t::string:
            return "text";
        case Json::value_t::array:
            return "a list";
        case Json::value_t::object:
            return "an object";
        case Json::value_t::number_integer:
        case Json::value_t::number_unsigned:
        case Json::value_t::number_float:
            return "a number";
        default:
            return "something else";
    }
}

std::string shown(const Json& value) {
    std::string text = value.dump();
    if (text.size() > 60) text = text.substr(0, 57) + "...";
    return text;
}

std::string numberText(double value) {
    char buffer[32];
    auto [end, ec] = std::to_chars(buffer, buffer + sizeof buffer, value);
    return ec == std::errc() ? std::string(buffer, end) : std::string("?");
}

std::string join(const std::vector<std::string>& items) {
    std::string text;
    for (std::size_t i = 0; i < items.size(); ++i) text += (i ? ", " : "") + items[i];
    return text;
}

bool isName(const std::string& name) {
    if (name.empty() || !(std::isalpha(static_cast<unsigned char>(name[0])) || name[0] == '_')) return false;
    return std::all_of(name.begin(), name.end(),
                       [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; });
}

// A JSON object at a place in the document, read key by key.
class ObjectReader {
public:
    ObjectReader(const Json& value, std::string place, std::vector<std::string> keys)
        : value_(value), place_(std::move(place)), keys_(std::move(keys)) {
        if (!value_.is_object()) fail(place_, "must be an object {...} (got " + jsonTypeName(value_) + ")");
    }

    // Unknown keys are errors: typo protection.
    void rejectUnknownKeys() const {
        for (const auto& item : value_.items())
            if (std::find(keys_.begin(), keys_.end(), item.key()) == keys_.end())
                fail(at(item.key()), "unknown key; the keys here are: " + join(keys_));
    }

    std::string at(const std::string& key) const { return place_.empty() ? key : place_ + "." + key; }
    bool has(const std::string& key) const { return value_.contains(key); }
    // The key a value is given under: its name, or its former name (docs/names.md), which is
    // read but never written. Both at once is an error.
    std::string keyOrFormer(const std::string& key, const std::string& former) const {
        if (has(key) && has(former))
            fail(at(former), "is the former name of \"" + key + "\", which is also given; keep one");
        return has(former) ? former : key;
    }
    const Json& get(const std::string& key) const {
        if (!has(key)) fail(at(key), "missing (required)");
        return value_.at(key);
    }

    std::string text(const std::string& key, const std::string& fallback, bool required = false) const {
        if (!has(key)) {
            if (required) fail(at(key), "missing (required)");
            return fallback;
        }
        const Json& v = value_.at(key);
        if (!v.is_string()) fail(at(key), "must be text in quotes (got " + shown(v) + ")");
        return v.get<std::string>();
    }

    double number(const std::string& key, double fallback, bool required = false) const {
        if (!has(key)) {
            if (required) fail(at(key), "missing (required)");
            return fallback;
        }
        const Json& v = value_.at(key);
        if (v.is_string() && readingAsTyped()) {  // a number typed as text, kept as it was typed
            if (currentReading->study) currentReading->study->unparsed[at(key)] = v.get<std::string>();
            return std::nan("");
        }
        if (!v.is_number()) fail(at(key), "must be a number (got " + shown(v) + ")");
        return v.get<double>();
    }

    long integer(const std::string& key, long fallback, long lo, long hi) const {
        if (!has(key)) return fallback;
        const Json& v = value_.at(key);
        const std::string range = "a whole number from " + std::to_string(lo) + " to " + std::to_string(hi);
        if (!v.is_number()) fail(at(key), "must be " + range + " (got " + shown(v) + ")");
        const double d = v.get<double>();
        if (d != std::floor(d) || d < static_cast<double>(lo) || d > static_cast<double>(hi))
            fail(at(key), "must be " + range + " (got " + shown(v) + ")");
        return static_cast<long>(d);
    }

    bool flag(const std::string& key, bool fallback) const {
        if (!has(key)) return fallback;
        const Json& v = value_.at(key);
        if (!v.is_boolean()) fail(at(key), "must be true or false (got " + shown(v) + ")");
        return v.get<bool>();
    }

    [[noreturn]] static void fail(const std::string& place, const std::string& problem) {
        throw StudyError(place, problem);
    }

private:
    const Json& value_;
    std::string place_;
    std::vector<std::string> keys_;
};

std::string item(const std::string& place, std::size_t index) {
    return place + "[" + std::to_string(index) + "]";
}

// Line and column (1-based) of a byte offset in the text.
std::string lineAndColumn(const std::string& text, std::size_t byte) {
    long line = 1, column = 1;
    for (std::size_t i = 0; i < byte && i < text.size(); ++i) {
        if (text[i] == '\n') {
            ++line;
            column = 1;
        } else if ((static_cast<unsigned char>(text[i]) & 0xC0) != 0x80) {
            ++column;
        }
    }
    return "line " + std::to_string(line) + ", column " + std::to_string(column);
}

// Builds the document from nlohmann-json's SAX events, checking as it goes what a DOM parse
// would not: the nesting depth (a study is 4 levels deep; 10^5 levels would exhaust the stack
// of anything recursive later), repeated keys (which would silently keep one value), and the
// number rule (core/expr/number_text.h: overflow and underflow are "out of range", named by
// field). The first problem stops the parse and is reported with its field path.
class DocumentBuilder {
public:
    using number_integer_t = Json::number_integer_t;
    using number_unsigned_t = Json::number_unsigned_t;
    using number_float_t = Json::number_float_t;
    using string_t = Json::string_t;
    using binary_t = Json::binary_t;

    explicit DocumentBuilder(const std::string& text) : text_(text) {}

    bool null() { return put(Json(nullptr)); }
    bool boolean(bool value) { return put(Json(value)); }
    bool number_integer(number_integer_t value) { return put(Json(value)); }
    bool number_unsigned(number_unsigned_t value) { return put(Json(value)); }
    bool number_float(number_float_t value, const string_t& literal) {
        double checked = 0;
        const NumberStatus status = readDecimal(literal, checked, false);
        if (status == NumberStatus::TooLarge || status == NumberStatus::TooSmall)
            return fail(path(), outOfRangeText(literal, status));
        return put(Json(value));
    }
    bool string(string_t& value) { return put(Json(std::move(value))); }
    bool binary(binary_t&) { return fail(path(), "binary data is not JSON text"); }
    bool start_object(std::size_t) { return open(Json::object(), false); }
    bool key(string_t& name) {
        Level& top = levels_.back();
        if (!top.keys.insert(name).second)
            return fail(joined(name), "this key appears twice in one object; each key may appear once");
        top.key = std::move(name);
        return true;
    }
    bool end_object() { return close(); }
    bool start_array(std::size_t) { return open(Json::array(), true); }
    bool end_array() { return close(); }
    bool parse_error(std::size_t byte, const std::string&, const nlohmann::detail::exception& e) {
        if (!error_.empty()) return false;
        if (e.id == 406) {  // number overflow: the literal is in the message between quotes
            std::string literal = e.what();
            const auto open = literal.find('\''), close = literal.rfind('\'');
            literal = open != std::string::npos && close > open ? literal.substr(open + 1, close - open - 1) : "a number";
            return fail(path(), outOfRangeText(literal, NumberStatus::TooLarge));
        }
        // byte is 1-based: the position of the last character read.
        std::string problem = e.what();
        const auto column = problem.find("column ");
        const auto colon = column == std::string::npos ? std::string::npos : problem.find(": ", column);
        if (colon != std::string::npos) problem = problem.substr(colon + 2);
        if (problem.find("[json.exception") == 0) problem = problem.substr(problem.find(']') + 2);
        return fail(lineAndColumn(text_, byte > 0 ? byte - 1 : 0), "not valid JSON: " + problem);
    }

    Json& document() { return root_; }
    const std::string& errorPlace() const { return errorPlace_; }
    const std::string& error() const { return error_; }

private:
    struct Level {
        Json* value;
        bool isArray;
        std::size_t index = 0;  // arrays: the next element's index
        std::string key;        // objects: the key whose value comes next
        std::unordered_set<std::string> keys;
    };

    // The place of levels_[0, count) followed by the value that comes next in the last of
    // them, e.g. "methods[2].options.initial_radius". An outer array's open element is its
    // last one (index - 1); the innermost array's next element is at index.
    std::string placeOf(std::size_t count, std::size_t limit = std::string::npos) const {
        std::string place = !levels_.empty() && levels_[0].isArray ? "document" : "";
        for (std::size_t i = 0; i < count && i < levels_.size(); ++i) {
            if (i == limit) return place + "...";
            const Level& level = levels_[i];
            const bool innermost = i + 1 == levels_.size();
            if (level.isArray) place += "[" + std::to_string(innermost || level.index == 0 ? level.index : level.index - 1) + "]";
            else place += (place.empty() ? "" : ".") + keyText(level.key);
        }
        return place.empty() ? "document" : place;
    }
    std::string path() const { return placeOf(levels_.size()); }
    std::string joined(const std::string& name) const {
        const std::string parent = levels_.size() > 1 ? placeOf(levels_.size() - 1) : "";
        return parent.empty() ? keyText(name) : parent + "." + keyText(name);
    }
    // A key as a place names it; the empty key is shown as "" (a fuzzer found a repeated empty
    // key reported with no place at all).
    static std::string keyText(const std::string& key) { return key.empty() ? std::string("\"\"") : key; }

    Json* insert(Json&& value) {
        if (levels_.empty()) {
            root_ = std::move(value);
            return &root_;
        }
        Level& top = levels_.back();
        if (top.isArray) {
            top.value->push_back(std::move(value));
            ++top.index;
            return &top.value->back();
        }
        Json& slot = (*top.value)[top.key];
        slot = std::move(value);
        return &slot;
    }
    bool put(Json&& value) {
        insert(std::move(value));
        return true;
    }
    bool open(Json&& container, bool isArray) {
        if (levels_.size() >= kMaxStudyNesting) {
            // Where the limit was crossed: the first kMaxStudyNesting + 1 deep bracket.
            std::size_t depth = 0, at = 0;
            bool inString = false;
            for (std::size_t i = 0; i < text_.size(); ++i) {
                const char c = text_[i];
                if (inString) {
                    if (c == '\\') ++i;
                    else if (c == '"') inString = false;
                } else if (c == '"') {
                    inString = true;
                } else if (c == '[' || c == '{') {
                    if (++depth > kMaxStudyNesting) {
                        at = i;
                        break;
                    }
                } else if (c == ']' || c == '}') {
                    --depth;
                }
            }
            return fail(placeOf(levels_.size(), 3),
                        "nested more than " + std::to_string(kMaxStudyNesting) + " levels deep at " +
                            lineAndColumn(text_, at) + " (a study needs 4)");
        }
        Json* value = insert(std::move(container));
        levels_.push_back({value, isArray, 0, {}, {}});
        return true;
    }
    bool close() {
        levels_.pop_back();
        return true;
    }
    bool fail(std::string place, std::string problem) {
        if (error_.empty()) {
            errorPlace_ = std::move(place);
            error_ = std::move(problem);
        }
        return false;
    }

    const std::string& text_;
    Json root_;
    std::vector<Level> levels_;
    std::string errorPlace_, error_;
};

Json parseDocument(const std::string& text) {
    // Text that is not JSON at all: say what it is instead of an "invalid literal".
    if (const auto nul = text.find('\0'); nul != std::string::npos)
        throw StudyError(lineAndColumn(text, nul), "a NUL byte: a study file is JSON text (is this a binary file?)");
    DocumentBuilder builder(text);
    const bool parsed = Json::sax_parse(text, &builder);
    if (!parsed || !builder.error().empty()) {
        if (builder.error().empty()) throw StudyError("document", "not valid JSON");
        throw StudyError(builder.errorPlace(), builder.error());
    }
    return std::move(builder.document());
}

void readHeader(const Json& document) {
    if (!document.is_object())
        throw StudyError("document", "a study is a JSON object {...} (got " + jsonTypeName(document) + ")");
    if (!document.contains("format"))
        throw StudyError("format", "missing: this is not a Saddlewise study (expected \"format\": \"" +
                                       std::string(kFormatName) + "\")");
    const Json& format = document.at("format");
    if (!format.is_string() || format.get<std::string>() != kFormatName)
        throw StudyError("format", "this is not a Saddlewise study (expected \"" + std::string(kFormatName) +
                                       "\", got " + shown(format) + ")");
    if (!document.contains("version")) throw StudyError("version", "missing (required)");
    const Json& version = document.at("version");
    // Compared as a double so a huge version (above 2^63, or written 1e30) reads as what it is.
    const double v = version.is_number() ? version.get<double>() : std::nan("");
    if (!version.is_number() || v != std::floor(v))
        throw StudyError("version", "must be a whole number (got " + shown(version) + ")");
    if (v > kFormatVersion)
        throw StudyError("version", "this file is format version " + shown(version) +
                                        "; this Saddlewise reads up to " + std::to_string(kFormatVersion) +
                                        " - update Saddlewise");
    if (v < 1) throw StudyError("version", "must be 1 or more (got " + shown(version) + ")");
}

std::vector<Variable> readVariables(const Json& document) {
    if (!document.contains("variables")) throw StudyError("variables", "missing (required)");
    const Json& list = document.at("variables");
    if (!list.is_array()) throw StudyError("variables", "must be a list [...] (got " + jsonTypeName(list) + ")");
    if (list.size() < 2)
        contentProblem("variables", "a study needs at least two variables (the landscape plots two; got " +
                                        std::to_string(list.size()) + ")");
    if (list.size() > kMaxVariables)
        throw StudyError("variables", "has " + std::to_string(list.size()) + " entries; the limit is " +
                                          std::to_string(kMaxVariables));
    std::unordered_set<std::string> names;
    std::vector<Variable> variables;
    for (std::size_t k = 0; k < list.size(); ++k) {
        const std::string place = item("variables", k);
        ObjectReader in(list[k], place, {"name", "start", "plot_from", "plot_to", "lower", "upper"});
        in.rejectUnknownKeys();
        const std::string from = in.keyOrFormer("plot_from", "lower"), to = in.keyOrFormer("plot_to", "upper");
        Variable v;
        v.name = in.text("name", "", true);
        if (!isName(v.name))
            contentProblem(in.at("name"),
                               "'" + v.name + "' is not a valid name (letters, digits, _; not starting with a digit)");
        if (!names.insert(v.name).second) contentProblem(in.at("name"), "'" + v.name + "' is named twice");
        v.start = in.number("start", 0, true);
        v.lower = in.number(from, 0, true);
        v.upper = in.number(to, 0, true);
        // Read as typed, text kept for a former key name is filed under the current one.
        if (currentReading && currentReading->study)
            for (const auto& [former, current] : {std::pair<std::string, std::string>{from, "plot_from"}, {to, "plot_to"}}) {
                auto& unparsed = currentReading->study->unparsed;
                const auto typed = unparsed.find(place + "." + former);
                if (former != current && typed != unparsed.end()) {
                    unparsed[place + "." + current] = typed->second;
                    unparsed.erase(place + "." + former);
                }
            }
        if (!(v.lower < v.upper) && !std::isnan(v.lower) && !std::isnan(v.upper))
            contentProblem(in.at(from), "must be below " + to + " (got " + from + " " + numberText(v.lower) + ", " +
                                            to + " " + numberText(v.upper) + ")");
        variables.push_back(v);
    }
    return variables;
}

bool validColour(const std::string& colour) {
    return colour.size() == 7 && colour[0] == '#' && std::all_of(colour.begin() + 1, colour.end(), [](char c) {
               return std::isxdigit(static_cast<unsigned char>(c));
           });
}

std::string lowercase(std::string text) {
    for (char& c : text) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return text;
}

// Option values are typed in the document (numbers, true/false, text choices) and kept as
// canonical text in the Study, so load -> save -> load is exact.
std::string optionText(const solve::OptionSpec& spec, const Json& value, const std::string& place) {
    using Type = solve::OptionSpec::Type;
    // As typed, a value the window kept as text (it did not read as the option's type) stays text.
    if (readingAsTyped() && value.is_string()) return value.get<std::string>();
    switch (spec.type) {
        case Type::Boolean:
            if (!value.is_boolean()) ObjectReader::fail(place, "must be true or false (got " + shown(value) + ")");
            return value.get<bool>() ? "true" : "false";
        case Type::Choice:
            if (!value.is_string())
                ObjectReader::fail(place, "must be " + spec.rangeText() + ", in quotes (got " + shown(value) + ")");
            return value.get<std::string>();
        case Type::Integer: {
            if (!value.is_number())
                ObjectReader::fail(place, "must be " + spec.rangeText() + " (got " + shown(value) + ")");
            const double d = value.get<double>();
            if (d != std::floor(d) || std::abs(d) > 9e15)
                ObjectReader::fail(place,
                                   "must be a whole number, " + spec.rangeText() + " (got " + shown(value) + ")");
            return std::to_string(static_cast<long long>(d));
        }
        case Type::Real:
            if (!value.is_number())
                ObjectReader::fail(place, "must be " + spec.rangeText() + " (got " + shown(value) + ")");
            return numberText(value.get<double>());
    }
    return "";
}

// "option initial_radius: must be > 0 (got '-1')" -> "must be > 0 (got -1)"
std::string withoutOptionPrefix(std::string sentence, const std::string& name) {
    const std::string prefix = "option " + name + ": ";
    if (sentence.rfind(prefix, 0) == 0) sentence = sentence.substr(prefix.size());
    const auto got = sentence.rfind("(got '");
    if (got != std::string::npos && sentence.size() >= got + 8 && sentence.compare(sentence.size() - 2, 2, "')") == 0)
        sentence = sentence.substr(0, got) + "(got " + sentence.substr(got + 6, sentence.size() - got - 8) + ")";
    return sentence;
}

std::vector<MethodEntry> readMethods(const Json& document, bool residualForm) {
    if (!document.contains("methods")) throw StudyError("methods", "missing (required; may be an empty list [])");
    const Json& list = document.at("methods");
    if (!list.is_array()) throw StudyError("methods", "must be a list [...] (got " + jsonTypeName(list) + ")");
    if (list.size() > kMaxMethodEntries)
        throw StudyError("methods", "has " + std::to_string(list.size()) + " entries; the limit is " +
                                        std::to_string(kMaxMethodEntries));
    std::vector<MethodEntry> entries;
    entries.reserve(list.size());
    std::unordered_set<std::string> labels;  // a hash set: the check stays linear in the entries
    for (std::size_t k = 0; k < list.size(); ++k) {
        const std::string place = item("methods", k);
        ObjectReader in(list[k], place, {"label", "method", "options", "colour", "marker", "enabled"});
        in.rejectUnknownKeys();
        MethodEntry entry;
        entry.method = in.text("method", "", true);
        const solve::MethodInfo* info = solve::findMethod(entry.method);
        if (!info)
            ObjectReader::fail(in.at("method"),
                               "unknown method '" + entry.method + "'; known: " + solve::methodIdList());
        if (info->needsResiduals && !residualForm)
            contentProblem(in.at("method"), entry.method +
                                                    " needs a least-squares fit (residual form); this study's "
                                                    "objective has none (a formula, or a fit with another loss)");
        entry.label = in.text("label", entry.method);
        if (entry.label.empty()) ObjectReader::fail(in.at("label"), "must not be empty");
        if (!labels.insert(entry.label).second)
            ObjectReader::fail(in.at("label"), "'" + entry.label +
                                                   "' is already used by an earlier entry; labels "
                                                   "must be unique (they name the runs)");
        if (in.has("options")) {
            ObjectReader options(in.get("options"), in.at("options"), {});
            for (const auto& option : in.get("options").items()) {
                const std::string optionPlace = options.at(option.key());
                // A former option name (docs/names.md) is read, and kept under the current name.
                const solve::OptionSpec* spec = solve::findOptionOrFormer(info->options, option.key());
                if (!spec) {
                    std::vector<std::string> names;
                    for (const solve::OptionSpec& s : info->options) names.push_back(s.name);
                    ObjectReader::fail(optionPlace,
                                       "unknown option for " + entry.method +
                                           (names.empty() ? "; it takes no options" : "; its options: " + join(names)));
                }
                const std::string text = optionText(*spec, option.value(), optionPlace);
                const std::string problem = solve::checkOptions(info->options, {{spec->name, text}});
                if (!problem.empty()) contentProblem(optionPlace, withoutOptionPrefix(problem, spec->name));
                if (entry.options.count(spec->name))
                    ObjectReader::fail(optionPlace, "is the same option as \"" + spec->name +
                                                        "\" (its former or current name), which is also given; keep one");
                entry.options[spec->name] = text;
            }
            for (const solve::MethodRegistration& registration : solve::registrations())
                if (registration.info.id == entry.method && registration.check) {
                    const std::string problem = registration.check(entry.options);
                    if (!problem.empty()) contentProblem(in.at("options"), problem);
                }
        }
        if (!in.has("colour"))
            ObjectReader::fail(in.at("colour"), "missing (required): the colour of this method's paths and marks, "
                                                "as \"#rrggbb\" (for example \"#002ddd\")");
        entry.colour = lowercase(in.text("colour", "", true));
        if (!validColour(entry.colour))
            ObjectReader::fail(in.at("colour"), "must be a colour \"#rrggbb\" (got " + shown(in.get("colour")) + ")");
        entry.marker = in.text("marker", "circle");
        const auto& markers = markerNames();
        if (std::find(markers.begin(), markers.end(), entry.marker) == markers.end())
            ObjectReader::fail(in.at("marker"), "must be one of: " + join(markers) + " (got \"" + entry.marker + "\")");
        entry.enabled = in.flag("enabled", true);
        entries.push_back(std::move(entry));
    }
    return entries;
}

void readStopping(const Json& document, Study& study) {
    if (!document.contains("stopping")) return;
    // The tolerances are named after the test each sets (docs/names.md); the former names
    // are read too.
    ObjectReader in(document.at("stopping"), "stopping",
                    {"max_iterations", "max_evaluations", "gradient_norm_below", "gradient_ratio_below",
                     "relative_step_below", "relative_change_below", "gradient_tolerance",
                     "relative_gradient_tolerance", "step_tolerance", "function_tolerance"});
    in.rejectUnknownKeys();
    study.maxIterations = static_cast<int>(in.integer("max_iterations", study.maxIterations, 1, 1000000));
    study.maxEvaluations = in.integer("max_evaluations", study.maxEvaluations, 1, 1000000000);
    // Tolerances: any number >= 0 (every finite double is a valid tolerance; a number too large
    // for a double is refused while reading the JSON), the relative one below 1.
    constexpr double kNoLimit = std::numeric_limits<double>::infinity();
    auto nonNegative = [&](const std::string& key, double fallback, double below) {
        const double v = in.number(key, fallback);
        if (!(v >= 0) || !(v < below))
            ObjectReader::fail(in.at(key), "must be >= 0" + (below < kNoLimit ? " and < " + numberText(below) : std::string()) +
                                               " (got " + numberText(v) + ")");
        return v;
    };
    study.gradientTolerance =
        nonNegative(in.keyOrFormer("gradient_norm_below", "gradient_tolerance"), study.gradientTolerance, kNoLimit);
    study.relativeGradientTolerance = nonNegative(in.keyOrFormer("gradient_ratio_below", "relative_gradient_tolerance"),
                                                  study.relativeGradientTolerance, 1);
    study.stepTolerance = nonNegative(in.keyOrFormer("relative_step_below", "step_tolerance"), study.stepTolerance, kNoLimit);
    study.functionTolerance =
        nonNegative(in.keyOrFormer("relative_change_below", "function_tolerance"), study.functionTolerance, kNoLimit);
    const std::string problem = study.stoppingRules().check();
    if (!problem.empty()) ObjectReader::fail("stopping", problem);
}

void readView(const Json& document, Study& study) {
    ViewSettings& view = study.view;
    view.plotX = 0;
    view.plotY = 1;
    if (!document.contains("view")) return;
    ObjectReader in(document.at("view"), "view", {"plot_x", "plot_y", "log_colour", "contour_count", "grid_cells"});
    in.rejectUnknownKeys();
    const std::vector<std::string> names = study.variableNames();
    auto index = [&](const std::string& key, int fallback) {
        if (!in.has(key)) return fallback;
        const std::string name = in.text(key, "");
        auto it = std::find(names.begin(), names.end(), name);
        if (it == names.end()) {
            contentProblem(in.at(key), "'" + name + "' is not one of the variables (" + join(names) + ")");
            return fallback;
        }
        // Read as typed, two variables may share a name: plot_y then names the later one.
        if (key == "plot_y" && it - names.begin() == view.plotX) {
            const auto later = std::find(it + 1, names.end(), name);
            if (later != names.end() && readingAsTyped()) it = later;
        }
        return static_cast<int>(it - names.begin());
    };
    view.plotX = index("plot_x", 0);
    view.plotY = index("plot_y", view.plotX == 1 ? 0 : 1);
    if (view.plotX == view.plotY && view.plotX < static_cast<int>(names.size()))
        contentProblem(in.at("plot_y"), "must differ from plot_x (both are '" + names[view.plotX] + "')");
    view.logColour = in.flag("log_colour", view.logColour);
    view.contourCount = static_cast<int>(in.integer("contour_count", view.contourCount, 0, 100));
    view.gridCells = static_cast<int>(in.integer("grid_cells", view.gridCells, 10, 2000));
}

// "surveys": optional; each survey present is on. Basin methods name lineup entries by label.
void readSurveys(const Json& document, Study& study) {
    if (!document.contains("surveys")) return;
    ObjectReader in(document.at("surveys"), "surveys", {"critical_points", "basins"});
    in.rejectUnknownKeys();
    SurveySettings surveys;
    if (in.has("critical_points")) {
        ObjectReader critical(in.get("critical_points"), in.at("critical_points"), {"starts", "sign_change_grid"});
        critical.rejectUnknownKeys();
        surveys.critical = true;
        surveys.criticalStarts = static_cast<int>(critical.integer("starts", surveys.criticalStarts, 1, 1000000));
        surveys.signChangeGrid =
            static_cast<int>(critical.integer("sign_change_grid", surveys.signChangeGrid, 0, 1000));
    }
    if (in.has("basins")) {
        ObjectReader basins(in.get("basins"), in.at("basins"), {"grid", "methods"});
        basins.rejectUnknownKeys();
        surveys.basins = true;
        surveys.basinGrid =
            static_cast<int>(basins.integer("grid", surveys.basinGrid, 1, survey::BasinSettings::kMaxGrid));
        if (basins.has("methods")) {
            const Json& list = basins.get("methods");
            if (!list.is_array())
                ObjectReader::fail(basins.at("methods"), "must be a list of method labels (got " + jsonTypeName(list) + ")");
            for (std::size_t k = 0; k < list.size(); ++k) {
                const std::string place = item(basins.at("methods"), k);
                if (!list[k].is_string()) ObjectReader::fail(place, "must be a method label in quotes (got " + shown(list[k]) + ")");
                const std::string label = list[k].get<std::string>();
                const bool known = std::any_of(study.methods.begin(), study.methods.end(),
                                               [&](const MethodEntry& m) { return m.label == label; });
                if (!known) {
                    std::vector<std::string> labels;
                    for (const MethodEntry& m : study.methods) labels.push_back(m.label);
                    ObjectReader::fail(place, "'" + label + "' is not the label of a method entry (" + join(labels) + ")");
                }
                if (std::find(surveys.basinMethods.begin(), surveys.basinMethods.end(), label) != surveys.basinMethods.end())
                    ObjectReader::fail(place, "'" + label + "' is listed twice");
                surveys.basinMethods.push_back(label);
            }
        }
    }
    study.surveys = surveys;
}

// Checks the objective by building it, so a study that loads is a study that runs.
void checkObjective(const Study& study, const std::string& baseDirectory) {
    makeObjective(study, baseDirectory);
}

Study readDocument(const std::string& text, const std::string& baseDirectory, bool verifyData) {
    const Json document = parseDocument(text);
    readHeader(document);
    ObjectReader root(document, "",
                      {"format", "version", "title", "notes", "objective", "variables", "methods", "stopping", "view",
                       "surveys"});
    root.rejectUnknownKeys();

    Study study;
    study.title = root.text("title", "");
    study.notes = root.text("notes", "");

    ObjectReader objective(root.get("objective"), "objective",
                           {"formula", "data", "checksum", "model", "response", "loss", "weights", "sigma", "scale",
                            "separator", "drop_incomplete_rows"});
    objective.rejectUnknownKeys();
    const bool formulaMode = objective.has("formula");
    if (formulaMode == objective.has("data"))
        ObjectReader::fail("objective", formulaMode
                                            ? "has both \"formula\" and \"data\"; a study is one or the other"
                                            : "needs either \"formula\" (formula mode) or \"data\" (data-fit mode)");
    bool residualForm = false;
    if (formulaMode) {
        for (const char* key : {"checksum", "model", "response", "loss", "weights", "sigma", "scale", "separator",
                                "drop_incomplete_rows"})
            if (objective.has(key))
                ObjectReader::fail(objective.at(key), "belongs to data-fit mode, not to a formula study");
        study.formula = objective.text("formula", "", true);
        if (study.formula.find_first_not_of(" \t\r\n") == std::string::npos)
            contentProblem(objective.at("formula"), "is empty");
    } else {
        DataFit fit;
        fit.dataPath = objective.text("data", "", true);
        if (fit.dataPath.empty()) contentProblem(objective.at("data"), "is empty; give the data file's path");
        // A hand-written study does not know it yet: say how to get it.
        if (!objective.has("checksum") && !readingAsTyped())
            ObjectReader::fail(objective.at("checksum"),
                               "missing (required): the data file's SHA-256 as \"sha256:\" and 64 hex digits (what "
                               "`sha256sum " + fit.dataPath + "` prints), which ties the study to these data; saving "
                               "the study in the window records it");
        fit.checksum = lowercase(objective.text("checksum", "", true));
        const bool checksumShape = fit.checksum.size() == 7 + 64 && fit.checksum.rfind("sha256:", 0) == 0 &&
                                   std::all_of(fit.checksum.begin() + 7, fit.checksum.end(),
                                               [](char c) { return std::isxdigit(static_cast<unsigned char>(c)); });
        if (!checksumShape && !(readingAsTyped() && fit.checksum.empty()))  // empty: no table chosen yet
            ObjectReader::fail(objective.at("checksum"), "must be \"sha256:\" followed by 64 hex digits");
        fit.model = objective.text("model", "", true);
        fit.response = objective.text("response", "", true);
        fit.loss = objective.text("loss", fit.loss);
        Loss loss;
        if (!parseLoss(fit.loss, loss))
            ObjectReader::fail(objective.at("loss"), "must be one of: " + lossList() + " (got \"" + fit.loss + "\")");
        fit.loss = toString(loss);  // a former id (docs/names.md) is saved under the current one
        if (objective.has("weights") && objective.has("sigma"))
            ObjectReader::fail(objective.at("sigma"), "give either \"weights\" or \"sigma\", not both");
        if (objective.has("sigma")) {
            fit.weights = objective.text("sigma", "");
            fit.weightsKind = "sigma";
        } else {
            fit.weights = objective.text("weights", "");
        }
        if (loss == Loss::Weighted && fit.weights.empty())
            contentProblem("objective", "the weighted loss needs a \"weights\" or a \"sigma\" column");
        fit.lossScale = objective.number("scale", fit.lossScale);
        if (!(fit.lossScale > 0))
            contentProblem(objective.at("scale"), "must be > 0 (got " + numberText(fit.lossScale) + ")");
        fit.separator = objective.text("separator", fit.separator);
        Separator separator;
        if (!parseSeparator(fit.separator, separator) || fit.separator.size() < 3)
            ObjectReader::fail(objective.at("separator"),
                               "must be one of: auto, comma, semicolon, tab (got \"" + fit.separator + "\")");
        fit.dropIncompleteRows = objective.flag("drop_incomplete_rows", false);
        residualForm = hasResidualForm(loss);
        study.fit = fit;
    }

    study.variables = readVariables(document);
    readStopping(document, study);
    readView(document, study);
    if ((verifyData || !study.fit) && !readingAsTyped()) checkObjective(study, baseDirectory);
    study.methods = readMethods(document, residualForm);
    readSurveys(document, study);
    return study;
}

std::string readText(const std::string& path) {
    try {
        // A stream (pipe, /dev/stdin) is read like a file; a NUL stops the reading at once.
        return readTextFile(path, kMaxStudyBytes);
    } catch (const TextFileError& e) {
        throw StudyError("file", "'" + path + "' " + e.what() + (std::string(e.what()).find("directory") != std::string::npos
                                                                      ? " (give the study's .json file)"
                                                                      : ""));
    }
}

}  // namespace

Study fromJson(const std::string& text, const std::string& baseDirectory, bool verifyData) {
    Reading strict;
    const ReadingMode mode(strict);
    return readDocument(text, baseDirectory, verifyData);
}

Study fromJsonAsTyped(const std::string& text, const std::string& baseDirectory) {
    Study study;
    Reading asTyped{true, &study};
    const ReadingMode mode(asTyped);
    Study read = readDocument(text, baseDirectory, false);
    read.unparsed = std::move(study.unparsed);
    return read;
}

Study loadFile(const std::string& path, bool verifyData) {
    return fromJson(readText(path), directoryOf(path), verifyData);
}

Study loadFileAsTyped(const std::string& path) { return fromJsonAsTyped(readText(path), directoryOf(path)); }

void checkVariables(const Study& study) {
    const std::vector<Variable>& variables = study.variables;
    if (variables.size() < 2)
        throw StudyError("variables", "a study needs at least two variables (the landscape plots two; got " +
                                          std::to_string(variables.size()) + ")");
    for (std::size_t k = 0; k < variables.size(); ++k) {
        const Variable& v = variables[k];
        const std::string place = item("variables", k);
        if (!isName(v.name))
            throw StudyError(place + ".name",
                             "'" + v.name + "' is not a valid name (letters, digits, _; not starting with a digit)");
        for (std::size_t j = 0; j < k; ++j)
            if (variables[j].name == v.name) throw StudyError(place + ".name", "'" + v.name + "' is named twice");
        for (const auto& [key, value] : {std::pair<std::string, double>{"start", v.start}, {"plot_from", v.lower},
                                         {"plot_to", v.upper}}) {
            const auto typed = study.unparsed.find(place + "." + key);
            if (typed != study.unparsed.end())
                throw StudyError(place + "." + key, "must be a number (got \"" + typed->second + "\")");
            if (!std::isfinite(value))
                throw StudyError(place + "." + key, "must be a finite number (got " + numberText(value) + ")");
        }
        if (!(v.lower < v.upper))
            throw StudyError(place + ".plot_from", "must be below plot_to (got plot_from " + numberText(v.lower) +
                                                       ", plot_to " + numberText(v.upper) + ")");
    }
}

}  // namespace sw::study
