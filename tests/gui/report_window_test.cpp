// File ▸ Write report… in the window, on the offscreen platform: the report is made through the
// job runner (the work is off the GUI thread when writeReport returns), HTML and PDF by the
// name, with the numbers `run --json` prints for the same study, light figures even in the
// dark appearance, a note when the study has unsaved changes, and clear outcomes for a
// cancelled report, a missing data file and a bad name.
#include "app/report/pdf.h"
#include "app/window/job_runner.h"
#include "app/window/main_window.h"
#include "app/window/preferences.h"
#include "app/window/report_writer.h"
#include "core/report/report.h"
#include "core/report/study_run.h"

#include <QAction>
#include <QFile>
#include <QMenu>
#include <QMenuBar>
#include <QSignalSpy>
#include <QStandardPaths>
#include <QTemporaryDir>
#include <QtTest>

using sw::window::JobRunner;
using sw::window::MainWindow;
using sw::window::ReportWriter;

class ReportWindowTest : public QObject {
    Q_OBJECT

private:
    QTemporaryDir dir_;

    static QString sample(const QString& name) {
        for (const QString& file : MainWindow::sampleFiles())
            if (file.endsWith("/" + name)) return file;
        return {};
    }

    static QByteArray read(const QString& path) {
        QFile f(path);
        return f.open(QIODevice::ReadOnly) ? f.readAll() : QByteArray();
    }

    // Waits for the writer's finished() and returns (outcome, message).
    static std::pair<int, QString> waitForReport(QSignalSpy& spy) {
        if (spy.isEmpty() && !spy.wait(120000)) return {-1, QStringLiteral("no finished() within two minutes")};
        const QList<QVariant> args = spy.takeFirst();
        return {args.at(0).toInt(), args.at(1).toString()};
    }

