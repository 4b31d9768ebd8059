// The one number rule (core/expr/number_text.h). Limits of IEEE 754 binary64: largest finite
// 1.7976931348623157e308, smallest subnormal 4.9406564584124654e-324 (IEEE 754-2019 §3.3).
#include "core/expr/number_text.h"

#include <gtest/gtest.h>

#include <cmath>

using sw::NumberStatus;
using sw::readDecimal;

namespace {
NumberStatus status(const char* text, bool allowPlus = true) {
    double v = 0;
    return readDecimal(text, v, allowPlus);
}
double value(const char* text) {
    double v = -12345;
    EXPECT_EQ(readDecimal(text, v), NumberStatus::Ok) << text;
    return v;
}
}  // namespace

TEST(NumberText, PlainDecimalsAreRead) {
    EXPECT_EQ(value("1.5"), 1.5);
    EXPECT_EQ(value("-2e-3"), -2e-3);
    EXPECT_EQ(value(".5"), 0.5);
    EXPECT_EQ(value("5."), 5.0);
    EXPECT_EQ(value("+3"), 3.0);
    EXPECT_EQ(value("1.7976931348623157e308"), 1.7976931348623157e308);
    EXPECT_EQ(value("4.9406564584124654e-324"), 4.9406564584124654e-324);
    EXPECT_EQ(value("1e-310"), 1e-310);  // subnormal: accepted
    EXPECT_EQ(value("0e-999"), 0.0);     // zero with any exponent
    EXPECT_EQ(value("0.000e99999"), 0.0);
}

TEST(NumberText, OverflowAndUnderflowAreOutOfRange) {
    EXPECT_EQ(status("1e400"), NumberStatus::TooLarge);
    EXPECT_EQ(status("-1e400"), NumberStatus::TooLarge);
    EXPECT_EQ(status("1.8e308"), NumberStatus::TooLarge);
    EXPECT_EQ(status("1000000000000000000000000000000000000000e300"), NumberStatus::TooLarge);
    EXPECT_EQ(status("1e-400"), NumberStatus::TooSmall);
    EXPECT_EQ(status("-2e-324"), NumberStatus::TooSmall);
    EXPECT_EQ(status("0.0000001e-320"), NumberStatus::TooSmall);
    EXPECT_EQ(status("1e99999999999999999999"), NumberStatus::TooLarge);
    EXPECT_NE(sw::outOfRangeText("1e400", NumberStatus::TooLarge).find("1e400 is out of range"), std::string::npos);
    EXPECT_NE(sw::outOfRangeText("1e-400", NumberStatus::TooSmall).find("write 0 for zero"), std::string::npos);
}

TEST(NumberText, OtherTextIsNotANumber) {
    for (const char* text : {"", "inf", "nan", "-inf", "0x10", "1,5", "1e", "1e+", ".", "-", "+", " 1", "1 ", "1.2.3",
                             "e5", "1e5x", "--1", "\xff"})
        EXPECT_EQ(status(text), NumberStatus::NotANumber) << "'" << text << "'";
    EXPECT_EQ(status("+3", false), NumberStatus::NotANumber);  // formulas and JSON have no leading '+'
}
