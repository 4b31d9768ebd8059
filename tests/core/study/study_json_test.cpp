#include "core/study/study.h"
#include "study_test_support.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

namespace sw::study {
namespace {

using testing::validFormulaStudy;
using Json = nlohmann::ordered_json;

TEST(StudyJson, ReadsEveryFieldOfAFormulaStudy) {
    const Study study = fromJson(validFormulaStudy(), ".");
    EXPECT_EQ(study.title, "Two-knob calibration");
    EXPECT_EQ(study.formula, "(1 - gain)^2 + 40*(offset - gain^2)^2");
    EXPECT_FALSE(study.isFit());
    ASSERT_EQ(study.variables.size(), 2u);
    EXPECT_EQ(study.variables[1].name, "offset");
    EXPECT_DOUBLE_EQ(study.variables[0].start, -1.5);
    ASSERT_EQ(study.methods.size(), 3u);
    EXPECT_EQ(study.methods[0].options.at("line_search"), "armijo");
    EXPECT_EQ(study.methods[0].colour, "#1b6aa5");  // colours are kept in lower case
    EXPECT_EQ(study.methods[1].marker, "square");
    EXPECT_TRUE(study.methods[1].enabled);  // the default
    EXPECT_FALSE(study.methods[2].enabled);
    EXPECT_EQ(study.methods[2].options.at("initial_radius"), "0.5");
    EXPECT_EQ(study.maxIterations, 500);
    EXPECT_DOUBLE_EQ(study.gradientTolerance, 1e-9);
    EXPECT_EQ(study.maxEvaluations, 100000);  // not given: the default
    EXPECT_TRUE(study.view.logColour);
    EXPECT_EQ(study.view.contourCount, 20);
    EXPECT_EQ(study.view.plotX, 0);
    EXPECT_EQ(study.view.plotY, 1);
    EXPECT_EQ(study.start(), (Vector(2) << -1.5, 2).finished());
    EXPECT_EQ(study.stoppingRules().maxIterations, 500);
}

TEST(StudyJson, LoadSaveLoadGivesTheSameStudyAndTheSameText) {
    const Study first = fromJson(validFormulaStudy(), ".");
    const std::string text = toJson(first);
    const Study second = fromJson(text, ".");
    EXPECT_EQ(first, second);
    EXPECT_EQ(toJson(second), text);
}

TEST(StudyJson, RoundTripKeepsAwkwardNumbersAndTextExactly) {
    Study study = fromJson(validFormulaStudy(), ".");
    study.variables[0].start = 0.1 + 0.2;  // not 0.3
    study.variables[1].lower = -1e-300;
    study.variables[1].upper = 123456789.123456789;
    study.gradientTolerance = 3e-17;
    study.title = "Ünïcode \"quoted\" title\nwith a line break";
    study.methods[2].options["initial_radius"] = "0.30000000000000004";
    const Study back = fromJson(toJson(study), ".");
    EXPECT_EQ(back, study);
    EXPECT_EQ(back.variables[0].start, 0.1 + 0.2);
}

TEST(StudyJson, WritesOptionsAsTypedValues) {
    const Json document = Json::parse(toJson(fromJson(validFormulaStudy(), ".")));
    EXPECT_TRUE(document["methods"][2]["options"]["initial_radius"].is_number());
    EXPECT_TRUE(document["methods"][0]["options"]["line_search"].is_string());
    EXPECT_EQ(document["format"], "saddlewise-study");
    EXPECT_EQ(document["version"], 1);
    EXPECT_EQ(document["view"]["plot_y"], "offset");
}

// ---- every validation error names its place ----

struct BadStudy {
    const char* what;
    std::string json;         // the whole document
    std::string place;        // expected StudyError::place()
    std::string problemPart;  // expected inside StudyError::problem()
};

std::string edited(const std::function<void(Json&)>& edit) {
    Json document = Json::parse(validFormulaStudy());
    edit(document);
    return document.dump(2);
}

std::vector<BadStudy> badStudies() {
    return {
        {"not a study", edited([](Json& d) { d["format"] = "something-else"; }), "format", "not a Saddlewise study"},
        {"no format", edited([](Json& d) { d.erase("format"); }), "format", "missing"},
        {"newer version", edited([](Json& d) { d["version"] = 3; }), "version",
         "this file is format version 3; this Saddlewise reads up to 1 - update Saddlewise"},
        {"version as text", edited([](Json& d) { d["version"] = "1"; }), "version", "whole number"},
        {"unknown top-level key", edited([](Json& d) { d["titel"] = "x"; }), "titel", "unknown key"},
        {"plot range reversed", edited([](Json& d) { d["variables"][1]["plot_from"] = 3; }),
         "variables[1].plot_from", "must be below plot_to"},
        {"plot range reversed, former keys", edited([](Json& d) {
             Json& v = d["variables"][1];
             v.erase("plot_from");
             v.erase("plot_to");
             v["lower"] = 3;
             v["upper"] = 2;
         }),
         "variables[1].lower", "must be below upper"},
        {"plot range under both names", edited([](Json& d) { d["variables"][0]["lower"] = -1; }),
         "variables[0].lower", "former name of \"plot_from\""},
        {"start as text", edited([](Json& d) { d["variables"][0]["start"] = "one"; }), "variables[0].start",
         "must be a number"},
        {"variable name missing", edited([](Json& d) { d["variables"][1].erase("name"); }), "variables[1].name",
         "missing"},
        {"variable named twice", edited([](Json& d) { d["variables"][1]["name"] = "gain"; }), "variables[1].name",
         "named twice"},
        {"bad variable name", edited([](Json& d) { d["variables"][0]["name"] = "2x"; }), "variables[0].name",
         "not a valid name"},
        {"one variable only", edited([](Json& d) { d["variables"].erase(1); }), "variables", "at least two"},
        {"negative radius", edited([](Json& d) { d["methods"][2]["options"]["initial_radius"] = -1; }),
         "methods[2].options.initial_radius", "must be > 0 (got -1)"},
        {"unknown option", edited([](Json& d) {
             d["methods"][1]["options"] = {{"radius", 1}};
         }),
         "methods[1].options.radius", "unknown option for bfgs"},
        {"option of the wrong type", edited([](Json& d) { d["methods"][2]["options"]["initial_radius"] = "big"; }),
         "methods[2].options.initial_radius", "(got \"big\")"},
        {"choice not in the list", edited([](Json& d) { d["methods"][0]["options"]["line_search"] = "exact"; }),
         "methods[0].options.line_search", "one of: fixed, armijo, wolfe"},
        {"unknown method", edited([](Json& d) { d["methods"][1]["method"] = "bfgss"; }), "methods[1].method",
         "unknown method 'bfgss'; known:"},
        {"typo in an entry key", edited([](Json& d) { d["methods"][0]["colur"] = "#000000"; }), "methods[0].colur",
         "unknown key"},
        {"bad colour", edited([](Json& d) { d["methods"][1]["colour"] = "orange"; }), "methods[1].colour", "#rrggbb"},
        {"bad marker", edited([](Json& d) { d["methods"][1]["marker"] = "hexagon"; }), "methods[1].marker",
         "must be one of: circle"},
        {"enabled as text", edited([](Json& d) { d["methods"][1]["enabled"] = "yes"; }), "methods[1].enabled",
         "true or false"},
        {"label used twice", edited([](Json& d) { d["methods"][2]["label"] = "steepest"; }), "methods[2].label",
         "unique"},
        {"least squares on a formula", edited([](Json& d) { d["methods"][1]["method"] = "levenberg-marquardt"; }),
         "methods[1].method", "needs a least-squares fit"},
        {"formula syntax error", edited([](Json& d) { d["objective"]["formula"] = "(gain + offset"; }),
         "objective.formula", "^"},
        {"formula with an unknown name", edited([](Json& d) { d["objective"]["formula"] = "gain + slope"; }),
         "objective.formula", "slope"},
        {"empty formula", edited([](Json& d) { d["objective"]["formula"] = "  "; }), "objective.formula", "empty"},
        {"formula and data", edited([](Json& d) { d["objective"]["data"] = "x.csv"; }), "objective", "both"},
        {"fit key in a formula study", edited([](Json& d) { d["objective"]["loss"] = "huber"; }), "objective.loss",
         "data-fit mode"},
        {"no objective", edited([](Json& d) { d.erase("objective"); }), "objective", "missing"},
        {"a data fit without the table's checksum", edited([](Json& d) {
             d["objective"] = Json{{"data", "bench.csv"}, {"model", "gain*x"}, {"response", "y"}};
         }),
         "objective.checksum", "what `sha256sum bench.csv` prints"},
        {"a method without its colour", edited([](Json& d) { d["methods"][0].erase("colour"); }), "methods[0].colour",
         "missing (required): the colour of this method's paths and marks, as \"#rrggbb\""},
        {"iteration limit zero", edited([](Json& d) { d["stopping"]["max_iterations"] = 0; }),
         "stopping.max_iterations", "from 1 to"},
        {"negative tolerance", edited([](Json& d) { d["stopping"]["gradient_norm_below"] = -1; }),
         "stopping.gradient_norm_below", ">= 0"},
        {"negative tolerance, former key", edited([](Json& d) {
             d["stopping"].erase("gradient_norm_below");
             d["stopping"]["gradient_tolerance"] = -1;
         }),
         "stopping.gradient_tolerance", ">= 0"},
        {"tolerance under both names", edited([](Json& d) { d["stopping"]["gradient_tolerance"] = 1e-6; }),
         "stopping.gradient_tolerance", "former name of \"gradient_norm_below\""},
        {"option under both names", edited([](Json& d) {
             d["methods"][1]["method"] = "nelder-mead";
             d["methods"][1]["options"] = {{"adaptive", true}, {"dimension_scaled_moves", false}};
         }),
         "methods[1].options.dimension_scaled_moves", "also given"},
        {"plot variable unknown", edited([](Json& d) { d["view"]["plot_x"] = "slope"; }), "view.plot_x",
         "not one of the variables"},
        {"plot the same variable twice", edited([](Json& d) { d["view"]["plot_y"] = "gain"; }), "view.plot_y",
         "must differ"},
        {"grid too fine", edited([](Json& d) { d["view"]["grid_cells"] = 100000; }), "view.grid_cells",
         "from 10 to 2000"},
        {"methods not a list", edited([](Json& d) {
             d["methods"] = {{"a", 1}};
         }),
         "methods", "must be a list"},
        {"JSON syntax error", "{\n  \"format\": \"saddlewise-study\",\n  \"version\": 1,,\n}", "line 3, column 16",
         "not valid JSON"},
        {"repeated key", "{ \"format\": \"saddlewise-study\", \"version\": 1, \"version\": 1 }", "version", "twice"},
        // Found by the study fuzzer (tests/fuzz/regressions/study/repeated-empty-key.json): the
        // empty key repeated was reported with no place at all.
        {"repeated empty key", "{\"\": 6,\n \"\": null}", "\"\"", "twice"},
        {"repeated empty key inside", "{\"a\": {\"\": 1, \"\": 2}}", "a.\"\"", "twice"},
        {"not an object", "[1, 2]", "document", "JSON object"},
    };
}

TEST(StudyJson, EveryValidationErrorNamesItsPlace) {
    for (const BadStudy& bad : badStudies()) {
        SCOPED_TRACE(bad.what);
        try {
            fromJson(bad.json, ".");
            ADD_FAILURE() << "accepted: " << bad.what;
        } catch (const StudyError& e) {
            EXPECT_EQ(e.place(), bad.place) << e.what();
            EXPECT_NE(e.problem().find(bad.problemPart), std::string::npos) << e.what();
            EXPECT_EQ(std::string(e.what()), bad.place + ": " + e.problem());
        }
    }
}

TEST(StudyJson, TheMessageForABadOptionReadsAsOneLine) {
    try {
        fromJson(edited([](Json& d) { d["methods"][2]["options"]["initial_radius"] = -1; }), ".");
        FAIL();
    } catch (const StudyError& e) {
        EXPECT_STREQ(e.what(), "methods[2].options.initial_radius: must be > 0 (got -1)");
    }
}

TEST(StudyJson, AMinimalStudyTakesDefaults) {
    const std::string minimal = R"({"format": "saddlewise-study", "version": 1,
        "objective": {"formula": "x^2 + 3*y^2"},
        "variables": [{"name": "x", "start": 1, "plot_from": -2, "plot_to": 2},
                      {"name": "y", "start": 1, "plot_from": -2, "plot_to": 2}],
        "methods": [{"method": "newton", "colour": "#000000"}]})";
    const Study study = fromJson(minimal, ".");
    EXPECT_EQ(study.methods[0].label, "newton");
    EXPECT_EQ(study.methods[0].marker, "circle");
    EXPECT_EQ(study.maxIterations, 200);
    EXPECT_EQ(study.view.gridCells, 200);
    EXPECT_EQ(fromJson(toJson(study), "."), study);
}

// The stopping thresholds have no hidden limit: 1e308 (finite) is a valid threshold; only
// the number rule (out of range) and the sign refuse one. (1e308 was once refused by a hidden
// upper limit with a message that did not name it.)
TEST(StudyJson, AHugeButFiniteStoppingThresholdIsAccepted) {
    const Study s = fromJson(edited([](Json& d) {
                                 d["stopping"]["gradient_norm_below"] = 1e308;
                                 d["stopping"]["relative_step_below"] = 1e308;
                             }),
                             ".");
    EXPECT_EQ(s.gradientTolerance, 1e308);
    EXPECT_EQ(s.stepTolerance, 1e308);
}

}  // namespace
}  // namespace sw::study

