// The window's surveys on the offscreen platform: the two-valve sample shows its four wells,
// four passes and central peak on the landscape and in the table, and the basins of pure
// Newton, saddle-free Newton and the exact trust region side by side; a double click on a
// saddle runs the lineup from near it; the basin view exports; surveys save with the study;
// a cancelled survey never reaches the views. SW_VIEW_IMAGES=<dir> saves pictures to look at.
#include "app/window/job_runner.h"
#include "app/window/main_window.h"
#include "app/window/survey_controller.h"
#include "widgets/basins_view.h"
#include "widgets/critical_overlay.h"
#include "widgets/critical_points_table.h"
#include "widgets/landscape_view.h"

#include <QDockWidget>
#include <QFile>
#include <QStandardPaths>
#include <QSvgRenderer>
#include <QTableView>
#include <QTemporaryDir>
#include <QtTest>

using sw::solve::PointKind;
using sw::window::MainWindow;
namespace widgets = sw::widgets;

class SurveyWindowTest : public QObject {
    Q_OBJECT

private:
    QTemporaryDir dir_;

    static QString sample(const QString& name) {
        for (const QString& file : MainWindow::sampleFiles())
            if (file.endsWith(name)) return file;
        return {};
    }

    static void saveImage(QWidget* widget, const QString& name) {
        const QString folder = qEnvironmentVariable("SW_VIEW_IMAGES");
        if (!folder.isEmpty()) widget->grab().save(folder + "/" + name);
    }

