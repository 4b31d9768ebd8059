#pragma once
// One rule for reading decimal numbers typed by people, used everywhere a number is read:
// formula literals, command-line values (--at, --from, --box, tolerances), CSV cells and
// study-file numbers. See docs/robustness.md.
//
//   - the text is a plain decimal number: optional sign, digits with an optional '.', an
//     optional exponent (1.5, -2e-3, .5, 5.); never inf, nan, hex or a decimal comma;
//   - a number whose magnitude is above the largest double (1.7976931348623157e308) is
//     "out of range" (overflow), never infinity and never "not a number";
//   - a non-zero number whose magnitude is below the smallest positive double
//     (4.9406564584124654e-324) is "out of range" too (it would silently become 0); numbers
//     between that and 2.2e-308 (subnormal) are accepted with their reduced precision;
//   - zero written with any exponent (0e-999) is zero.
// Locale-free (std::from_chars).

#include <string>
#include <string_view>

namespace sw {

enum class NumberStatus {
    Ok,
    NotANumber,  // not of the form above
    TooLarge,    // |value| > 1.7976931348623157e308
    TooSmall,    // non-zero, but |value| < 4.9406564584124654e-324 (would read as 0)
};

// Reads the whole of `text` (no surrounding spaces) by the rule above. `allowPlus` accepts a
// leading '+' (command line, CSV); JSON and formulas have none.
NumberStatus readDecimal(std::string_view text, double& value, bool allowPlus = true);

// The sentence for a number that is out of range, e.g.
// "1e400 is out of range (larger in magnitude than 1.7976931348623157e308, the largest double)".
std::string outOfRangeText(std::string_view text, NumberStatus status);

}  // namespace sw
