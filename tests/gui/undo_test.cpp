// Undo and redo of the study (app/window/study_edit.h), driven through the real editors on the
// offscreen platform: a typed formula, a start, a method option and a plot box are each one step
// that undoes back to the study on screen before it and redoes forward; a drag of the start is
// one step; lineup and data-setting edits are steps too; the undo keys inside a field undo the
// study; undoing past a save makes the study modified again; New clears the history.
// Internal behaviour: no outside reference.
#include "app/window/lineup_editor.h"
#include "app/window/main_window.h"
#include "app/window/objective_editor.h"
#include "core/solve/solver.h"
#include "core/study/study.h"
#include "widgets/landscape_view.h"

#include <QAction>
#include <QCheckBox>
#include <QComboBox>
#include <QMenu>
#include <QMenuBar>
#include <functional>
#include <QPlainTextEdit>
#include <QStandardPaths>
#include <QTableWidget>
#include <QTemporaryDir>
#include <QUndoStack>
#include <QtTest>

using sw::window::MainWindow;
namespace widgets = sw::widgets;

namespace {

// The objective editor's variable table columns (objective_editor.cpp).
constexpr int kStartColumn = 1;
constexpr int kLowerColumn = 2;

std::string shownText(const MainWindow& window) { return sw::study::toJson(window.onScreenStudy()); }

// Lets the window record the edit just made (it records after the event that reported it).
void settle() {
    for (int i = 0; i < 3; ++i) QCoreApplication::processEvents();
}

void answerDiscard(MainWindow& window) {
    window.setQuestion([](QWidget*, const QString&, const QString&, QMessageBox::StandardButtons) {
        return QMessageBox::Discard;
    });
}

}  // namespace

class UndoTest : public QObject {
    Q_OBJECT

    QTemporaryDir dir_;

