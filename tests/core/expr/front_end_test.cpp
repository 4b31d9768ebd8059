// The front end: what formulas read as, how muParser's bytecode maps onto our operators, and
// every bad-input case with its message and position. Expected values are common practice
// (no published source) unless stated.
#include "core/expr/expr.h"

#include <muParser.h>

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <string>

using sw::expr::Expression;
using sw::expr::FormulaError;

namespace {

double eval(const std::string& text, const std::vector<std::string>& names = {}, const std::vector<double>& values = {}) {
    return Expression::parse(text, names).evaluate(values);
}

// Parses and expects a FormulaError; returns it for checks on message and position.
FormulaError errorOf(const std::string& text, const std::vector<std::string>& names = {"x", "y"}) {
    try {
        Expression::parse(text, names);
    } catch (const FormulaError& e) {
        return e;
    }
    ADD_FAILURE() << "no error for: " << text;
    return FormulaError("none", text, -1);
}

}  // namespace

TEST(FrontEnd, ReadsArithmeticWithMuParserPrecedence) {
    EXPECT_EQ(eval("1+2*3"), 7);
    EXPECT_EQ(eval("-2^2"), -4);          // unary minus binds weaker than ^ in muParser
    EXPECT_EQ(eval("2^3^2"), 512);        // ^ is right-associative
    EXPECT_EQ(eval("2^-1"), 0.5);
    EXPECT_EQ(eval("8-3-2"), 3);
    EXPECT_EQ(eval("8/4/2"), 1);
    EXPECT_EQ(eval("2*-3"), -6);
    EXPECT_EQ(eval("+3"), 3);
    EXPECT_EQ(eval("(1+2)*(3+4)"), 21);
}

TEST(FrontEnd, ReadsScientificNotationWithAPoint) {
    EXPECT_EQ(eval("1e3"), 1000);
    EXPECT_EQ(eval("2.5E-2"), 0.025);
    EXPECT_EQ(eval("1e+2*2"), 200);
    EXPECT_EQ(eval(".5+1."), 1.5);
}

TEST(FrontEnd, ReadsEveryFunction) {
    const double x = 0.3;
    const std::vector<std::string> v{"x"};
    EXPECT_DOUBLE_EQ(eval("sin(x)", v, {x}), std::sin(x));
    EXPECT_DOUBLE_EQ(eval("cos(x)", v, {x}), std::cos(x));
    EXPECT_DOUBLE_EQ(eval("tan(x)", v, {x}), std::tan(x));
    EXPECT_DOUBLE_EQ(eval("asin(x)", v, {x}), std::asin(x));
    EXPECT_DOUBLE_EQ(eval("acos(x)", v, {x}), std::acos(x));
    EXPECT_DOUBLE_EQ(eval("atan(x)", v, {x}), std::atan(x));
    EXPECT_DOUBLE_EQ(eval("sinh(x)", v, {x}), std::sinh(x));
    EXPECT_DOUBLE_EQ(eval("cosh(x)", v, {x}), std::cosh(x));
    EXPECT_DOUBLE_EQ(eval("tanh(x)", v, {x}), std::tanh(x));
    EXPECT_DOUBLE_EQ(eval("asinh(x)", v, {x}), std::asinh(x));
    EXPECT_DOUBLE_EQ(eval("acosh(x+1)", v, {x}), std::acosh(x + 1));
    EXPECT_DOUBLE_EQ(eval("atanh(x)", v, {x}), std::atanh(x));
    EXPECT_DOUBLE_EQ(eval("exp(x)", v, {x}), std::exp(x));
    EXPECT_DOUBLE_EQ(eval("ln(x)", v, {x}), std::log(x));
    EXPECT_DOUBLE_EQ(eval("log10(x)", v, {x}), std::log10(x));
    EXPECT_DOUBLE_EQ(eval("log2(x)", v, {x}), std::log2(x));
    EXPECT_DOUBLE_EQ(eval("sqrt(x)", v, {x}), std::sqrt(x));
    EXPECT_EQ(eval("abs(-x)", v, {x}), x);
    EXPECT_EQ(eval("sign(-x)", v, {x}), -1);
    EXPECT_EQ(eval("sign(0)"), 0);
    EXPECT_DOUBLE_EQ(eval("atan2(x, -1)", v, {x}), std::atan2(x, -1.0));
    EXPECT_EQ(eval("min(3, 1, 2)"), 1);
    EXPECT_EQ(eval("max(3, 1, 2, 5)"), 5);
}

