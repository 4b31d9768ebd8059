// The review report's content and its HTML, built in process from the bundled samples: every
// section is there, every number about a run is the number the runs' JSON (what `run --json`
// prints) holds, the HTML escapes what it must and inlines figures safely. The samples are
// invented demo data (samples/make_samples.py); these checks are about the report, not about
// the accuracy of a fit.
#include "core/report/html.h"
#include "core/report/report.h"
#include "core/report/run_json.h"
#include "core/report/study_run.h"
#include "core/study/study.h"

#include <gtest/gtest.h>

#include <cstdlib>
#include <regex>
#include <string>

namespace {

using namespace sw;
using nlohmann::json;

const std::string kSamples = std::string(SW_SOURCE_DIR) + "/samples/";

report::StudyRuns runSample(const std::string& name) {
    const std::string path = kSamples + name;
    const study::Study study = study::loadFile(path);
    auto objective = study::makeObjective(study, study::directoryOf(path));
    return report::runStudy(study, path, objective, study.stoppingRules());
}

report::ReportInput inputFor(const report::StudyRuns& runs) {
    report::ReportInput in = report::prepareInput(runs);
    in.provenance.version = "9.9.9";
    in.provenance.build = "git 0123456789ab";
    in.provenance.generated = "2030-01-02 03:04:05 UTC";
    in.provenance.command = "saddlewise report study.json -o out.html";
    in.provenance.studyFile = runs.studyPath;
    in.provenance.studyText = "{ \"format\": \"saddlewise-study\" }";
    in.provenance.studyChecksum = report::checksumOf(in.provenance.studyText);
    return in;
}

std::string allText(const report::Section& s) {
    std::string t = s.title + "\n";
    for (const report::Block& b : s.blocks) {
        t += report::plainText(b.text) + "\n" + b.preformatted + "\n" + b.figure.title + "\n" + b.figure.caption + "\n";
        for (const auto& f : b.fields) t += f.label + ": " + report::plainText(f.value) + "\n";
        for (const auto& h : b.table.header) t += h + "\t";
        for (const auto& row : b.table.rows)
            for (const auto& c : row) t += report::plainText(c.text) + "\t";
        for (const auto& item : b.items) t += report::plainText(item) + "\n";
    }
    return t;
}

const std::vector<std::string> kAlwaysThere = {"summary", "caution", "objective", "data", "methods", "plots",
                                               "end-points", "fit-statistics", "reproducibility"};

TEST(Report, AFormulaStudyHasEverySectionWithItsNumbersFromTheRunsJson) {
    const report::StudyRuns runs = runSample("two-valve-saddles.json");
    const report::ReportInput in = inputFor(runs);
    // One source: the report's results are the JSON `run --json` prints, minus the traces.
    json expected = report::studyRunsJson(runs, true);
    for (json& run : expected["runs"]) run.erase("trace");
    EXPECT_EQ(in.results, expected);

    const report::Document d = report::buildReport(in);
    for (const std::string& id : kAlwaysThere) EXPECT_NE(d.section(id), nullptr) << id;
    EXPECT_EQ(d.section("findings"), nullptr) << "no findings in the runs, no findings section";
    EXPECT_EQ(d.title, runs.study.title);

    const std::string ends = allText(*d.section("end-points"));
    for (const json& run : in.results["runs"]) {
        SCOPED_TRACE(run["label"].get<std::string>());
        EXPECT_NE(ends.find(report::numberText(run["value"], 10)), std::string::npos);
        EXPECT_NE(ends.find(run["termination"].get<std::string>()), std::string::npos);
        EXPECT_NE(ends.find(std::to_string(run["iterations"].get<int>())), std::string::npos);
        EXPECT_NE(ends.find(run["message"].get<std::string>()), std::string::npos);
    }
    // The sample's point: pure Newton stops on a saddle of index 1.
    EXPECT_NE(ends.find("saddle (index 1)"), std::string::npos);

    const std::string objective = allText(*d.section("objective"));
    EXPECT_NE(objective.find(runs.study.formula), std::string::npos);
    EXPECT_NE(objective.find("∂f/∂valve_a = "), std::string::npos);
    EXPECT_NE(objective.find("∂²f/∂valve_a∂valve_b = "), std::string::npos);
    EXPECT_NE(allText(*d.section("data")).find("reads no data table"), std::string::npos);
    EXPECT_NE(allText(*d.section("fit-statistics")).find("not a data fit"), std::string::npos);
    // The disabled entry is named, not run.
    EXPECT_NE(allText(*d.section("methods")).find("Not run (disabled in the study): modified Newton"), std::string::npos);
    EXPECT_NE(allText(*d.section("methods")).find("initial_radius = 0.5"), std::string::npos);
}

TEST(Report, AFitStudyShowsItsDataAndStatisticsFromTheRunsJson) {
    const report::StudyRuns runs = runSample("sensor-warmup.json");
    const report::ReportInput in = inputFor(runs);
    const report::Document d = report::buildReport(in);
    for (const std::string& id : kAlwaysThere) EXPECT_NE(d.section(id), nullptr) << id;

    const std::string data = allText(*d.section("data"));
    EXPECT_NE(data.find("sensor-warmup.csv"), std::string::npos);
    EXPECT_NE(data.find(runs.study.fit->checksum), std::string::npos);
    EXPECT_NE(data.find("121"), std::string::npos) << "the table's row count";
    EXPECT_NE(data.find("minutes"), std::string::npos);
    EXPECT_NE(data.find("The first 8 rows"), std::string::npos);

    const int best = report::bestRun(in.results);
    ASSERT_GE(best, 0);
    const json& fit = in.results["runs"][static_cast<std::size_t>(best)]["fit"];
    const std::string stats = allText(*d.section("fit-statistics"));
    for (const char* name : {"a", "b", "tau"}) {
        SCOPED_TRACE(name);
        EXPECT_NE(stats.find(report::numberText(fit["parameters"][name], 8)), std::string::npos);
        EXPECT_NE(stats.find(report::numberText(fit["standard_errors"][name], 4)), std::string::npos);
        EXPECT_NE(stats.find(report::numberText(fit["confidence_intervals"][name][0], 6)), std::string::npos);
        EXPECT_NE(stats.find(report::numberText(fit["confidence_intervals"][name][1], 6)), std::string::npos);
    }
    EXPECT_NE(stats.find("95% interval (t, 118 dof)"), std::string::npos);
    EXPECT_NE(stats.find("Correlations between estimates, strongest first"), std::string::npos);
    EXPECT_NE(stats.find(report::numberText(fit["residual_sum_of_squares"], 10)), std::string::npos);

    const std::string objective = allText(*d.section("objective"));
    // The model as an equation, the same text the fit verb prints (sw::modelEquation).
    EXPECT_NE(objective.find("temp = a - b*exp(-minutes/tau) + error"), std::string::npos);
    EXPECT_EQ(objective.find(" ~ "), std::string::npos);
    EXPECT_NE(objective.find("∂model/∂tau = "), std::string::npos);
}

TEST(Report, ALogisticFitIsMeasuredByItsDevianceNotBySumsOfSquares) {
    const report::StudyRuns runs = runSample("seed-germination.json");
    ASSERT_EQ(runs.study.fit->loss, "logistic");
    const report::ReportInput in = inputFor(runs);
    const report::Document d = report::buildReport(in);
    const std::string stats = allText(*d.section("fit-statistics"));
    const int best = report::bestRun(in.results);
    ASSERT_GE(best, 0);
    const json& fit = in.results["runs"][static_cast<std::size_t>(best)]["fit"];
    EXPECT_NE(stats.find("Deviance"), std::string::npos);
    EXPECT_NE(stats.find(report::numberText(fit["deviance"], 10)), std::string::npos);
    EXPECT_NE(stats.find("Log-likelihood"), std::string::npos);
    EXPECT_EQ(stats.find("Residual sum of squares"), std::string::npos) << stats;
    EXPECT_EQ(stats.find("Residual standard deviation"), std::string::npos) << stats;
    EXPECT_EQ(stats.find("Correlation of the estimates"), std::string::npos);
    const std::string objective = allText(*d.section("objective"));
    EXPECT_NE(objective.find("log(p / (1 - p)) = "), std::string::npos) << objective;
    EXPECT_EQ(objective.find(" ~ "), std::string::npos) << objective;
}

TEST(Report, TheFitStatisticsInTheRunsJsonAreTheFitVerbsStatistics) {
    const report::StudyRuns runs = runSample("sensor-warmup.json");
    ASSERT_EQ(runs.statistics.size(), runs.runs.size());
    const json results = report::studyRunsJson(runs, false);
    for (std::size_t k = 0; k < runs.runs.size(); ++k) {
        json expected = report::statisticsToJson(runs.statistics[k]);
        json got = results["runs"][k]["fit"];
        got.erase("warnings");
        EXPECT_EQ(got, expected);
    }
}

TEST(Report, TheBestRunIsTheLowestConvergedOne) {
    json runs = json::array();
    runs.push_back({{"value", 1.0}, {"converged", false}});
    runs.push_back({{"value", 3.0}, {"converged", true}});
    runs.push_back({{"value", 2.0}, {"converged", true}});
    runs.push_back({{"value", nullptr}, {"converged", true}});
    EXPECT_EQ(report::bestRun(json{{"runs", runs}}), 2);
    // Equal to rounding: the first in the lineup.
    runs[1]["value"] = 2.0 + 1e-13;
    EXPECT_EQ(report::bestRun(json{{"runs", runs}}), 1);
    runs[1]["value"] = 3.0;
    runs[1]["converged"] = false;
    runs[2]["converged"] = false;
    EXPECT_EQ(report::bestRun(json{{"runs", runs}}), 0);
    EXPECT_EQ(report::bestRun(json{{"runs", json::array()}}), -1);
}

// Findings in the shape `run --json` prints them (docs/findings.md, issue 10): a problem with
// its evidence and a remedy that was rerun, a problem whose remedy was not tried, a note
// without a remedy, and a run without findings.
TEST(Report, FindingsInTheRunsAreShownWithTheirEvidenceAndRemedyOutcome) {
    const report::StudyRuns runs = runSample("two-valve-saddles.json");
    report::ReportInput in = inputFor(runs);
    const json saddle = {
        {"id", "saddle-end"},
        {"severity", "problem"},
        {"title", "ended on a saddle"},
        {"iterations", {{"first", 4}, {"last", 4}, {"focus", 4}, {"notable", json::array()}}},
        {"evidence", {{"negative_eigenvalues", 1.0}, {"smallest_eigenvalue", -3.8309518948}}},
        {"evidence_detail",
         json::array({{{"name", "negative_eigenvalues"}, {"value", 1.0}, {"unit", ""}, {"meaning", "k: eigenvalues below zero"}},
                      {{"name", "smallest_eigenvalue"}, {"value", -3.8309518948}, {"unit", "curvature"},
                       {"meaning", "most negative curvature"}}})},
        {"message", "The run ended on a saddle point, not a minimum."},
        {"mark", nullptr},
        {"remedy",
         {{"change", {{"kind", "switch-method"}, {"method", "trust-region-exact"}, {"text", "switch to trust-region-exact"}}},
          {"outcome",
           {{"helped", true},
            {"text", "Tried: it converged after 7 iterations at f = 0.46875, a local minimum - it helped."},
            {"termination", "gradient-tolerance"},
            {"converged", true},
            {"value", 0.46875},
            {"gradient_norm", 2.58e-13},
            {"end_point", "minimum"},
            {"end_index", 0},
            {"critical", true},
            {"iterations", 7},
            {"evaluations", {{"value", 7}, {"gradient", 0}, {"hessian", 7}}}}}}}};
    json untried = saddle;
    untried["id"] = "uphill-newton";
    untried["title"] = "uphill Newton step";
    untried["iterations"] = {{"first", 1}, {"last", 3}, {"focus", 1}, {"notable", {1, 3}}};
    untried["remedy"]["outcome"] = nullptr;
    const json note = {{"id", "convergence-rate"},
                       {"severity", "note"},
                       {"title", "observed convergence rate"},
                       {"iterations", {{"first", 0}, {"last", 5}, {"focus", 5}, {"notable", json::array()}}},
                       {"evidence", {{"order", 1.6152}}},
                       {"evidence_detail", json::array()},
                       {"message", "The last iterations converged superlinearly (estimated order 1.6)."},
                       {"mark", nullptr},
                       {"remedy", nullptr}};
    in.results["runs"][0]["findings"] = json::array({saddle, untried, note});
    in.results["runs"][1]["findings"] = json::array();
    const report::Document d = report::buildReport(in);
    ASSERT_NE(d.section("findings"), nullptr);
    const std::string text = allText(*d.section("findings"));
    for (const char* piece :
         {"Problem: Ended on a saddle", "saddle-end", "iteration 4)", "The run ended on a saddle point, not a minimum.",
          "negative_eigenvalues", "-3.831", "most negative curvature", "switch to trust-region-exact", "helped.",
          "Tried: it converged after 7 iterations at f = 0.46875, a local minimum - it helped.",
          "gradient-tolerance after 7 iterations; f = 0.46875, |∇f| = 2.58e-13; end point: local minimum; evaluations 7 / 0 / 7",
          "uphill-newton", "iterations 1–3", "not tried", "Note: Observed convergence rate", "order", "1.615",
          "none that a rerun could try", "No findings: nothing unusual in this run."})
        EXPECT_NE(text.find(piece), std::string::npos) << piece;
    // The overview counts problems, notes, remedies tried and those that helped.
    const report::Block* overview = nullptr;
    for (const report::Block& b : d.section("findings")->blocks)
        if (b.kind == report::Block::Kind::Table && !b.table.header.empty() && b.table.header[0] == "method") overview = &b;
    ASSERT_NE(overview, nullptr);
    ASSERT_GE(overview->table.rows.size(), 2u);
    std::vector<std::string> first;
    for (const report::Cell& c : overview->table.rows[0]) first.push_back(report::plainText(c.text));
    EXPECT_EQ(std::vector<std::string>(first.begin() + 1, first.end()), (std::vector<std::string>{"2", "1", "1", "1"}));
}

// Surveys as issue 11 defines them: critical points {x, value, kind, index, eigenvalues,
// gradient_norm} and basins with counts.
TEST(Report, SurveysGiveTheCriticalPointAndBasinSections) {
    const report::StudyRuns runs = runSample("two-valve-saddles.json");
    report::ReportInput in = inputFor(runs);
    in.surveys = json{{"critical",
                       {{"starts", 256},
                        {"points", json::array({{{"x", {{"valve_a", 0.0}, {"valve_b", 0.0}}},
                                                 {"value", 2.0},
                                                 {"kind", "maximum"},
                                                 {"index", 2},
                                                 {"eigenvalues", {-4.5, -3.5}},
                                                 {"gradient_norm", 0.0}}})}}},
                      {"basins", json::array({{{"method", "newton"}, {"counts", {{"minimum 1", 120}, {"saddle 2", 16}}}}})}};
    const report::Document d = report::buildReport(in);
    ASSERT_NE(d.section("critical-points"), nullptr);
    ASSERT_NE(d.section("basins"), nullptr);
    EXPECT_NE(allText(*d.section("critical-points")).find("maximum"), std::string::npos);
    EXPECT_NE(allText(*d.section("basins")).find("saddle 2"), std::string::npos);
    EXPECT_EQ(report::buildReport(inputFor(runs)).section("basins"), nullptr);
}

TEST(Report, TheReproducibilityBlockNamesVersionBuildChecksumDateAndCommand) {
    const report::StudyRuns runs = runSample("two-valve-saddles.json");
    const report::ReportInput in = inputFor(runs);
    const std::string text = allText(*report::buildReport(in).section("reproducibility"));
    for (const std::string& piece : {std::string("9.9.9"), std::string("git 0123456789ab"), std::string("2030-01-02 03:04:05 UTC"),
                                     std::string("saddlewise report study.json -o out.html"), in.provenance.studyChecksum,
                                     in.provenance.studyText})
        EXPECT_NE(text.find(piece), std::string::npos) << piece;
}

TEST(Report, ChecksumsAreSha256) {
    // FIPS 180-4 test vector: SHA-256("abc").
    EXPECT_EQ(report::checksumOf("abc"), "sha256:ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
}

TEST(Report, TheDateFollowsSourceDateEpoch) {
    ::setenv("SOURCE_DATE_EPOCH", "1700000000", 1);
    EXPECT_EQ(report::generationTime(), "2023-11-14 22:13:20 UTC");
    ::setenv("SOURCE_DATE_EPOCH", "not a number", 1);
    EXPECT_NE(report::generationTime(), "2023-11-14 22:13:20 UTC");
    ::unsetenv("SOURCE_DATE_EPOCH");
    EXPECT_EQ(report::generationTime().size(), std::string("2023-11-14 22:13:20 UTC").size());
}

TEST(Report, CommandsAreQuotedForTheShell) {
    EXPECT_EQ(report::commandLine({"saddlewise", "report", "my study.json", "-o", "it's.html"}),
              "saddlewise report 'my study.json' -o 'it'\\''s.html'");
    EXPECT_EQ(report::shellQuote("samples/a-b_c.json"), "samples/a-b_c.json");
    EXPECT_EQ(report::shellQuote(""), "''");
    EXPECT_EQ(report::shellQuote("$HOME"), "'$HOME'");
}

TEST(Html, EscapesTextAndKeepsTheStyleElementClosed) {
    report::Document d;
    d.title = "<script>alert(1)</script> & \"quotes\"";
    d.footer = "a </style> in the footer \"quoted\"";
    d.sections.push_back({"one", "Section <1>", {report::paragraph("x < y && y > z"), report::preformatted("if a<b then")}});
    d.machineReadable = json{{"text", "</script><b>"}}.dump();
    const std::string html = report::toHtml(d);
    EXPECT_EQ(html.find("<script>alert"), std::string::npos);
    EXPECT_NE(html.find("&lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;quotes&quot;"), std::string::npos);
    EXPECT_NE(html.find("x &lt; y &amp;&amp; y &gt; z"), std::string::npos);
    EXPECT_NE(html.find("if a&lt;b then"), std::string::npos);
    // Exactly one </style>, one </script> (the data block's own), whatever the text holds.
    auto count = [&](const std::string& what) {
        std::size_t n = 0;
        for (std::size_t at = html.find(what); at != std::string::npos; at = html.find(what, at + 1)) ++n;
        return n;
    };
    EXPECT_EQ(count("</style>"), 1u);
    EXPECT_EQ(count("</script>"), 1u);
    EXPECT_NE(html.find("<section id=\"one\">"), std::string::npos);
    EXPECT_NE(html.find("<a href=\"#one\">"), std::string::npos);
}

TEST(Html, InlineSvgDropsTheXmlPrologueAndPrefixesEveryId) {
    const std::string svg =
        "<?xml version=\"1.0\" encoding=\"UTF-8\" standalone=\"no\"?>\n"
        "<svg width=\"201mm\" height=\"159mm\"\n viewBox=\"0 0 760 600\"\n xmlns=\"http://www.w3.org/2000/svg\" "
        "xmlns:xlink=\"http://www.w3.org/1999/xlink\" version=\"1.2\" baseProfile=\"tiny\">\n"
        "<title>Saddlewise plot</title>\n<desc>Generated with Qt</desc>\n"
        "<defs><clipPath id=\"clip1\"><rect x=\"0\" y=\"0\" width=\"5\" height=\"5\"/></clipPath></defs>\n"
        "<g clip-path=\"url(#clip1)\" fill=\"none\"><use xlink:href=\"#clip1\"/><path d=\"M0,0 L1,1\"/></g>\n"
        "<g font-family=\"Sans Serif\"><text>a</text></g><g font-family=\"DejaVu Sans\"><text>b</text></g>\n</svg>\n";
    const std::string inlined = report::inlineSvg(svg, "landscape", 760, 600, "A <landscape>");
    EXPECT_EQ(inlined.find("<?xml"), std::string::npos);
    EXPECT_EQ(inlined.rfind("<svg ", 0), 0u);
    EXPECT_NE(inlined.find("viewBox=\"0 0 760 600\""), std::string::npos);
    EXPECT_NE(inlined.find("width=\"760\" height=\"600\""), std::string::npos);
    EXPECT_EQ(inlined.find("201mm"), std::string::npos);
    EXPECT_NE(inlined.find("<title id=\"landscape-title\">A &lt;landscape&gt;</title>"), std::string::npos);
    EXPECT_EQ(inlined.find("Generated with Qt"), std::string::npos);
    EXPECT_NE(inlined.find("id=\"landscape-clip1\""), std::string::npos);
    EXPECT_NE(inlined.find("url(#landscape-clip1)"), std::string::npos);
    EXPECT_NE(inlined.find("xlink:href=\"#landscape-clip1\""), std::string::npos);
    EXPECT_EQ(inlined.find("\"clip1\""), std::string::npos);
    EXPECT_NE(inlined.find("font-family=\"sans-serif\""), std::string::npos);
    EXPECT_NE(inlined.find("font-family=\"DejaVu Sans, sans-serif\""), std::string::npos);
    EXPECT_EQ(report::inlineSvg("no svg here", "x", 1, 1, "t"), "");
}

TEST(Html, TheWholeReportReferencesNothingOutsideItself) {
    const report::StudyRuns runs = runSample("sensor-warmup.json");
    const std::string html = report::toHtml(report::buildReport(inputFor(runs)));
    // Every href is a fragment; no src attribute, no url() but fragments, no @import.
    const std::regex href(R"(href\s*=\s*"([^"]*)\")");
    for (auto it = std::sregex_iterator(html.begin(), html.end(), href); it != std::sregex_iterator(); ++it)
        EXPECT_EQ((*it)[1].str().rfind('#', 0), 0u) << (*it)[0].str();
    EXPECT_EQ(html.find(" src="), std::string::npos);
    EXPECT_EQ(html.find("@import"), std::string::npos);
    // Addresses only as the SVG namespaces.
    const std::regex address(R"(https?://[^"\s)<]*)");
    for (auto it = std::sregex_iterator(html.begin(), html.end(), address); it != std::sregex_iterator(); ++it) {
        const std::string found = (*it)[0].str();
        EXPECT_TRUE(found == "http://www.w3.org/2000/svg" || found == "http://www.w3.org/1999/xlink") << found;
    }
    // The data block round-trips to the results.
    const std::string open = "<script type=\"application/json\" id=\"saddlewise-results\">";
    const std::size_t at = html.find(open);
    ASSERT_NE(at, std::string::npos);
    const std::size_t end = html.find("</script>", at);
    const json embedded = json::parse(html.substr(at + open.size(), end - at - open.size()));
    EXPECT_EQ(embedded, report::prepareInput(runs).results);
}

}  // namespace

// The surveys a study asks for are made for its report (runStudySurveys, the same core calls the
// window's survey panels make) and reach the document. The two-valve sample's surface has four
// wells, four passes and a central peak by its construction (samples/make_samples.py); the
// published-function checks of the survey itself are in tests/core/survey.
TEST(Report, TheSurveysAStudyAsksForAreMadeAndReported) {
    report::StudyRuns runs = runSample("two-valve-saddles.json");
    ASSERT_TRUE(runs.study.surveys.has_value());
    runs.study.surveys->basinGrid = 24;  // small: this checks the plumbing, not the maps
    report::runStudySurveys(runs);
    ASSERT_NE(runs.critical, nullptr) << runs.surveyNote;
    ASSERT_NE(runs.basins, nullptr) << runs.surveyNote;
    EXPECT_TRUE(runs.surveyNote.empty()) << runs.surveyNote;
    int minima = 0, saddles = 0, maxima = 0;
    for (const auto& p : runs.critical->points) {
        const std::string kind = survey::kindName(p);
        minima += kind == "minimum";
        saddles += kind == "saddle";
        maxima += kind == "maximum";
    }
    EXPECT_EQ(minima, 4);
    EXPECT_EQ(saddles, 4);
    EXPECT_EQ(maxima, 1);
    ASSERT_EQ(runs.basins->maps.size(), 3u);

    const report::ReportInput in = inputFor(runs);
    ASSERT_TRUE(in.surveys.has_value());
    const report::Document d = report::buildReport(in);
    ASSERT_NE(d.section("critical-points"), nullptr);
    ASSERT_NE(d.section("basins"), nullptr);
    const std::string critical = allText(*d.section("critical-points"));
    EXPECT_NE(critical.find("saddle"), std::string::npos);
    EXPECT_NE(critical.find("maximum"), std::string::npos);
    const std::string basins = allText(*d.section("basins"));
    for (const char* label : {"Newton", "saddle-free Newton", "exact trust region"})
        EXPECT_NE(basins.find(label), std::string::npos) << label;
    EXPECT_NE(basins.find("24 × 24 grid"), std::string::npos) << basins;
    // Every cell is accounted for in each method's table.
    for (const json& b : (*in.surveys)["basins"]) {
        long total = 0;
        for (const auto& [name, count] : b["counts"].items()) total += count.get<long>();
        EXPECT_EQ(total, 24 * 24) << b["method"];
    }
    // Pure Newton can end on a saddle; its table says so.
    bool newtonSaddle = false;
    for (const auto& [name, count] : (*in.surveys)["basins"][0]["counts"].items())
        newtonSaddle = newtonSaddle || name.rfind("saddle", 0) == 0;
    EXPECT_TRUE(newtonSaddle) << (*in.surveys)["basins"][0].dump();
}

TEST(Report, ASurveyThatCannotBeMadeIsNamedInTheReport) {
    report::StudyRuns runs = runSample("two-valve-saddles.json");
    runs.study.surveys->critical = false;
    runs.study.surveys->basinMethods = {"no such entry"};
    report::runStudySurveys(runs);
    EXPECT_EQ(runs.basins, nullptr);
    EXPECT_NE(runs.surveyNote.find("name no lineup entry"), std::string::npos) << runs.surveyNote;
    const report::Document d = report::buildReport(inputFor(runs));
    ASSERT_NE(d.section("critical-points"), nullptr);
    EXPECT_NE(allText(*d.section("critical-points")).find("name no lineup entry"), std::string::npos);
}
