// The fit verb end to end, in process: reading the bundled samples, the JSON keys, the
// human report's caution, and errors that name their place. Expected parameter values are
// the samples' stated true values (samples/make_samples.py), checked loosely: the noise is
// real, so the estimates must fall within a few standard errors.
#include "app/cli/cli.h"
#include "core/study/provenance.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <sstream>

namespace {

struct Outcome {
    int code;
    std::string out, err;
};

Outcome run(std::vector<std::string> args) {
    std::ostringstream out, err;
    args.insert(args.begin(), "fit");
    const int code = sw::cli::runCommandLine(args, out, err);
    return {code, out.str(), err.str()};
}

const std::string kSensor = std::string(SW_SOURCE_DIR) + "/samples/sensor-warmup.csv";
const std::string kGermination = std::string(SW_SOURCE_DIR) + "/samples/seed-germination.csv";

}  // namespace

TEST(FitVerb, FitsTheSensorSampleAndPrintsJsonWithEveryKey) {
    Outcome o = run({"--data", kSensor, "--model", "a - b*exp(-minutes/tau)", "--response", "temp", "--start",
                     "a=40,b=20,tau=5", "--json"});
    ASSERT_EQ(o.code, 0) << o.err;
    const auto j = nlohmann::json::parse(o.out);
    for (const char* key : {"parameters", "standard_errors", "residual_sum_of_squares", "termination", "message",
                            "iterations", "covariance", "correlation", "trace", "confidence_intervals", "warnings",
                            "degrees_of_freedom", "data"})
        EXPECT_TRUE(j.contains(key)) << key;
    EXPECT_EQ(j["method"], "levenberg-marquardt");
    EXPECT_TRUE(j["converged"].get<bool>());
    EXPECT_EQ(j["degrees_of_freedom"], 118);
    EXPECT_EQ(j["data"]["separator"], "comma");
    // True values a = 41.5, b = 18.2, tau = 7.5 (samples/make_samples.py): within 4 standard errors.
    for (const auto& [name, truth] : {std::pair<std::string, double>{"a", 41.5}, {"b", 18.2}, {"tau", 7.5}}) {
        const double estimate = j["parameters"][name], se = j["standard_errors"][name];
        EXPECT_LT(std::fabs(estimate - truth), 4 * se) << name;
    }
    EXPECT_EQ(j["covariance"].size(), 3u);
    EXPECT_FALSE(j["trace"].empty());
    EXPECT_EQ(j["trace"][0]["damping_name"], "lambda");
}

TEST(FitVerb, FitsTheGerminationSampleWithTheLogisticLoss) {
    Outcome o = run({"--data", kGermination, "--model", "b0 + b1*moisture + b2*chill_days", "--response",
                     "germinated", "--loss", "logistic", "--start", "b0=0,b1=0,b2=0", "--json", "--summary"});
    ASSERT_EQ(o.code, 0) << o.err;
    const auto j = nlohmann::json::parse(o.out);
    EXPECT_EQ(j["loss"], "logistic");
    EXPECT_TRUE(j.contains("log_likelihood"));
    EXPECT_TRUE(j.contains("deviance"));
    EXPECT_FALSE(j.contains("trace"));
    // True values b0 = -6, b1 = 0.18, b2 = 0.09 (samples/make_samples.py): within 4 standard errors.
    for (const auto& [name, truth] : {std::pair<std::string, double>{"b0", -6.0}, {"b1", 0.18}, {"b2", 0.09}}) {
        const double estimate = j["parameters"][name], se = j["standard_errors"][name];
        EXPECT_LT(std::fabs(estimate - truth), 4 * se) << name;
    }
}

std::string oneLine(std::string text) {
    std::replace(text.begin(), text.end(), '\n', ' ');
    return text;
}

