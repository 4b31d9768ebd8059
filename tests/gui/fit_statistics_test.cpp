// The window's Fit panel on the offscreen platform: for the selected run of a data-fit study
// it shows the numbers `saddlewise fit --json` gives for the same fit (estimates, standard
// errors, intervals, correlations, rows, degrees of freedom, sums of squares or deviance,
// warnings), marks parameters the data do not determine and gives them no interval, follows
// the selection, and carries the caution line, as the About box does.
//
// Source of the expected values: the command line's own `fit --json` (run in-process through
// sw::cli::runCommandLine). Both sides call core/fit's computeStatistics, so this checks that
// the window computes at the run's end point and shows what it computed; the statistics
// themselves are checked against published and reference values in tests/reference/fit.
#include "app/cli/cli.h"
#include "app/window/fit_statistics_panel.h"
#include "app/window/main_window.h"
#include "core/study/provenance.h"
#include "core/study/study.h"
#include "widgets/fit_statistics_view.h"

#include <nlohmann/json.hpp>

#include <QAction>
#include <QApplication>
#include <QDockWidget>
#include <QFile>
#include <QMenu>
#include <QMenuBar>
#include <QMessageBox>
#include <QSignalSpy>
#include <QStandardPaths>
#include <QTemporaryDir>
#include <QtTest>
#include <cmath>
#include <sstream>

using sw::window::MainWindow;
using nlohmann::json;

namespace {

QString samplePath(const QString& name) {
    for (const QString& file : MainWindow::sampleFiles())
        if (QFileInfo(file).fileName() == name) return file;
    return {};
}

json fitJson(const std::vector<std::string>& args, int expectedExit = 0) {
    std::vector<std::string> all = {"fit", "--json", "--summary"};
    all.insert(all.end(), args.begin(), args.end());
    std::ostringstream out, err;
    const int code = sw::cli::runCommandLine(all, out, err);
    if (code != expectedExit) qWarning("fit exited %d: %s", code, err.str().c_str());
    return json::parse(out.str());
}

// |a - b| within `relative` of the larger magnitude (or `absolute`).
bool near(double a, double b, double relative, double absolute = 0) {
    return std::fabs(a - b) <= std::max(absolute, relative * std::max(std::fabs(a), std::fabs(b)));
}

}  // namespace

class FitStatisticsTest : public QObject {
    Q_OBJECT

private:
    QTemporaryDir dir_;

    // Opens a study, shows the Fit panel, selects `track` and waits for its statistics.
    static std::shared_ptr<const sw::widgets::FitSnapshot> openAndShow(MainWindow& window, const QString& path,
                                                                       int track = 0) {
        QString error;
        if (!window.openStudy(path, &error)) {
            qWarning("%s", qPrintable(error));
            return nullptr;
        }
        window.fitStatistics()->dock()->show();
        window.fitStatistics()->dock()->raise();
        if (!window.waitForIdle()) return nullptr;
        window.setSelection({track, 0});
        if (!window.waitForIdle()) return nullptr;
        auto shown = window.fitStatistics()->view()->snapshot();
        if (!shown || !window.snapshot()) return nullptr;
        if (shown->runLabel != window.snapshot()->tracks[static_cast<std::size_t>(track)].label) return nullptr;
        return shown;
    }

