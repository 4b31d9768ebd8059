// `saddlewise report` end to end, with outside tools as the judges:
//   - the HTML parses without errors in html5lib (Debian python3-html5lib; its version is
//     printed with any failure) and references nothing outside itself (check_html.py);
//   - headless Chromium (Debian chromium) renders and prints it: the page is not blank, and
//     the SVG figures draw, seen as pixels in the lineup's path colours that are there with
//     the figures and not when the same page is rendered with its <svg> elements removed;
//   - the PDF opens in Poppler (pdfinfo, pdftotext; Debian poppler-utils), every figure's
//     title and caption share a page, and its text holds the end values `run --json` prints;
//   - bad input (unknown extension, unwritable path, missing data file) gives a clear
//     message and exit code 2, and leaves no file, partial or temporary, behind.
#include "core/report/report.h"

#include <QColor>
#include <QImage>
#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include <array>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <regex>
#include <sstream>
#include <sys/wait.h>

namespace {

namespace fs = std::filesystem;
using nlohmann::json;

struct Shell {
    int code = -1;
    std::string out;
};

std::string quoted(const std::string& text) {
    std::string q = "'";
    for (char c : text) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
}

Shell shell(const std::string& command, bool withErrors = true) {
    Shell s;
    FILE* pipe = ::popen((command + (withErrors ? " 2>&1" : " 2>/dev/null")).c_str(), "r");
    if (!pipe) return s;
    std::array<char, 8192> buffer{};
    std::size_t n = 0;
    while ((n = std::fread(buffer.data(), 1, buffer.size(), pipe)) > 0) s.out.append(buffer.data(), n);
    const int status = ::pclose(pipe);
    s.code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return s;
}

std::string saddlewise(const std::string& arguments) { return quoted(SW_EXECUTABLE) + " " + arguments; }

std::string sample(const std::string& name) { return std::string(SW_SOURCE_DIR) + "/samples/" + name; }

std::string readFile(const fs::path& path) {
    std::ifstream in(path, std::ios::binary);
    return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

json runJson(const std::string& study) {
    const Shell s = shell(saddlewise("run " + quoted(study) + " --json"), false);
    EXPECT_EQ(s.code, 0);
    return json::parse(s.out);
}

// Chromium as the machine's notes start it: headless, no sandbox (CI containers run as root),
// nothing that reaches the network, a fresh profile every time.
std::string chromium(const fs::path& profile) {
    return "timeout 180 chromium --headless --no-sandbox --disable-gpu --disable-quic --no-first-run "
           "--disable-background-networking --disable-component-update --disable-sync --hide-scrollbars "
           "--user-data-dir=" +
           quoted(profile.string()) + " ";
}

class ReportOutput : public ::testing::Test {
protected:
    void SetUp() override {
        std::random_device seed;
        folder_ = fs::temp_directory_path() / ("saddlewise-report-output-" + std::to_string(seed()));
        fs::create_directories(folder_);
    }
    void TearDown() override {
        std::error_code ignored;
        fs::remove_all(folder_, ignored);
    }
    fs::path file(const std::string& name) const { return folder_ / name; }
    Shell writeReport(const std::string& study, const std::string& output) {
        return shell(saddlewise("report " + quoted(study) + " -o " + quoted(file(output).string())));
    }
    std::vector<std::string> filesIn(const fs::path& folder) const {
        std::vector<std::string> names;
        for (const auto& entry : fs::directory_iterator(folder)) names.push_back(entry.path().filename().string());
        std::sort(names.begin(), names.end());
        return names;
    }
    fs::path folder_;
};

const std::vector<std::string> kSections = {"summary", "caution", "objective", "data", "methods", "plots",
                                            "end-points", "fit-statistics", "reproducibility"};

TEST_F(ReportOutput, TheHtmlParsesWithoutErrorsAndReferencesNothingOutsideItself) {
    for (const char* name : {"two-valve-saddles.json", "sensor-warmup.json"}) {
        SCOPED_TRACE(name);
        const Shell written = writeReport(sample(name), "review.html");
        ASSERT_EQ(written.code, 0) << written.out;
        const Shell checked =
            shell(quoted(SW_PYTHON) + " " + quoted(std::string(SW_SOURCE_DIR) + "/tests/report/check_html.py") + " " +
                  quoted(file("review.html").string()));
        ASSERT_EQ(checked.code, 0) << checked.out;
        const json result = json::parse(checked.out);
        SCOPED_TRACE("parser: html5lib " + result["html5lib"].get<std::string>());
        EXPECT_TRUE(result["errors"].empty()) << result["errors"].dump(1);
        EXPECT_TRUE(result["external"].empty()) << result["external"].dump(1);
        const auto sections = result["sections"].get<std::vector<std::string>>();
        for (const std::string& id : kSections)
            EXPECT_NE(std::find(sections.begin(), sections.end(), id), sections.end()) << id;
        // The two-valve study asks for the surveys: its report adds the critical-point map and
        // the basin maps, each with its section.
        const bool surveys = std::string(name) == "two-valve-saddles.json";
        EXPECT_EQ(result["svg"], surveys ? 5 : 3) << "landscape, progress and curvature (and the surveys)";
        for (const char* id : {"critical-points", "basins"})
            EXPECT_EQ(std::find(sections.begin(), sections.end(), id) != sections.end(), surveys) << id;
    }
}

// The colour of each enabled lineup entry of a study.
std::vector<QColor> pathColours(const std::string& study) {
    std::vector<QColor> colours;
    const json document = json::parse(readFile(study));
    for (const json& entry : document["methods"])
        if (entry.value("enabled", true)) colours.emplace_back(QString::fromStdString(entry["colour"].get<std::string>()));
    return colours;
}

int pixelsNear(const QImage& image, const QColor& colour, int tolerance) {
    int count = 0;
    for (int y = 0; y < image.height(); ++y) {
        const QRgb* line = reinterpret_cast<const QRgb*>(image.constScanLine(y));
        for (int x = 0; x < image.width(); ++x)
            if (std::abs(qRed(line[x]) - colour.red()) <= tolerance && std::abs(qGreen(line[x]) - colour.green()) <= tolerance &&
                std::abs(qBlue(line[x]) - colour.blue()) <= tolerance)
                ++count;
    }
    return count;
}

TEST_F(ReportOutput, ChromiumRendersAndPrintsItAndTheFiguresDraw) {
    const std::string study = sample("sensor-warmup.json");
    ASSERT_EQ(writeReport(study, "review.html").code, 0);
    // The same page without its figures, to tell the figures' pixels from the tables' swatches.
    const std::string html = readFile(file("review.html"));
    std::string stripped;  // (std::regex recurses per character: no use on a megabyte of SVG)
    for (std::size_t at = 0;;) {
        const std::size_t open = html.find("<svg ", at);
        if (open == std::string::npos) {
            stripped += html.substr(at);
            break;
        }
        const std::size_t close = html.find("</svg>", open);
        ASSERT_NE(close, std::string::npos);
        stripped += html.substr(at, open - at) + "<div></div>";
        at = close + 6;
    }
    ASSERT_LT(stripped.size(), html.size() / 2) << "the figures are most of the file";
    std::ofstream(file("stripped.html")) << stripped;

    auto screenshot = [&](const std::string& page, const std::string& png) {
        const Shell s = shell(chromium(file("profile-" + png)) + "--window-size=1100,12000 --screenshot=" +
                              quoted(file(png).string()) + " " + quoted("file://" + file(page).string()));
        EXPECT_EQ(s.code, 0) << s.out;
        QImage image(QString::fromStdString(file(png).string()));
        EXPECT_FALSE(image.isNull()) << s.out;
        return image.convertToFormat(QImage::Format_RGB32);
    };
    const QImage full = screenshot("review.html", "full.png");
    const QImage bare = screenshot("stripped.html", "bare.png");
    ASSERT_FALSE(full.isNull());
    ASSERT_FALSE(bare.isNull());

    // Not blank: a good share of the page is ink, not background.
    const int white = pixelsNear(full, Qt::white, 6);
    EXPECT_LT(white, full.width() * full.height() * 97 / 100);
    // Every method's path colour is drawn by the figures (hundreds of pixels: lines and markers).
    const std::vector<QColor> colours = pathColours(study);
    ASSERT_EQ(colours.size(), 6u);
    for (const QColor& colour : colours) {
        const int with = pixelsNear(full, colour, 24), without = pixelsNear(bare, colour, 24);
        std::printf("path colour %s: %d pixels with the figures, %d without\n", colour.name().toStdString().c_str(), with,
                    without);
        EXPECT_GT(with - without, 150) << colour.name().toStdString() << ": " << with << " with the figures, " << without
                                       << " without";
    }

    // Printed to PDF by the browser: several pages, readable by Poppler.
    const Shell printed = shell(chromium(file("profile-print")) + "--no-pdf-header-footer --print-to-pdf=" +
                                quoted(file("browser.pdf").string()) + " " + quoted("file://" + file("review.html").string()));
    ASSERT_EQ(printed.code, 0) << printed.out;
    const Shell info = shell("pdfinfo " + quoted(file("browser.pdf").string()));
    ASSERT_EQ(info.code, 0) << info.out;
    std::smatch pages;
    ASSERT_TRUE(std::regex_search(info.out, pages, std::regex("Pages:\\s+(\\d+)"))) << info.out;
    EXPECT_GE(std::stoi(pages[1]), 4);
    const Shell text = shell("pdftotext -layout " + quoted(file("browser.pdf").string()) + " -");
    EXPECT_NE(text.out.find("page 1 of " + pages[1].str()), std::string::npos) << "the print style numbers its pages";
}

TEST_F(ReportOutput, ThePdfOpensAndHoldsTheEndValuesThatRunJsonPrints) {
    for (const char* name : {"two-valve-saddles.json", "sensor-warmup.json"}) {
        SCOPED_TRACE(name);
        const std::string study = sample(name);
        const json results = runJson(study);
        const Shell written = writeReport(study, "review.pdf");
        ASSERT_EQ(written.code, 0) << written.out;
        const Shell info = shell("pdfinfo " + quoted(file("review.pdf").string()));
        ASSERT_EQ(info.code, 0) << info.out;
        std::smatch pages;
        ASSERT_TRUE(std::regex_search(info.out, pages, std::regex("Pages:\\s+(\\d+)"))) << info.out;
        const int pageCount = std::stoi(pages[1]);
        EXPECT_GE(pageCount, 3);
        EXPECT_NE(info.out.find(results["study"]["title"].get<std::string>()), std::string::npos) << info.out;

        const Shell text = shell("pdftotext " + quoted(file("review.pdf").string()) + " -");
        ASSERT_EQ(text.code, 0) << text.out;
        for (const json& run : results["runs"]) {
            SCOPED_TRACE(run["label"].get<std::string>());
            // The report prints final values to 10 significant digits and |grad f| to 3.
            EXPECT_NE(text.out.find(sw::report::numberText(run["value"], 10)), std::string::npos);
            EXPECT_NE(text.out.find(sw::report::numberText(run["gradient_norm"], 3)), std::string::npos);
            for (const json& x : run["x"]) EXPECT_NE(text.out.find(sw::report::numberText(x, 8)), std::string::npos);
        }
        for (const char* title : {"Summary", "Caution", "Objective", "Data", "Methods and settings", "End points",
                                  "Fit statistics", "Reproducibility", "Landscape, progress and curvature"})
            EXPECT_NE(text.out.find(title), std::string::npos) << title;
        EXPECT_NE(text.out.find("page " + std::to_string(pageCount) + " of " + std::to_string(pageCount)), std::string::npos);
        // The landscape's filled field is the one raster image inside the vector figures.
        const Shell images = shell("pdfimages -list " + quoted(file("review.pdf").string()));
        EXPECT_NE(images.out.find("image"), std::string::npos) << images.out;
    }
}

// Each figure's title, drawing and caption share one page (Qt's layout keeps the block whole).
TEST_F(ReportOutput, NoFigureIsSplitAcrossPages) {
    const std::string study = sample("sensor-warmup.json");
    ASSERT_EQ(writeReport(study, "review.pdf").code, 0);
    const Shell info = shell("pdfinfo " + quoted(file("review.pdf").string()));
    std::smatch pages;
    ASSERT_TRUE(std::regex_search(info.out, pages, std::regex("Pages:\\s+(\\d+)")));
    const int pageCount = std::stoi(pages[1]);
    const std::vector<std::pair<std::string, std::string>> figures = {
        {"Landscape: f over", "The objective over the study's box"},
        {"Progress: distance to the best value", "Top: f − f_best per iteration"},
        {"Curvature: the Hessian's eigenvalues", "Top: every eigenvalue of the Hessian"}};
    for (const auto& [title, caption] : figures) {
        SCOPED_TRACE(title);
        int titlePage = -1, captionPage = -1;
        for (int p = 1; p <= pageCount; ++p) {
            const std::string text = shell("pdftotext -f " + std::to_string(p) + " -l " + std::to_string(p) + " " +
                                           quoted(file("review.pdf").string()) + " -")
                                         .out;
            if (titlePage < 0 && text.find(title) != std::string::npos) titlePage = p;
            if (captionPage < 0 && text.find(caption) != std::string::npos) captionPage = p;
        }
        EXPECT_GT(titlePage, 0);
        EXPECT_EQ(titlePage, captionPage);
    }
}

// The findings the `run` verb prints reach the report with their tried remedy: pure Newton on
// the two-valve sample ends on a saddle (its Hessian there is indefinite: checked against the
// critical-point map in tests/reference/survey), and the exact trust region's rerun helps.
TEST_F(ReportOutput, TheFindingsAndTheirTriedRemediesAreInTheReport) {
    const std::string study = sample("two-valve-saddles.json");
    const json runs = runJson(study);
    std::string outcome;
    for (const json& run : runs["runs"])
        for (const json& f : run["findings"])
            if (f["id"] == "saddle-end" && f.contains("remedy") && f["remedy"].contains("outcome"))
                outcome = f["remedy"]["outcome"]["text"].get<std::string>();
    ASSERT_FALSE(outcome.empty()) << "run --json has a saddle-end finding with a tried remedy";

    ASSERT_EQ(writeReport(study, "review.html").code, 0);
    const std::string html = readFile(file("review.html"));
    EXPECT_NE(html.find("id=\"findings\""), std::string::npos) << "a findings section";
    EXPECT_NE(html.find("saddle-end"), std::string::npos);
    EXPECT_NE(html.find("trust-region-exact"), std::string::npos) << "the remedy's change";
    EXPECT_NE(html.find("it helped"), std::string::npos) << "the rerun's outcome";

    ASSERT_EQ(writeReport(study, "review.pdf").code, 0);
    const Shell text = shell("pdftotext " + quoted(file("review.pdf").string()) + " -");
    EXPECT_NE(text.out.find("saddle-end"), std::string::npos);
    EXPECT_NE(text.out.find("helped"), std::string::npos);
}

TEST_F(ReportOutput, BadOutputPathsAreRefusedAndLeaveNothingBehind) {
    const std::string study = sample("two-valve-saddles.json");
    Shell s = writeReport(study, "review.txt");
    EXPECT_EQ(s.code, 2);
    EXPECT_NE(s.out.find("unknown extension '.txt'"), std::string::npos) << s.out;

    s = shell(saddlewise("report " + quoted(study) + " -o " + quoted((folder_ / "no-such-folder" / "r.html").string())));
    EXPECT_EQ(s.code, 2);
    EXPECT_NE(s.out.find("cannot write in"), std::string::npos) << s.out;
    EXPECT_NE(s.out.find("No such file or directory"), std::string::npos) << s.out;

    // A folder that is a file (refused even for root, unlike a read-only folder).
    std::ofstream(file("plain-file")) << "x";
    s = shell(saddlewise("report " + quoted(study) + " -o " + quoted((folder_ / "plain-file" / "r.pdf").string())));
    EXPECT_EQ(s.code, 2);
    EXPECT_NE(s.out.find("cannot write in"), std::string::npos) << s.out;

    s = shell(saddlewise("report " + quoted(study) + " -o " + quoted(folder_.string())));
    EXPECT_EQ(s.code, 2) << s.out;
    EXPECT_EQ(filesIn(folder_), std::vector<std::string>{"plain-file"});
}

TEST_F(ReportOutput, AMissingDataFileIsNamedAndLeavesNothingBehind) {
    // The fit sample copied without its table.
    fs::copy_file(sample("sensor-warmup.json"), file("sensor-warmup.json"));
    for (const char* output : {"review.html", "review.pdf"}) {
        const Shell s = writeReport(file("sensor-warmup.json").string(), output);
        EXPECT_EQ(s.code, 2);
        EXPECT_NE(s.out.find("objective.data: the data file 'sensor-warmup.csv' is missing"), std::string::npos) << s.out;
        EXPECT_EQ(filesIn(folder_), std::vector<std::string>{"sensor-warmup.json"}) << "no report and no temporary file";
    }
}

TEST_F(ReportOutput, AnExistingReportIsReplacedWhole) {
    std::ofstream(file("review.html")) << "an older report";
    ASSERT_EQ(writeReport(sample("two-valve-saddles.json"), "review.html").code, 0);
    const std::string html = readFile(file("review.html"));
    EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);
    EXPECT_NE(html.find("</html>"), std::string::npos);
    EXPECT_EQ(filesIn(folder_), std::vector<std::string>{"review.html"});
}

}  // namespace
