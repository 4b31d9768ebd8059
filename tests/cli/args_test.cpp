// The shared argument helpers of the command line (app/cli/args.cpp).
#include "app/cli/cli.h"

#include <gtest/gtest.h>

#include <limits>

#include <sstream>

using namespace sw::cli;

TEST(Args, SplitsOptionsFlagsAndPositionals) {
    auto parsed = parseArgs({"x^2", "--at", "x=1", "--json", "--method=bfgs", "--method", "newton"}, {"json"},
                            {"at", "method"});
    ASSERT_EQ(parsed.positional.size(), 1u);
    EXPECT_EQ(parsed.positional[0], "x^2");
    EXPECT_TRUE(parsed.has("json"));
    EXPECT_EQ(parsed.get("at"), "x=1");
    EXPECT_EQ(parsed.all("method").size(), 2u);
    EXPECT_THROW(parsed.get("method"), UsageError);
}

TEST(Args, NegativeNumbersAreNotOptions) {
    auto parsed = parseArgs({"-x^2", "-1"}, {}, {});
    EXPECT_EQ(parsed.positional.size(), 2u);
}

TEST(Args, UnknownOptionNamesWhatTheVerbTakes) {
    try {
        parseArgs({"--jsn"}, {"json"}, {"at"});
        FAIL() << "expected a UsageError";
    } catch (const UsageError& e) {
        std::string message = e.what();
        EXPECT_NE(message.find("--jsn"), std::string::npos);
        EXPECT_NE(message.find("--json"), std::string::npos);
        EXPECT_NE(message.find("--at"), std::string::npos);
    }
}

TEST(Args, MissingValueIsReported) {
    EXPECT_THROW(parseArgs({"--at"}, {}, {"at"}), UsageError);
    EXPECT_THROW(parseArgs({"--json=1"}, {"json"}, {}), UsageError);
}

TEST(Args, AssignmentsKeepTheirOrder) {
    auto values = parseAssignments("y=2, x=-1.5e-3", "at");
    ASSERT_EQ(values.size(), 2u);
    EXPECT_EQ(values[0].first, "y");
    EXPECT_DOUBLE_EQ(values[1].second, -1.5e-3);
}

TEST(Args, BadAssignmentsNameTheItem) {
    try {
        parseAssignments("x=1,y", "at");
        FAIL();
    } catch (const UsageError& e) {
        EXPECT_NE(std::string(e.what()).find("item 2 'y'"), std::string::npos) << e.what();
    }
    EXPECT_THROW(parseAssignments("x=1,x=2", "at"), UsageError);
    EXPECT_THROW(parseAssignments("x=1,5", "at"), UsageError);
    EXPECT_THROW(parseAssignments("2x=1", "at"), UsageError);
    try {
        parseAssignments("x=1,5", "at");
    } catch (const UsageError& e) {
        EXPECT_NE(std::string(e.what()).find("name=value"), std::string::npos);
    }
}

TEST(Args, NumbersAreLocaleFreeAndStrict) {
    EXPECT_DOUBLE_EQ(parseNumber("2.5", "v"), 2.5);
    EXPECT_DOUBLE_EQ(parseNumber("+1e3", "v"), 1000.0);
    EXPECT_THROW(parseNumber("2,5", "v"), UsageError);
    EXPECT_THROW(parseNumber("1e999", "v"), UsageError);
    EXPECT_THROW(parseNumber("nan", "v"), UsageError);
    EXPECT_THROW(parseNumber("", "v"), UsageError);
    EXPECT_EQ(parseInteger("40", "grid", 2, 5000), 40);
    EXPECT_THROW(parseInteger("1", "grid", 2, 5000), UsageError);
    EXPECT_THROW(parseInteger("4.5", "grid", 2, 5000), UsageError);
}

TEST(Args, RangesNeedLowBelowHigh) {
    auto ranges = parseRanges("x=-5:5,y=0:1e-3", "box");
    ASSERT_EQ(ranges.size(), 2u);
    EXPECT_DOUBLE_EQ(ranges[0].lo, -5);
    EXPECT_DOUBLE_EQ(ranges[1].hi, 1e-3);
    EXPECT_THROW(parseRanges("x=5:-5", "box"), UsageError);
    EXPECT_THROW(parseRanges("x=5", "box"), UsageError);
}

TEST(Args, NumbersPrintShortestRoundTrip) {
    EXPECT_EQ(formatNumber(0.1), "0.1");
    EXPECT_EQ(formatNumber(1.0 / 3.0, 4), "0.3333");
    EXPECT_EQ(formatNumber(std::numeric_limits<double>::infinity()), "inf");
}

TEST(CommandLine, UnknownVerbIsBadUsage) {
    std::ostringstream out, err;
    EXPECT_EQ(runCommandLine({"frobnicate"}, out, err), 2);
    EXPECT_NE(err.str().find("unknown verb 'frobnicate'"), std::string::npos);
}

TEST(CommandLine, HelpListsEveryVerb) {
    std::ostringstream out, err;
    EXPECT_EQ(runCommandLine({"--help"}, out, err), 0);
    for (const Verb& v : verbs()) EXPECT_NE(out.str().find(v.name), std::string::npos) << v.name;
    for (const Verb& v : verbs()) {
        std::ostringstream o, e;
        EXPECT_EQ(runCommandLine({v.name, "--help"}, o, e), 0);
        EXPECT_FALSE(o.str().empty());
    }
}
