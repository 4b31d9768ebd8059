// Basin maps: every cell accounted for, mirror symmetry of Newton's map on a mirror-symmetric
// function, no saddle basins for methods that escape saddles, pieces, bad input.
#include "core/objective/formula_objective.h"
#include "core/survey/survey.h"
#include "core/survey/survey_json.h"

#include <gtest/gtest.h>

#include <cmath>

namespace {

using sw::FormulaObjective;
using sw::Vector;
using sw::solve::PointKind;
using namespace sw::survey;

Region box2(double x0, double x1, double y0, double y1) {
    Region r;
    r.lower = Vector(2);
    r.upper = Vector(2);
    r.lower << x0, y0;
    r.upper << x1, y1;
    r.held = Vector::Zero(2);
    return r;
}

// The two-valve sample's objective (samples/two-valve-saddles.json).
const char* kTwoValve = "(a^2 - 1)^2 + (b^2 - 1)^2 + 0.5*a*b";

BasinSettings grid(int n) {
    BasinSettings s;
    s.grid = n;
    return s;
}

TEST(Basins, EveryCellIsAccountedFor) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    const BasinSurvey survey =
        mapBasins(f, box2(-1.6, 1.6, -1.6, 1.6), {{"", "newton", {}}, {"sd", "gradient-descent", {}}}, grid(37));
    ASSERT_EQ(survey.maps.size(), 2u);
    EXPECT_EQ(survey.maps[0].method.label, "newton") << "an empty label takes the method id";
    for (const BasinMap& m : survey.maps) {
        ASSERT_EQ(m.cells.size(), 37u * 37u);
        ASSERT_EQ(m.iterations.size(), 37u * 37u);
        EXPECT_EQ(m.total(), 37 * 37);
        EXPECT_EQ(m.pointCounts.size(), survey.map.points.size());
        EXPECT_EQ(m.notRun, 0);
        for (int code : m.cells) {
            EXPECT_GE(code, kCellOutside);
            EXPECT_LT(code, static_cast<int>(survey.map.points.size()));
        }
    }
    EXPECT_FALSE(survey.cancelled);
    // The map under the basins is the sample's: four wells, four passes, one peak.
    EXPECT_EQ(survey.map.count(PointKind::Minimum), 4);
    EXPECT_EQ(survey.map.count(PointKind::Saddle), 4);
    EXPECT_EQ(survey.map.count(PointKind::Maximum), 1);
}

TEST(Basins, NewtonsMapIsMirrorSymmetricForAMirrorSymmetricFunction) {
    // f(-x, y) = f(x, y), and the cell centres are placed symmetrically about the box's centre,
    // so cell (i, j) and cell (N-1-i, j) must end at mirrored points (common practice, no
    // published source). The function is not symmetric in y, so a transposed cell layout or a
    // wrong match fails here; with an odd N the middle column maps onto itself.
    const FormulaObjective f("(x^2 - 1)^2 + (y^2 - 1)^2 + 0.3*y", {"x", "y"});
    for (int n : {40, 41}) {
        const BasinSurvey survey = mapBasins(f, box2(-1.5, 1.5, -1.7, 1.3), {{"", "newton", {}}}, grid(n));
        const BasinMap& m = survey.maps[0];
        int pointCells = 0;
        for (int j = 0; j < n; ++j)
            for (int i = 0; i < n; ++i) {
                const int a = m.cells[static_cast<std::size_t>(j * n + i)];
                const int b = m.cells[static_cast<std::size_t>(j * n + (n - 1 - i))];
                if (a < 0 || b < 0) {
                    EXPECT_EQ(a, b) << "cell " << i << ", " << j;
                    continue;
                }
                ++pointCells;
                const Vector& pa = survey.map.points[static_cast<std::size_t>(a)].x;
                const Vector& pb = survey.map.points[static_cast<std::size_t>(b)].x;
                EXPECT_NEAR(pa[0], -pb[0], 1e-9) << "cell " << i << ", " << j;
                EXPECT_NEAR(pa[1], pb[1], 1e-9);
            }
        EXPECT_GT(pointCells, n * n / 2);
    }
}

