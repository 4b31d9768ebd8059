// saddlewise report STUDY -o FILE.html|FILE.pdf: runs a study headless and writes the review
// report (core/report/report.h) as one HTML file or a paginated PDF.
#include "app/cli/build_id.h"
#include "app/cli/cli.h"
#include "app/cli/study_findings.h"
#include "app/cli/report_graphics.h"
#include "app/cli/run_report.h"
#include "core/report/html.h"
#include "core/report/report.h"
#include "core/report/study_run.h"
#include "core/study/study.h"

#include <cerrno>
#include <csignal>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <ostream>
#include <sstream>
#include <sys/stat.h>
#include <unistd.h>

namespace sw::cli {

namespace {

namespace fs = std::filesystem;

const char* kHelp =
    "Usage: saddlewise report STUDY.json -o FILE.html|FILE.pdf [--max-iterations N] [--no-remedies]\n"
    "\n"
    "Runs the study as 'saddlewise run' does and writes the review report: the study's title\n"
    "and description, the objective with its exact derivatives, the data (for fits: file,\n"
    "rows, columns, a preview and the table's checksum), the methods and their settings, the\n"
    "landscape with every method's path, the progress and curvature plots, where each method\n"
    "ended and why, its findings (the evidence and the remedy that was tried), the fit\n"
    "statistics (estimates, standard errors, intervals, correlations, warnings), how to\n"
    "regenerate the report, and the caution about relying on results.\n"
    "\n"
    "Every number in it is the number 'saddlewise run STUDY --json' prints. The plots are the\n"
    "window's own views, drawn without a display.\n"
    "\n"
    "  -o, --output FILE    FILE.html: one self-contained file (inline styles and SVG plots; no\n"
    "                       links out), for screen and print; FILE.pdf: A4 pages with page\n"
    "                       numbers. The file is written whole or not at all (a temporary file\n"
    "                       in the same folder, renamed when complete).\n"
    "  --max-iterations N   override the study's iteration limit (1 to 1000000)\n"
    "  --no-remedies        report findings without rerunning their remedies\n"
    "\n"
    "Example:\n"
    "  saddlewise report samples/sensor-warmup.json -o review.html\n"
    "\n"
    "Set SOURCE_DATE_EPOCH (seconds since 1970) to stamp the report with that time instead of\n"
    "now, so the same study and build give the same HTML file byte for byte (a PDF's own\n"
    "metadata still carries the time it was laid out).\n"
    "\n"
    "Exit codes: 0 the report was written, 1 it was written but a run broke down (non-finite\n"
    "values or a method failure), or the writing failed; 2 bad usage, a bad study, a missing or\n"
    "changed data file, or an output path that cannot be written.\n";

enum class Format { Html, Pdf };

std::string lowered(std::string s) {
    for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    return s;
}

// The report file, written whole or not at all: a temporary file beside the target (so the
// rename stays on one file system), renamed over the target by commit(). The destructor
// removes the temporary file when commit() was never reached.
// The temporary file of the report being written, for the signal handler below (a plain
// buffer: only async-signal-safe calls may touch it there).
char pendingTemporary[4096] = {0};

// Interrupt, terminate or hang-up while a report is being made: remove its temporary file,
// then end as the signal would have (so the exit status still says which signal).
void removeTemporaryAndStop(int signal) {
    if (pendingTemporary[0] != '\0') ::unlink(pendingTemporary);
    std::signal(signal, SIG_DFL);
    std::raise(signal);
}

class ReportFile {
public:
    explicit ReportFile(const std::string& target) : target_(target) {
        const fs::path path(target);
        const fs::path folder = path.parent_path().empty() ? fs::path(".") : path.parent_path();
        std::error_code ec;
        if (fs::is_directory(path, ec))
            throw UsageError("-o " + target + ": is a folder; give a file name ending in .html or .pdf");
        std::string pattern = (folder / ("." + path.filename().string() + ".tmp-XXXXXX")).string();
        std::vector<char> name(pattern.begin(), pattern.end());
        name.push_back('\0');
        fd_ = ::mkstemp(name.data());
        if (fd_ < 0) {
            const int error = errno;
            throw UsageError("-o " + target + ": cannot write in " + folder.string() + ": " + std::strerror(error));
        }
        temporary_ = name.data();
        if (temporary_.size() < sizeof pendingTemporary) {
            std::memcpy(pendingTemporary, temporary_.c_str(), temporary_.size() + 1);
            for (const int s : {SIGINT, SIGTERM, SIGHUP}) std::signal(s, removeTemporaryAndStop);
        }
        // mkstemp makes the file private (0600); a report is an ordinary document (0666 less umask).
        const mode_t mask = ::umask(0);
        ::umask(mask);
        ::fchmod(fd_, 0666 & ~mask);
    }
    ReportFile(const ReportFile&) = delete;
    ReportFile& operator=(const ReportFile&) = delete;
    ~ReportFile() {
        forget();
        if (fd_ >= 0) ::close(fd_);
        if (!temporary_.empty()) ::unlink(temporary_.c_str());
    }

    void commit(const std::string& bytes) {
        std::size_t written = 0;
        while (written < bytes.size()) {
            const ssize_t n = ::write(fd_, bytes.data() + written, bytes.size() - written);
            if (n < 0 && errno == EINTR) continue;
            if (n <= 0) fail("cannot write " + target_);
            written += static_cast<std::size_t>(n);
        }
        if (::fsync(fd_) != 0) fail("cannot write " + target_);
        const int closed = ::close(fd_);
        fd_ = -1;
        if (closed != 0) fail("cannot write " + target_);
        if (::rename(temporary_.c_str(), target_.c_str()) != 0) fail("cannot replace " + target_);
        forget();
        temporary_.clear();
    }