TEST(FrontEnd, LogIsTheNaturalLogarithmAsInMuParser) {
    // muParser 2.3.3's own built-in log is ln; we keep that meaning.
    mu::Parser plain;
    plain.SetExpr("log(100)");
    EXPECT_DOUBLE_EQ(plain.Eval(), std::log(100.0));
    EXPECT_DOUBLE_EQ(eval("log(100)"), std::log(100.0));
    EXPECT_DOUBLE_EQ(eval("ln(100)"), std::log(100.0));
}

TEST(FrontEnd, KnowsPiAndEUnlessASymbolShadowsThem) {
    EXPECT_EQ(eval("pi"), std::numbers::pi);
    EXPECT_EQ(eval("e"), std::numbers::e);
    EXPECT_EQ(eval("e*2", {"e"}, {5.0}), 10);
    EXPECT_EQ(eval("pi+1", {"pi"}, {1.0}), 2);
}

TEST(FrontEnd, ComparisonsLogicAndConditionals) {
    EXPECT_EQ(eval("1 < 2"), 1);
    EXPECT_EQ(eval("2 <= 1"), 0);
    EXPECT_EQ(eval("2 > 1"), 1);
    EXPECT_EQ(eval("1 >= 1"), 1);
    EXPECT_EQ(eval("1 == 1"), 1);
    EXPECT_EQ(eval("1 != 1"), 0);
    EXPECT_EQ(eval("x < 0 ? -x : x", {"x"}, {-3.0}), 3);
    EXPECT_EQ(eval("1 ? 2 : 3 ? 4 : 5"), 2);
    EXPECT_EQ(eval("0 ? 2 : 0 ? 4 : 5"), 5);
}

// PITFALLS.md: muParser's optimizer folds 0.5&&1 to 0. Our reading treats non-zero as true.
TEST(FrontEnd, LogicTreatsEveryNonZeroAsTrue) {
    EXPECT_EQ(eval("0.5 && 1"), 1);
    EXPECT_EQ(eval("x && 1", {"x"}, {0.5}), 1);
    EXPECT_EQ(eval("0 && 1"), 0);
    EXPECT_EQ(eval("0.25 || 0"), 1);
    EXPECT_EQ(eval("0 || 0"), 0);
    EXPECT_EQ(eval("x || 0", {"x"}, {-1e-300}), 1);
    EXPECT_EQ(eval("x && 1", {"x"}, {std::nan("")}), 1);  // NaN is not zero
}

TEST(FrontEnd, NonFiniteResultsAreValuesNotErrors) {
    EXPECT_TRUE(std::isinf(eval("1/0")));
    EXPECT_TRUE(std::isnan(eval("0/0")));
    EXPECT_TRUE(std::isnan(eval("sqrt(-1)")));
    EXPECT_TRUE(std::isnan(eval("ln(-1)")));
    EXPECT_EQ(eval("ln(0)"), -INFINITY);
    EXPECT_TRUE(std::isnan(eval("(-8)^(1/3)")));
}

TEST(FrontEnd, ListsTheSymbolsInUse) {
    auto f = Expression::parse("y*2 + sin(y)", {"x", "y", "z"});
    EXPECT_EQ(f.usedSymbols(), (std::vector<std::string>{"y"}));
    EXPECT_EQ(f.symbols().size(), 3u);
}