TEST(Basins, MethodsThatEscapeSaddlesHaveNoSaddleBasin) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    const BasinSurvey survey = mapBasins(
        f, box2(-1.6, 1.6, -1.6, 1.6),
        {{"", "newton", {}}, {"", "saddle-free-newton", {}}, {"", "trust-region-exact", {}}, {"", "trust-region-cg", {}}},
        grid(41));
    auto saddleCells = [&](const BasinMap& m) {
        long cells = 0;
        for (std::size_t k = 0; k < survey.map.points.size(); ++k)
            if (survey.map.points[k].kind == PointKind::Saddle) cells += m.pointCounts[k];
        return cells;
    };
    // Pure Newton is attracted by saddles (Nocedal & Wright 2006, sec. 3.4): positive area.
    EXPECT_GT(saddleCells(survey.maps[0]), 41);
    // Saddle-free Newton (Dauphin et al. 2014) and trust-region methods that follow negative
    // curvature (More & Sorensen 1983; Steihaug 1983) leave saddles: not one cell ends there.
    for (std::size_t m = 1; m < survey.maps.size(); ++m)
        EXPECT_EQ(saddleCells(survey.maps[m]), 0) << survey.maps[m].method.methodId;
}

TEST(Basins, SameSurveyOnOneThreadOnTwoAndFromPieces) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    const Region region = box2(-1.6, 1.6, -1.6, 1.6);
    const std::vector<BasinMethod> methods = {{"", "newton", {}}, {"", "trust-region-exact", {}}};
    Control one, two;
    one.threads = 1;
    two.threads = 2;
    const BasinSurvey a = mapBasins(f, region, methods, grid(30), {}, one);
    const BasinSurvey b = mapBasins(f, region, methods, grid(30), {}, two);
    // As an MPI split does it: each cell computed elsewhere, assembled in cell order.
    const BasinSearch search(f, region, methods, grid(30));
    std::vector<StartOutcome> starts(search.critical().starts().size());
    for (std::size_t i = 0; i < starts.size(); ++i) starts[(i * 7) % starts.size()] = search.critical().run((i * 7) % starts.size());
    const CriticalMap map = search.critical().assemble(starts);
    std::vector<std::vector<CellOutcome>> cells(methods.size(), std::vector<CellOutcome>(static_cast<std::size_t>(search.cellCount())));
    for (std::size_t m = 0; m < methods.size(); ++m)
        for (long c = search.cellCount() - 1; c >= 0; --c) cells[m][static_cast<std::size_t>(c)] = search.run(m, c, map);
    const BasinSurvey c = search.assemble(map, cells);
    for (const BasinSurvey* s : {&b, &c})
        EXPECT_EQ(withoutTimings(basinSurveyToJson(*s)), withoutTimings(basinSurveyToJson(a)));
}

TEST(Basins, RunsThatEndOnAPointTheSearchMissedAddItToTheMap) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    CriticalSettings sparse;
    sparse.starts = 1;
    sparse.signChangeGrid = 0;
    const BasinSurvey survey = mapBasins(f, box2(-1.6, 1.6, -1.6, 1.6), {{"", "newton", {}}}, grid(25), sparse);
    EXPECT_EQ(survey.map.points.size(), 9u);
    int added = 0;
    for (const CriticalPoint& p : survey.map.points) added += p.foundBy == "basins";
    EXPECT_GE(added, 8);
    EXPECT_EQ(survey.maps[0].total(), 25 * 25);
}

TEST(Basins, LimitsAndRunawaysAreShownApart) {
    // Steepest descent with 3 iterations stops at the limit almost everywhere; on x^3 + y^2
    // Newton runs off toward x = -inf from the left half.
    const FormulaObjective wells(kTwoValve, {"a", "b"});
    BasinSettings few = grid(20);
    few.rules.maxIterations = 3;
    const BasinSurvey limited = mapBasins(wells, box2(-1.6, 1.6, -1.6, 1.6), {{"", "gradient-descent", {}}}, few);
    EXPECT_GT(limited.maps[0].limit, 300);
    const FormulaObjective cubic("x^3 + y^2 + 3*x", {"x", "y"});
    const BasinSurvey runaway = mapBasins(cubic, box2(-2, 2, -2, 2), {{"", "damped-newton", {}}}, grid(20));
    EXPECT_GT(runaway.maps[0].diverged + runaway.maps[0].limit + runaway.maps[0].failed, 0);
    EXPECT_EQ(runaway.maps[0].total(), 400);
}

