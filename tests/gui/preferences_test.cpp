// Preferences: each setting changed in the dialog applies to the open window at once and is
// kept in QSettings for the next start; Cancel goes back; bad stored values fall back to the
// defaults. QSettings run in Qt's test mode under their own names, so a user's settings are
// never read or written.
#include "app/window/main_window.h"
#include "app/window/preferences.h"
#include "widgets/landscape_view.h"

#include <QApplication>
#include <QCheckBox>
#include <QComboBox>
#include <QSettings>
#include <QSpinBox>
#include <QStandardPaths>
#include <QtTest>

using sw::window::MainWindow;
using sw::window::PaletteChoice;
using sw::window::Preferences;

class PreferencesTest : public QObject {
    Q_OBJECT

private slots:
    void initTestCase() {
        QStandardPaths::setTestModeEnabled(true);
        QCoreApplication::setOrganizationName("SaddlewiseTest");
        QCoreApplication::setApplicationName("preferences_test");
        QSettings().clear();
    }

    void cleanupTestCase() {
        sw::window::applyPalette(PaletteChoice::System);
        QSettings().clear();
    }

    void defaultsAreValidAndBadValuesAreNamed() {
        Preferences p;
        QString why;
        QVERIFY(p.isValid(&why));
        p.gridCells = 5;
        QVERIFY(!p.isValid(&why));
        QVERIFY2(why.contains("grid-cells") && why.contains("20..2000"), qPrintable(why));
        p = Preferences{};
        p.exportFormat = "bmp";
        QVERIFY(!p.isValid(&why));
        QVERIFY2(why.contains("export-format"), qPrintable(why));
    }

    void storedValuesOutOfRangeFallBackToTheDefaults() {
        QSettings settings;
        settings.setValue("preferences/grid-cells", 5);
        settings.setValue("preferences/contour-levels", "many");
        settings.setValue("preferences/export-format", "bmp");
        settings.setValue("preferences/palette", "sepia");
        settings.setValue("preferences/max-iterations", 350);
        const Preferences p = Preferences::load(settings);
        const Preferences defaults;
        QCOMPARE(p.gridCells, defaults.gridCells);
        QCOMPARE(p.contourLevels, defaults.contourLevels);
        QCOMPARE(p.exportFormat, defaults.exportFormat);
        QVERIFY(p.palette == defaults.palette);
        QCOMPARE(p.maxIterations, 350);
        settings.clear();
    }

    void aChangeInTheDialogAppliesAtOnceAndPersists() {
        MainWindow window;
        window.resize(1200, 800);
        window.show();
        QVERIFY(window.waitForIdle());
        QVERIFY(!window.isModified());
        auto* dialog = window.showPreferences();
        QVERIFY(dialog && dialog->isVisible());
        QCOMPARE(window.showPreferences(), dialog);  // one dialog at a time

        // Landscape: contour lines, grid and colour scale redraw the open study's landscape.
        dialog->contourLevelsBox()->setValue(6);
        dialog->gridCellsBox()->setValue(60);
        dialog->logColourBox()->setChecked(true);
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.preferences().contourLevels, 6);
        QCOMPARE(window.study().view.contourCount, 6);
        QCOMPARE(window.study().view.gridCells, 60);
        QVERIFY(window.study().view.logColour);
        QVERIFY(window.isModified());  // the study keeps its view settings
        QVERIFY(window.field());
        QCOMPARE(window.field()->field.nx, 60);
        QVERIFY(!window.field()->contours.empty() && window.field()->contours.size() <= 6u);
        QVERIFY(window.landscape()->logColour());

        // Animation speed, iteration limit, export defaults.
        dialog->animationSpeedBox()->setValue(17);
        dialog->maxIterationsBox()->setValue(321);
        dialog->exportWidthBox()->setValue(800);
        dialog->exportFormatBox()->setCurrentIndex(dialog->exportFormatBox()->findData("svg"));
        QCOMPARE(window.preferences().animationSpeed, 17);
        QCOMPARE(window.preferences().exportFormat, QStringLiteral("svg"));

        // Appearance: the dark palette reaches the application and the plots.
        dialog->paletteBox()->setCurrentIndex(dialog->paletteBox()->findData("dark"));
        QVERIFY(QApplication::palette().color(QPalette::Window).lightness() < 128);
        QTRY_VERIFY_WITH_TIMEOUT(window.landscape()->plot()->xAxis->labelColor().lightness() > 160, 3000);

        // Kept in QSettings at once.
        {
            QSettings settings;
            QCOMPARE(settings.value("preferences/contour-levels").toInt(), 6);
            QCOMPARE(settings.value("preferences/grid-cells").toInt(), 60);
            QCOMPARE(settings.value("preferences/animation-speed").toInt(), 17);
            QCOMPARE(settings.value("preferences/max-iterations").toInt(), 321);
            QCOMPARE(settings.value("preferences/export-format").toString(), QStringLiteral("svg"));
            QCOMPARE(settings.value("preferences/palette").toString(), QStringLiteral("dark"));
        }
        dialog->accept();

        // The next window starts with them, and its new study uses the landscape settings
        // and the iteration limit.
        MainWindow next;
        QCOMPARE(next.preferences().animationSpeed, 17);
        QCOMPARE(next.preferences().exportWidth, 800);
        QVERIFY(next.preferences().palette == PaletteChoice::Dark);
        QCOMPARE(next.study().view.contourCount, 6);
        QCOMPARE(next.study().view.gridCells, 60);
        QVERIFY(next.study().view.logColour);
        QCOMPARE(next.study().maxIterations, 321);
        QVERIFY(next.waitForIdle());
        QVERIFY(next.landscape()->logColour());
    }

    void cancelGoesBackToTheSettingsAsTheyWere() {
        QSettings().clear();
        MainWindow window;
        window.show();
        QVERIFY(window.waitForIdle());
        const Preferences before = window.preferences();
        auto* dialog = window.showPreferences();
        dialog->contourLevelsBox()->setValue(before.contourLevels + 5);
        dialog->paletteBox()->setCurrentIndex(dialog->paletteBox()->findData("light"));
        QCOMPARE(window.preferences().contourLevels, before.contourLevels + 5);
        dialog->reject();
        QVERIFY(window.preferences() == before);
        QCOMPARE(QSettings().value("preferences/contour-levels").toInt(), before.contourLevels);
        QVERIFY(window.waitForIdle());
        QCOMPARE(window.study().view.contourCount, before.contourLevels);

        // Restore defaults puts every control back.
        dialog = window.showPreferences();
        dialog->gridCellsBox()->setValue(400);
        dialog->restoreDefaults();
        QCOMPARE(dialog->gridCellsBox()->value(), Preferences{}.gridCells);
        QVERIFY(window.preferences() == Preferences{});
        dialog->accept();
        QVERIFY(window.waitForIdle());
    }
};

QTEST_MAIN(PreferencesTest)
#include "preferences_test.moc"
