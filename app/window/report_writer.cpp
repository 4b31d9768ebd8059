#include "app/window/report_writer.h"

#include "app/cli/build_id.h"
#include "app/cli/study_findings.h"
#include "app/report/figures.h"
#include "app/report/pdf.h"
#include "core/report/html.h"
#include "core/report/report.h"

#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QSaveFile>
#include <memory>

namespace sw::window {

namespace {

struct ReportState {
    study::Study study;
    QString studyPath, baseDirectory, output;
    bool modified = false;
    bool pdf = false;
    std::string error;  // set by a stage that failed
    report::StudyRuns runs;
    report::ReportInput input;
    reportgui::LandscapePlan plan;
};

report::Provenance provenanceOf(const ReportState& s) {
    report::Provenance p;
    p.version = cli::version();
    p.build = cli::buildId();
    p.generated = report::generationTime();
    const QString output = QFileInfo(s.output).absoluteFilePath();
    if (!s.studyPath.isEmpty()) {
        p.studyFile = QFileInfo(s.studyPath).absoluteFilePath().toStdString();
        p.command = report::commandLine({"saddlewise", "report", p.studyFile, "-o", output.toStdString()});
    } else {
        p.command = report::commandLine({"saddlewise", "report", "STUDY.json", "-o", output.toStdString()});
    }
    QFile file(s.studyPath);
    if (!s.studyPath.isEmpty() && !s.modified && file.open(QIODevice::ReadOnly)) {
        p.studyText = file.readAll().toStdString();
        p.studyChecksum = report::checksumOf(p.studyText);
    } else {
        p.studyText = study::toJson(s.study);
        p.studyChecksum = report::checksumOf(p.studyText);
        p.note = s.studyPath.isEmpty()
                     ? "This study was never saved: the study printed below is the one reported, and its checksum is "
                       "that text's. Save it as STUDY.json to regenerate the report with the command above."
                     : "The window had unsaved changes when this report was written: the study printed below is the one "
                       "reported, and its checksum is that text's, not the file's on disk. Save the study to "
                       "regenerate the report with the command above.";
    }
    return p;
}

QString suffixOf(const QString& path) { return QFileInfo(path).suffix().toLower(); }

}  // namespace

ReportWriter::ReportWriter(JobRunner* jobs, QObject* parent) : QObject(parent), jobs_(jobs) {
    connect(jobs_, &JobRunner::jobEnded, this, [this](int kind, bool cancelled) {
        if (kind != JobRunner::Task || !cancelled || !busy_) return;
        busy_ = false;
        emit finished(Cancelled, tr("The report was cancelled; no file was written."));
    });
}

bool ReportWriter::start(const study::Study& study, const QString& studyPath, const QString& baseDirectory,
                         bool modified, const QString& output, QString* error) {
    const QString suffix = suffixOf(output);
    if (suffix != QLatin1String("html") && suffix != QLatin1String("htm") && suffix != QLatin1String("pdf")) {
        if (error)
            *error = tr("%1: unknown extension '.%2'; the report is written as .html (one self-contained file) or .pdf")
                         .arg(output, suffix);
        return false;
    }
    auto state = std::make_shared<ReportState>();
    state->study = study;
    state->studyPath = studyPath;
    state->baseDirectory = baseDirectory;
    state->output = output;
    state->modified = modified;
    state->pdf = suffix == QLatin1String("pdf");
    busy_ = true;

    // 1. Off the GUI thread: the runs, their JSON, the landscape's field.
    auto compute = [state](const std::atomic<bool>& cancelled, const std::function<void(double)>& progress) {
        try {
            auto objective = study::makeObjective(state->study, state->baseDirectory.toStdString());
            report::RunControl control;
            control.cancel = &cancelled;
            control.progress = [&progress](double f) { progress(0.7 * f); };
            state->runs = report::runStudy(state->study, state->studyPath.toStdString(), objective,
                                           state->study.stoppingRules(), control);
            if (cancelled.load()) return;
            cli::addStudyFindings(state->runs, true);  // the same findings and remedies as `saddlewise report`
            if (cancelled.load()) return;
            control.progress = [&progress](double f) { progress(0.7 + 0.15 * f); };
            report::runStudySurveys(state->runs, control);  // the critical-point map and basins it asks for
            if (cancelled.load()) return;
            state->input = report::prepareInput(state->runs);
            analyze::Control fieldControl;
            fieldControl.cancel = &cancelled;
            fieldControl.progress = [&progress](double f) { progress(0.85 + 0.1 * f); };
            state->plan = reportgui::sampleLandscape(state->runs, state->input.results, fieldControl);
        } catch (const study::StudyError& e) {
            state->error = e.what();
        } catch (const std::exception& e) {
            state->error = e.what();
        }
    };

    // 3. Off the GUI thread again: the document, its HTML or PDF, the file.
    auto write = [state](const std::atomic<bool>& cancelled, const std::function<void(double)>& progress) {
        try {
            const report::Document document = report::buildReport(state->input);
            const std::string bytes = state->pdf ? reportgui::writePdf(document) : report::toHtml(document);
            progress(0.98);
            QSaveFile file(state->output);
            if (!file.open(QIODevice::WriteOnly)) {
                state->error = QStringLiteral("cannot write %1: %2").arg(state->output, file.errorString()).toStdString();
                return;
            }
            if (file.write(bytes.data(), static_cast<qint64>(bytes.size())) != static_cast<qint64>(bytes.size()) ||
                cancelled.load()) {
                file.cancelWriting();
                if (!cancelled.load())
                    state->error = QStringLiteral("cannot write %1: %2").arg(state->output, file.errorString()).toStdString();
                return;
            }
            if (!file.commit())
                state->error = QStringLiteral("cannot write %1: %2").arg(state->output, file.errorString()).toStdString();
        } catch (const std::exception& e) {
            state->error = std::string("cannot lay out the report: ") + e.what();
        }
    };

    auto written = [this, state] {
        busy_ = false;
        if (!state->error.empty()) {
            emit finished(Failed, QString::fromStdString(state->error));
            return;
        }
        emit finished(Written, tr("Wrote the report to %1").arg(QDir::toNativeSeparators(state->output)));
    };

    // 2. On the GUI thread: the views draw the figures.
    auto draw = [this, state, write, written] {
        if (!state->error.empty()) {
            busy_ = false;
            emit finished(Failed, tr("Cannot write the report: %1").arg(QString::fromStdString(state->error)));
            return;
        }
        state->input.provenance = provenanceOf(*state);
        std::string note;
        state->input.figures = reportgui::drawFigures(state->runs, state->input.results, state->plan, &note);
        state->input.figuresNote = note;
        jobs_->runTask(write, written);
    };

    jobs_->runTask(compute, draw);
    return true;
}

}  // namespace sw::window