    static long saddleCells(const sw::survey::BasinSurvey& s, std::size_t method) {
        long cells = 0;
        for (std::size_t k = 0; k < s.map.points.size(); ++k)
            if (s.map.points[k].kind == PointKind::Saddle) cells += s.maps[method].pointCounts[k];
        return cells;
    }

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("survey_window_test");
        QVERIFY(dir_.isValid());
        QVERIFY2(!sample("two-valve-saddles.json").isEmpty(), "the two-valve sample is missing");
    }

    void twoValveSampleShowsWellsPassesPeakAndThreeBasinMaps() {
        MainWindow window;
        window.resize(1500, 950);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle(120000));
        auto* surveys = window.surveys();
        const auto map = surveys->criticalMap();
        QVERIFY(map);
        QCOMPARE(map->count(PointKind::Minimum), 4);
        QCOMPARE(map->count(PointKind::Saddle), 4);
        QCOMPARE(map->count(PointKind::Maximum), 1);
        QCOMPARE(surveys->overlay()->markerCount(PointKind::Minimum), 4);
        QCOMPARE(surveys->overlay()->markerCount(PointKind::Saddle), 4);
        QCOMPARE(surveys->overlay()->markerCount(PointKind::Maximum), 1);
        QCOMPARE(surveys->criticalTable()->model()->rowCount(), 9);
        // The peak sits at the centre (the sample's own description; analytic by symmetry).
        const auto& peak = map->points.back();
        QCOMPARE(peak.kind, PointKind::Maximum);
        QVERIFY(std::abs(peak.x[0]) < 1e-9 && std::abs(peak.x[1]) < 1e-9);

        const auto basins = surveys->basins();
        QVERIFY(basins);
        QCOMPARE(static_cast<int>(basins->maps.size()), 3);
        QCOMPARE(QString::fromStdString(basins->maps[0].method.methodId), QStringLiteral("newton"));
        QCOMPARE(QString::fromStdString(basins->maps[1].method.methodId), QStringLiteral("saddle-free-newton"));
        QCOMPARE(QString::fromStdString(basins->maps[2].method.methodId), QStringLiteral("trust-region-exact"));
        QCOMPARE(basins->grid, 200);
        for (const auto& m : basins->maps) QCOMPARE(m.total(), 40000L);
        QVERIFY(saddleCells(*basins, 0) > 1000);  // pure Newton walks onto the passes
        QCOMPARE(saddleCells(*basins, 1), 0L);
        QCOMPARE(saddleCells(*basins, 2), 0L);
        QCOMPARE(surveys->basinsView()->panelCount(), 3);

        // Hovering over the middle of the first panel reads out where its run ends.
        QCPAxisRect* first = surveys->basinsView()->panel(0);
        const QString readout = surveys->basinsView()->readoutAt(first->rect().center());
        QVERIFY2(readout.startsWith("Newton from"), qPrintable(readout));
        QVERIFY2(readout.contains("ends at") || readout.contains("limit"), qPrintable(readout));

        // Shown and exported like the other views.
        for (QDockWidget* dock : window.findChildren<QDockWidget*>())
            if (dock->objectName() == "basins") dock->raise();
        QVERIFY(window.waitForIdle());
        saveImage(&window, "two-valve-window-basins.png");
        saveImage(surveys->basinsView(), "two-valve-basins-view.png");
        for (QDockWidget* dock : window.findChildren<QDockWidget*>())
            if (dock->objectName() == "critical-points") dock->raise();
        QVERIFY(window.waitForIdle());
        saveImage(&window, "two-valve-window-critical.png");
        const QString base = dir_.filePath("basins");
        for (const QString& suffix : {QStringLiteral(".png"), QStringLiteral(".svg"), QStringLiteral(".pdf")}) {
            QVERIFY2(window.exportView("basins", base + suffix, 1200, 500, &error), qPrintable(error));
            QFile file(base + suffix);
            QVERIFY(file.open(QIODevice::ReadOnly));
            const QByteArray head = file.read(8);
            if (suffix == ".png") QCOMPARE(head.left(4), QByteArray("\x89PNG"));
            if (suffix == ".pdf") QCOMPARE(head.left(5), QByteArray("%PDF-"));
        }
        QVERIFY(QSvgRenderer(base + ".svg").isValid());
    }

    void doubleClickOnASaddleRunsTheLineupFromNearIt() {
        MainWindow window;
        window.resize(1500, 950);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle(120000));
        auto* surveys = window.surveys();
        const auto map = surveys->criticalMap();
        QVERIFY(map);
        int saddle = -1;
        for (std::size_t k = 0; k < map->points.size(); ++k)
            if (map->points[k].kind == PointKind::Saddle) saddle = static_cast<int>(k);
        QVERIFY(saddle >= 0);
        const sw::Vector at = map->points[static_cast<std::size_t>(saddle)].x;
        widgets::LandscapeView* landscape = window.landscape();
        landscape->resetView();
        QVERIFY(window.waitForIdle());
        landscape->plot()->replot();
        const QPoint pixel(static_cast<int>(landscape->plot()->xAxis->coordToPixel(at[0])),
                           static_cast<int>(landscape->plot()->yAxis->coordToPixel(at[1])));
        QCOMPARE(surveys->overlay()->pointAt(pixel), saddle);
        QTest::mouseDClick(landscape->plot(), Qt::LeftButton, Qt::NoModifier, pixel);
        QVERIFY(window.waitForIdle());
        const sw::Vector expected = surveys->startNear(saddle);
        QVERIFY((window.start() - expected).norm() < 1e-12);
        QVERIFY((window.start() - at).norm() > 0.05);
        // Along the escape direction: f is below the saddle's value there.
        QVERIFY(window.objective()->value(window.start()) < map->points[static_cast<std::size_t>(saddle)].value);
        QVERIFY(window.snapshot());
        QVERIFY((window.snapshot()->tracks[0].run->trace.front().x - expected).norm() < 1e-12);
        QCOMPARE(surveys->criticalTable()->selectedPoint(), saddle);
        QCOMPARE(surveys->overlay()->highlighted(), saddle);
        // Pure Newton from beside the pass goes back to it or elsewhere; saddle-free Newton leaves.
        const auto& sfn = window.snapshot()->tracks[1].run;
        QVERIFY(sfn && sfn->endPoint.kind == PointKind::Minimum);
    }

    void surveysSaveWithTheStudyAndSwitchOff() {
        MainWindow window;
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle(120000));
        auto* surveys = window.surveys();
        QVERIFY(!window.isModified());
        surveys->setBasinsOn(false);
        QVERIFY(window.isModified());
        QVERIFY(!surveys->basins());
        QVERIFY(window.study().surveys && !window.study().surveys->basins && window.study().surveys->critical);
        surveys->setCriticalOn(false);
        QVERIFY(!window.study().surveys.has_value());
        QCOMPARE(surveys->overlay()->markerCount(PointKind::Minimum), 0);
        surveys->setCriticalOn(true);
        surveys->setBasinGrid(40);
        surveys->setBasinMethods({"Newton", "steepest descent"});
        surveys->setBasinsOn(true);
        QVERIFY(window.waitForIdle(120000));
        QVERIFY(surveys->basins());
        QCOMPARE(static_cast<int>(surveys->basins()->maps.size()), 2);
        QCOMPARE(surveys->basins()->grid, 40);
        const QString path = dir_.filePath("saved.json");
        QVERIFY2(window.saveStudy(path, &error), qPrintable(error));
        MainWindow other;
        QVERIFY2(other.openStudy(path, &error), qPrintable(error));
        QVERIFY(other.waitForIdle(120000));
        QVERIFY(other.study().surveys);
        QCOMPARE(other.study().surveys->basinGrid, 40);
        QCOMPARE(other.study().surveys->basinMethods, (std::vector<std::string>{"Newton", "steepest descent"}));
        QVERIFY(other.surveys()->basins());
        QCOMPARE(static_cast<int>(other.surveys()->basins()->maps.size()), 2);
        QVERIFY(other.surveys()->criticalMap());
    }

    void aCancelledBasinMapNeverReachesTheView() {
        MainWindow window;
        window.show();
        QString error;
        QVERIFY2(window.openStudy(sample("two-valve-saddles.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle(120000));
        auto* surveys = window.surveys();
        const auto before = surveys->basins();
        QVERIFY(before);
        surveys->setBasinGrid(1000);  // 3,000,000 runs: long enough to cancel
        QTRY_VERIFY_WITH_TIMEOUT(window.jobs()->busy(sw::window::JobRunner::Basins), 5000);
        window.cancelJobs();
        QVERIFY(window.waitForIdle(60000));
        QCOMPARE(surveys->basins(), before);  // the old maps stay; no partial map is shown
        QCOMPARE(surveys->basinsView()->survey(), before);
        // The window keeps running jobs afterwards.
        surveys->setBasinGrid(30);
        QVERIFY(window.waitForIdle(60000));
        QVERIFY(surveys->basins() && surveys->basins()->grid == 30);
    }
};

QTEST_MAIN(SurveyWindowTest)
#include "survey_window_test.moc"
