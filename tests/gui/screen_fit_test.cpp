// The window on a 1280 x 800 screen (the offscreen platform configured with one screen of that
// size): a fresh window fits, opening a data-fit study does not grow it past the screen, a
// shrunk window keeps every panel's controls apart (editors scroll instead), and a saved size
// that does not fit the screen is not restored.
#include "app/window/main_window.h"

#include <QApplication>
#include <QDir>
#include <QDockWidget>
#include <QFile>
#include <QFileInfo>
#include <QMainWindow>
#include <QScreen>
#include <QScrollArea>
#include <QSettings>
#include <QStandardPaths>
#include <QStatusBar>
#include <QtTest>

using sw::window::MainWindow;

namespace {

QRect available(const QWidget& window) {
    return window.screen() ? window.screen()->availableGeometry() : QRect();
}

QString describe(const QRect& r) { return QStringLiteral("%1x%2 at %3,%4").arg(r.width()).arg(r.height()).arg(r.x()).arg(r.y()); }

// Every dock's content has at least the room its controls need, or scrolls.
QString squeezedPanels(const MainWindow& window) {
    QStringList squeezed;
    for (QDockWidget* dock : window.findChildren<QDockWidget*>()) {
        if (!dock->isVisible() || !dock->widget()) continue;
        const QString name = dock->objectName();
        QWidget* content = dock->widget();
        if (qobject_cast<QScrollArea*>(content)) continue;  // scrolls instead of squeezing
        const QSize needed = content->minimumSizeHint();
        if (content->height() + 1 < needed.height() || content->width() + 1 < needed.width())
            squeezed << QStringLiteral("%1 (%2x%3, needs %4x%5)")
                            .arg(name)
                            .arg(content->width())
                            .arg(content->height())
                            .arg(needed.width())
                            .arg(needed.height());
    }
    return squeezed.join("; ");
}

}  // namespace

class ScreenFitTest : public QObject {
    Q_OBJECT

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("screen_fit_test");
        QSettings().clear();
        QVERIFY(QGuiApplication::primaryScreen());
        const QRect screen = QGuiApplication::primaryScreen()->geometry();
        QCOMPARE(screen.size(), QSize(1280, 800));
    }

    void aFreshWindowFitsAndOpeningAFitStudyDoesNotGrowIt() {
        QSettings().clear();
        MainWindow window;
        window.show();
        QVERIFY(QTest::qWaitForWindowExposed(&window));
        QVERIFY(window.waitForIdle());
        const QRect screen = available(window);
        QVERIFY2(screen.contains(window.frameGeometry()), qPrintable(describe(window.frameGeometry())));
        for (const QString& file : MainWindow::sampleFiles()) {
            QString error;
            QVERIFY2(window.openStudy(file, &error), qPrintable(error));
            QVERIFY(window.waitForIdle());
            QCoreApplication::processEvents();
            QVERIFY2(screen.contains(window.frameGeometry()),
                     qPrintable(QFileInfo(file).fileName() + ": the window is " + describe(window.frameGeometry())));
            const QRect status(window.statusBar()->mapToGlobal(QPoint(0, 0)), window.statusBar()->size());
            QVERIFY2(screen.contains(status), "the status bar is off the screen");
            QVERIFY2(squeezedPanels(window).isEmpty(), qPrintable(squeezedPanels(window)));
        }
    }

    void aShrunkWindowKeepsEveryPanelsControlsApart() {
        QSettings().clear();
        MainWindow window;
        window.show();
        QString error;
        QVERIFY2(window.openStudy(QStringLiteral(SW_SAMPLES_DIR "/sensor-warmup.json"), &error), qPrintable(error));
        QVERIFY(window.waitForIdle());
        window.resize(1000, 600);
        QCoreApplication::processEvents();
        QVERIFY(window.waitForIdle());
        QVERIFY2(window.height() <= 600, qPrintable(QStringLiteral("the window cannot be shorter than %1 px").arg(window.height())));
        QVERIFY2(squeezedPanels(window).isEmpty(), qPrintable(squeezedPanels(window)));
    }

    void aSavedSizeThatDoesNotFitTheScreenIsNotRestored() {
        // A size saved on a larger screen (or by a version that let the window grow).
        QByteArray tooBig;
        {
            QMainWindow big;
            big.resize(1900, 1150);
            big.show();
            QVERIFY(QTest::qWaitForWindowExposed(&big));
            tooBig = big.saveGeometry();
        }
        QSettings().setValue("window/geometry", tooBig);
        MainWindow window;
        window.show();
        QVERIFY(QTest::qWaitForWindowExposed(&window));
        QVERIFY(window.waitForIdle());
        QVERIFY2(available(window).contains(window.frameGeometry()), qPrintable(describe(window.frameGeometry())));
        QSettings().clear();
    }
};

// One screen of 1280 x 800 on the offscreen platform (its configfile option, Qt 6).
int main(int argc, char** argv) {
    const QString config = QDir::temp().filePath(QStringLiteral("saddlewise-screen-%1.json").arg(QCoreApplication::applicationPid()));
    {
        QFile file(config);
        if (!file.open(QIODevice::WriteOnly)) return 2;
        file.write(R"({"screens": [{"name": "laptop", "x": 0, "y": 0, "width": 1280, "height": 800,
                       "logicalDpi": 96, "logicalBaseDpi": 96, "dpr": 1}]})");
    }
    qputenv("QT_QPA_PLATFORM", ("offscreen:configfile=" + config).toUtf8());
    int status = 0;
    {
        QApplication app(argc, argv);
        ScreenFitTest test;
        status = QTest::qExec(&test, argc, argv);
    }
    QFile::remove(config);
    return status;
}

#include "screen_fit_test.moc"
