// The findings panel in the window: the two-valve sample's findings appear (pure Newton's
// saddle end with a rerun that reached a minimum), clicking a finding selects its iteration in
// every view and marks the escape direction on the landscape, the method list flags the entries
// with problems, and the findings follow a drag of the start. Runs on the offscreen platform.
#include "app/window/findings_controller.h"
#include "app/window/findings_panel.h"
#include "app/window/job_runner.h"
#include "app/window/lineup_editor.h"
#include "app/window/main_window.h"
#include "widgets/evidence_overlay.h"
#include "widgets/landscape_view.h"
#include "widgets/local_model_view.h"
#include "widgets/steps_table.h"

#include <QLabel>
#include <QListWidget>
#include <QStandardPaths>
#include <QTextBrowser>
#include <QTreeWidget>
#include <QtTest>

using sw::window::FindingsPanel;
using sw::window::MainWindow;
namespace diagnose = sw::diagnose;

class FindingsPanelTest : public QObject {
    Q_OBJECT

private:
    static QString sample(const QString& stem) {
        for (const QString& file : MainWindow::sampleFiles())
            if (file.endsWith(stem + ".json")) return file;
        return {};
    }

    static int trackOf(const MainWindow& window, const QString& label) {
        const auto& tracks = window.snapshot()->tracks;
        for (std::size_t i = 0; i < tracks.size(); ++i)
            if (tracks[i].label == label) return static_cast<int>(i);
        return -1;
    }

    // Waits until the findings of the shown runs have arrived with their remedies' outcomes.
    static bool waitForFindings(MainWindow& window) {
        if (!window.waitForIdle(60000)) return false;
        const auto findings = window.findingsController()->findings();
        return findings && findings->remediesDone && findings->runs.size() == window.snapshot()->tracks.size();
    }

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("findings_panel_test");
    }

    void theTwoValveSampleShowsNewtonsSaddleWithARemedyThatHelped() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles"), &error), qPrintable(error));
        QVERIFY(waitForFindings(window));
        const int newton = trackOf(window, "Newton");
        QVERIFY(newton >= 0);
        const auto findings = window.findingsController()->findings();
        const diagnose::Finding* saddle =
            diagnose::findById(findings->findings[static_cast<std::size_t>(newton)], diagnose::FindingId::SaddleEnd);
        QVERIFY(saddle);
        QVERIFY(saddle->remedy && saddle->remedy->outcome && saddle->remedy->outcome->helped);

        FindingsPanel* panel = window.findingsPanel();
        QVERIFY(panel->shownFindingCount() > 0);
        QVERIFY(panel->summary()->text().contains("problem"));
        // The method list flags Newton (a problem) and not saddle-free Newton.
        const auto& flags = window.findingsController()->flags();
        QVERIFY(flags.count("Newton") == 1);
        QVERIFY(flags.at("Newton").contains("saddle-end"));
        QVERIFY(flags.count("saddle-free Newton") == 0);

        // Clicking the finding selects its iteration everywhere and marks the escape direction.
        QVERIFY(panel->activate(newton, diagnose::FindingId::SaddleEnd));
        const sw::widgets::Selection selected = window.selection();
        QCOMPARE(selected.track, newton);
        const auto& run = *window.snapshot()->tracks[static_cast<std::size_t>(newton)].run;
        QCOMPARE(run.trace[static_cast<std::size_t>(selected.iteration)].iteration, saddle->iterations.focus);
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.landscape()->selection(), selected);
        QCOMPARE(window.localModel()->selection(), selected);
        QCOMPARE(window.steps()->selection(), selected);
        auto* overlay = window.findingsController()->overlay();
        QVERIFY(overlay->isShown());
        QCOMPARE(overlay->arrowCount(), 1);
        QVERIFY(std::abs(overlay->markedPoint().x() - run.x[0]) < 1e-12);
        QVERIFY(std::abs(overlay->markedPoint().y() - run.x[1]) < 1e-12);
        QVERIFY(overlay->remedyPathPoints() > 1);  // the rerun's path, dashed
        // The detail pane shows the evidence and what the rerun did.
        const QString detail = panel->detail()->toPlainText();
        QVERIFY2(detail.contains("negative eigenvalues"), qPrintable(detail));
        QVERIFY2(detail.contains("it helped"), qPrintable(detail));
    }

    void theHeaterSamplesRescaleRerunIsDrawnInWattsAndDuty() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("heater-power-and-duty"), &error), qPrintable(error));
        QVERIFY(waitForFindings(window));
        const int descent = trackOf(window, "steepest descent");
        QVERIFY(window.findingsPanel()->activate(descent, diagnose::FindingId::PoorScaling));
        auto* overlay = window.findingsController()->overlay();
        QVERIFY(overlay->isShown());
        QCOMPARE(overlay->arrowCount(), 0);
        QVERIFY2(overlay->remedyPathPoints() > 1, qPrintable(QString::number(overlay->remedyPathPoints())));
    }

    void findingsFollowADragOfTheStart() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles"), &error), qPrintable(error));
        QVERIFY(waitForFindings(window));
        const auto before = window.findingsController()->findings();
        // Move the start into the well near (-1, 1): pure Newton then reaches a minimum.
        sw::Vector x = window.start();
        x << -0.9, 1.1;
        window.moveStart(x);
        QVERIFY(waitForFindings(window));
        const auto after = window.findingsController()->findings();
        QVERIFY(after != before);
        QVERIFY((after->runs.front()->trace.front().x - x).norm() < 1e-12);
        const int newton = trackOf(window, "Newton");
        QVERIFY(!diagnose::findById(after->findings[static_cast<std::size_t>(newton)], diagnose::FindingId::SaddleEnd));
        QVERIFY(window.findingsController()->flags().count("Newton") == 0);
    }

    void findingsArriveWhileStepping() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle(60000));
        window.resetRuns();
        QVERIFY(window.waitForIdle());
        window.stepAll();
        QVERIFY(window.waitForIdle());
        window.stepAll();
        QVERIFY(window.waitForIdle());
        const auto findings = window.findingsController()->findings();
        QVERIFY(findings);
        const int newton = trackOf(window, "Newton");
        // After two steps pure Newton has already gone uphill; its end is not judged yet.
        QVERIFY(!findings->runs[static_cast<std::size_t>(newton)]->finished());
        const auto& list = findings->findings[static_cast<std::size_t>(newton)];
        QVERIFY(diagnose::findById(list, diagnose::FindingId::UphillNewton));
        QVERIFY(!diagnose::findById(list, diagnose::FindingId::SaddleEnd));
    }

    void everySampleGetsFindingsAndThePanelExplainsItself() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        for (const QString& file : MainWindow::sampleFiles()) {
            QString error;
            QVERIFY2(window.openStudy(file, &error), qPrintable(error));
            QVERIFY2(waitForFindings(window), qPrintable(file));
        }
        FindingsPanel* panel = window.findingsPanel();
        for (QWidget* w : panel->findChildren<QWidget*>())
            if (w->isVisibleTo(panel) && (qobject_cast<QTreeWidget*>(w) || qobject_cast<QTextBrowser*>(w)))
                QVERIFY2(!w->toolTip().isEmpty(), qPrintable(w->objectName()));
    }
};

QTEST_MAIN(FindingsPanelTest)
#include "findings_panel_test.moc"
