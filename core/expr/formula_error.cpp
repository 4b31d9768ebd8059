#include "core/expr/expr.h"

#include <cstdint>
#include <vector>

namespace sw::expr {

namespace {

// One shown character per UTF-8 character of the formula, so the caret lines up: control
// bytes become their Unicode control pictures (NUL -> U+2400), a byte that is not UTF-8
// becomes U+FFFD, a tab a space. Raw control bytes never reach a terminal, and a NUL cannot
// cut the message short.
struct Shown {
    std::vector<std::string> characters;
    std::vector<int> firstByte;  // byte offset of each character
};

Shown shownCharacters(const std::string& text) {
    Shown shown;
    const int size = static_cast<int>(text.size());
    for (int i = 0; i < size;) {
        const auto c = static_cast<unsigned char>(text[i]);
        shown.firstByte.push_back(i);
        if (c < 0x80) {
            if (c == '\t') shown.characters.emplace_back(" ");
            else if (c < 0x20) shown.characters.push_back(std::string("\xE2\x90") + static_cast<char>(0x80 + c));
            else if (c == 0x7F) shown.characters.emplace_back("\xE2\x90\xA1");
            else shown.characters.emplace_back(1, static_cast<char>(c));
            ++i;
            continue;
        }
        int length = c >= 0xF0 && c <= 0xF4 ? 4 : c >= 0xE0 && c <= 0xEF ? 3 : c >= 0xC2 && c <= 0xDF ? 2 : 0;
        bool valid = length > 0 && i + length <= size;
        std::uint32_t cp = length == 2 ? c & 0x1F : length == 3 ? c & 0x0F : c & 0x07;
        for (int k = 1; valid && k < length; ++k) {
            const auto next = static_cast<unsigned char>(text[i + k]);
            valid = (next & 0xC0) == 0x80;
            cp = (cp << 6) | (next & 0x3F);
        }
        // C1 controls and direction overrides are not shown either.
        const bool hidden = valid && ((cp >= 0x80 && cp <= 0x9F) || (cp >= 0x202A && cp <= 0x202E) ||
                                      (cp >= 0x2066 && cp <= 0x2069));
        if (!valid || hidden) {
            shown.characters.emplace_back("\xEF\xBF\xBD");
            i += valid ? length : 1;
        } else {
            shown.characters.push_back(text.substr(i, length));
            i += length;
        }
    }
    return shown;
}

// The character index of a byte offset (the end of the text maps past the last character).
int characterIndex(const Shown& shown, int byte) {
    int index = 0;
    while (index < static_cast<int>(shown.firstByte.size()) && shown.firstByte[index] < byte) ++index;
    if (index < static_cast<int>(shown.firstByte.size()) && shown.firstByte[index] > byte) --index;
    return index;
}

std::string composeMessage(const std::string& reason, const std::string& formula, int position) {
    if (position < 0) return reason;
    const int column = formula.empty() ? position : characterIndex(shownCharacters(formula), position);
    return reason + " (at column " + std::to_string(column + 1) + ")";
}

}  // namespace

FormulaError::FormulaError(std::string message, std::string formula, int position)
    : std::runtime_error(composeMessage(message, formula, position)),
      reason_(std::move(message)),
      formula_(std::move(formula)),
      position_(position) {}

std::string FormulaError::withCaret() const {
    std::string text = what();
    if (formula_.empty()) return text;
    const Shown shown = shownCharacters(formula_);
    const int count = static_cast<int>(shown.characters.size());
    const int at = position_ >= 0 ? characterIndex(shown, position_) : -1;
    // Long formulas are shown as a window of about 100 characters around the position.
    constexpr int kWindow = 100;
    int first = 0, last = count;
    if (count > kWindow) {
        first = at < 0 ? 0 : std::max(0, std::min(at - kWindow / 2, count - kWindow));
        last = std::min(count, first + kWindow);
    }
    std::string line = first > 0 ? "..." : "";
    for (int k = first; k < last; ++k) line += shown.characters[static_cast<std::size_t>(k)];
    if (last < count) line += "...";
    text += "\n  " + line;
    if (at >= 0) text += "\n  " + std::string((first > 0 ? 3 : 0) + (at - first), ' ') + "^";
    return text;
}

}  // namespace sw::expr
