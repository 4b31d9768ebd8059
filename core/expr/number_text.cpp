#include "core/expr/number_text.h"

#include <charconv>
#include <cmath>

namespace sw {

namespace {

bool isDigit(char c) { return c >= '0' && c <= '9'; }

}  // namespace

NumberStatus readDecimal(std::string_view text, double& value, bool allowPlus) {
    std::size_t i = 0;
    const std::size_t n = text.size();
    if (i < n && (text[i] == '-' || (allowPlus && text[i] == '+'))) ++i;
    const std::size_t mantissaStart = i;
    std::size_t integerDigits = 0, fractionDigits = 0;
    bool nonZero = false;
    // Decimal exponent of the first non-zero digit, from the mantissa alone.
    long leadExponent = 0;
    bool seenLead = false;
    while (i < n && isDigit(text[i])) {
        if (text[i] != '0' && !seenLead) {
            seenLead = true;
            nonZero = true;
        }
        if (seenLead) ++leadExponent;
        ++integerDigits;
        ++i;
    }
    if (seenLead) --leadExponent;  // d.ddd x 10^(digits - 1)
    if (i < n && text[i] == '.') {
        ++i;
        long position = -1;
        while (i < n && isDigit(text[i])) {
            if (text[i] != '0' && !seenLead) {
                seenLead = true;
                nonZero = true;
                leadExponent = position;
            }
            --position;
            ++fractionDigits;
            ++i;
        }
    }
    if (integerDigits + fractionDigits == 0) return NumberStatus::NotANumber;
    long exponent = 0;
    if (i < n && (text[i] == 'e' || text[i] == 'E')) {
        ++i;
        bool negative = false;
        if (i < n && (text[i] == '+' || text[i] == '-')) negative = text[i++] == '-';
        if (i >= n || !isDigit(text[i])) return NumberStatus::NotANumber;
        while (i < n && isDigit(text[i])) {
            if (exponent < 100000000) exponent = exponent * 10 + (text[i] - '0');
            ++i;
        }
        if (negative) exponent = -exponent;
    }
    if (i != n) return NumberStatus::NotANumber;
    const char* first = text.data() + mantissaStart;
    if (mantissaStart > 0 && text[0] == '-') --first;  // from_chars reads '-' but not '+'
    double parsed = 0;
    const auto [ptr, ec] = std::from_chars(first, text.data() + n, parsed);
    if (ec == std::errc::result_out_of_range || (ec == std::errc() && std::isinf(parsed))) {
        if (!nonZero) {
            value = 0;
            return NumberStatus::Ok;
        }
        return leadExponent + exponent > 0 ? NumberStatus::TooLarge : NumberStatus::TooSmall;
    }
    if (ec != std::errc() || ptr != text.data() + n) return NumberStatus::NotANumber;
    if (parsed == 0 && nonZero) return NumberStatus::TooSmall;
    value = parsed;
    return NumberStatus::Ok;
}

std::string outOfRangeText(std::string_view text, NumberStatus status) {
    std::string shown(text.substr(0, 40));
    if (text.size() > 40) shown += "...";
    if (status == NumberStatus::TooLarge)
        return shown + " is out of range (larger in magnitude than 1.7976931348623157e308, the largest number)";
    if (status == NumberStatus::TooSmall)
        return shown +
               " is out of range (non-zero but smaller in magnitude than 4.9406564584124654e-324, the smallest "
               "positive number; write 0 for zero)";
    return shown + " is not a number";
}

}  // namespace sw