// Pins the bytecode reading: if a muParser upgrade changes what GetByteCode() yields for
// these shapes, this fails loudly.
TEST(FrontEnd, BytecodeOfMuParserIsReadAsExpected) {
    mu::Parser p;
    double x = 0;
    p.DefineVar("x", &x);
    p.EnableOptimizer(false);
    p.SetExpr("min(x,2,3)+(x<1?-x:x)");
    p.Eval();
    const auto& code = p.GetByteCode();
    const mu::SToken* t = code.GetBase();
    ASSERT_GE(code.GetSize(), 15u);
    EXPECT_EQ(t[0].Cmd, mu::cmVAR);
    EXPECT_EQ(t[0].Val.ptr, &x);
    EXPECT_EQ(t[1].Cmd, mu::cmVAL);
    EXPECT_EQ(t[1].Val.data2, 2.0);
    EXPECT_EQ(t[3].Cmd, mu::cmFUNC);
    EXPECT_EQ(t[3].Fun.argc, -3);  // variadic functions store minus the argument count
    EXPECT_EQ(t[6].Cmd, mu::cmLT);
    EXPECT_EQ(t[7].Cmd, mu::cmIF);
    EXPECT_EQ(t[9].Cmd, mu::cmFUNC);  // unary minus is a one-argument function
    EXPECT_EQ(t[9].Fun.argc, 1);
    EXPECT_EQ(t[10].Cmd, mu::cmELSE);
    EXPECT_EQ(t[12].Cmd, mu::cmENDIF);
    EXPECT_EQ(t[13].Cmd, mu::cmADD);
    EXPECT_EQ(t[14].Cmd, mu::cmEND);
    // And the whole path agrees with muParser's own value.
    for (double v : {-2.0, 0.5, 4.0}) {
        x = v;
        EXPECT_EQ(Expression::parse("min(x,2,3)+(x<1?-x:x)", {"x"}).evaluate({v}), p.Eval());
    }
}

// PITFALLS.md: muParser reports syntax errors only at the first Eval, not at SetExpr.
TEST(FrontEnd, SyntaxErrorsSurfaceAtParseTime) {
    mu::Parser p;
    EXPECT_NO_THROW(p.SetExpr("1+"));
    EXPECT_THROW(p.Eval(), mu::ParserError);
    // Our own scan now names this one before muParser evaluates (at the operator).
    auto e = errorOf("1+");
    EXPECT_EQ(e.reason(), "the formula ends after '+'; something must follow it");
    EXPECT_EQ(e.position(), 1);
    auto open = errorOf("sin(");
    EXPECT_EQ(open.reason(), "this parenthesis is never closed");
}

TEST(FormulaErrors, SyntaxErrorHasPositionAndCaret) {
    auto e = errorOf("x + * y");
    EXPECT_EQ(e.reason(), "unexpected operator '*'");
    EXPECT_EQ(e.position(), 4);
    EXPECT_EQ(e.withCaret(), "unexpected operator '*' (at column 5)\n  x + * y\n      ^");
}

TEST(FormulaErrors, MissingOperatorIsNamed) {
    auto e = errorOf("3 4");
    EXPECT_EQ(e.reason(), "unexpected number '4' (is an operator missing before it?)");
    EXPECT_EQ(e.position(), 2);
    auto v = errorOf("2 x");
    EXPECT_EQ(v.reason(), "unexpected name 'x' (is an operator missing before it?)");
    EXPECT_EQ(v.position(), 2);
}

TEST(FormulaErrors, UnknownNamesAreAllListedWithTheDeclaredVariables) {
    auto e = errorOf("x + a*b - a", {"x", "y"});
    EXPECT_EQ(e.reason(), "unknown names 'a', 'b'; the variables are x, y");
    EXPECT_EQ(e.position(), 4);
    auto one = errorOf("sin(t)", {});
    EXPECT_EQ(one.reason(), "unknown name 't' (no variables are declared)");
    EXPECT_EQ(one.position(), 4);
}

TEST(FormulaErrors, UnknownFunctionIsNamed) {
    auto e = errorOf("x + foo(y)");
    EXPECT_EQ(e.reason(), "unknown function 'foo'");
    EXPECT_EQ(e.position(), 4);
    auto v = errorOf("2*x(3)");
    EXPECT_EQ(v.reason(), "'x' is a variable, not a function");
    EXPECT_EQ(v.position(), 2);
}