    // The numbers `run --json` prints for a study file, computed the same way in process.
    static nlohmann::json runJson(const QString& path) {
        const sw::study::Study study = sw::study::loadFile(path.toStdString());
        auto objective = sw::study::makeObjective(study, sw::study::directoryOf(path.toStdString()));
        return sw::report::studyRunsJson(sw::report::runStudy(study, path.toStdString(), objective, study.stoppingRules()), false);
    }

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("report_window_test");
        QVERIFY(dir_.isValid());
        QVERIFY(!sample("sensor-warmup.json").isEmpty());
    }

    void theFileMenuOffersTheReport() {
        MainWindow window;
        QAction* action = window.action("write-report");
        QVERIFY(action);
        bool inFileMenu = false;
        for (QAction* menu : window.menuBar()->actions())
            if (menu->menu() && menu->text().remove('&') == "File") inFileMenu = menu->menu()->actions().contains(action);
        QVERIFY(inFileMenu);
    }

    void writesHtmlAndPdfThroughTheJobRunnerWithTheRunJsonNumbers() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        const QString study = sample("sensor-warmup.json");
        QString error;
        QVERIFY2(window.openStudy(study, &error), qPrintable(error));
        QVERIFY(window.waitForIdle(60000));
        const nlohmann::json expected = runJson(study);

        for (const QString& name : {QStringLiteral("review.html"), QStringLiteral("review.pdf")}) {
            const QString path = dir_.filePath(name);
            QSignalSpy spy(window.reportWriter(), &ReportWriter::finished);
            QVERIFY2(window.writeReport(path, &error), qPrintable(error));
            // The work runs off the GUI thread: it is still going when writeReport returns.
            QVERIFY(window.jobs()->busy(JobRunner::Task));
            QVERIFY(window.reportWriter()->busy());
            QVERIFY(!QFile::exists(path));
            QString second;
            QVERIFY(!window.writeReport(dir_.filePath("another.html"), &second));
            QVERIFY(second.contains("being written"));
            const auto [outcome, message] = waitForReport(spy);
            QCOMPARE(outcome, int(ReportWriter::Written));
            QVERIFY(message.contains(name));
            const QByteArray bytes = read(path);
            if (name.endsWith(".pdf")) {
                QVERIFY(bytes.startsWith("%PDF"));
                continue;
            }
            const std::string html = bytes.toStdString();
            std::size_t svgs = 0;
            for (std::size_t at = html.find("<svg "); at != std::string::npos; at = html.find("<svg ", at + 1)) ++svgs;
            QCOMPARE(svgs, std::size_t(3));
            for (const auto& run : expected["runs"])
                QVERIFY2(html.find(sw::report::numberText(run["value"], 10)) != std::string::npos,
                         run["label"].get<std::string>().c_str());
            // An opened, unchanged study: its file's checksum and the command that regenerates it.
            QVERIFY(html.find(sw::report::checksumOf(read(study).toStdString())) != std::string::npos);
            QVERIFY(html.find("saddlewise report " + study.toStdString() + " -o " + path.toStdString()) != std::string::npos);
            QVERIFY(html.find("unsaved changes") == std::string::npos);
        }
    }

    void aModifiedStudyIsReportedAsShownWithANote() {
        MainWindow window;
        window.show();
        QString error;
        QVERIFY(window.openStudy(sample("two-valve-saddles.json"), &error));
        QVERIFY(window.waitForIdle(60000));
        window.moveStart((sw::Vector(2) << 0.75, -1.25).finished());
        QVERIFY(window.isModified());
        QVERIFY(window.waitForIdle(60000));
        QSignalSpy spy(window.reportWriter(), &ReportWriter::finished);
        const QString path = dir_.filePath("moved.html");
        QVERIFY2(window.writeReport(path, &error), qPrintable(error));
        QCOMPARE(waitForReport(spy).first, int(ReportWriter::Written));
        const std::string html = read(path).toStdString();
        QVERIFY(html.find("unsaved changes") != std::string::npos);
        QVERIFY(html.find("valve_a = 0.75, valve_b = -1.25") != std::string::npos);
    }

    void theFiguresAreLightInTheDarkAppearance() {
        MainWindow window;
        window.show();
        sw::window::Preferences dark = window.preferences();
        dark.palette = sw::window::PaletteChoice::Dark;
        window.setPreferences(dark);
        QString error;
        QVERIFY(window.openStudy(sample("two-valve-saddles.json"), &error));
        QVERIFY(window.waitForIdle(60000));
        QSignalSpy spy(window.reportWriter(), &ReportWriter::finished);
        const QString path = dir_.filePath("dark.html");
        QVERIFY(window.writeReport(path, &error));
        QCOMPARE(waitForReport(spy).first, int(ReportWriter::Written));
        const std::string html = read(path).toStdString();
        // The dark scheme's window and base colours (preferences.cpp) never reach the figures.
        QVERIFY(html.find("#2a2c30") == std::string::npos);
        QVERIFY(html.find("#1e2023") == std::string::npos);
        sw::window::Preferences system = window.preferences();
        system.palette = sw::window::PaletteChoice::System;
        window.setPreferences(system);
    }

    void aCancelledReportWritesNothing() {
        MainWindow window;
        window.show();
        QString error;
        QVERIFY(window.openStudy(sample("sensor-warmup.json"), &error));
        QVERIFY(window.waitForIdle(60000));
        QSignalSpy spy(window.reportWriter(), &ReportWriter::finished);
        const QString path = dir_.filePath("cancelled.html");
        QVERIFY(window.writeReport(path, &error));
        window.cancelJobs();
        const auto [outcome, message] = waitForReport(spy);
        QCOMPARE(outcome, int(ReportWriter::Cancelled));
        QVERIFY(!window.reportWriter()->busy());
        QVERIFY(!QFile::exists(path));
        // And the next report goes through.
        QVERIFY(window.writeReport(path, &error));
        QCOMPARE(waitForReport(spy).first, int(ReportWriter::Written));
    }

    void aMissingDataFileOrABadNameIsSaidClearly() {
        QTemporaryDir folder;
        QVERIFY(QFile::copy(sample("sensor-warmup.json"), folder.filePath("study.json")));
        QVERIFY(QFile::copy(QFileInfo(sample("sensor-warmup.json")).absolutePath() + "/sensor-warmup.csv",
                            folder.filePath("sensor-warmup.csv")));
        MainWindow window;
        window.show();
        QString error;
        QVERIFY2(window.openStudy(folder.filePath("study.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle(60000));

        QVERIFY(!window.writeReport(folder.filePath("review.odt"), &error));
        QVERIFY2(error.contains("unknown extension '.odt'"), qPrintable(error));

        QVERIFY(QFile::remove(folder.filePath("sensor-warmup.csv")));
        QSignalSpy spy(window.reportWriter(), &ReportWriter::finished);
        QVERIFY(window.writeReport(folder.filePath("review.html"), &error));
        const auto [outcome, message] = waitForReport(spy);
        QCOMPARE(outcome, int(ReportWriter::Failed));
        QVERIFY2(message.contains("objective.data") && message.contains("missing"), qPrintable(message));
        QVERIFY(!QFile::exists(folder.filePath("review.html")));
    }

    // A long table whose rows take one to five lines: Qt alone splits a row whose first line
    // fits at a page's foot; the PDF cuts the table before such a row instead, so every row
    // lies on one page, and every row is there once, in order.
    void noTableRowStraddlesTwoPagesOfThePdf() {
        sw::report::Document document;
        document.title = "Rows";
        sw::report::Table table;
        table.header = {"row", "note", "value"};
        const std::string words = "a remark long enough to wrap over several lines of the table's middle column, ";
        for (int r = 0; r < 160; ++r) {
            std::string note;
            for (int k = 0; k < 1 + (r * 7) % 5; ++k) note += words;
            table.rows.push_back({sw::report::numberCell(std::to_string(r)), sw::report::cell(note),
                                  sw::report::numberCell("1.5")});
        }
        document.sections.push_back({"rows", "Rows", {sw::report::paragraph("A long table follows."), sw::report::table(table)}});
        const std::vector<std::pair<int, int>> pages = sw::reportgui::pdfTableRowPages(document);
        QCOMPARE(int(pages.size()), 160);
        int lastPage = 0;
        for (std::size_t r = 0; r < pages.size(); ++r) {
            QVERIFY2(pages[r].first == pages[r].second, qPrintable(QString("row %1 spans pages %2 to %3")
                                                                     .arg(r).arg(pages[r].first).arg(pages[r].second)));
            QVERIFY(pages[r].first >= lastPage);
            lastPage = pages[r].first;
        }
        QVERIFY2(lastPage >= 5, "the table fills several pages");
        // The PDF itself is written from the same layout.
        QVERIFY(sw::reportgui::writePdf(document).size() > 1000);
    }
};

QTEST_MAIN(ReportWindowTest)
#include "report_window_test.moc"
