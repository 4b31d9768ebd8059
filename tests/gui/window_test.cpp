// The workbench window end to end on the offscreen platform: samples draw every enabled
// method's path, bad formulas are marked where they are wrong while the last good results
// stay, dragging the start reruns, selection links the table and the plots, exports write
// valid files, a cancelled job leaves the window usable, data-fit mode shows its table and
// keeps its last results when the model is bad, and closing with unsaved changes asks first.
#include "app/window/job_runner.h"
#include "app/window/lineup_editor.h"
#include "app/window/main_window.h"
#include "app/window/objective_editor.h"
#include "core/study/provenance.h"
#include "widgets/landscape_view.h"
#include "widgets/local_model_view.h"
#include "widgets/progress_view.h"
#include "widgets/steps_table.h"

#include <QAbstractButton>
#include <QAbstractItemView>
#include <QAbstractSpinBox>
#include <QComboBox>
#include <QLineEdit>
#include <QHeaderView>
#include <QPlainTextEdit>
#include <QTabBar>
#include <QToolButton>
#include <QSignalSpy>
#include <QStandardPaths>
#include <QSvgRenderer>
#include <QTableView>
#include <QTemporaryDir>
#include <QtTest>

using sw::window::MainWindow;
namespace widgets = sw::widgets;

class WindowTest : public QObject {
    Q_OBJECT

private:
    QTemporaryDir dir_;

    static int enabledCount(const sw::study::Study& s) {
        int n = 0;
        for (const auto& m : s.methods) n += m.enabled ? 1 : 0;
        return n;
    }