TEST(FormulaErrors, WrongArgumentCountsAreNamed) {
    auto e = errorOf("1 + sin(x, y)");
    EXPECT_EQ(e.reason(), "sin takes 1 argument, got 2");
    EXPECT_EQ(e.position(), 4);
    auto a = errorOf("atan2(x)");
    EXPECT_EQ(a.reason(), "atan2 takes 2 arguments, got 1");
    EXPECT_EQ(a.position(), 0);
    auto m = errorOf("x*min(y)");
    EXPECT_EQ(m.reason(), "min takes 2 or more arguments, got 1");
    EXPECT_EQ(m.position(), 2);
    auto z = errorOf("exp()");
    EXPECT_EQ(z.reason(), "exp takes 1 argument, got 0");
    EXPECT_EQ(z.position(), 0);
}

TEST(FormulaErrors, EmptyAndBlankFormulas) {
    for (const char* text : {"", "   ", "\t\n"}) {
        auto e = errorOf(text);
        EXPECT_EQ(e.reason(), "the formula is empty");
        EXPECT_EQ(e.position(), -1);
    }
    auto p = errorOf("x*()");
    EXPECT_EQ(p.reason(), "empty parentheses");
    EXPECT_EQ(p.position(), 2);
}

// PITFALLS.md: "1,5" gives two results in muParser (and returns 5).
TEST(FormulaErrors, CommaOutsideAFunctionHintsAtADecimalComma) {
    mu::Parser p;
    p.SetExpr("1,5");
    EXPECT_EQ(p.Eval(), 5);
    EXPECT_EQ(p.GetNumResults(), 2);
    auto e = errorOf("1,5*x");
    EXPECT_EQ(e.reason(), "a comma only separates function arguments (for a decimal number write a point: 1.5, not 1,5)");
    EXPECT_EQ(e.position(), 1);
    auto nested = errorOf("(x,y)");
    EXPECT_EQ(nested.position(), 2);
}

// PITFALLS.md: "=" assigns into the bound variable in muParser.
TEST(FormulaErrors, AssignmentIsRejected) {
    mu::Parser p;
    double x = 1;
    p.DefineVar("x", &x);
    p.SetExpr("x=5");
    p.Eval();
    EXPECT_EQ(x, 5);  // the pitfall
    auto e = errorOf("x = 5");
    EXPECT_EQ(e.reason(), "'=' would assign a value; write '==' to compare");
    EXPECT_EQ(e.position(), 2);
    EXPECT_NO_THROW(Expression::parse("x == 5 || x <= 1 || x >= 2 || x != 3", {"x"}));
}

TEST(FormulaErrors, UnbalancedParentheses) {
    auto open = errorOf("2*(x+(y-1)");
    EXPECT_EQ(open.reason(), "this parenthesis is never closed");
    EXPECT_EQ(open.position(), 2);
    auto close = errorOf("x+1)*2");
    EXPECT_EQ(close.reason(), "this closing parenthesis has no opening one");
    EXPECT_EQ(close.position(), 3);
}

TEST(FormulaErrors, ConditionalWithoutElse) {
    auto e = errorOf("x > 0 ? 1");
    EXPECT_EQ(e.reason(), "'?' needs a ':' part (c ? a : b)");
    EXPECT_EQ(e.position(), 6);  // at the '?' (muParser gives no position)
    auto c = errorOf("x : 1");
    EXPECT_EQ(c.reason(), "':' without a '?' before it");
}

TEST(FormulaErrors, LengthLimit) {
    std::string text = "x";
    while (text.size() + 2 <= sw::expr::kMaxFormulaLength) text += "+1";
    text.resize(sw::expr::kMaxFormulaLength, ' ');
    EXPECT_NO_THROW(Expression::parse(text, {"x"}));
    auto e = errorOf(text + "+1", {"x"});
    EXPECT_EQ(e.reason(), "the formula has 10002 characters; the limit is 10000");
    EXPECT_EQ(e.position(), -1);
}

