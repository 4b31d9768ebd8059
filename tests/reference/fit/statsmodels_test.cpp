// Logistic and Poisson regression against statsmodels 0.13.5 (Debian bookworm
// python3-statsmodels): tests/reference/fit/statsmodels_glm.py generates the data with a
// fixed seed, writes the CSV files, fits them with statsmodels (Logit / Poisson, Newton,
// tol 1e-14; deviance from GLM) and prints the reference values. Our fits read the same CSV
// files and must agree to 1e-6 relative in coefficients and standard errors.
// If statsmodels is missing the test fails (scripts/deps installs it); it never skips.
#include "core/fit/run_fit.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <memory>
#include <string>

using namespace sw;

namespace {

struct Reference {
    nlohmann::json json;
    std::string directory;
};

const Reference& reference() {
    static const Reference ref = [] {
        Reference r;
        r.directory = std::string(SW_BINARY_DIR) + "/statsmodels_reference";
        std::filesystem::create_directories(r.directory);
        const std::string command = std::string(SW_PYTHON) + " " + SW_SOURCE_DIR +
                                    "/tests/reference/fit/statsmodels_glm.py " + r.directory + " 2>&1";
        std::string output;
        if (FILE* pipe = popen(command.c_str(), "r")) {
            std::array<char, 4096> buffer{};
            while (std::fgets(buffer.data(), buffer.size(), pipe)) output += buffer.data();
            const int status = pclose(pipe);
            if (status != 0) output = "exit status " + std::to_string(status) + ": " + output;
        }
        try {
            r.json = nlohmann::json::parse(output);
        } catch (const std::exception&) {
            ADD_FAILURE() << "statsmodels reference script failed (is python3-statsmodels installed?):\n" << output;
        }
        return r;
    }();
    return ref;
}

void expectRelative(double ours, double theirs, double tolerance, const std::string& what) {
    EXPECT_NEAR(ours, theirs, tolerance * std::fabs(theirs)) << what << " (reference: statsmodels 0.13.5)";
}

fit::FitResult fitCsv(const std::string& file, const std::string& model, const std::string& response, Loss loss) {
    fit::FitRequest request;
    request.definition.model = model;
    request.definition.response = response;
    request.definition.parameters = {"b0", "b1", "b2"};
    request.definition.loss = loss;
    request.start = {0.0, 0.0, 0.0};
    return fit::runFit(std::make_shared<Table>(readTable(reference().directory + "/" + file)), request);
}

}  // namespace

TEST(Statsmodels, ReferenceScriptRunsWithTheExpectedVersion) {
    ASSERT_TRUE(reference().json.is_object());
    const std::string version = reference().json["statsmodels"];
    std::printf("[ REF      ] statsmodels %s, NumPy %s\n", version.c_str(),
                reference().json["numpy"].get<std::string>().c_str());
    EXPECT_EQ(version.rfind("0.13.5", 0), 0u) << "the pinned reference values were produced with statsmodels 0.13.5";
}

TEST(Statsmodels, LogisticRegressionMatchesStatsmodels) {
    ASSERT_TRUE(reference().json.is_object());
    const auto& ref = reference().json["logistic"];
    const fit::FitResult r = fitCsv("logistic.csv", "b0 + b1*x1 + b2*x2", "outcome", Loss::BernoulliLogit);
    EXPECT_TRUE(r.converged()) << r.run.message;
    for (int j = 0; j < 3; ++j) {
        expectRelative(r.run.x[j], ref["params"][j].get<double>(), 1e-6, "coefficient b" + std::to_string(j));
        expectRelative(r.statistics.standardErrors[j], ref["bse"][j].get<double>(), 1e-6,
                       "standard error of b" + std::to_string(j));
    }
    expectRelative(r.statistics.logLikelihood, ref["llf"].get<double>(), 1e-10, "log-likelihood");
    expectRelative(r.statistics.deviance, ref["deviance"].get<double>(), 1e-10, "deviance");
    EXPECT_EQ(r.statistics.covarianceMethod, "inverse observed information");
    std::printf("[ REF      ] logistic: b = %.10g %.10g %.10g (statsmodels 0.13.5 Logit)\n", r.run.x[0], r.run.x[1],
                r.run.x[2]);
}

TEST(Statsmodels, PoissonRegressionMatchesStatsmodels) {
    ASSERT_TRUE(reference().json.is_object());
    const auto& ref = reference().json["poisson"];
    const fit::FitResult r = fitCsv("poisson.csv", "b0 + b1*u + b2*v", "count", Loss::PoissonLog);
    EXPECT_TRUE(r.converged()) << r.run.message;
    for (int j = 0; j < 3; ++j) {
        expectRelative(r.run.x[j], ref["params"][j].get<double>(), 1e-6, "coefficient b" + std::to_string(j));
        expectRelative(r.statistics.standardErrors[j], ref["bse"][j].get<double>(), 1e-6,
                       "standard error of b" + std::to_string(j));
    }
    expectRelative(r.statistics.logLikelihood, ref["llf"].get<double>(), 1e-10, "log-likelihood");
    expectRelative(r.statistics.deviance, ref["deviance"].get<double>(), 1e-10, "deviance");
    std::printf("[ REF      ] poisson: b = %.10g %.10g %.10g (statsmodels 0.13.5 Poisson)\n", r.run.x[0], r.run.x[1],
                r.run.x[2]);
}
