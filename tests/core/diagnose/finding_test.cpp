// Finding ids: a fixed list, each with a kebab-case name, a rule, a source, and a row in
// docs/findings.md.
#include "core/diagnose/finding.h"

#include <gtest/gtest.h>

#include <fstream>
#include <set>
#include <sstream>

namespace sw::diagnose {
namespace {

bool isKebabCase(const std::string& s) {
    if (s.empty() || s.front() == '-' || s.back() == '-') return false;
    for (char c : s)
        if (!((c >= 'a' && c <= 'z') || c == '-')) return false;
    return s.find("--") == std::string::npos;
}

TEST(FindingIds, EveryIdHasItsOwnKebabCaseName) {
    std::set<std::string> seen;
    ASSERT_EQ(static_cast<int>(allFindingIds().size()), kFindingIdCount);
    for (FindingId id : allFindingIds()) {
        const std::string name = toString(id);
        EXPECT_TRUE(isKebabCase(name)) << name;
        EXPECT_TRUE(seen.insert(name).second) << "repeated: " << name;
    }
    // The ids the issue names, all present.
    for (const char* wanted : {"saddle-end", "maximum-end", "flat-direction", "narrow-valley", "poor-scaling",
                               "uphill-newton", "line-search-collapse", "radius-collapse", "stagnation", "divergence",
                               "non-finite", "budget-exhausted", "convergence-rate", "method-failed"})
        EXPECT_TRUE(seen.count(wanted)) << wanted;
}

TEST(FindingIds, AValueOutsideTheEnumStillNamesAKnownId) {
    // An id is built only from the enum; even a corrupted value prints as a known id, never "unknown".
    const auto corrupted = static_cast<FindingId>(kFindingIdCount + 7);
    std::set<std::string> known;
    for (FindingId id : allFindingIds()) known.insert(toString(id));
    EXPECT_TRUE(known.count(toString(corrupted)));
}

TEST(FindingIds, EveryIdIsDescribedWithARuleAndASource) {
    for (FindingId id : allFindingIds()) {
        const FindingInfo& info = describe(id);
        EXPECT_EQ(info.id, id);
        EXPECT_GT(std::string(info.title).size(), 5u) << toString(id);
        EXPECT_GT(std::string(info.rule).size(), 20u) << toString(id);
        EXPECT_GT(std::string(info.source).size(), 5u) << toString(id);
    }
}

TEST(FindingIds, EveryIdHasARowInTheDocumentation) {
    // Appended to a named string: GCC 12 at -O2 warns (-Warray-bounds, a false positive) on
    // std::string(SW_SOURCE_DIR) + "..." here.
    std::string path(SW_SOURCE_DIR);
    path.append("/docs/findings.md");
    std::ifstream file(path);
    ASSERT_TRUE(file.good());
    std::stringstream text;
    text << file.rdbuf();
    for (FindingId id : allFindingIds()) {
        std::string row = "| `";
        row += toString(id);
        row += "` |";
        EXPECT_NE(text.str().find(row), std::string::npos) << toString(id);
    }
}

TEST(Findings, SortPutsProblemsFirstThenTheEnumOrder) {
    Findings list(3);
    list[0].id = FindingId::ConvergenceRate;
    list[0].severity = Severity::Note;
    list[1].id = FindingId::Stagnation;
    list[1].severity = Severity::Problem;
    list[2].id = FindingId::SaddleEnd;
    list[2].severity = Severity::Problem;
    sortFindings(list);
    EXPECT_EQ(list[0].id, FindingId::SaddleEnd);
    EXPECT_EQ(list[1].id, FindingId::Stagnation);
    EXPECT_EQ(list[2].id, FindingId::ConvergenceRate);
    EXPECT_TRUE(hasProblem(list));
    EXPECT_EQ(findById(list, FindingId::Stagnation), &list[1]);
    EXPECT_EQ(findById(list, FindingId::Divergence), nullptr);
}

}  // namespace
}  // namespace sw::diagnose