TEST(FormulaErrors, NestingLimitIsCheckedBeforeMuParser) {
    const int limit = sw::expr::kMaxNestingDepth;
    auto nested = [](int depth) { return std::string(depth, '(') + "x" + std::string(depth, ')'); };
    auto f = Expression::parse(nested(limit), {"x"});
    EXPECT_EQ(f.evaluate({2.0}), 2.0);
    auto e = errorOf(nested(limit + 1), {"x"});
    EXPECT_EQ(e.reason(), "parentheses are nested more than 200 deep");
    EXPECT_EQ(e.position(), limit);
    // Function calls count as nesting too.
    std::string calls = "x";
    for (int i = 0; i <= limit; ++i) calls = "sin(" + calls + ")";
    EXPECT_EQ(errorOf(calls, {"x"}).position(), 4 * limit + 3);  // the '(' of the call one level too deep
}

// Long chains without parentheses make deep graphs; every pass of ours is iterative.
TEST(FormulaErrors, DeepChainsWithinTheLengthLimitAreSafe) {
    std::string sum = "x";
    while (sum.size() + 2 < sw::expr::kMaxFormulaLength) sum += "+x";
    auto f = Expression::parse(sum, {"x"});
    const double n = static_cast<double>((sum.size() + 1) / 2);
    EXPECT_EQ(f.evaluate({1.0}), n);
    EXPECT_EQ(f.derivative(0).evaluate({1.0}), n);
    EXPECT_FALSE(f.toText().empty());
    std::string power;
    for (int i = 0; i < 1000; ++i) power += "1.0001^";
    auto p = Expression::parse(power + "x", {"x"});
    EXPECT_TRUE(std::isfinite(p.evaluate({0.5})));
    std::string conditional;
    for (int i = 0; i < 900; ++i) conditional += "x>" + std::to_string(i) + "?" + std::to_string(i) + ":";
    conditional += "0";
    auto c = Expression::parse(conditional, {"x"});
    EXPECT_EQ(c.evaluate({10.5}), 0);
    EXPECT_EQ(c.evaluate({-1.0}), 0);
}

TEST(FormulaErrors, BadSymbolNamesAreRejected) {
    EXPECT_EQ(errorOf("1", {"sin"}).reason(), "'sin' cannot name a variable: it is a function");
    EXPECT_EQ(errorOf("1", {"2x"}).reason(),
              "'2x' is not a valid variable name (letters, digits and _, not starting with a digit)");
    EXPECT_EQ(errorOf("1", {"x", "x"}).reason(), "the variable 'x' is declared twice");
}

TEST(FormulaErrors, CaretCountsCharactersNotBytes) {
    auto e = errorOf("\xC3\xA9 + *", {});
    EXPECT_GE(e.position(), 0);
    FormulaError manual("bad", "\xC3\xA9+*", 3);
    // position 3 is the byte of '*', the third character: column 3, caret after two characters.
    EXPECT_EQ(manual.withCaret(), "bad (at column 3)\n  \xC3\xA9+*\n    ^");
}

// Issue 17: messages that misled, and muParser's own sentences that reached the user.
TEST(FormulaErrors, CharactersAreNamedByCodeAndColumn) {
    auto greek = errorOf("t\xCE\xB1 + x");
    EXPECT_EQ(greek.reason(), "non-ASCII character '\xCE\xB1' (U+03B1) in a name; names use ASCII letters, digits and _");
    EXPECT_EQ(greek.position(), 1);
    auto nul = errorOf(std::string("x\0+y", 4));
    EXPECT_EQ(nul.reason(), "control character NUL (U+0000) in the formula; formulas are plain text");
    EXPECT_EQ(nul.position(), 1);
    // The echo shows the NUL as a control picture; the message is not cut short.
    EXPECT_EQ(nul.withCaret(), std::string(nul.what()) + "\n  x\xE2\x90\x80+y\n   ^");
    EXPECT_EQ(errorOf("x+\xff").reason(), "byte 0xFF is not valid UTF-8 text");
    EXPECT_EQ(errorOf("x\xE2\x88\x92y").reason(), "non-ASCII character '\xE2\x88\x92' (U+2212) in the formula; write the ASCII '-'");
    EXPECT_EQ(errorOf("x\xE2\x80\x8By").reason(), "non-ASCII character (U+200B) in a name; names use ASCII letters, digits and _");
    EXPECT_EQ(errorOf("x + \"a\"").position(), 4);
    EXPECT_EQ(errorOf("x;y").reason(), "';' has no meaning in a formula (one formula only; a comma separates function arguments)");
}

