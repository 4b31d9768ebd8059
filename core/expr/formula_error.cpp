#include "core/expr/expr.h"

namespace sw::expr {

static std::string composeMessage(const std::string& reason, int position) {
    if (position < 0) return reason;
    return reason + " (at column " + std::to_string(position + 1) + ")";
}

FormulaError::FormulaError(std::string message, std::string formula, int position)
    : std::runtime_error(composeMessage(message, position)),
      reason_(std::move(message)),
      formula_(std::move(formula)),
      position_(position) {}

FormulaError::FormulaError(std::string message, std::string formula, int position, std::vector<std::string> unknownNames)
    : FormulaError(std::move(message), std::move(formula), position) {
    unknownNames_ = std::move(unknownNames);
}

std::string FormulaError::withCaret() const {
    std::string text = what();
    if (formula_.empty()) return text;
    text += "\n  " + formula_;
    if (position_ >= 0) {
        // Columns count characters, not bytes: step over UTF-8 continuation bytes.
        std::string pad;
        for (int i = 0; i < position_ && i < static_cast<int>(formula_.size()); ++i)
            if ((static_cast<unsigned char>(formula_[i]) & 0xC0) != 0x80) pad += formula_[i] == '\t' ? '\t' : ' ';
        text += "\n  " + pad + "^";
    }
    return text;
}

}  // namespace sw::expr