TEST(Basins, BadInputIsRefusedWithASentence) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    const Region region = box2(-1.6, 1.6, -1.6, 1.6);
    auto refusal = [&](const std::vector<BasinMethod>& methods, const BasinSettings& settings, const Region& r) {
        try {
            BasinSearch(f, r, methods, settings);
        } catch (const std::invalid_argument& e) {
            return std::string(e.what());
        }
        return std::string("(accepted)");
    };
    BasinSettings huge = grid(4000);
    EXPECT_NE(refusal({{"", "newton", {}}, {"", "bfgs", {}}}, huge, region).find("above the limit of 16,000,000"),
              std::string::npos);
    EXPECT_NE(refusal({{"", "newton", {}}}, grid(4001), region).find("16,008,001 runs"), std::string::npos);
    BasinSettings roomy = grid(4001);
    roomy.maxCells = 20'000'000;
    EXPECT_NE(refusal({{"", "newton", {}}}, roomy, region).find("1 to 4000"), std::string::npos);
    EXPECT_NE(refusal({{"", "newton", {}}}, grid(0), region).find("at least 1 cell"), std::string::npos);
    EXPECT_NE(refusal({{"", "levenberg-marquardt", {}}}, grid(10), region).find("needs a least-squares objective"),
              std::string::npos);
    EXPECT_NE(refusal({{"", "newtonn", {}}}, grid(10), region).find("unknown method 'newtonn'"), std::string::npos);
    EXPECT_NE(refusal({{"", "trust-region-exact", {{"initial_radius", "-1"}}}}, grid(10), region).find("initial_radius"),
              std::string::npos);
    EXPECT_NE(refusal({}, grid(10), region).find("at least one method"), std::string::npos);
    EXPECT_NE(refusal({{"", "newton", {}}}, grid(10), box2(1, 1, 0, 1)).find("no interior in a"), std::string::npos);
    // Both ends finite, the width not: named as too wide (it was called "too narrow").
    EXPECT_NE(refusal({{"", "newton", {}}}, grid(10), box2(-1e308, 1e308, 0, 1)).find("is too wide"), std::string::npos);
}

TEST(Basins, CellCentresAreMirroredToTheLastBit) {
    BasinSurvey s;
    s.region = box2(-1.6, 1.6, -3, 3);
    for (int n : {7, 8, 200, 201}) {
        s.grid = n;
        for (int i = 0; i < n; ++i) {
            EXPECT_EQ(s.cellX(i), -s.cellX(n - 1 - i));
            EXPECT_EQ(s.cellY(i), -s.cellY(n - 1 - i));
        }
        EXPECT_NEAR(s.cellX(0), -1.6 + 1.6 / n, 1e-15);
    }
}

TEST(Basins, CancelledSurveyMarksCellsNotRun) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    std::atomic<bool> cancel{true};
    Control control;
    control.cancel = &cancel;
    const BasinSurvey s = mapBasins(f, box2(-1.6, 1.6, -1.6, 1.6), {{"", "newton", {}}}, grid(10), {}, control);
    EXPECT_TRUE(s.cancelled);
    EXPECT_EQ(s.maps[0].total(), 100);
    EXPECT_EQ(s.maps[0].notRun, 100);
}

TEST(SurveyJson, BasinJsonCarriesTheDocumentedKeys) {
    const FormulaObjective f(kTwoValve, {"a", "b"});
    const BasinSurvey s = mapBasins(f, box2(-1.6, 1.6, -1.6, 1.6), {{"", "newton", {}}}, grid(12));
    const Json j = basinSurveyToJson(s);
    ASSERT_EQ(j["methods"].size(), 1u);
    const Json& m = j["methods"][0];
    for (const char* key : {"cells", "counts", "points", "seconds"}) EXPECT_TRUE(m.contains(key)) << key;
    EXPECT_EQ(m["cells"].size(), 144u);
    long sum = 0;
    for (const auto& c : m["counts"]["points"]) sum += c.get<long>();
    for (const char* k : {"limit", "diverged", "failed", "outside", "not_run"}) sum += m["counts"][k].get<long>();
    EXPECT_EQ(sum, 144);
    const Json& p = m["points"][0];
    for (const char* key : {"x", "value", "kind", "index", "eigenvalues", "gradient_norm"}) EXPECT_TRUE(p.contains(key)) << key;
    EXPECT_TRUE(p["x"].contains("a"));
    const Json stripped = withoutTimings(j);
    EXPECT_FALSE(stripped.contains("seconds"));
    EXPECT_FALSE(stripped["methods"][0].contains("seconds"));
    EXPECT_FALSE(stripped["critical"].contains("seconds"));
}

TEST(SurveyJson, CriticalJsonCarriesTheDocumentedKeys) {
    const FormulaObjective f("(x^2 + y^2 - 1)^2", {"x", "y"});
    const CriticalMap map = findCriticalPoints(f, box2(-2, 2, -2, 2));
    const Json j = criticalMapToJson(map);
    for (const char* key : {"points", "starts", "seconds", "found_once", "likely_complete", "box"})
        EXPECT_TRUE(j.contains(key)) << key;
    bool sawContinuum = false;
    for (const Json& p : j["points"]) {
        EXPECT_TRUE(p["kind"] == "degenerate" || p["kind"] == "maximum");
        if (p.contains("continuum")) sawContinuum = p["continuum"]["members"].get<int>() > 1;
    }
    EXPECT_TRUE(sawContinuum);
}

}  // namespace