    // Checks every number the panel shows against the command line's JSON.
    static void compareWithJson(const sw::widgets::FitSnapshot& shown, const sw::widgets::FitStatisticsView& view,
                                const json& j, double relative) {
        const sw::fit::FitStatistics& st = shown.statistics;
        QCOMPARE(st.rows, j["data"]["rows"].get<int>());
        QCOMPARE(st.degreesOfFreedom, j["degrees_of_freedom"].get<int>());
        QCOMPARE(st.parameters, static_cast<int>(j["parameters"].size()));
        for (std::size_t k = 0; k < st.names.size(); ++k) {
            const auto i = static_cast<Eigen::Index>(k);
            const std::string& name = st.names[k];
            const QStringList cells = view.parameterCells(static_cast<int>(k));
            QCOMPARE(cells.value(0), QString::fromStdString(name));
            const double estimate = j["parameters"][name].get<double>();
            QVERIFY2(near(st.estimates[i], estimate, relative), name.c_str());
            // The shown text is the number to the digits shown.
            QVERIFY2(near(cells.value(1).toDouble(), estimate, 1e-9 + relative), qPrintable(cells.join(" | ")));
            if (j["standard_errors"][name].is_null()) {
                QCOMPARE(cells.size(), 3);  // estimate, then "not determined by the data"
                continue;
            }
            QCOMPARE(cells.size(), 6);
            const double se = j["standard_errors"][name].get<double>();
            const double lower = j["confidence_intervals"][name][0].get<double>();
            const double upper = j["confidence_intervals"][name][1].get<double>();
            QVERIFY2(near(st.standardErrors[i], se, relative), name.c_str());
            QVERIFY2(near(st.lower[i], lower, relative), name.c_str());
            QVERIFY2(near(st.upper[i], upper, relative), name.c_str());
            QVERIFY2(near(cells.value(2).toDouble(), lower, 1e-5 + relative), qPrintable(cells.join(" | ")));
            QVERIFY2(near(cells.value(3).toDouble(), upper, 1e-5 + relative), qPrintable(cells.join(" | ")));
            QVERIFY2(near(cells.value(4).toDouble(), se, 1e-3 + relative), qPrintable(cells.join(" | ")));
        }
        const json& correlation = j["correlation"];
        for (Eigen::Index a = 0; a < st.correlation.rows(); ++a)
            for (Eigen::Index b = 0; b < st.correlation.cols(); ++b) {
                const json& expected = correlation[static_cast<std::size_t>(a)][static_cast<std::size_t>(b)];
                if (expected.is_null()) {
                    QVERIFY(std::isnan(st.correlation(a, b)));
                } else {
                    QVERIFY(near(st.correlation(a, b), expected.get<double>(), 0, 1e-6));
                    if (a > b)  // the lower triangle is shown, to four decimals
                        QVERIFY2(view.text().contains(QString::asprintf("%+.4f", st.correlation(a, b))),
                                 qPrintable(view.text()));
                }
            }
        QVERIFY(near(st.residualSumOfSquares, j["residual_sum_of_squares"].get<double>(), relative));
        QCOMPARE(QString::fromStdString(st.covarianceMethod), QString::fromStdString(j["covariance_method"].get<std::string>()));
        if (st.likelihood) {
            QVERIFY(near(st.deviance, j["deviance"].get<double>(), relative));
            QVERIFY(view.text().contains(sw::widgets::FitStatisticsView::number(st.deviance, 8)));
            QVERIFY(view.text().contains("deviance"));
            QVERIFY(!view.text().contains("residual sum of squares"));
        } else {
            QVERIFY(view.text().contains("residual sum of squares"));
            QVERIFY(!view.text().contains("deviance"));
        }
        QVERIFY(shown.warnings == j["warnings"].get<std::vector<std::string>>());
        for (const std::string& w : shown.warnings) QVERIFY2(view.text().contains(QString::fromStdString(w)), w.c_str());
        QVERIFY(view.text().contains(QStringLiteral("%1 degrees of freedom").arg(st.degreesOfFreedom)) || st.likelihood);
    }

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("fit_statistics_test");
        QVERIFY(dir_.isValid());
    }

    void leastSquaresFitShowsTheNumbersOfFitJson() {
        const QString path = samplePath("sensor-warmup.json");
        QVERIFY(!path.isEmpty());
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        const auto shown = openAndShow(window, path, 0);
        QVERIFY(shown);
        QVERIFY(shown->methodId == "levenberg-marquardt");
        QVERIFY(shown->problem.isEmpty());
        const QString data = QFileInfo(path).absolutePath() + "/sensor-warmup.csv";
        const json j = fitJson({"--data", data.toStdString(), "--model", "a - b*exp(-minutes/tau)", "--response", "temp",
                                "--start", "a=30,b=5,tau=25", "--method", "levenberg-marquardt"});
        QVERIFY(j["converged"].get<bool>());
        // The window's run stops by the study's rules, the command line's by its own; both
        // converge to the same point to far more digits than are shown.
        compareWithJson(*shown, *window.fitStatistics()->view(), j, 1e-7);
        QVERIFY(window.fitStatistics()->view()->text().contains("temp = a - b*exp(-minutes/tau) + error"));
    }

    void logisticFitShowsDevianceAsFitJsonDoes() {
        const QString path = samplePath("seed-germination.json");
        QVERIFY(!path.isEmpty());
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        const auto shown = openAndShow(window, path, 0);  // damped Newton
        QVERIFY(shown);
        QVERIFY(shown->statistics.likelihood);
        const QString data = QFileInfo(path).absolutePath() + "/seed-germination.csv";
        const json j = fitJson({"--data", data.toStdString(), "--model", "b0 + b1*moisture + b2*chill_days", "--response",
                                "germinated", "--loss", "logistic", "--start", "b0=0,b1=0,b2=0", "--method",
                                "damped-newton"});
        compareWithJson(*shown, *window.fitStatistics()->view(), j, 1e-7);
    }

    void aRunThatDidNotConvergeSaysSoFirst() {
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        // Steepest descent stops at the iteration limit on this sample (its notes say so).
        const auto shown = openAndShow(window, samplePath("seed-germination.json"), 4);
        QVERIFY(shown);
        QVERIFY(shown->methodId == "gradient-descent");
        QVERIFY(!shown->warnings.empty());
        QVERIFY2(QString::fromStdString(shown->warnings.front()).startsWith("The method did not converge"),
                 shown->warnings.front().c_str());
        QVERIFY(window.fitStatistics()->view()->text().contains("without converging"));
    }

    void parametersTheDataDoNotDetermineHaveNoInterval() {
        // Invented for this check: y = a*b*x + c, where only the product a*b is determined.
        const QString csv = dir_.filePath("product.csv");
        {
            QFile f(csv);
            QVERIFY(f.open(QIODevice::WriteOnly));
            f.write("x,y\n");
            const double noise[] = {0.03, -0.02, 0.01, -0.04, 0.02, 0.0, -0.01, 0.03, -0.03, 0.01};
            for (int i = 0; i < 10; ++i) f.write(QByteArray::number(i) + "," + QByteArray::number(1.5 + 0.6 * i + noise[i], 'g', 17) + "\n");
        }
        sw::study::Study s;
        s.title = "product of two parameters";
        sw::study::DataFit fit;
        fit.dataPath = "product.csv";
        fit.checksum = sw::study::fileChecksum(csv.toStdString());
        fit.model = "a*b*x + c";
        fit.response = "y";
        s.fit = fit;
        s.variables = {{"a", 1.0, 0.0, 2.0}, {"b", 1.0, 0.0, 2.0}, {"c", 0.0, -1.0, 3.0}};
        sw::study::MethodEntry lm;
        lm.method = "levenberg-marquardt";
        lm.label = "LM";
        lm.colour = "#002ddd";
        lm.marker = "circle";
        s.methods = {lm};
        const QString studyPath = dir_.filePath("product.json");
        sw::study::saveFile(s, studyPath.toStdString());

        MainWindow window;
        window.resize(1280, 800);
        window.show();
        const auto shown = openAndShow(window, studyPath, 0);
        QVERIFY(shown);
        const auto& view = *window.fitStatistics()->view();
        const json j = fitJson({"--data", csv.toStdString(), "--model", "a*b*x + c", "--response", "y", "--start",
                                "a=1,b=1,c=0", "--method", "levenberg-marquardt"});
        QVERIFY(j["not_determined"].get<std::vector<std::string>>() == (std::vector<std::string>{"a", "b"}));
        for (int k : {0, 1}) {
            const QStringList cells = view.parameterCells(k);
            QCOMPARE(cells.size(), 3);
            QCOMPARE(cells[2], QStringLiteral("not determined by the data"));
            QVERIFY(shown->statistics.notDetermined[static_cast<std::size_t>(k)]);
        }
        QCOMPARE(view.parameterCells(2).size(), 6);
        QVERIFY(!shown->statistics.determinedCombinations.empty());
        QVERIFY(view.text().contains("Determined by the data: "));
        // The undetermined parameters' estimates are where the run left them: compare only what
        // the data determine (c, the product's combination, the fit's sums).
        const double c = j["parameters"]["c"].get<double>();
        QVERIFY(near(shown->statistics.estimates[2], c, 1e-6));
        QVERIFY(near(shown->statistics.standardErrors[2], j["standard_errors"]["c"].get<double>(), 1e-6));
        QCOMPARE(shown->statistics.degreesOfFreedom, j["degrees_of_freedom"].get<int>());
        // The same warnings; only the rank warning's smallest singular value (rounding, ~1e-17)
        // follows where each run left the undetermined a and b.
        const auto expected = j["warnings"].get<std::vector<std::string>>();
        QCOMPARE(shown->warnings.size(), expected.size());
        for (std::size_t k = 0; k < expected.size(); ++k) {
            const std::string& w = expected[k];
            if (w.rfind("The Jacobian is rank-deficient: rank 2 of 3", 0) == 0)
                QVERIFY(shown->warnings[k].rfind("The Jacobian is rank-deficient: rank 2 of 3", 0) == 0);
            else
                QCOMPARE(QString::fromStdString(shown->warnings[k]), QString::fromStdString(w));
        }
    }

    void selectingAnotherRunShowsItsStatistics() {
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        QVERIFY(openAndShow(window, samplePath("sensor-warmup.json"), 0));
        QSignalSpy shown(window.fitStatistics(), &sw::window::FitStatisticsPanel::shown);
        window.setSelection({3, 1});  // BFGS, an early iterate: statistics at the run's end
        QVERIFY(window.waitForIdle());
        QTRY_VERIFY_WITH_TIMEOUT(shown.count() > 0, 5000);
        const auto snapshot = window.fitStatistics()->view()->snapshot();
        QVERIFY(snapshot);
        QCOMPARE(snapshot->runLabel, window.snapshot()->tracks[3].label);
        QCOMPARE(snapshot->iteration, window.snapshot()->tracks[3].run->iterations());
        // Another iterate of the same run needs no new computation.
        shown.clear();
        window.setSelection({3, 2});
        QVERIFY(window.waitForIdle());
        QCOMPARE(shown.count(), 0);
        QVERIFY(window.fitStatistics()->view()->snapshot() == snapshot);
    }

    void aFormulaStudySaysWhereStatisticsComeFrom() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        window.fitStatistics()->dock()->show();
        window.fitStatistics()->dock()->raise();
        QVERIFY(window.waitForIdle());
        QVERIFY(!window.fitStatistics()->view()->snapshot());
        QVERIFY(window.fitStatistics()->view()->text().contains("fits a model to a table"));
        QVERIFY(!window.jobs()->busy(sw::window::JobRunner::Statistics));
    }

    void thePanelIsListedInTheViewMenu() {
        MainWindow window;
        bool listed = false;
        for (QAction* top : window.menuBar()->actions())
            if (top->menu() && top->menu()->actions().contains(window.fitStatistics()->dock()->toggleViewAction()))
                listed = true;
        QVERIFY(listed);
    }

    void theCautionIsInTheFitViewAndTheAboutBox() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        const QString caution = QString::fromStdString(sw::study::cautionLine());
        QVERIFY(caution.startsWith("Caution: "));
        QCOMPARE(window.fitStatistics()->view()->cautionText(), caution);
        QVERIFY(window.fitStatistics()->view()->text().contains(caution));
        QString aboutText;
        QTimer::singleShot(0, &window, [&] {
            for (QWidget* w : QApplication::topLevelWidgets())
                if (auto* box = qobject_cast<QMessageBox*>(w); box && box->isVisible()) {
                    aboutText = box->text();
                    box->accept();
                }
        });
        window.action("about")->trigger();
        QVERIFY2(aboutText.contains(caution.toHtmlEscaped()), qPrintable(aboutText));
    }
};

QTEST_MAIN(FitStatisticsTest)
#include "fit_statistics_test.moc"