TEST(FitVerb, HumanReportShowsTheEquationTheEstimatesAndEndsWithTheCaution) {
    Outcome o = run({"--data", kSensor, "--model", "a - b*exp(-minutes/tau)", "--response", "temp", "--start",
                     "a=40,b=20,tau=5", "--summary"});
    ASSERT_EQ(o.code, 0) << o.err;
    EXPECT_NE(o.out.find("comma-separated (detected)"), std::string::npos);
    EXPECT_NE(o.out.find("Equation:  temp = a - b*exp(-minutes/tau) + error"), std::string::npos) << o.out;
    EXPECT_NE(o.out.find("95% intervals from the t distribution with 118 degrees of freedom"), std::string::npos);
    EXPECT_NE(o.out.find("standard error"), std::string::npos);
    EXPECT_EQ(o.out.find("Std. error"), std::string::npos);
    EXPECT_NE(o.out.find("Correlations between estimates, strongest first"), std::string::npos);
    EXPECT_NE(o.out.find("residual standard deviation"), std::string::npos);
    // The estimates table: one row per parameter, in the order given, each with its interval.
    const auto a = o.out.find("\n  a "), b = o.out.find("\n  b "), tau = o.out.find("\n  tau ");
    ASSERT_NE(a, std::string::npos) << o.out;
    EXPECT_LT(a, b);
    EXPECT_LT(b, tau);
    const std::string tail = "practice.\n";
    ASSERT_GE(o.out.size(), tail.size());
    EXPECT_EQ(o.out.substr(o.out.size() - tail.size()), tail);
    EXPECT_NE(oneLine(o.out).find("where safety is involved defer to the applicable codes and standards and to "
                                  "licensed professional practice."),
              std::string::npos)
        << o.out;
}

// A likelihood fit is judged by its deviance, not by squared differences from the linear predictor.
TEST(FitVerb, LogisticAndPoissonReportsGiveTheDevianceNotASumOfSquares) {
    for (const std::string loss : {"logistic", "poisson"}) {
        SCOPED_TRACE(loss);
        const std::string response = loss == "logistic" ? "germinated" : "chill_days";
        Outcome o = run({"--data", kGermination, "--model", "b0 + b1*moisture", "--response", response, "--loss", loss,
                         "--start", "b0=0,b1=0", "--summary"});
        ASSERT_EQ(o.code, 0) << o.err;
        EXPECT_NE(o.out.find("deviance"), std::string::npos) << o.out;
        EXPECT_NE(o.out.find("log-likelihood"), std::string::npos) << o.out;
        EXPECT_EQ(o.out.find("residual sum of squares"), std::string::npos) << o.out;
        EXPECT_EQ(o.out.find("residual standard deviation"), std::string::npos) << o.out;
        EXPECT_NE(o.out.find(loss == "logistic" ? "log(p / (1 - p)) = b0 + b1*moisture, where p = P(germinated = 1)"
                                                : "log(mean of chill_days) = b0 + b1*moisture"),
                  std::string::npos)
            << o.out;
        EXPECT_NE(o.out.find("95% intervals from the normal distribution"), std::string::npos) << o.out;
    }
}

TEST(FitVerb, JsonCarriesProvenanceAndTheCaution) {
    Outcome o = run({"--data", kSensor, "--model", "a - b*exp(-minutes/tau)", "--response", "temp", "--start",
                     "a=40,b=20,tau=5", "--json", "--summary"});
    ASSERT_EQ(o.code, 0) << o.err;
    const auto p = nlohmann::json::parse(o.out)["provenance"];
    EXPECT_EQ(p["program"], "Saddlewise");
    EXPECT_EQ(p["version"], sw::study::programVersion());
    std::ostringstream version, ignored;
    sw::cli::runCommandLine({"--version"}, version, ignored);
    // --version adds the build id in parentheses (app/cli/build_id.h).
    EXPECT_EQ(version.str().rfind("saddlewise " + p["version"].get<std::string>() + " (", 0), 0u) << version.str();
    EXPECT_EQ(p["model"], "temp = a - b*exp(-minutes/tau)");
    EXPECT_EQ(p["loss"], "least-squares");
    EXPECT_NE(p["caution"].get<std::string>().find("licensed professional practice"), std::string::npos);
}

