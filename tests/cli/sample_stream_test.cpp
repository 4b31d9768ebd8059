// The streaming `sample` verb, run as the built executable (SW_EXECUTABLE): its summary equals
// the one computed from the whole grid (evaluateGrid, kept in memory here), its memory does
// not grow with the grid, a box whose width overflows still gives finite coordinates, values
// near the largest double still give a finite mean, and a request whose working memory would
// pass the stated limit is refused with a message. Expected values are computed here from
// the whole grid or worked by hand (common practice, no published source).
#include "core/expr/expr.h"

#include <nlohmann/json.hpp>

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <fcntl.h>
#include <limits>
#include <string>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>
#include <vector>

namespace {

struct Result {
    int code = -1;
    std::string out, err;
    double peakMegabytes = 0;  // the child's peak resident set (wait4)
};

std::string readAll(int fd) {
    std::string text;
    char buffer[65536];
    for (ssize_t n; (n = ::read(fd, buffer, sizeof buffer)) > 0;) text.append(buffer, static_cast<std::size_t>(n));
    return text;
}

// fork + exec, so wait4 gives this child's own rusage (its peak RSS).
Result run(const std::vector<std::string>& args) {
    char outPath[] = "/tmp/sw_sample_out_XXXXXX", errPath[] = "/tmp/sw_sample_err_XXXXXX";
    const int outFd = ::mkstemp(outPath), errFd = ::mkstemp(errPath);
    const pid_t pid = ::fork();
    if (pid == 0) {
        ::dup2(outFd, 1);
        ::dup2(errFd, 2);
        std::vector<char*> argv{const_cast<char*>(SW_EXECUTABLE)};
        for (const auto& a : args) argv.push_back(const_cast<char*>(a.c_str()));
        argv.push_back(nullptr);
        ::execv(SW_EXECUTABLE, argv.data());
        ::_exit(127);
    }
    int status = 0;
    rusage usage{};
    ::wait4(pid, &status, 0, &usage);
    Result r;
    r.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    ::lseek(outFd, 0, SEEK_SET);
    ::lseek(errFd, 0, SEEK_SET);
    r.out = readAll(outFd);
    r.err = readAll(errFd);
    ::close(outFd);
    ::close(errFd);
    ::unlink(outPath);
    ::unlink(errPath);
    r.peakMegabytes = static_cast<double>(usage.ru_maxrss) / 1024.0;
    return r;
}

struct Expected {
    double min, max, mean;
    std::size_t nonFinite;
};

// The summary from the whole grid, stored: finite values only, mean by long double sum.
std::vector<Expected> wholeGridSummary(const std::string& formula, const std::vector<std::string>& names,
                                       const sw::expr::GridSpec& grid, int order) {
    const sw::expr::DerivativeSet set(formula, names, order);
    std::vector<std::vector<double>> values;
    // Scalar math on both sides would be needed for identical bits; the verb's block
    // evaluation is the same code as evaluateGrid's, so the values are the same.
    sw::expr::evaluateGrid(set.program(), grid, values, 1);
    std::vector<Expected> out;
    for (const auto& v : values) {
        Expected e{std::numeric_limits<double>::infinity(), -std::numeric_limits<double>::infinity(), 0, 0};
        long double sum = 0;
        std::size_t finite = 0;
        for (double x : v) {
            if (!std::isfinite(x)) {
                ++e.nonFinite;
                continue;
            }
            e.min = std::min(e.min, x);
            e.max = std::max(e.max, x);
            sum += x;
            ++finite;
        }
        e.mean = finite ? static_cast<double>(sum / finite) : std::nan("");
        out.push_back(e);
    }
    return out;
}

bool sanitized() {
#if defined(__SANITIZE_ADDRESS__)
    return true;
#else
    return false;
#endif
}

}  // namespace