    static QPointF pixelOf(widgets::LandscapeView* view, double x, double y) {
        return {view->plot()->xAxis->coordToPixel(x), view->plot()->yAxis->coordToPixel(y)};
    }

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);  // keep QSettings and recovery files away from the user's own
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("undo_test");
        QVERIFY(dir_.isValid());
    }

    void theUndoKeysInsideAFieldUndoTheStudy() {
        // The platform's undo and redo keys pressed while the formula box has the focus go to
        // the study's history (the box's own text history would record a new edit instead and
        // clear Redo). Also right after typing, before the edit is recorded.
        MainWindow window;
        answerDiscard(window);
        window.show();
        QVERIFY(window.waitForIdle());
        const std::string before = shownText(window);
        QPlainTextEdit* formula = window.objectiveEditor()->formulaEdit();
        const QString original = formula->toPlainText();
        formula->setFocus();
        formula->moveCursor(QTextCursor::End);
        QTest::keyClicks(formula, " + 0.5*x");
        QTest::keySequence(formula, QKeySequence(QKeySequence::Undo));  // not yet settled
        settle();
        QCOMPARE(formula->toPlainText(), original);
        QCOMPARE(shownText(window), before);
        QVERIFY(window.action("redo")->isEnabled());
        QCOMPARE(window.undoStack()->index(), 0);
        QTest::keySequence(window.objectiveEditor()->formulaEdit(), QKeySequence(QKeySequence::Redo));
        settle();
        QCOMPARE(window.objectiveEditor()->formulaEdit()->toPlainText(), original + " + 0.5*x");
        QCOMPARE(window.undoStack()->index(), 1);
        QVERIFY(!window.action("redo")->isEnabled());
        QVERIFY(window.waitForIdle());
    }

    void lineupAndDataSettingEditsAreStepsToo() {
        // The other kinds of edit: lineup entries added, moved and removed, and a fit's data
        // settings (missing values, separator), on the sensor sample.
        MainWindow window;
        answerDiscard(window);
        window.show();
        QString error;
        QVERIFY2(window.openStudy(QStringLiteral(SW_SAMPLES_DIR "/sensor-warmup.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle());
        std::vector<std::string> texts{shownText(window)};
        auto* lineup = window.lineupEditor();
        auto* editor = window.objectiveEditor();
        const std::vector<std::function<void()>> edits = {
            [&] { lineup->addMethod("bfgs"); },
            [&] { lineup->moveEntry(0, 1); },
            [&] { lineup->removeEntry(0); },
            [&] { editor->dropIncompleteBox()->click(); },
            [&] { editor->separatorBox()->setCurrentIndex((editor->separatorBox()->currentIndex() + 1) % editor->separatorBox()->count()); },
        };
        for (std::size_t k = 0; k < edits.size(); ++k) {
            edits[k]();
            settle();
            QVERIFY(window.waitForIdle());
            QCOMPARE(window.undoStack()->count(), static_cast<int>(k + 1));
            texts.push_back(shownText(window));
            QVERIFY2(texts[k + 1] != texts[k], qPrintable(QStringLiteral("edit %1 changed nothing").arg(k)));
        }
        for (std::size_t k = edits.size(); k >= 1; --k) {
            window.action("undo")->trigger();
            QCOMPARE(shownText(window), texts[k - 1]);
            QVERIFY(window.waitForIdle());
        }
        for (std::size_t k = 1; k <= edits.size(); ++k) {
            window.action("redo")->trigger();
            QCOMPARE(shownText(window), texts[k]);
            QVERIFY(window.waitForIdle());
        }
        // The Edit menu holds both.
        bool inMenu = false;
        for (QAction* a : window.menuBar()->actions())
            if (a->menu() && a->menu()->actions().contains(window.action("undo")) && a->menu()->actions().contains(window.action("redo")))
                inMenu = true;
        QVERIFY(inMenu);
    }

    void everyKindOfEditUndoesAndRedoesOneStepAtATime() {
        MainWindow window;
        answerDiscard(window);
        window.show();
        QVERIFY(window.waitForIdle());
        QAction* undo = window.action("undo");
        QAction* redo = window.action("redo");
        QVERIFY(undo && redo);
        QCOMPARE(undo->shortcut(), QKeySequence(QKeySequence::Undo));
        QCOMPARE(redo->shortcut(), QKeySequence(QKeySequence::Redo));
        QVERIFY(!undo->isEnabled());
        QVERIFY(!redo->isEnabled());

        std::vector<std::string> texts{shownText(window)};
        auto* editor = window.objectiveEditor();

        // 1. A formula typed key by key: one step.
        QPlainTextEdit* formula = editor->formulaEdit();
        formula->setFocus();
        formula->moveCursor(QTextCursor::End);
        QTest::keyClicks(formula, " + 0.5*x");
        settle();
        QCOMPARE(window.undoStack()->count(), 1);
        QVERIFY(undo->isEnabled());
        texts.push_back(shownText(window));
        QVERIFY(texts[1] != texts[0]);

        // 2. A start typed into the variable table.
        QTableWidget* variables = editor->variableTable();
        variables->item(0, kStartColumn)->setText("0.25");
        settle();
        QCOMPARE(window.undoStack()->count(), 2);
        texts.push_back(shownText(window));

        // 3. A method option in the lineup.
        auto* lineup = window.lineupEditor();
        const auto entries = lineup->entries();
        QVERIFY(!entries.empty());
        const sw::solve::MethodInfo* info = sw::solve::findMethod(entries[0].method);
        QVERIFY(info && !info->options.empty());
        const std::string option = info->options.front().name;
        lineup->setOption(0, option, entries[0].options.count(option) ? "" : info->options.front().defaultText());
        settle();
        QCOMPARE(window.undoStack()->count(), 3);
        texts.push_back(shownText(window));
        QVERIFY(texts[3] != texts[2]);

        // 4. A plot box: the lower end of the second variable.
        variables->item(1, kLowerColumn)->setText("-1.5");
        settle();
        QCOMPARE(window.undoStack()->count(), 4);
        texts.push_back(shownText(window));
        QVERIFY(window.waitForIdle());

        // Back, one step at a time, to exactly what was on screen before each edit.
        for (int k = 4; k >= 1; --k) {
            undo->trigger();
            QCOMPARE(shownText(window), texts[static_cast<std::size_t>(k - 1)]);
            QVERIFY(window.waitForIdle());
        }
        QVERIFY(!undo->isEnabled());
        QVERIFY(redo->isEnabled());
        QVERIFY(!window.isModified());  // back at the study as it was opened
        // And forward again.
        for (int k = 1; k <= 4; ++k) {
            redo->trigger();
            QCOMPARE(shownText(window), texts[static_cast<std::size_t>(k)]);
        }
        QVERIFY(!redo->isEnabled());
        QVERIFY(window.isModified());
        QVERIFY(window.waitForIdle());
        QVERIFY(window.objective());  // the redone study runs
        QCOMPARE(window.undoStack()->count(), 4);  // showing a step records none
    }

    void aDragOfTheStartIsOneStep() {
        MainWindow window;
        answerDiscard(window);
        window.resize(1400, 900);
        window.show();
        QVERIFY(QTest::qWaitForWindowExposed(&window));
        QVERIFY(window.waitForIdle());
        const std::string before = shownText(window);
        const sw::Vector start = window.start();
        auto* view = window.landscape();
        QWidget* plot = view->plot();
        const QPoint from = pixelOf(view, start(0), start(1)).toPoint();
        const QPoint to = from + QPoint(40, -30);
        QTest::mousePress(plot, Qt::LeftButton, Qt::NoModifier, from);
        for (int i = 1; i <= 6; ++i) {
            const QPoint at = from + (to - from) * i / 6;
            QMouseEvent move(QEvent::MouseMove, at, plot->mapToGlobal(at), Qt::NoButton, Qt::LeftButton, Qt::NoModifier);
            QApplication::sendEvent(plot, &move);
            settle();
        }
        QCOMPARE(window.undoStack()->count(), 0);  // nothing recorded while the drag goes on
        QTest::mouseRelease(plot, Qt::LeftButton, Qt::NoModifier, to);
        settle();
        QVERIFY(window.waitForIdle());
        QVERIFY((window.start() - start).norm() > 1e-3);
        QCOMPARE(window.undoStack()->count(), 1);
        const std::string after = shownText(window);
        window.action("undo")->trigger();
        QCOMPARE(shownText(window), before);
        QVERIFY((window.start() - start).norm() == 0);
        window.action("redo")->trigger();
        QCOMPARE(shownText(window), after);
    }

    void undoingPastASaveMakesTheStudyModifiedAgain() {
        MainWindow window;
        answerDiscard(window);
        window.show();
        QVERIFY(window.waitForIdle());
        window.objectiveEditor()->variableTable()->item(0, kStartColumn)->setText("0.75");
        settle();
        QVERIFY(window.isModified());
        const QString path = dir_.filePath("saved.json");
        QString error;
        QVERIFY2(window.saveStudy(path, &error), qPrintable(error));
        QVERIFY(!window.isModified());
        QVERIFY(window.undoStack()->isClean());
        window.action("undo")->trigger();
        QVERIFY(window.isModified());
        QVERIFY(window.windowTitle().contains('*'));
        window.action("redo")->trigger();
        QVERIFY(!window.isModified());  // back at what the file holds
        QCOMPARE(window.studyPath(), QFileInfo(path).absoluteFilePath());
    }

    void newAndOpenClearTheHistory() {
        MainWindow window;
        answerDiscard(window);
        window.show();
        QVERIFY(window.waitForIdle());
        window.objectiveEditor()->variableTable()->item(0, kStartColumn)->setText("0.5");
        settle();
        QCOMPARE(window.undoStack()->count(), 1);
        window.action("new")->trigger();  // asks; the answer is Discard
        QCOMPARE(window.undoStack()->count(), 0);
        QVERIFY(!window.action("undo")->isEnabled());
        QVERIFY(!window.isModified());

        window.objectiveEditor()->variableTable()->item(0, kStartColumn)->setText("0.5");
        settle();
        const QString path = dir_.filePath("open.json");
        QString error;
        QVERIFY2(window.saveStudy(path, &error), qPrintable(error));
        QCOMPARE(window.undoStack()->count(), 1);
        QVERIFY2(window.openStudy(path, &error), qPrintable(error));
        QCOMPARE(window.undoStack()->count(), 0);
    }
};

QTEST_MAIN(UndoTest)
#include "undo_test.moc"
