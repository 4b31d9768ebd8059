// Findings on the command line: after each method's summary in minimize, fit and run, and in
// --json as each run's "findings". The three formula samples each show the finding a modeler
// expects for their weak method, with a remedy that was rerun and helped.
#include "app/cli/cli.h"
#include "core/diagnose/finding.h"

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <cstdio>
#include <fstream>
#include <set>
#include <sstream>
#include <unistd.h>

namespace {

using Json = nlohmann::json;

struct Result {
    int code;
    std::string out, err;
};

Result cli(const std::vector<std::string>& args) {
    std::ostringstream out, err;
    const int code = sw::cli::runCommandLine(args, out, err);
    return {code, out.str(), err.str()};
}

std::string sample(const std::string& name) { return std::string(SW_SOURCE_DIR) + "/samples/" + name; }

const Json& runLabelled(const Json& all, const std::string& label) {
    for (const Json& r : all["runs"])
        if (r["label"] == label) return r;
    static const Json none;
    ADD_FAILURE() << "no run labelled " << label;
    return none;
}

const Json* findingOf(const Json& run, const std::string& id) {
    for (const Json& f : run["findings"])
        if (f["id"] == id) return &f;
    return nullptr;
}

std::set<std::string> knownIds() {
    std::set<std::string> ids;
    for (sw::diagnose::FindingId id : sw::diagnose::allFindingIds()) ids.insert(sw::diagnose::toString(id));
    return ids;
}

// The JSON contract of one finding.
void checkFindingContract(const Json& f) {
    static const std::set<std::string> ids = knownIds();
    ASSERT_TRUE(f.is_object());
    ASSERT_TRUE(f.contains("id") && f["id"].is_string());
    EXPECT_TRUE(ids.count(f["id"].get<std::string>())) << f["id"];
    EXPECT_TRUE(f["severity"] == "problem" || f["severity"] == "note") << f["severity"];
    ASSERT_TRUE(f["iterations"].is_object());
    for (const char* k : {"first", "last", "focus"}) EXPECT_TRUE(f["iterations"][k].is_number_integer()) << k;
    EXPECT_TRUE(f["iterations"]["notable"].is_array());
    ASSERT_TRUE(f["evidence"].is_object());
    for (const auto& [name, value] : f["evidence"].items()) EXPECT_TRUE(value.is_number() || value.is_null()) << name;
    ASSERT_TRUE(f["evidence_detail"].is_array());
    EXPECT_EQ(f["evidence_detail"].size(), f["evidence"].size());
    ASSERT_TRUE(f["message"].is_string());
    EXPECT_GT(f["message"].get<std::string>().size(), 20u);
    ASSERT_TRUE(f.contains("remedy"));
    if (!f["remedy"].is_null()) {
        const Json& change = f["remedy"]["change"];
        ASSERT_TRUE(change.is_object());
        EXPECT_TRUE(change["kind"].is_string());
        EXPECT_TRUE(change["text"].is_string());
        ASSERT_TRUE(f["remedy"].contains("outcome"));
        const Json& outcome = f["remedy"]["outcome"];
        if (!outcome.is_null()) {
            for (const char* k : {"helped", "text", "termination", "value", "end_point", "iterations", "x"})
                EXPECT_TRUE(outcome.contains(k)) << k;
            EXPECT_TRUE(outcome["helped"].is_boolean());
        }
    }
}

void checkEveryFinding(const Json& runs) {
    for (const Json& run : runs) {
        ASSERT_TRUE(run.contains("findings")) << run["label"];
        ASSERT_TRUE(run["findings"].is_array());
        for (const Json& f : run["findings"]) checkFindingContract(f);
    }
}

void expectHelped(const Json* f) {
    ASSERT_NE(f, nullptr);
    ASSERT_TRUE(f->at("remedy").is_object());
    ASSERT_TRUE(f->at("remedy")["outcome"].is_object());
    EXPECT_TRUE(f->at("remedy")["outcome"]["helped"].get<bool>()) << f->at("remedy")["outcome"]["text"];
    EXPECT_EQ(f->at("remedy")["outcome"]["end_point"], "minimum");
}

TEST(FindingsCli, TwoValvesPureNewtonEndsOnASaddleAndTheRerunReachesAMinimum) {
    const Result r = cli({"run", sample("two-valve-saddles.json"), "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const Json all = Json::parse(r.out);
    checkEveryFinding(all["runs"]);
    const Json& newton = runLabelled(all, "Newton");
    const Json* saddle = findingOf(newton, "saddle-end");
    ASSERT_NE(saddle, nullptr) << newton["findings"].dump(2);
    EXPECT_EQ((*saddle)["severity"], "problem");
    EXPECT_EQ((*saddle)["evidence"]["negative_eigenvalues"], 1);
    EXPECT_TRUE((*saddle)["evidence"].contains("escape_valve_a"));
    EXPECT_EQ((*saddle)["remedy"]["change"]["kind"], "switch-method");
    expectHelped(saddle);
    // The methods that reach a well have no problem.
    for (const char* label : {"saddle-free Newton", "exact trust region"}) {
        for (const Json& f : runLabelled(all, label)["findings"]) EXPECT_EQ(f["severity"], "note") << label << f.dump();
    }
}

TEST(FindingsCli, PumpFlowSteepestDescentZigZagsAndBfgsGetsThrough) {
    const Result r = cli({"run", sample("pump-flow-calibration.json"), "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const Json all = Json::parse(r.out);
    checkEveryFinding(all["runs"]);
    const Json* valley = findingOf(runLabelled(all, "steepest descent"), "narrow-valley");
    ASSERT_NE(valley, nullptr) << runLabelled(all, "steepest descent")["findings"].dump(2);
    EXPECT_GE((*valley)["evidence"]["condition_number"].get<double>(), 100);
    EXPECT_EQ((*valley)["remedy"]["change"]["method"], "bfgs");
    expectHelped(valley);
}

TEST(FindingsCli, HeaterSteepestDescentIsPoorlyScaledAndRescalingFixesIt) {
    const Result r = cli({"run", sample("heater-power-and-duty.json"), "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const Json all = Json::parse(r.out);
    checkEveryFinding(all["runs"]);
    const Json* scaling = findingOf(runLabelled(all, "steepest descent"), "poor-scaling");
    ASSERT_NE(scaling, nullptr) << runLabelled(all, "steepest descent")["findings"].dump(2);
    const Json& change = (*scaling)["remedy"]["change"];
    EXPECT_EQ(change["kind"], "rescale-variables");
    EXPECT_EQ(change["scale"]["power"], 100);
    EXPECT_EQ(change["scale"]["duty"], 0.1);
    expectHelped(scaling);
}

TEST(FindingsCli, NoRemediesProposesWithoutRerunning) {
    const Result r = cli({"run", sample("two-valve-saddles.json"), "--json", "--no-remedies"});
    ASSERT_EQ(r.code, 0) << r.err;
    const Json all = Json::parse(r.out);
    const Json* saddle = findingOf(runLabelled(all, "Newton"), "saddle-end");
    ASSERT_NE(saddle, nullptr);
    ASSERT_TRUE((*saddle)["remedy"].is_object());
    EXPECT_TRUE((*saddle)["remedy"]["outcome"].is_null());
}

TEST(FindingsCli, RunPrintsEachMethodsFindingsAfterItsMessage) {
    const Result r = cli({"run", sample("two-valve-saddles.json")});
    ASSERT_EQ(r.code, 0) << r.err;
    const std::size_t message = r.out.find("Newton (newton):");
    ASSERT_NE(message, std::string::npos) << r.out;
    const std::size_t saddle = r.out.find("[problem] saddle-end", message);
    ASSERT_NE(saddle, std::string::npos) << r.out;
    EXPECT_LT(saddle, r.out.find("saddle-free Newton (saddle-free-newton):"));
    EXPECT_NE(r.out.find("remedy:   switch to trust-region-exact", saddle), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("outcome:  Tried:", saddle), std::string::npos) << r.out;
}

TEST(FindingsCli, MinimizePrintsFindingsAfterTheSummaryAndInJson) {
    const char* formula = "(valve_a^2 - 1)^2 + (valve_b^2 - 1)^2 + 0.5*valve_a*valve_b";
    const Result text = cli({"minimize", formula, "--from", "valve_a=0.3,valve_b=1.1", "--method", "newton", "--summary"});
    ASSERT_EQ(text.code, 0) << text.err;
    const std::size_t summary = text.out.find("end point:");
    const std::size_t findings = text.out.find("Findings:");
    ASSERT_NE(summary, std::string::npos);
    ASSERT_NE(findings, std::string::npos) << text.out;
    EXPECT_LT(summary, findings);
    EXPECT_NE(text.out.find("[problem] saddle-end", findings), std::string::npos) << text.out;

    const Result json = cli({"minimize", formula, "--from", "valve_a=0.3,valve_b=1.1", "--method", "newton", "--method",
                             "trust-region-exact", "--summary", "--json"});
    ASSERT_EQ(json.code, 0) << json.err;
    const Json all = Json::parse(json.out);
    checkEveryFinding(all["runs"]);
    ASSERT_NE(findingOf(all["runs"][0], "saddle-end"), nullptr);
    EXPECT_EQ(findingOf(all["runs"][1], "saddle-end"), nullptr);
}

TEST(FindingsCli, ARunThatEndedByAnErrorIsExplained) {
    // Newton steps to x < 0, where ln(x) is NaN: the run breaks down (exit 1) and its finding
    // says where and what.
    const Result r = cli({"minimize", "x - ln(x) + (y - 1)^2", "--from", "x=3,y=0", "--method", "newton", "--json"});
    EXPECT_EQ(r.code, 1) << r.err;
    const Json j = Json::parse(r.out);
    checkFindingContract(j["findings"][0]);
    const Json* bad = findingOf(j, "non-finite");
    ASSERT_NE(bad, nullptr) << j["findings"].dump(2);
    EXPECT_NE((*bad)["message"].get<std::string>().find("value is nan"), std::string::npos);
    expectHelped(bad);
}

TEST(FindingsCli, AFitNamesTheParameterCombinationTheDataDoNotDetermine) {
    const std::string path = std::string(SW_BINARY_DIR) + "/findings_test_" + std::to_string(::getpid()) + ".csv";
    {
        std::ofstream csv(path);
        csv << "x,y\n1,1.1\n2,1.9\n3,3.2\n4,3.9\n5,5.1\n";
    }
    const Result r = cli({"fit", "--data", path, "--model", "a*x + b*x", "--response", "y", "--start", "a=0.5,b=0.3",
                          "--json", "--summary"});
    std::remove(path.c_str());
    ASSERT_EQ(r.code, 0) << r.err;
    const Json j = Json::parse(r.out);
    for (const Json& f : j["findings"]) checkFindingContract(f);
    const Json* flat = findingOf(j, "flat-direction");
    ASSERT_NE(flat, nullptr) << j["findings"].dump(2);
    EXPECT_EQ((*flat)["severity"], "problem");
    EXPECT_NE((*flat)["message"].get<std::string>().find("a - b is not determined by the data"), std::string::npos)
        << (*flat)["message"];
}

TEST(FindingsCli, FitPrintsFindingsAfterTheSummary) {
    const Result r = cli({"fit", "--data", sample("sensor-warmup.csv"), "--model", "a - b*exp(-minutes/tau)",
                          "--response", "temp", "--start", "a=40,b=20,tau=5", "--summary"});
    ASSERT_EQ(r.code, 0) << r.err;
    const std::size_t summary = r.out.find("end point:");
    const std::size_t findings = r.out.find("Findings:");
    ASSERT_NE(findings, std::string::npos) << r.out;
    EXPECT_LT(summary, findings);
    EXPECT_LT(findings, r.out.find("Parameter"));
}

TEST(FindingsCli, HelpMentionsNoRemedies) {
    for (const char* verb : {"minimize", "fit", "run"}) {
        const Result r = cli({verb, "--help"});
        EXPECT_NE(r.out.find("--no-remedies"), std::string::npos) << verb;
    }
}

}  // namespace
