// The printer: readable text that muParser reads back to the same value. Common practice,
// no published source.
#include "core/expr/expr.h"
#include "formula_generator.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>

using namespace sw::expr;

namespace {
std::string printed(const std::string& text) { return Expression::parse(text, {"x", "y", "z"}).toText(); }
}  // namespace

TEST(Printer, UsesMinimalParenthesesForMuParserPrecedence) {
    EXPECT_EQ(printed("(x*y)+z"), "x*y + z");
    EXPECT_EQ(printed("x*(y+z)"), "x*(y + z)");
    EXPECT_EQ(printed("(x-y)-z"), "x - y - z");
    EXPECT_EQ(printed("x-(y-z)"), "x - (y - z)");
    EXPECT_EQ(printed("x+(y+z)"), "x + (y + z)") << "keeps the rounding order";
    EXPECT_EQ(printed("x^(y^z)"), "x^y^z");
    EXPECT_EQ(printed("(x^y)^z"), "(x^y)^z");
    EXPECT_EQ(printed("-(x^2)"), "-x^2");
    EXPECT_EQ(printed("(-x)^2"), "(-x)^2");
    EXPECT_EQ(printed("x^(-y)"), "x^(-y)");
    EXPECT_EQ(printed("x < y && y < z || z == 1"), "x < y && y < z || z == 1");
    EXPECT_EQ(printed("x > 0 ? y : z"), "x > 0 ? y : z");
    EXPECT_EQ(printed("(x > 0 ? y : z)*2"), "2*(x > 0 ? y : z)");
    EXPECT_EQ(printed("atan2(y, x) + min(x, y, z)"), "atan2(y, x) + min(min(x, y), z)");
    EXPECT_EQ(printed("log(x)"), "ln(x)");
}

TEST(Printer, NumbersRoundTripInTheCLocale) {
    EXPECT_EQ(printed("0.1*x"), "0.1*x");
    EXPECT_EQ(printed("x*1e-300"), "1e-300*x");
    EXPECT_EQ(printed("123456789.125*x"), "123456789.125*x");
    EXPECT_EQ(printed("2*pi*x"), "6.283185307179586*x");
    EXPECT_EQ(printed("pi*x"), "pi*x");
    EXPECT_EQ(printed("e^x"), "e^x");
    EXPECT_EQ(Expression::parse("pi*x", {"x", "pi"}).toText(), "pi*x") << "the symbol pi";
}

// muParser has no inf or nan literal; non-finite constants print as the division giving them.
TEST(Printer, NeverPrintsInfOrNan) {
    EXPECT_EQ(printed("x + 1/0"), "x + (1/0)");
    EXPECT_EQ(printed("x + -1/0"), "x - (1/0)");
    EXPECT_EQ(printed("min(x, -1/0)"), "min(x, (-1/0))");
    EXPECT_EQ(printed("x*(0/0)"), "(0/0)*x");
    for (const char* text : {"x + 1/0", "x - 1/0", "x*(0/0)"}) {
        auto f = Expression::parse(text, {"x"});
        auto back = Expression::parse(f.toText(), {"x"});
        const double a = f.evaluate({1.0}), b = back.evaluate({1.0});
        EXPECT_TRUE(a == b || (std::isnan(a) && std::isnan(b))) << text;
    }
}

TEST(Printer, TextOfGeneratedFormulasAndTheirDerivativesReadsBackToTheSameValue) {
    gen::FormulaGenerator generator(424242u, false);
    std::mt19937 rng(1);
    std::uniform_real_distribution<double> coordinate(-3.0, 3.0);
    int compared = 0;
    for (int k = 0; k < 200; ++k) {
        const std::string text = generator.next(4);
        auto f = Expression::parse(text, {"x", "y", "z"});
        std::vector<Expression> all{f};
        for (auto& g : gradient(f)) all.push_back(g);
        for (const auto& e : all) {
            const std::string out = e.toText();
            if (out.size() > kMaxFormulaLength) continue;  // readable only; beyond what we accept as input
            auto back = Expression::parse(out, {"x", "y", "z"});
            for (int p = 0; p < 3; ++p) {
                const std::vector<double> at{coordinate(rng), coordinate(rng), coordinate(rng)};
                const double a = e.evaluate(at), b = back.evaluate(at);
                if (std::isnan(a)) EXPECT_TRUE(std::isnan(b)) << out;
                else EXPECT_EQ(a, b) << text << "\n printed as " << out;
                ++compared;
            }
        }
    }
    std::printf("printer round trips compared: %d\n", compared);
    EXPECT_GT(compared, 1000);
}