TEST(SampleStream, SummaryEqualsTheWholeGridsSummary) {
    struct Case {
        std::string formula, box, at;
        int grid, order;
    };
    const std::vector<Case> cases = {
        {"0.1*x^4 + 0.1*y^4 - 0.5*x*y + 3*exp(-0.5*((x - 1)^2 + (y + 0.5)^2))*sin(2*x)*cos(3*y)", "x=-3:3,y=-3:3", "", 301, 2},
        // Non-finite values (log of negative numbers, division by zero on the axes) are counted.
        {"ln(x) + 1/y + z*x*y", "x=-1:2,y=-1:1", "z=0.5", 257, 2},
        {"sqrt(x*y) - atan2(y, x)", "x=-2:2,y=-2:2", "", 2001, 1},
    };
    for (const Case& c : cases) {
        std::vector<std::string> args{"sample", c.formula, "--box", c.box, "--grid", std::to_string(c.grid), "--order",
                                      std::to_string(c.order), "--json"};
        if (!c.at.empty()) args.insert(args.end(), {"--at", c.at});
        const Result r = run(args);
        ASSERT_EQ(r.code, 0) << r.err;
        const auto j = nlohmann::json::parse(r.out);
        sw::expr::GridSpec grid;
        const auto box = j["box"];
        const auto names = j["variables"].get<std::vector<std::string>>();
        grid.xMin = box[names[0]][0], grid.xMax = box[names[0]][1];
        grid.yMin = box[names[1]][0], grid.yMax = box[names[1]][1];
        grid.nx = grid.ny = c.grid;
        grid.fixedInputs = {0, 0};
        if (!c.at.empty()) grid.fixedInputs.push_back(0.5);
        const auto expected = wholeGridSummary(c.formula, names, grid, c.order);
        ASSERT_EQ(j["outputs"].size(), expected.size());
        for (std::size_t o = 0; o < expected.size(); ++o) {
            const auto& got = j["outputs"][o];
            const Expected& e = expected[o];
            EXPECT_EQ(got["non_finite"].get<std::size_t>(), e.nonFinite) << c.formula << " output " << o;
            if (!std::isfinite(e.mean)) {
                EXPECT_TRUE(got["mean"].is_null());
                continue;
            }
            // min and max are values of the grid: the same bits; the mean to rounding.
            EXPECT_EQ(got["min"].get<double>(), e.min) << c.formula << " output " << o;
            EXPECT_EQ(got["max"].get<double>(), e.max) << c.formula << " output " << o;
            const double scale = std::max({1.0, std::abs(e.min), std::abs(e.max)});
            EXPECT_NEAR(got["mean"].get<double>(), e.mean, 1e-13 * scale) << c.formula << " output " << o;
        }
    }
}

TEST(SampleStream, PeakMemoryDoesNotGrowWithTheGrid) {
    if (sanitized()) GTEST_SKIP() << "AddressSanitizer's shadow memory and quarantine make RSS meaningless here";
    const Result small = run({"sample", "x*y + y^3", "--box", "x=-1:1,y=-1:1", "--grid", "500", "--order", "2", "--json"});
    const Result large = run({"sample", "x*y + y^3", "--box", "x=-1:1,y=-1:1", "--grid", "4000", "--order", "2", "--json"});
    ASSERT_EQ(small.code, 0) << small.err;
    ASSERT_EQ(large.code, 0) << large.err;
    // 16 million points x 6 outputs would be 768 MB stored; streamed, the process stays small.
    EXPECT_LT(large.peakMegabytes, 64.0);
    EXPECT_LT(large.peakMegabytes - small.peakMegabytes, 8.0)
        << "peak " << small.peakMegabytes << " MB at N = 500, " << large.peakMegabytes << " MB at N = 4000";
    const auto j = nlohmann::json::parse(large.out);
    EXPECT_EQ(j["points"].get<long long>(), 16000000LL);
    EXPECT_EQ(j["outputs"][0]["non_finite"].get<long long>(), 0);
    // f = xy + y^3 over the square: mean 0 by symmetry (y^3 odd, xy odd in x).
    EXPECT_NEAR(j["outputs"][0]["mean"].get<double>(), 0.0, 1e-12);
    EXPECT_EQ(j["outputs"][0]["max"].get<double>(), 2.0);  // at (1, 1)
}

TEST(SampleStream, WorkingMemoryIsStatedAndIndependentOfTheGrid) {
    std::string at;
    for (int i = 1; i <= 60; ++i) at += (i > 1 ? "," : "") + std::string("a") + std::to_string(i) + "=1";
    const Result a = run({"sample", "x*y + a1*a2", "--box", "x=-1:1,y=-1:1", "--grid", "130", "--at", at, "--json"});
    const Result b = run({"sample", "x*y + a1*a2", "--box", "x=-1:1,y=-1:1", "--grid", "260", "--at", at, "--json"});
    ASSERT_EQ(a.code, 0) << a.err;
    ASSERT_EQ(b.code, 0) << b.err;
    const auto ja = nlohmann::json::parse(a.out), jb = nlohmann::json::parse(b.out);
    EXPECT_EQ(ja["outputs"].size(), 1u + 62u + 62u * 63u / 2u);
    const double bytes = ja["working_memory_bytes"].get<double>();
    EXPECT_EQ(bytes, jb["working_memory_bytes"].get<double>());
    EXPECT_LT(bytes, 256.0 * (1 << 20));
    // d2f/da1da2 = 1 everywhere.
    for (const auto& o : ja["outputs"]) {
        if (o["name"] == "d2f/da1da2") {
            EXPECT_EQ(o["mean"].get<double>(), 1.0);
        }
    }
}

