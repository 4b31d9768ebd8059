// The lineup palette stays distinguishable under simulated colour-vision deficiency.
#include "widgets/theme.h"

#include <QtTest>

using namespace sw::widgets;

class ThemeTest : public QObject {
    Q_OBJECT

private:
    static double smallestDifference(ColourVision vision) {
        const auto palette = lineupPalette();
        double smallest = 1e9;
        for (std::size_t i = 0; i < palette.size(); ++i)
            for (std::size_t j = i + 1; j < palette.size(); ++j)
                smallest = std::min(smallest, colourDifference(simulateColourVision(palette[i], vision),
                                                               simulateColourVision(palette[j], vision)));
        return smallest;
    }

private slots:
    void paletteHasEightDistinctColours() {
        const auto palette = lineupPalette();
        QCOMPARE(palette.size(), std::size_t(8));
        QVERIFY(smallestDifference(ColourVision::Normal) > 30);
    }

    // Threshold: a CIE76 difference above ~20 reads as clearly different colours for lines
    // (common practice, no published source). Simulation: Machado, Oliveira & Fernandes (2009),
    // severity 1.0 (matrices from memory of the paper's table).
    void paletteSurvivesProtanopiaAndDeuteranopia() {
        const double protan = smallestDifference(ColourVision::Protanopia);
        const double deutan = smallestDifference(ColourVision::Deuteranopia);
        qInfo("smallest ΔE*ab: protanopia %.1f, deuteranopia %.1f, tritanopia %.1f", protan, deutan,
              smallestDifference(ColourVision::Tritanopia));
        QVERIFY(protan > 25);
        QVERIFY(deutan > 25);
    }

    void simulationLeavesGreysAlone() {
        // A neutral grey has equal cone responses; every simulation keeps it (rows sum to 1).
        const QColor grey(128, 128, 128);
        for (ColourVision v : {ColourVision::Protanopia, ColourVision::Deuteranopia, ColourVision::Tritanopia})
            QVERIFY(colourDifference(simulateColourVision(grey, v), grey) < 1.0);
        // Red and green collapse toward each other under deuteranopia: the check can fail.
        const double normal = colourDifference(QColor(200, 60, 40), QColor(90, 160, 40));
        const double deutan = colourDifference(simulateColourVision(QColor(200, 60, 40), ColourVision::Deuteranopia),
                                               simulateColourVision(QColor(90, 160, 40), ColourVision::Deuteranopia));
        QVERIFY(deutan < normal / 2);
    }

    void markerNamesRoundTrip() {
        for (Marker m : lineupMarkers()) {
            bool ok = false;
            QCOMPARE(markerFromName(markerName(m), &ok), m);
            QVERIFY(ok);
        }
        bool ok = true;
        markerFromName("hexagon", &ok);
        QVERIFY(!ok);
    }
};

QTEST_MAIN(ThemeTest)
#include "theme_test.moc"
