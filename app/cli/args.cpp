#include "app/cli/cli.h"
#include "core/expr/number_text.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <sstream>

namespace sw::cli {

std::string ParsedArgs::get(const std::string& name, const std::string& fallback) const {
    auto it = options.find(name);
    if (it == options.end()) return fallback;
    if (it->second.size() > 1) throw UsageError("--" + name + " given more than once");
    return it->second.front();
}

const std::vector<std::string>& ParsedArgs::all(const std::string& name) const {
    static const std::vector<std::string> none;
    auto it = options.find(name);
    return it == options.end() ? none : it->second;
}

ParsedArgs parseArgs(const std::vector<std::string>& args, const std::vector<std::string>& flags,
                     const std::vector<std::string>& valued) {
    auto contains = [](const std::vector<std::string>& list, const std::string& s) {
        return std::find(list.begin(), list.end(), s) != list.end();
    };
    ParsedArgs parsed;
    for (std::size_t i = 0; i < args.size(); ++i) {
        const std::string& a = args[i];
        // A lone "-" or a negative number is a positional, not an option.
        if (a.size() < 3 || a.compare(0, 2, "--") != 0) {
            parsed.positional.push_back(a);
            continue;
        }
        std::string name = a.substr(2), value;
        bool hasValue = false;
        if (auto eq = name.find('='); eq != std::string::npos) {
            value = name.substr(eq + 1);
            name = name.substr(0, eq);
            hasValue = true;
        }
        if (contains(flags, name)) {
            if (hasValue) throw UsageError("--" + name + " takes no value");
            parsed.options[name].push_back("");
        } else if (contains(valued, name)) {
            if (!hasValue) {
                if (i + 1 >= args.size()) throw UsageError("--" + name + " needs a value");
                value = args[++i];
            }
            parsed.options[name].push_back(value);
        } else {
            std::string known;
            for (const auto& f : flags) known += " --" + f;
            for (const auto& v : valued) known += " --" + v;
            throw UsageError("unknown option --" + shownText(name) + "; this verb takes:" + known);
        }
    }
    return parsed;
}

// Text from the command line for a message: at most 40 characters, control bytes and bytes
// that are not UTF-8 shown by code (\x07), never raw.
std::string shownText(const std::string& text) {
    std::string out;
    std::size_t characters = 0, i = 0;
    for (; i < text.size() && characters < 40; ++characters) {
        const auto c = static_cast<unsigned char>(text[i]);
        std::size_t length = c < 0x80 ? 1 : c >= 0xF0 && c <= 0xF4 ? 4 : c >= 0xE0 && c <= 0xEF ? 3 : c >= 0xC2 && c <= 0xDF ? 2 : 0;
        if (length > 1 && i + length <= text.size()) {
            for (std::size_t k = 1; k < length; ++k)
                if ((static_cast<unsigned char>(text[i + k]) & 0xC0) != 0x80) length = 0;
        } else if (length > 1) {
            length = 0;
        }
        if (length == 0 || c < 0x20 || c == 0x7F) {
            static const char* hex = "0123456789ABCDEF";
            out += "\\x";
            out += hex[c >> 4];
            out += hex[c & 15];
            ++i;
        } else {
            out.append(text, i, length);
            i += length;
        }
    }
    if (i < text.size()) out += "...";
    return out;
}

static std::string trim(const std::string& s) {
    auto b = s.find_first_not_of(" \t");
    auto e = s.find_last_not_of(" \t");
    return b == std::string::npos ? std::string() : s.substr(b, e - b + 1);
}

static std::vector<std::string> splitComma(const std::string& text) {
    std::vector<std::string> items;
    std::string item;
    std::istringstream in(text);
    while (std::getline(in, item, ',')) items.push_back(trim(item));
    if (!text.empty() && text.back() == ',') items.emplace_back();
    return items;
}

static bool validName(const std::string& name) {
    if (name.empty() || !(std::isalpha(static_cast<unsigned char>(name[0])) || name[0] == '_')) return false;
    return std::all_of(name.begin(), name.end(),
                       [](char c) { return std::isalnum(static_cast<unsigned char>(c)) || c == '_'; });
}

double parseNumber(const std::string& text, const std::string& what) {
    const std::string t = trim(text);
    double value = 0;
    // The one number rule (core/expr/number_text.h): plain decimals; overflow and underflow
    // are out of range; inf, nan, hex and decimal commas are not numbers.
    const NumberStatus status = readDecimal(t, value);
    if (status == NumberStatus::TooLarge || status == NumberStatus::TooSmall)
        throw UsageError(what + ": " + outOfRangeText(t, status));
    if (status != NumberStatus::Ok)
        throw UsageError(what + ": '" + shownText(text) + "' is not a number" +
                         (t.find(',') != std::string::npos || t.empty() ? " (use '.' as the decimal point)" : ""));
    return value;
}

long parseInteger(const std::string& text, const std::string& what, long lo, long hi) {
    std::string t = trim(text);
    long value = 0;
    auto [ptr, ec] = std::from_chars(t.data(), t.data() + t.size(), value);
    if (ec == std::errc::result_out_of_range && ptr == t.data() + t.size())
        throw UsageError(what + ": " + shownText(t) + " is out of range (" + std::to_string(lo) + " to " +
                         std::to_string(hi) + ")");
    if (t.empty() || ec != std::errc() || ptr != t.data() + t.size())
        throw UsageError(what + ": '" + shownText(text) + "' is not a whole number");
    if (value < lo || value > hi)
        throw UsageError(what + ": " + std::to_string(value) + " is out of range (" + std::to_string(lo) + " to " +
                         std::to_string(hi) + ")");
    return value;
}

std::vector<std::pair<std::string, double>> parseAssignments(const std::string& text, const std::string& optionName) {
    std::vector<std::pair<std::string, double>> result;
    int position = 0;
    for (const std::string& item : splitComma(text)) {
        ++position;
        auto eq = item.find('=');
        if (eq == std::string::npos)
            throw UsageError("--" + optionName + " item " + std::to_string(position) + " '" + shownText(item) +
                             "' is not of the form name=value");
        std::string name = trim(item.substr(0, eq));
        if (!validName(name))
            throw UsageError("--" + optionName + " item " + std::to_string(position) + ": '" + shownText(name) +
                             "' is not a valid name (letters, digits, _; not starting with a digit)");
        for (const auto& [seen, unused] : result)
            if (seen == name) throw UsageError("--" + optionName + ": '" + name + "' is given twice");
        result.emplace_back(name, parseNumber(item.substr(eq + 1), "--" + optionName + " " + name));
    }
    if (result.empty()) throw UsageError("--" + optionName + " is empty; expected name=value,...");
    return result;
}

std::vector<Range> parseRanges(const std::string& text, const std::string& optionName) {
    std::vector<Range> result;
    int position = 0;
    for (const std::string& item : splitComma(text)) {
        ++position;
        auto eq = item.find('=');
        auto colon = item.find(':', eq == std::string::npos ? 0 : eq);
        if (eq == std::string::npos || colon == std::string::npos)
            throw UsageError("--" + optionName + " item " + std::to_string(position) + " '" + shownText(item) +
                             "' is not of the form name=low:high");
        Range r;
        r.name = trim(item.substr(0, eq));
        if (!validName(r.name))
            throw UsageError("--" + optionName + " item " + std::to_string(position) + ": '" + shownText(r.name) +
                             "' is not a valid name");
        r.lo = parseNumber(item.substr(eq + 1, colon - eq - 1), "--" + optionName + " " + r.name + " low end");
        r.hi = parseNumber(item.substr(colon + 1), "--" + optionName + " " + r.name + " high end");
        if (!(r.lo < r.hi))
            throw UsageError("--" + optionName + " " + r.name + ": the low end must be below the high end (got " +
                             formatNumber(r.lo) + ":" + formatNumber(r.hi) + ")");
        result.push_back(r);
    }
    if (result.empty()) throw UsageError("--" + optionName + " is empty; expected name=low:high,...");
    return result;
}

std::string formatNumber(double value, int significant) {
    if (std::isnan(value)) return "nan";
    if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
    char buffer[64];
    if (significant >= 17) {
        auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, value);
        return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
    }
    auto [ptr, ec] = std::to_chars(buffer, buffer + sizeof buffer, value, std::chars_format::general, significant);
    return ec == std::errc() ? std::string(buffer, ptr) : std::string("?");
}

std::string wrapText(const std::string& text, std::size_t width) {
    std::string out, line, word;
    auto flushWord = [&] {
        if (word.empty()) return;
        if (!line.empty() && line.size() + 1 + word.size() > width) {
            out += line + '\n';
            line.clear();
        }
        line += (line.empty() ? "" : " ") + word;
        word.clear();
    };
    for (char c : text) {
        if (c == ' ' || c == '\n') flushWord();
        else word += c;
    }
    flushWord();
    if (!line.empty()) out += line + '\n';
    return out;
}

}  // namespace sw::cli