TEST(SampleStream, RefusesWhatWouldPassTheMemoryLimitWithAMessage) {
    std::string at;
    for (int i = 1; i <= 800; ++i) at += (i > 1 ? "," : "") + std::string("a") + std::to_string(i) + "=0";
    const Result r = run({"sample", "x + y", "--box", "x=-1:1,y=-1:1", "--grid", "4000", "--at", at, "--threads", "2"});
    EXPECT_EQ(r.code, 2) << r.err;
    EXPECT_NE(r.err.find("802 variables at --order 2 make 322806 outputs per point"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("256 MB"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find("--order"), std::string::npos) << r.err;
    EXPECT_LT(r.peakMegabytes, 512.0) << "must refuse before allocating";
    // The same variables at order 0 are one output: fine.
    const Result value = run({"sample", "x + y", "--box", "x=-1:1,y=-1:1", "--grid", "50", "--at", at, "--order", "0"});
    EXPECT_EQ(value.code, 0) << value.err;
}

TEST(SampleStream, ABoxWhoseWidthOverflowsStillHasFiniteCoordinates) {
    // 1e308 - (-1e308) overflows (and in the second box, (hi - lo) i does); the grid points are -1e308, 0, 1e308 all the same.
    const Result r = run({"sample", "x + y", "--box", "x=-1e308:1e308,y=-1:1", "--grid", "3", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const auto j = nlohmann::json::parse(r.out);
    const auto& f = j["outputs"][0];
    EXPECT_EQ(f["non_finite"].get<int>(), 0);
    EXPECT_EQ(f["min"].get<double>(), -1e308 - 1);
    EXPECT_EQ(f["max"].get<double>(), 1e308 + 1);
    EXPECT_EQ(f["mean"].get<double>(), 0.0);  // symmetric grid: the values cancel in pairs
    EXPECT_EQ(j["outputs"][1]["mean"].get<double>(), 1.0);
    // The coordinates themselves: ends exact, middle point 0, all finite and ordered.
    EXPECT_EQ(sw::expr::gridCoordinate(-1e308, 1e308, 0, 3), -1e308);
    EXPECT_EQ(sw::expr::gridCoordinate(-1e308, 1e308, 1, 3), 0.0);
    EXPECT_EQ(sw::expr::gridCoordinate(-1e308, 1e308, 2, 3), 1e308);
    const double big = std::numeric_limits<double>::max();
    double previous = -big;
    for (int i = 0; i < 1001; ++i) {
        const double x = sw::expr::gridCoordinate(-big, big, i, 1001);
        EXPECT_TRUE(std::isfinite(x)) << i;
        EXPECT_GE(x, previous) << i;
        previous = x;
    }
    EXPECT_EQ(previous, big);
    for (int i = 0; i < 5; ++i) EXPECT_TRUE(std::isfinite(sw::expr::gridCoordinate(1e308, 1.7e308, i, 5))) << i;
    EXPECT_EQ(sw::expr::gridCoordinate(1e308, 1.7e308, 2, 5), 1.35e308);
    // An ordinary box keeps the formula's bits: lo + (hi - lo) i / (n - 1).
    EXPECT_EQ(sw::expr::gridCoordinate(-3, 3, 7, 11), -3 + 6.0 * 7 / 10);
}

TEST(SampleStream, ValuesNearTheLargestDoubleStillHaveAFiniteMean) {
    // f = x over [1e308, 1.7e308]: every value is finite but their sum overflows; the mean is
    // the mean of the coordinates, 1.35e308 (the grid is symmetric about it up to rounding).
    const Result r = run({"sample", "x", "--box", "x=1e308:1.7e308,y=0:1", "--grid", "1001", "--order", "0", "--json"});
    ASSERT_EQ(r.code, 0) << r.err;
    const auto j = nlohmann::json::parse(r.out);
    const auto& f = j["outputs"][0];
    ASSERT_FALSE(f["mean"].is_null()) << r.out;
    EXPECT_NEAR(f["mean"].get<double>(), 1.35e308, 1e-14 * 1.35e308);
    EXPECT_EQ(f["non_finite"].get<int>(), 0);
}