    static QPointF pixelOf(widgets::LandscapeView* view, double x, double y) {
        return {view->plot()->xAxis->coordToPixel(x), view->plot()->yAxis->coordToPixel(y)};
    }

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);  // keep QSettings away from the user's own
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("window_test");
        QVERIFY(dir_.isValid());
        QVERIFY2(!MainWindow::sampleFiles().isEmpty(), "no samples found");
    }

    void loadingEachSampleDrawsPathsForEveryEnabledMethod() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        for (const QString& file : MainWindow::sampleFiles()) {
            QString error;
            QVERIFY2(window.openStudy(file, &error), qPrintable(error));
            QVERIFY(window.waitForIdle());
            const int enabled = enabledCount(window.study());
            QVERIFY2(enabled > 0, qPrintable(file));
            QVERIFY(window.snapshot());
            QCOMPARE(static_cast<int>(window.snapshot()->tracks.size()), enabled);
            QCOMPARE(window.landscape()->pathCount(), enabled);
            for (int t = 0; t < enabled; ++t) {
                const auto& run = window.snapshot()->tracks[static_cast<std::size_t>(t)].run;
                QVERIFY(run && run->finished());
                QVERIFY2(run->termination != sw::solve::Termination::Failed, run->message.c_str());
                QVERIFY(window.landscape()->pathCurve(t));
                QCOMPARE(window.landscape()->pathCurve(t)->dataCount(), static_cast<int>(run->trace.size()));
            }
            QVERIFY(window.field());
            QVERIFY(!window.field()->contours.empty());
            QVERIFY(!window.isModified());
            QVERIFY(window.windowTitle().contains(QFileInfo(file).fileName()));
            QVERIFY(!window.lastSummary().isEmpty());
        }
    }

    void aBadFormulaIsMarkedWhereItIsWrongAndTheLastGoodResultsStay() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        const auto goodSnapshot = window.snapshot();
        const auto goodObjective = window.objective();
        QVERIFY(goodSnapshot && goodObjective);
        auto* edit = window.objectiveEditor()->formulaEdit();
        // An operator with nothing before it: the error is at the second '*' (offset 7).
        const QString bad = "x^2 + y**2";
        edit->setPlainText(bad);
        QTRY_VERIFY_WITH_TIMEOUT(!window.objectiveEditor()->problemText().isEmpty(), 3000);
        const int position = window.objectiveEditor()->markedPosition();
        qInfo("message: %s (position %d)", qPrintable(window.objectiveEditor()->problemText()), position);
        QCOMPARE(position, 8);
        QCOMPARE(edit->extraSelections().size(), 1);
        QCOMPARE(edit->extraSelections().first().cursor.selectionStart(), position);
        QVERIFY(window.objectiveEditor()->problemText().contains(QString::number(position + 1)));
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.snapshot(), goodSnapshot);
        QCOMPARE(window.objective(), goodObjective);

        // An unknown name is reported by name at its place.
        edit->setPlainText("x^2 + zeta*y");
        QTRY_VERIFY_WITH_TIMEOUT(window.objectiveEditor()->problemText().contains("zeta"), 3000);
        QCOMPARE(window.objectiveEditor()->markedPosition(), 6);
        QCOMPARE(window.snapshot(), goodSnapshot);

        // Fixing the text clears the mark and runs again.
        QSignalSpy shown(&window, &MainWindow::runsShown);
        edit->setPlainText("x^2 + 3*y^2");
        QTRY_VERIFY_WITH_TIMEOUT(shown.count() > 0, 5000);
        QVERIFY(window.objectiveEditor()->problemText().isEmpty());
        QVERIFY(edit->extraSelections().isEmpty());
        QVERIFY(window.objective() != goodObjective);
        QVERIFY(window.objectiveEditor()->gradientText().contains("∂f/∂y"));
    }

    void draggingTheStartRerunsEveryMethod() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QVERIFY(QTest::qWaitForWindowExposed(&window));
        QVERIFY(window.waitForIdle());
        const sw::Vector before = window.start();
        const auto beforeSnapshot = window.snapshot();
        auto* view = window.landscape();
        QWidget* plot = view->plot();
        const QPoint from = pixelOf(view, before(0), before(1)).toPoint();
        const QPoint to = from + QPoint(40, -30);
        QSignalSpy moved(view, &widgets::LandscapeView::startMoved);
        QTest::mousePress(plot, Qt::LeftButton, Qt::NoModifier, from);
        for (int i = 1; i <= 4; ++i) {
            QMouseEvent move(QEvent::MouseMove, from + (to - from) * i / 4, plot->mapToGlobal(from + (to - from) * i / 4),
                             Qt::NoButton, Qt::LeftButton, Qt::NoModifier);
            QApplication::sendEvent(plot, &move);
        }
        QTest::mouseRelease(plot, Qt::LeftButton, Qt::NoModifier, to);
        QVERIFY(moved.count() > 0);
        QVERIFY(window.waitForIdle());
        const sw::Vector after = window.start();
        QVERIFY((after - before).norm() > 1e-3);
        QVERIFY(window.snapshot() != beforeSnapshot);
        for (const auto& track : window.snapshot()->tracks)
            QVERIFY(track.run->trace.empty() || (track.run->trace.front().x - after).norm() < 1e-12);
        QVERIFY(window.isModified());
    }

    void selectingARowSelectsTheIterateInThePlotsAndBack() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QVERIFY(window.waitForIdle());
        auto* table = window.steps();
        auto* model = table->model();
        QVERIFY(model->rowCount() > 3);
        const int row = 2;
        table->view()->selectRow(row);
        const widgets::Selection chosen = model->selectionAt(row);
        QCOMPARE(window.selection(), chosen);
        QCOMPARE(window.landscape()->selection(), chosen);
        QCOMPARE(window.localModel()->selection(), chosen);
        const auto& record =
            window.snapshot()->tracks[static_cast<std::size_t>(chosen.track)].run->trace[static_cast<std::size_t>(chosen.iteration)];
        const QPointF highlight = window.landscape()->highlightPosition();
        QVERIFY(std::abs(highlight.x() - record.x(0)) < 1e-9);
        QVERIFY(std::abs(highlight.y() - record.x(1)) < 1e-9);
        QVERIFY(!window.localModel()->verdict().isEmpty());

        // A plot asking for an iterate selects its row.
        const widgets::Selection other{static_cast<int>(window.snapshot()->tracks.size()) - 1, 1};
        emit window.progressView()->selectionRequested(other);
        QCOMPARE(window.selection(), other);
        QCOMPARE(table->selection(), other);
        const QModelIndex current = table->view()->selectionModel()->currentIndex();
        QCOMPARE(model->selectionAt(current.row()), other);
    }

    void everyExportWritesAValidFile() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QVERIFY(window.waitForIdle());
        for (const QString& view : window.viewNames()) {
            for (const QString& suffix : {QString("png"), QString("svg"), QString("pdf")}) {
                const QString path = dir_.filePath(view + "." + suffix);
                QString error;
                QVERIFY2(window.exportView(view, path, 800, 600, &error), qPrintable(view + ": " + error));
                QFile file(path);
                QVERIFY(file.open(QIODevice::ReadOnly));
                const QByteArray bytes = file.readAll();
                QVERIFY2(bytes.size() > 500, qPrintable(path));
                if (suffix == "png") QVERIFY(bytes.startsWith("\x89PNG\r\n\x1a\n"));
                if (suffix == "pdf") QVERIFY(bytes.startsWith("%PDF-"));
                if (suffix == "svg") {
                    QSvgRenderer renderer(bytes);
                    QVERIFY2(renderer.isValid(), qPrintable(path));
                    QVERIFY(bytes.contains("<svg"));
                }
            }
        }
        QString error;
        QVERIFY(!window.exportView("nowhere", dir_.filePath("x.png"), 100, 100, &error));
        QVERIFY(error.contains("landscape"));

        const QString csv = dir_.filePath("steps.csv");
        QVERIFY2(window.exportStepsCsv(csv, &error), qPrintable(error));
        QFile file(csv);
        QVERIFY(file.open(QIODevice::ReadOnly));
        QStringList lines = QString::fromUtf8(file.readAll()).split('\n', Qt::SkipEmptyParts);
        // Two comment lines first: provenance (version, study title, objective) and the caution.
        QVERIFY(lines.size() > 2);
        QVERIFY2(lines[0].startsWith("# Saddlewise " + QString::fromLatin1(sw::study::programVersion())),
                 qPrintable(lines[0]));
        QVERIFY(!window.study().title.empty());
        QCOMPARE(lines[0], "# " + QString::fromStdString(sw::study::provenanceLine(sw::study::provenanceOf(window.study()))));
        QVERIFY(lines[0].contains(QString::fromStdString(window.study().title)));
        QVERIFY2(lines[1].startsWith("# Caution: ") && lines[1].contains("licensed professional practice"),
                 qPrintable(lines[1]));
        lines.removeFirst();
        lines.removeFirst();
        std::size_t records = 0;
        for (const auto& t : window.snapshot()->tracks) records += t.run->trace.size();
        QCOMPARE(static_cast<std::size_t>(lines.size()), records + 1);
        QVERIFY(lines.first().startsWith("method,label,iteration,value,gradient_norm"));
        QVERIFY(lines.first().endsWith(",x,y"));
    }

    void aSavedStudyOpensAsTheSameStudy() {
        MainWindow window;
        QVERIFY(window.waitForIdle());
        window.lineupEditor()->setEnabled(0, false);
        QVERIFY(window.isModified());
        const QString path = dir_.filePath("saved.json");
        QString error;
        QVERIFY2(window.saveStudy(path, &error), qPrintable(error));
        QVERIFY(!window.isModified());
        const std::string saved = sw::study::toJson(window.study());
        MainWindow other;
        QVERIFY2(other.openStudy(path, &error), qPrintable(error));
        QCOMPARE(sw::study::toJson(other.study()), saved);
        QVERIFY(other.waitForIdle());
        QCOMPARE(static_cast<int>(other.snapshot()->tracks.size()), enabledCount(other.study()));

        // A broken file is refused with the place of the problem.
        QFile broken(dir_.filePath("broken.json"));
        QVERIFY(broken.open(QIODevice::WriteOnly));
        QByteArray text = QByteArray::fromStdString(saved);
        text.replace("\"version\": 1", "\"version\": 99");
        broken.write(text);
        broken.close();
        QVERIFY(!other.openStudy(broken.fileName(), &error));
        qInfo("refused: %s", qPrintable(error));
        QVERIFY(error.contains("version"));
    }

    void cancellingALongJobLeavesTheWindowUsable() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        // A field far larger than any view asks for: 3000 x 3000 cells of a transcendental formula.
        sw::window::FieldRequest request;
        request.objective = window.objective();
        request.held = window.start();
        request.box = {-3, 3, -3, 3};
        request.nx = request.ny = 3000;
        QSignalSpy fields(window.jobs(), &sw::window::JobRunner::fieldReady);
        QSignalSpy ended(window.jobs(), &sw::window::JobRunner::jobEnded);
        window.jobs()->sampleField(request);
        QVERIFY(window.jobs()->busy(sw::window::JobRunner::Field));
        window.cancelJobs();
        QVERIFY(window.waitForIdle(20000));
        QCOMPARE(fields.count(), 0);  // the cancelled field never reaches the views
        QVERIFY(ended.count() >= 1);
        QCOMPARE(ended.last().at(1).toBool(), true);

        // Still usable: a run goes through and a field arrives.
        QSignalSpy shown(&window, &MainWindow::runsShown);
        window.runAll();
        QTRY_VERIFY_WITH_TIMEOUT(shown.count() > 0, 5000);
        window.setViewBox({-1, 1, -1, 1});
        QVERIFY(window.waitForIdle());
        QVERIFY(window.field());
        QCOMPARE(window.field()->field.box.xMax, 1.0);
    }

    void steppingAndAnimationAdvanceOneIterationAtATime() {
        MainWindow window;
        QVERIFY(window.waitForIdle());
        window.resetRuns();
        QVERIFY(window.waitForIdle());
        for (const auto& t : window.snapshot()->tracks) QCOMPARE(t.run->trace.size(), std::size_t(1));
        window.stepAll();
        QVERIFY(window.waitForIdle());
        for (const auto& t : window.snapshot()->tracks) QVERIFY(t.run->trace.size() <= 2);
        QVERIFY(window.snapshot()->tracks.front().run->trace.size() == 2);
        window.setPlaying(true);
        QVERIFY(window.playing());
        QTest::qWait(700);
        window.setPlaying(false);
        QVERIFY(window.waitForIdle());
        QVERIFY(window.snapshot()->tracks.front().run->trace.size() >= 3);
    }

    void dataFitModeShowsTheTableKeepsTheLastResultsOnABadModelAndDrawsPaths() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(QStringLiteral(SW_SAMPLES_DIR "/sensor-warmup.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle());
        auto* editor = window.objectiveEditor();
        QVERIFY(editor->fitMode());
        // The table is shown with the separator it was read with, found by looking at the file.
        qInfo("table: %s", qPrintable(editor->tableSummary()));
        QVERIFY(editor->tableSummary().contains("121 rows"));
        QVERIFY(editor->tableSummary().contains("comma-separated (detected)"));
        QCOMPARE(editor->tablePreview()->columnCount(), 2);
        QVERIFY(editor->tablePreview()->rowCount() > 0);
        QCOMPARE(editor->tablePreview()->item(0, 0)->text().toDouble(), 0.0);

        // A run draws a path for every enabled method, over the fit's parameters.
        const int enabled = enabledCount(window.study());
        QCOMPARE(static_cast<int>(window.snapshot()->tracks.size()), enabled);
        for (int t = 0; t < enabled; ++t)
            QCOMPARE(window.landscape()->pathCurve(t)->dataCount(),
                     static_cast<int>(window.snapshot()->tracks[static_cast<std::size_t>(t)].run->trace.size()));
        QVERIFY(window.lastSummary().contains("converged"));

        // A model with an unclosed bracket: the message names the place; the last results stay.
        const auto goodSnapshot = window.snapshot();
        const auto goodObjective = window.objective();
        const QString model = editor->modelEdit()->toPlainText();
        editor->modelEdit()->setPlainText("a - b*exp(-minutes/tau");
        QTRY_VERIFY_WITH_TIMEOUT(!editor->problemText().isEmpty(), 3000);
        qInfo("bad model: %s (position %d)", qPrintable(editor->problemText()), editor->markedPosition());
        QVERIFY(editor->markedPosition() >= 0);
        QCOMPARE(editor->modelEdit()->extraSelections().size(), 1);
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.snapshot(), goodSnapshot);
        QCOMPARE(window.objective(), goodObjective);

        // A column that is not in the table is named.
        editor->modelEdit()->setPlainText("a - b*exp(-hours/tau)");
        QTRY_VERIFY_WITH_TIMEOUT(editor->problemText().contains("hours"), 3000);
        QCOMPARE(window.snapshot(), goodSnapshot);

        // Putting the model back runs again and draws every path.
        QSignalSpy shown(&window, &MainWindow::runsShown);
        editor->modelEdit()->setPlainText(model);
        QTRY_VERIFY_WITH_TIMEOUT(shown.count() > 0, 5000);
        QVERIFY(window.waitForIdle());
        QVERIFY(editor->problemText().isEmpty());
        QVERIFY(window.objective() != goodObjective);
        QCOMPARE(window.landscape()->pathCount(), enabled);
    }

    void everyControlExplainsItselfInATooltip() {
        MainWindow window;
        window.resize(1400, 900);
        window.show();
        QVERIFY(window.waitForIdle());
        auto* dialog = window.showPreferences();
        QStringList missing;
        auto check = [&](QWidget* root) {
            const auto controls = root->findChildren<QWidget*>();
            for (QWidget* w : controls) {
                const bool control = qobject_cast<QAbstractButton*>(w) || qobject_cast<QComboBox*>(w) ||
                                     qobject_cast<QAbstractSpinBox*>(w) || qobject_cast<QLineEdit*>(w) ||
                                     qobject_cast<QPlainTextEdit*>(w) || qobject_cast<QAbstractItemView*>(w);
                if (!control || !w->isVisibleTo(root)) continue;
                if (qobject_cast<QLineEdit*>(w) && qobject_cast<QAbstractSpinBox*>(w->parentWidget())) continue;
                if (qobject_cast<QLineEdit*>(w) && qobject_cast<QComboBox*>(w->parentWidget())) continue;
                QString tip = w->toolTip();
                if (auto* button = qobject_cast<QToolButton*>(w); button && button->defaultAction())
                    tip = button->defaultAction()->toolTip();
                // Buttons Qt adds itself (dock title bars, tab scrollers, table corners) explain themselves.
                const QString cls = QString::fromLatin1(w->metaObject()->className());
                if (cls.startsWith("QDockWidgetTitleButton") || cls == "QTabBar" || w->objectName().startsWith("qt_"))
                    continue;
                if (qobject_cast<QToolButton*>(w) && qobject_cast<QTabBar*>(w->parentWidget())) continue;
                if (qobject_cast<QHeaderView*>(w)) continue;  // part of its table, which has the tooltip
                if (tip.trimmed().isEmpty())
                    missing << QStringLiteral("%1 '%2' (%3)").arg(cls, w->objectName(),
                                                                 w->property("text").toString());
            }
        };
        check(&window);
        check(dialog);
        QVERIFY2(missing.isEmpty(), qPrintable(missing.join("; ")));
        // The status bar carries the last run's summary.
        QVERIFY(window.lastSummary().startsWith("Last run:"));
        dialog->reject();
    }

    void closingWithUnsavedChangesAsksAndDoesWhatTheAnswerSays() {
        // A copy of a sample, so Save has a file of its own to write.
        const QString path = dir_.filePath("prompt.json");
        QFile::remove(path);
        QVERIFY(QFile::copy(QStringLiteral(SW_SAMPLES_DIR "/two-valve-saddles.json"), path));
        QFile::setPermissions(path, QFile::ReadOwner | QFile::WriteOwner);
        const QByteArray original = [&] {
            QFile f(path);
            return f.open(QIODevice::ReadOnly) ? f.readAll() : QByteArray();
        }();

        int asked = 0;
        QString askedText;
        auto answer = [&](QMessageBox::StandardButton button) {
            return [&, button](QWidget*, const QString&, const QString& text, QMessageBox::StandardButtons offered) {
                ++asked;
                askedText = text;
                return offered.testFlag(button) ? button : QMessageBox::NoButton;
            };
        };
        auto open = [&](MainWindow& window) {
            window.show();
            QString error;
            QVERIFY2(window.openStudy(path, &error), qPrintable(error));
            QVERIFY(window.waitForIdle());
        };
        auto edit = [](MainWindow& window) {
            // Move the start: an edit of the study, as a drag on the landscape makes.
            sw::Vector x = window.start();
            x(0) += 0.125;
            window.moveStart(x);
            QVERIFY(window.waitForIdle());
            QVERIFY(window.isModified());
        };

        {
            MainWindow window;
            open(window);
            QVERIFY(window.close());  // nothing changed: no question
            QCOMPARE(asked, 0);
        }
        {
            MainWindow window;
            open(window);
            edit(window);
            const sw::Vector edited = window.start();

            // Cancel: the window stays, with the edit.
            window.setQuestion(answer(QMessageBox::Cancel));
            QVERIFY(!window.close());
            QCOMPARE(asked, 1);
            QVERIFY(askedText.contains("prompt.json"));
            QVERIFY(window.isVisible());
            QVERIFY(window.isModified());
            QVERIFY(window.start() == edited);

            // Discard: the window closes and the file is as it was.
            window.setQuestion(answer(QMessageBox::Discard));
            QVERIFY(window.close());
            QCOMPARE(asked, 2);
            QFile f(path);
            QVERIFY(f.open(QIODevice::ReadOnly));
            QCOMPARE(f.readAll(), original);
        }
        {
            MainWindow window;
            open(window);
            edit(window);
            const sw::Vector edited = window.start();

            // Save: the window closes and the file holds the edit.
            window.setQuestion(answer(QMessageBox::Save));
            QVERIFY(window.close());
            QCOMPARE(asked, 3);
            const sw::study::Study saved = sw::study::loadFile(path.toStdString());
            QVERIFY((saved.start() - edited).norm() < 1e-12);
        }
    }
};

QTEST_MAIN(WindowTest)
#include "window_test.moc"
