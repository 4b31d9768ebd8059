// Study files written before the names of docs/names.md still open: every former key, loss id
// and option name is read as its current name, and saving writes only the current names.
#include "core/study/study.h"
#include "study_test_support.h"

#include <gtest/gtest.h>

namespace sw::study {
namespace {

using testing::ScratchFolder;

// 0/1 responses for the logistic loss, and a straight line for least squares (invented).
constexpr const char* kTable = "dose,response,reading\n0,0,1.0\n1,0,2.9\n2,1,5.1\n3,0,7.0\n4,1,9.1\n5,1,11.2\n";

std::string study(const std::string& checksum, const std::string& loss, const std::string& response,
                  const std::string& variables, const std::string& methods, const std::string& stopping) {
    return R"({"format": "saddlewise-study", "version": 1, "title": "former names",
      "objective": {"data": "table.csv", "checksum": ")" +
           checksum + R"(", "model": "a + b*dose", "response": ")" + response + R"(", "loss": ")" + loss +
           R"("}, "variables": )" + variables + R"(, "methods": )" + methods + R"(, "stopping": )" + stopping + "}";
}

struct Pair {
    std::string former, current;
};

TEST(FormerNames, AStudyWrittenWithEveryFormerNameLoadsAsTheCurrentOneAndSavesUnderTheCurrentNames) {
    ScratchFolder folder;
    folder.write("table.csv", kTable);
    const std::string checksum = fileChecksum(folder.file("table.csv"));
    const std::vector<Pair> variables = {
        {R"([{"name": "a", "start": 0, "lower": -5, "upper": 5}, {"name": "b", "start": 0, "lower": -2, "upper": 3}])",
         R"([{"name": "a", "start": 0, "plot_from": -5, "plot_to": 5},
             {"name": "b", "start": 0, "plot_from": -2, "plot_to": 3}])"}};
    const Pair stopping = {
        R"({"max_iterations": 50, "gradient_tolerance": 1e-7, "relative_gradient_tolerance": 0.001,
            "step_tolerance": 1e-12, "function_tolerance": 1e-13})",
        R"({"max_iterations": 50, "gradient_norm_below": 1e-7, "gradient_ratio_below": 0.001,
            "relative_step_below": 1e-12, "relative_change_below": 1e-13})"};
    const Pair likelihoodMethods = {
        R"([{"method": "nelder-mead", "colour": "#112233",
             "options": {"adaptive": true, "simplex_tolerance": 1e-7, "value_tolerance": 1e-10}}])",
        R"([{"method": "nelder-mead", "colour": "#112233",
             "options": {"dimension_scaled_moves": true, "simplex_size_below": 1e-7, "value_spread_below": 1e-10}}])"};
    const Pair leastSquaresMethods = {
        R"([{"method": "levenberg-marquardt", "colour": "#112233",
             "options": {"function_tolerance": 1e-10, "step_tolerance": 1e-11, "orthogonality_tolerance": 1e-9}},
            {"method": "gauss-newton", "colour": "#445566", "options": {"function_tolerance": 1e-9}}])",
        R"([{"method": "levenberg-marquardt", "colour": "#112233",
             "options": {"reduction_below": 1e-10, "scaled_radius_below": 1e-11, "column_cosine_below": 1e-9}},
            {"method": "gauss-newton", "colour": "#445566", "options": {"reduction_below": 1e-9}}])"};

    struct Case {
        Pair loss;
        std::string response;
        Pair methods;
    };
    const std::vector<Case> cases = {{{"bernoulli-logit", "logistic"}, "response", likelihoodMethods},
                                     {{"poisson-log", "poisson"}, "response", likelihoodMethods},
                                     {{"least-squares", "least-squares"}, "reading", leastSquaresMethods}};
    for (const Case& c : cases) {
        SCOPED_TRACE(c.loss.former);
        const Study former = fromJson(study(checksum, c.loss.former, c.response, variables[0].former,
                                            c.methods.former, stopping.former),
                                      folder.path());
        const Study current = fromJson(study(checksum, c.loss.current, c.response, variables[0].current,
                                             c.methods.current, stopping.current),
                                       folder.path());
        EXPECT_EQ(former, current);
        EXPECT_EQ(former.fit->loss, c.loss.current);
        EXPECT_DOUBLE_EQ(former.variables[1].upper, 3);
        EXPECT_DOUBLE_EQ(former.stoppingRules().functionTolerance, 1e-13);

        const std::string saved = toJson(former);
        for (const char* gone : {"\"lower\"", "\"upper\"", "_tolerance\"", "\"adaptive\"", "bernoulli-logit",
                                 "poisson-log"})
            EXPECT_EQ(saved.find(gone), std::string::npos) << gone << " in\n" << saved;
        EXPECT_EQ(fromJson(saved, folder.path()), current);
    }
}

}  // namespace
}  // namespace sw::study
