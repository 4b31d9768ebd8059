// The smaller things a new user met in the window, each through the real widgets offscreen:
// undeclared names become variables in one click; the fit page reads a table the way it is
// written (separator, missing values) and picks the last column as the response; a study with a
// bad table row opens and shows the row; samples open as untitled copies; a start outside its
// plot range is pointed out; exported figures have readable text, no hints and an optional
// title; the Add menu names methods; editing an option cell gives no Qt warning; the Help menu;
// held values typed for a third variable; the runs side by side. Tables are invented for the test.
#include "app/window/lineup_editor.h"
#include "app/window/main_window.h"
#include "app/window/objective_editor.h"
#include "core/study/study.h"
#include "widgets/landscape_view.h"
#include "widgets/run_summary.h"

#include <QCheckBox>
#include <QComboBox>
#include <QFileDialog>
#include <QHeaderView>
#include <QLabel>
#include <QLineEdit>
#include <QListWidget>
#include <QMenu>
#include <QMenuBar>
#include <QPlainTextEdit>
#include <QPushButton>
#include <QRegularExpression>
#include <QSettings>
#include <QSignalSpy>
#include <QStandardPaths>
#include <QTableView>
#include <QTableWidget>
#include <QTemporaryDir>
#include <QTimer>
#include <QToolButton>
#include <QtTest>
#include <cmath>

using sw::window::MainWindow;

namespace {

void writeText(const QString& path, const QByteArray& text) {
    QFile file(path);
    QVERIFY(file.open(QIODevice::WriteOnly));
    file.write(text);
}

QByteArray readText(const QString& path) {
    QFile file(path);
    return file.open(QIODevice::ReadOnly) ? file.readAll() : QByteArray();
}

void answerFileDialogWith(const QString& path) {
    auto* poll = new QTimer;
    poll->setInterval(20);
    QObject::connect(poll, &QTimer::timeout, [poll, path] {
        QFileDialog* dialog = nullptr;
        for (QWidget* w : QApplication::topLevelWidgets())
            if (auto* d = qobject_cast<QFileDialog*>(w)) dialog = d;  // in its exec() (isVisible may lag offscreen)
        if (!dialog) return;
        poll->stop();
        poll->deleteLater();
        dialog->selectFile(path);
        // A save dialog given a full path keeps its suggested name: type the path where a user would.
        if (auto* name = dialog->findChild<QLineEdit*>("fileNameEdit"); name && dialog->acceptMode() == QFileDialog::AcceptSave)
            name->setText(path);
        static_cast<QDialog*>(dialog)->accept();  // QFileDialog::accept is protected; QDialog::accept is not
    });
    poll->start();
}

QStringList warnings;
void keepWarnings(QtMsgType type, const QMessageLogContext&, const QString& message) {
    // The offscreen platform's own notes ("This plugin does not support raise()") are not ours.
    if ((type == QtWarningMsg || type == QtCriticalMsg) && !message.startsWith("This plugin does not support"))
        warnings << message;
}

}  // namespace