    // The signal handler no longer has anything to remove.
    static void forget() {
        for (const int s : {SIGINT, SIGTERM, SIGHUP}) std::signal(s, SIG_DFL);
        pendingTemporary[0] = '\0';
    }

private:
    [[noreturn]] void fail(const std::string& what) {
        throw Failure(what + ": " + std::strerror(errno));
    }
    std::string target_, temporary_;
    int fd_ = -1;
};

std::string readBytes(const std::string& path) {
    std::ifstream in(path, std::ios::binary);
    std::ostringstream bytes;
    bytes << in.rdbuf();
    return bytes.str();
}

int runReport(const std::vector<std::string>& args, std::ostream& out, std::ostream& err) {
    std::vector<std::string> words;
    for (const std::string& a : args) words.push_back(a == "-o" ? std::string("--output") : a);
    const ParsedArgs parsed = parseArgs(words, {"no-remedies"}, {"output", "max-iterations"});
    if (parsed.positional.size() != 1)
        throw UsageError(parsed.positional.empty() ? "give the study file to report on" : "give exactly one study file");
    if (!parsed.has("output")) throw UsageError("give the report file with -o FILE.html or -o FILE.pdf");
    const std::string path = parsed.positional[0];
    const std::string output = parsed.get("output");
    const std::string extension = lowered(fs::path(output).extension().string());
    Format format = Format::Html;
    if (extension == ".html" || extension == ".htm")
        format = Format::Html;
    else if (extension == ".pdf")
        format = Format::Pdf;
    else
        throw UsageError("-o " + output + ": unknown extension '" + extension +
                         "'; the report is written as .html (one self-contained file) or .pdf");
    const ReportGraphics& graphics = reportGraphics();
    if (format == Format::Pdf && !graphics.pdf)
        throw UsageError("-o " + output +
                         ": this saddlewise was built without Qt (the headless preset), which lays out the PDF; "
                         "write .html instead, or use a build with the window");
    solve::StoppingRules overrides;
    const bool limitGiven = parsed.has("max-iterations");
    if (limitGiven)
        overrides.maxIterations =
            static_cast<int>(parseInteger(parsed.get("max-iterations"), "--max-iterations", 1, 1000000));

    ReportFile file(output);  // fails early, before any work, when the folder cannot be written

    study::Study study;
    std::shared_ptr<const Objective> objective;
    try {
        study = study::loadFile(path);
        objective = study::makeObjective(study, study::directoryOf(path));
    } catch (const study::StudyError& e) {
        throw UsageError(path + ": " + e.what());
    }
    solve::StoppingRules rules = study.stoppingRules();
    if (limitGiven) rules.maxIterations = overrides.maxIterations;

    report::StudyRuns runs;
    try {
        runs = report::runStudy(study, path, objective, rules);
        addStudyFindings(runs, !parsed.has("no-remedies"));
        report::runStudySurveys(runs);  // the critical-point map and basins the study asks for
    } catch (const study::StudyError& e) {
        throw UsageError(path + ": " + e.problem());
    }

    report::ReportInput input = report::prepareInput(runs);
    report::Provenance& p = input.provenance;
    p.version = version();
    p.build = buildId();
    p.generated = report::generationTime();
    std::vector<std::string> command = {"saddlewise", "report"};
    command.insert(command.end(), args.begin(), args.end());
    p.command = report::commandLine(command);
    std::error_code ec;
    p.workingDirectory = fs::current_path(ec).string();
    p.studyFile = path;
    p.studyText = readBytes(path);
    p.studyChecksum = report::checksumOf(p.studyText);

    if (graphics.figures) {
        try {
            input.figures = graphics.figures(runs, input.results, &input.figuresNote);
        } catch (const std::exception& e) {
            input.figuresNote = std::string("The plots could not be drawn: ") + e.what();
            err << "saddlewise report: " << input.figuresNote << '\n';
        }
    } else {
        input.figuresNote =
            "This copy of Saddlewise was built without Qt (the headless preset), and the plots are drawn by the "
            "window's views, so they are left out. 'saddlewise run STUDY --json' prints the numbers behind them.";
        err << "saddlewise report: built without Qt: the report has no plots\n";
    }

    const report::Document document = report::buildReport(input);
    std::string bytes;
    if (format == Format::Html) {
        bytes = report::toHtml(document);
    } else {
        try {
            bytes = graphics.pdf(document);
        } catch (const std::exception& e) {
            throw Failure(std::string("cannot lay out the PDF: ") + e.what());
        }
    }
    file.commit(bytes);
    out << "wrote " << output << " (" << (bytes.size() + 1023) / 1024 << " KiB): " << runs.runs.size()
        << (runs.runs.size() == 1 ? " method, " : " methods, ") << input.figures.size()
        << (input.figures.size() == 1 ? " figure\n" : " figures\n");
    return exitCodeFor(runs.runs);
}

}  // namespace

namespace {
ReportGraphics& installedGraphics() {
    static ReportGraphics graphics;
    return graphics;
}
}  // namespace

void setReportGraphics(ReportGraphics graphics) { installedGraphics() = std::move(graphics); }
const ReportGraphics& reportGraphics() { return installedGraphics(); }

Verb reportVerb() {
    return {"report", "run a study and write the review report (HTML or PDF)", kHelp, &runReport};
}

}  // namespace sw::cli