TEST(FormulaErrors, FunctionsUsedAsNamesAndSignsAndEndings) {
    EXPECT_EQ(errorOf("sin + x").reason(), "'sin' is a function: write sin(...)");
    auto signs = errorOf("(--x)");
    EXPECT_EQ(signs.position(), 2);  // the second sign (muParser says 3)
    EXPECT_NE(signs.reason().find("two signs in a row"), std::string::npos);
    auto end = errorOf("x--");
    EXPECT_EQ(end.reason(), "the formula ends after '-'; something must follow it");
    EXPECT_EQ(end.position(), 2);
    EXPECT_EQ(errorOf("x &y").reason(), "'&' alone has no meaning; write '&&' for 'and'");
    EXPECT_EQ(errorOf("!x").reason(), "'!' only appears in '!=' (for 'not x' write x == 0)");
    EXPECT_NO_THROW(Expression::parse("x != 1 && y || x", {"x", "y"}));
}

TEST(FormulaErrors, NumbersOutOfRangeFollowTheOneRule) {
    auto big = errorOf("x*1e400");
    EXPECT_NE(big.reason().find("1e400 is out of range"), std::string::npos) << big.reason();
    EXPECT_EQ(big.position(), 2);
    auto tiny = errorOf("x + 1e-400");
    EXPECT_NE(tiny.reason().find("1e-400 is out of range"), std::string::npos) << tiny.reason();
    EXPECT_EQ(eval("1e-310*1e10"), 1e-310 * 1e10);  // a subnormal literal is a number
    EXPECT_EQ(errorOf("2*1e").reason(), "the number '1e' has an exponent without digits (write e.g. 1e5)");
}

TEST(FormulaErrors, LongListsOfUnknownNamesAreCapped) {
    std::string text = "x";
    for (int i = 0; i < 1500; ++i) text += "+a" + std::to_string(i);
    std::vector<std::string> many;
    for (int i = 0; i < 30; ++i) many.push_back("v" + std::to_string(i));
    many.push_back("x");
    try {
        Expression::parse(text, many);
        FAIL();
    } catch (const FormulaError& e) {
        EXPECT_NE(e.reason().find("'a9' and 1490 more"), std::string::npos) << e.reason();
        EXPECT_NE(e.reason().find("v9 and 21 more"), std::string::npos) << e.reason();
        EXPECT_LT(e.reason().size(), 300u);
        EXPECT_LT(e.withCaret().size(), 600u);  // the echo is a window around the place
    }
}

TEST(FormulaErrors, MuParsersOwnSentencesNeverReachTheUser) {
    for (const char* text : {"x--", "\"", "x+\"a\"", "x>0 ? 1", "x ? : 1", "sin", "1e", "x $ 1", "x ** 2", "()", "(",
                             ")", "x,", ",x", "1..2", "x 2", "(x)(x)", "sin(x)x", "x ? 1 : 2 : 3", "+-x", "x^^2", "--x",
                             "x*-", "x/", "min(x,)", "atan2(,x)", "x ? 1 :", "(x ? 1)", "x = = 1"}) {
        try {
            Expression::parse(text, {"x"});
            ADD_FAILURE() << "no error for " << text;
        } catch (const FormulaError& e) {
            const std::string m = e.what();
            for (const char* theirs : {"Internal error", "Unterminated string", "No suitable overload", "Unexpected token",
                                       "found at position", "cannot read the formula:", "ApplyBinOprt"})
                EXPECT_EQ(m.find(theirs), std::string::npos) << text << " -> " << m;
            EXPECT_GE(e.position(), 0) << text << " -> " << m;  // every one has a place
        }
    }
}