TEST(FitVerb, WarnsWhenABadStartLeavesAParameterUndetermined) {
    Outcome o = run({"--data", kSensor, "--model", "a - b*exp(-minutes/tau)", "--response", "temp", "--start",
                     "a=0,b=0,tau=0.01", "--summary"});
    EXPECT_EQ(o.code, 0) << o.err;
    EXPECT_NE(o.out.find("Parameter tau is poorly determined"), std::string::npos) << o.out;
}

TEST(FitVerb, ReportsACsvErrorWithLineAndColumn) {
    const std::string path = std::string(SW_BINARY_DIR) + "/fit_verb_bad.csv";
    std::ofstream(path) << "x;y\n1;2\n3;4,5\n";
    Outcome o = run({"--data", path, "--model", "a*x", "--response", "y", "--start", "a=1"});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("line 3, column 2"), std::string::npos) << o.err;
    EXPECT_NE(o.err.find("use '.' as the decimal point"), std::string::npos) << o.err;
}

TEST(FitVerb, ListsTheColumnsForAnUnknownName) {
    Outcome o = run({"--data", kSensor, "--model", "a - b*exp(-t/tau)", "--response", "temp", "--start",
                     "a=40,b=20,tau=5"});
    EXPECT_EQ(o.code, 2);
    EXPECT_NE(o.err.find("'t'"), std::string::npos) << o.err;
    EXPECT_NE(o.err.find("(minutes, temp)"), std::string::npos) << o.err;
}

TEST(FitVerb, RejectsBadOptionsWithTheirValidChoices) {
    auto base = std::vector<std::string>{"--data", kSensor, "--model", "a*minutes", "--response", "temp", "--start",
                                         "a=1"};
    auto with = [&](std::vector<std::string> extra) {
        auto args = base;
        args.insert(args.end(), extra.begin(), extra.end());
        return run(args);
    };
    Outcome loss = with({"--loss", "square"});
    EXPECT_EQ(loss.code, 2);
    EXPECT_NE(loss.err.find("least-squares, weighted, huber, cauchy, logistic, poisson"), std::string::npos);
    Outcome sep = with({"--separator", "pipe"});
    EXPECT_EQ(sep.code, 2);
    EXPECT_NE(sep.err.find("auto, comma, semicolon, tab"), std::string::npos);
    Outcome method = with({"--method", "lm"});
    EXPECT_EQ(method.code, 2);
    EXPECT_NE(method.err.find("unknown method 'lm'"), std::string::npos);
    Outcome missing = run({"--data", kSensor});
    EXPECT_EQ(missing.code, 2);
    EXPECT_NE(missing.err.find("--model is required"), std::string::npos) << missing.err;
    Outcome weighted = with({"--loss", "weighted"});
    EXPECT_EQ(weighted.code, 2);
    EXPECT_NE(weighted.err.find("needs a weights column"), std::string::npos) << weighted.err;
    Outcome noFile = run({"--data", "/nonexistent.csv", "--model", "a*x", "--response", "y", "--start", "a=1"});
    EXPECT_EQ(noFile.code, 2);
    EXPECT_NE(noFile.err.find("/nonexistent.csv: the data file does not exist"), std::string::npos) << noFile.err;
}

TEST(FitVerb, DescribesItselfInHelp) {
    std::ostringstream out, err;
    EXPECT_EQ(sw::cli::runCommandLine({"fit", "--help"}, out, err), 0);
    EXPECT_NE(out.str().find("--drop-incomplete"), std::string::npos);
    EXPECT_NE(out.str().find("logistic"), std::string::npos);
}

// The former loss ids still work on the command line and are reported under the current ids.
TEST(FitVerb, ReadsTheFormerLossIdsAndReportsTheCurrentOnes) {
    for (const auto& [former, current] : {std::pair<std::string, std::string>{"bernoulli-logit", "logistic"},
                                          {"poisson-log", "poisson"}}) {
        const std::string response = current == "logistic" ? "germinated" : "chill_days";
        Outcome o = run({"--data", kGermination, "--model", "b0 + b1*moisture", "--response", response, "--loss",
                         former, "--start", "b0=0,b1=0", "--json", "--summary"});
        ASSERT_EQ(o.code, 0) << former << ": " << o.err;
        EXPECT_EQ(nlohmann::json::parse(o.out)["loss"], current);
    }
}