class WindowFrictionTest : public QObject {
    Q_OBJECT

private:
    QTemporaryDir dir_;

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("window_friction_test");
        QSettings().clear();
        QVERIFY(dir_.isValid());
    }

    void undeclaredNamesAreOfferedAsVariablesInOneClick() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        auto* editor = window.objectiveEditor();
        editor->formulaEdit()->setPlainText("(x - 1)^2 + (y - z)^2 + 0.5*z^2");
        QTRY_VERIFY_WITH_TIMEOUT(editor->problemText().contains("z"), 3000);
        QVERIFY2(editor->fixText().contains("z"), qPrintable(editor->fixText()));
        QSignalSpy shown(&window, &MainWindow::runsShown);
        editor->applyFix();
        QCOMPARE(editor->variableTable()->rowCount(), 3);
        QCOMPARE(editor->variableTable()->item(2, 0)->text(), QStringLiteral("z"));
        QTRY_VERIFY_WITH_TIMEOUT(shown.count() > 0, 5000);
        QVERIFY(editor->problemText().isEmpty());
        QCOMPARE(window.objective()->dimension(), 3);
        QVERIFY(window.isModified());
    }

    void theFitPageReadsTheTableAsWrittenAndNamesParameters() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        auto* editor = window.objectiveEditor();
        // Semicolons, an NA cell on line 4, the measured outcome in the last column.
        const QString csv = dir_.filePath("load-test.csv");
        QByteArray text = "load;speed;wear\n";
        for (int i = 0; i < 30; ++i) {
            const double load = 1 + 0.25 * i, speed = 2 + std::fmod(0.7 * i, 3.0);
            text += QByteArray::number(load) + ";" + (i == 2 ? QByteArray("NA") : QByteArray::number(speed)) + ";" +
                    QByteArray::number(0.3 * load + 0.1 * speed * speed + 0.01 * std::sin(i)) + "\n";
        }
        writeText(csv, text);
        QVERIFY(editor->setDataFile(csv) || true);
        QVERIFY(editor->fitMode());
        // The NA cell is reported with its line, and the window has the option the message names.
        QVERIFY2(editor->tableSummary().contains("line 4"), qPrintable(editor->tableSummary()));
        QVERIFY(editor->dropIncompleteBox()->isVisibleTo(editor));
        editor->dropIncompleteBox()->setChecked(true);
        QVERIFY2(editor->tableSummary().contains("30") || editor->tableSummary().contains("29 rows"),
                 qPrintable(editor->tableSummary()));
        QVERIFY(editor->tableSummary().contains("semicolon"));
        QVERIFY(editor->tableSummary().contains("1 incomplete row dropped"));
        QCOMPARE(editor->responseBox()->currentText(), QStringLiteral("wear"));
        // A separator given by hand is used (and said to be given).
        editor->separatorBox()->setCurrentIndex(editor->separatorBox()->findData("semicolon"));
        QVERIFY(editor->tableSummary().contains("given"));
        // Fit parameters are called parameters.
        QVERIFY(editor->variableTable()->horizontalHeaderItem(0)->text().contains("Parameter"));
        // The saved study keeps the reading options.
        const sw::study::Study shown = window.onScreenStudy();
        QVERIFY(shown.fit);
        QCOMPARE(QString::fromStdString(shown.fit->separator), QStringLiteral("semicolon"));
        QVERIFY(shown.fit->dropIncompleteRows);
    }

    void aStudyWithABadTableRowOpensWithTheRowNamed() {
        const QString folder = dir_.filePath("bad-row");
        QDir().mkpath(folder);
        writeText(folder + "/readings.csv", "t,y\n0,1\n1,1.5\n2,two\n3,2.6\n");
        sw::study::Study study;
        study.title = "bad row";
        study.fit = sw::study::DataFit{};
        study.fit->dataPath = "readings.csv";
        study.fit->checksum = sw::study::fileChecksum((folder + "/readings.csv").toStdString());
        study.fit->model = "a + b*t";
        study.fit->response = "y";
        study.variables = {{"a", 0, -2, 2}, {"b", 1, -2, 2}};
        writeText(folder + "/bad-row.json", QByteArray::fromStdString(sw::study::toJson(study)));
        MainWindow window;
        window.show();
        QString error;
        QVERIFY2(window.openStudy(folder + "/bad-row.json", &error), qPrintable(error));
        QVERIFY(window.waitForIdle());
        const QString said = window.objectiveEditor()->problemText() + window.objectiveEditor()->tableSummary();
        QVERIFY2(said.contains("line 4"), qPrintable(said));
        QCOMPARE(window.objectiveEditor()->modelEdit()->toPlainText(), QStringLiteral("a + b*t"));
    }

    void aSampleOpensAsAnUntitledCopyAndSaveNeverOverwritesIt() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        const QString sample = QStringLiteral(SW_SAMPLES_DIR "/sensor-warmup.json");
        const QByteArray shipped = readText(sample);
        QMenu* samples = nullptr;
        for (QMenu* menu : window.menuBar()->findChildren<QMenu*>())
            if (menu->title().remove('&') == "Samples") samples = menu;
        QVERIFY(samples);
        QAction* open = nullptr;
        for (QAction* a : samples->actions())
            if (a->statusTip().contains("sensor-warmup.json")) open = a;
        QVERIFY(open);
        open->trigger();
        QVERIFY(window.waitForIdle());
        QVERIFY(window.studyPath().isEmpty());
        QVERIFY2(window.windowTitle().contains("sensor-warmup.json"), qPrintable(window.windowTitle()));
        QVERIFY(window.snapshot() && !window.snapshot()->tracks.empty());  // it runs from where it is

        // Save asks for a name (starting in the last folder used) and writes there.
        const QString copy = dir_.filePath("my-warmup.json");
        answerFileDialogWith(copy);
        window.action("save")->trigger();
        QTRY_VERIFY_WITH_TIMEOUT(QFileInfo::exists(copy), 5000);
        QCOMPARE(readText(sample), shipped);
        QCOMPARE(window.studyPath(), QFileInfo(copy).absoluteFilePath());
        // The copy's table path leads back to the sample's table.
        const sw::study::Study saved = sw::study::loadFile(copy.toStdString());
        QVERIFY(saved.fit);
        QCOMPARE(QFileInfo(QDir(dir_.path()).absoluteFilePath(QString::fromStdString(saved.fit->dataPath))).canonicalFilePath(),
                 QFileInfo(QStringLiteral(SW_SAMPLES_DIR "/sensor-warmup.csv")).canonicalFilePath());
        QCOMPARE(QSettings().value("window/last-folder").toString(), QFileInfo(copy).absolutePath());
    }

    void aStartOutsideItsPlotRangeIsPointedOut() {
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        auto* editor = window.objectiveEditor();
        QVERIFY(editor->noticeText().isEmpty());
        editor->variableTable()->item(0, 1)->setText("5");  // x starts at 5; its range is -2 .. 2
        QVERIFY2(editor->noticeText().contains("x starts at 5"), qPrintable(editor->noticeText()));
        editor->variableTable()->item(0, 1)->setText("1");
        QVERIFY(editor->noticeText().isEmpty());
    }

    void exportedFiguresHaveReadableTextNoHintsAndAnOptionalTitle() {
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        QVERIFY(window.waitForIdle());
        const QString svg = dir_.filePath("landscape.svg");
        QString error;
        sw::window::ExportLook look;
        look.title = true;
        QVERIFY2(window.exportView("landscape", svg, 1200, 900, &error, look), qPrintable(error));
        const QString text = QString::fromUtf8(readText(svg));
        QVERIFY(!text.contains("drag to move"));
        QVERIFY2(text.contains("(x - 1)^2"), "the title line with the formula is missing");
        // Every text is at least 10 pt (QSvgGenerator writes the point size on the group that
        // holds each <text>; groups of lines carry the painter's font too, and are not text).
        const QRegularExpression size(QStringLiteral("font-size=\"([0-9.]+)(pt)?\"[^>]*>\\s*<text"));
        int texts = 0;
        for (auto match = size.globalMatch(text); match.hasNext();) {
            const auto found = match.next();
            const double points = found.captured(1).toDouble();
            QVERIFY2(points >= 9.99, qPrintable(QStringLiteral("text at %1 pt: %2").arg(points).arg(text.mid(found.capturedStart(), 400))));
            ++texts;
        }
        QVERIFY(texts > 5);
        // The window's own plot still has its hint and no title.
        QVERIFY(window.landscape()->plot()->plotLayout()->rowCount() == 2);
        const QString plain = dir_.filePath("landscape-plain.svg");
        QVERIFY(window.exportView("landscape", plain, 1200, 900, &error));
        QVERIFY(!QString::fromUtf8(readText(plain)).contains("(x - 1)^2"));
    }

    void theAddMenuNamesEveryMethodWithItsId() {
        MainWindow window;
        QToolButton* add = nullptr;
        for (QToolButton* button : window.lineupEditor()->findChildren<QToolButton*>())
            if (button->menu()) add = button;
        QVERIFY(add && add->menu());
        int seen = 0;
        for (QAction* family : add->menu()->actions()) {
            QVERIFY(family->menu());
            for (QAction* method : family->menu()->actions()) {
                const QRegularExpression shape(QStringLiteral("^(.+)  \\(([a-z0-9-]+)\\)$"));
                const auto match = shape.match(method->text());
                QVERIFY2(match.hasMatch(), qPrintable(method->text()));
                QVERIFY(match.captured(1) != match.captured(2));
                ++seen;
            }
        }
        QVERIFY(seen >= 18);
    }

    void editingAnOptionCellGivesNoWarningAndSetsTheOption() {
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        QVERIFY(QTest::qWaitForWindowExposed(&window));
        QVERIFY(window.waitForIdle());
        auto* lineup = window.lineupEditor();
        lineup->setCurrentEntry(3);  // trust-region-dogleg: it has options
        auto* options = lineup->findChild<QTableWidget*>();
        QVERIFY(options && options->rowCount() > 0);
        QTableWidgetItem* value = options->item(0, 1);
        const std::string name = value->data(Qt::UserRole).toString().toStdString();
        warnings.clear();
        const QtMessageHandler previous = qInstallMessageHandler(keepWarnings);
        options->setCurrentItem(value);
        options->editItem(value);
        QWidget* editor = QApplication::focusWidget();
        QVERIFY(editor);
        QTest::keyClicks(editor, "0.5");
        QTest::keyClick(editor, Qt::Key_Return);
        QCoreApplication::processEvents();
        QVERIFY(window.waitForIdle());
        qInstallMessageHandler(previous);
        QVERIFY2(warnings.isEmpty(), qPrintable(warnings.join("\n")));
        QCOMPARE(lineup->entries()[3].options.at(name), std::string("0.5"));
    }

    void theHelpMenuHasFormulaSyntaxShortcutsAndWhatTheProgramIsFor() {
        MainWindow window;
        QMenu* help = nullptr;
        for (QMenu* menu : window.menuBar()->findChildren<QMenu*>())
            if (menu->title().remove('&') == "Help") help = menu;
        QVERIFY(help);
        QVERIFY(help->actions().contains(window.action("formula-help")));
        QVERIFY(help->actions().contains(window.action("shortcuts")));
        QVERIFY(help->actions().contains(window.action("about")));
        QVERIFY(MainWindow::formulaSyntaxText().contains("atan2"));
        QVERIFY(window.shortcutsText().contains(window.action("run-all")->shortcut().toString(QKeySequence::NativeText)));
        // The About text is the README's own paragraph on what the program is for.
        const QString readme = QString::fromUtf8(readText(QStringLiteral(SW_SAMPLES_DIR "/../README.md")));
        const int start = readme.indexOf("Saddlewise is a desktop workbench");
        QVERIFY(start >= 0);
        const QString paragraph = readme.mid(start, readme.indexOf("\n\n", start) - start).simplified();
        QCOMPARE(MainWindow::aboutText().simplified(), paragraph);
        window.action("formula-help")->trigger();
        QTRY_VERIFY(QApplication::topLevelWidgets().size() > 1);
    }

    void heldValuesForAThirdVariableCanBeTyped() {
        MainWindow window;
        window.show();
        QString error;
        QVERIFY2(window.openStudy(QStringLiteral(SW_SAMPLES_DIR "/seed-germination.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle());
        QTableWidget* held = window.objectiveEditor()->heldTable();
        QCOMPARE(held->rowCount(), 1);  // three parameters, two plotted
        const int heldIndex = 3 - window.study().view.plotX - window.study().view.plotY;
        QSignalSpy fields(&window, &MainWindow::fieldShown);
        held->item(0, 1)->setText("0.05");
        QVERIFY(!window.objectiveEditor()->heldFollowsSelection());
        QTRY_VERIFY_WITH_TIMEOUT(fields.count() > 0, 5000);
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.heldVector()(heldIndex), 0.05);
        // The landscape is the slice at the typed value.
        const auto field = window.field();
        QVERIFY(field);
        sw::Vector at = window.heldVector();
        at(field->field.xVariable) = field->field.x(3);
        at(field->field.yVariable) = field->field.y(5);
        const double expected = window.objective()->value(at);
        QVERIFY(std::abs(field->field.at(3, 5) - expected) <= 1e-9 * std::max(1.0, std::abs(expected)));
        // Selecting another iterate does not move a typed value.
        window.setSelection({0, 1});
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.heldVector()(heldIndex), 0.05);
    }

    void theRunsStandSideBySideLikeTheRunVerbPrintsThem() {
        MainWindow window;
        window.resize(1280, 800);
        window.show();
        QVERIFY(window.waitForIdle());
        auto* summary = window.runSummary();
        const auto snapshot = window.snapshot();
        QVERIFY(snapshot);
        auto* model = summary->model();
        QCOMPARE(model->rowCount(), static_cast<int>(snapshot->tracks.size()));
        using Column = sw::widgets::RunSummaryModel::Column;
        for (int r = 0; r < model->rowCount(); ++r) {
            const auto& run = *snapshot->tracks[static_cast<std::size_t>(r)].run;
            QCOMPARE(model->index(r, Column::Label).data().toString(), snapshot->tracks[static_cast<std::size_t>(r)].label);
            QCOMPARE(model->index(r, Column::Iterations).data().toInt(), run.iterations());
            QCOMPARE(model->index(r, Column::Ended).data().toString(), QString::fromUtf8(sw::solve::toString(run.termination)));
            QCOMPARE(model->index(r, Column::Message).data().toString(), QString::fromStdString(run.message));
            QVERIFY(model->index(r, Column::Evaluations).data().toString().startsWith(QString::number(run.evaluations.value) + "/"));
        }
        QVERIFY(summary->headline().contains("converged"));
        // Selecting a row selects that run's last iterate.
        summary->view()->selectRow(2);
        const auto& run = *snapshot->tracks[2].run;
        QCOMPARE(window.selection(), (sw::widgets::Selection{2, static_cast<int>(run.trace.size()) - 1}));
    }
};

QTEST_MAIN(WindowFrictionTest)
#include "window_friction_test.moc"
