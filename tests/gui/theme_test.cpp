// The lineup palette stays distinguishable under simulated colour-vision deficiency, and the
// landscape's colour scale is ordered in lightness, separates its steps under simulated
// colour-vision deficiency, and is not one of the well-known named scales.
#include "widgets/plot_style.h"
#include "widgets/theme.h"

#include <QtTest>

#include <array>
#include <vector>

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

    // CIEDE2000 against the 34 pairs of Sharma, Wu & Dalal (2005), Table 1 (L*a*b* of both
    // colours and the difference, 4 decimals; values from memory of the paper's table, every
    // one reproduced by this implementation and by scripts/colour_scale.py's own).
    void ciede2000MatchesThePublishedTestData() {
        const std::vector<std::array<double, 7>> table = {
        {50.0000, 2.6772, -79.7751, 50.0000, 0.0000, -82.7485, 2.0425},
        {50.0000, 3.1571, -77.2803, 50.0000, 0.0000, -82.7485, 2.8615},
        {50.0000, 2.8361, -74.0200, 50.0000, 0.0000, -82.7485, 3.4412},
        {50.0000, -1.3802, -84.2814, 50.0000, 0.0000, -82.7485, 1.0000},
        {50.0000, -1.1848, -84.8006, 50.0000, 0.0000, -82.7485, 1.0000},
        {50.0000, -0.9009, -85.5211, 50.0000, 0.0000, -82.7485, 1.0000},
        {50.0000, 0.0000, 0.0000, 50.0000, -1.0000, 2.0000, 2.3669},
        {50.0000, -1.0000, 2.0000, 50.0000, 0.0000, 0.0000, 2.3669},
        {50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0009, 7.1792},
        {50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0010, 7.1792},
        {50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0011, 7.2195},
        {50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0012, 7.2195},
        {50.0000, -0.0010, 2.4900, 50.0000, 0.0009, -2.4900, 4.8045},
        {50.0000, -0.0010, 2.4900, 50.0000, 0.0010, -2.4900, 4.8045},
        {50.0000, -0.0010, 2.4900, 50.0000, 0.0011, -2.4900, 4.7461},
        {50.0000, 2.5000, 0.0000, 50.0000, 0.0000, -2.5000, 4.3065},
        {50.0000, 2.5000, 0.0000, 73.0000, 25.0000, -18.0000, 27.1492},
        {50.0000, 2.5000, 0.0000, 61.0000, -5.0000, 29.0000, 22.8977},
        {50.0000, 2.5000, 0.0000, 56.0000, -27.0000, -3.0000, 31.9030},
        {50.0000, 2.5000, 0.0000, 58.0000, 24.0000, 15.0000, 19.4535},
        {50.0000, 2.5000, 0.0000, 50.0000, 3.1736, 0.5854, 1.0000},
        {50.0000, 2.5000, 0.0000, 50.0000, 3.2972, 0.0000, 1.0000},
        {50.0000, 2.5000, 0.0000, 50.0000, 1.8634, 0.5757, 1.0000},
        {50.0000, 2.5000, 0.0000, 50.0000, 3.2592, 0.3350, 1.0000},
        {60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644},
        {63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.2630},
        {61.2901, 3.7196, -5.3901, 61.4292, 2.2480, -4.9620, 1.8731},
        {35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645},
        {22.7233, 20.0904, -46.6940, 23.0331, 14.9730, -42.5619, 2.0373},
        {36.4612, 47.8580, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146},
        {90.8027, -2.0831, 1.4410, 91.1528, -1.6435, 0.0447, 1.4441},
        {90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381},
        {6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377},
        {2.0776, 0.0795, -1.1350, 0.9033, -0.0636, -0.5514, 0.9082}};
        for (const auto& row : table) {
            const Lab first{row[0], row[1], row[2]}, second{row[3], row[4], row[5]};
            QVERIFY2(std::abs(ciede2000(first, second) - row[6]) < 5e-5, qPrintable(QString::number(row[6])));
            QVERIFY(std::abs(ciede2000(second, first) - row[6]) < 5e-5);  // symmetric
        }
    }

    // The landscape scale as drawn: QCPColorGradient's own colours at 101 positions.
    static std::vector<QColor> scale(bool dark, int count = 101) {
        QCPColorGradient gradient = sw::widgets::fieldGradient(dark);  // color() is not const
        std::vector<QColor> colours;
        for (int i = 0; i < count; ++i)
            colours.push_back(QColor::fromRgb(
                gradient.color(static_cast<double>(i) / (count - 1), QCPRange(0, 1), false)));
        return colours;
    }

    // Sequential means ordered by lightness: CIE L* rises at every step of the drawn scale, in
    // both variants, also as seen with each simulated colour-vision deficiency (Machado et al.
    // 2009, severity 1). Common practice for sequential scales, no published threshold.
    void fieldScaleLightnessRisesMonotonically() {
        for (bool dark : {false, true})
            for (ColourVision vision : {ColourVision::Normal, ColourVision::Protanopia, ColourVision::Deuteranopia,
                                        ColourVision::Tritanopia}) {
                const std::vector<QColor> colours = scale(dark);
                double previous = -1;
                for (const QColor& c : colours) {
                    const double lightness = cielab(simulateColourVision(c, vision)).L;
                    QVERIFY2(lightness > previous, qPrintable(QStringLiteral("dark %1, vision %2, at %3")
                                                                  .arg(dark)
                                                                  .arg(static_cast<int>(vision))
                                                                  .arg(c.name())));
                    previous = lightness;
                }
                QVERIFY(cielab(colours.back()).L - cielab(colours.front()).L > 70);
            }
    }

    // Tenths of the scale stay apart under every simulated deficiency: CIEDE2000 (Sharma, Wu &
    // Dalal 2005) between neighbouring tenths at least 3 (several just-noticeable differences;
    // common practice, no published source), and under normal vision the steps are even (the
    // largest at most 1.5 times the smallest).
    void fieldScaleSeparatesItsStepsUnderColourVisionDeficiency() {
        for (bool dark : {false, true}) {
            const std::vector<QColor> tenths = scale(dark, 11);
            for (ColourVision vision : {ColourVision::Normal, ColourVision::Protanopia, ColourVision::Deuteranopia,
                                        ColourVision::Tritanopia}) {
                double smallest = 1e9, largest = 0;
                for (std::size_t i = 1; i < tenths.size(); ++i) {
                    const double d = colourDifference2000(simulateColourVision(tenths[i - 1], vision),
                                                          simulateColourVision(tenths[i], vision));
                    smallest = std::min(smallest, d);
                    largest = std::max(largest, d);
                }
                qInfo("field scale (%s), vision %d: CIEDE2000 between tenths %.1f .. %.1f", dark ? "dark" : "light",
                      static_cast<int>(vision), smallest, largest);
                QVERIFY(smallest >= 3);
                if (vision == ColourVision::Normal) QVERIFY(largest <= 1.5 * smallest);
            }
        }
    }

    // Not a copy of a well-known scale: at 0, 1/4, 1/2, 3/4 and 1 the scale is on average more
    // than 20 CIEDE2000 units from each of matplotlib's viridis, magma, inferno, plasma and
    // cividis (their colours at those positions, values from memory of matplotlib's tables).
    void fieldScaleIsNotAWellKnownNamedScale() {
        const std::vector<std::pair<const char*, std::array<const char*, 5>>> named = {
            {"viridis", {"#440154", "#3b528b", "#21918c", "#5ec962", "#fde725"}},
            {"magma", {"#000004", "#51127c", "#b73779", "#fc8961", "#fcfdbf"}},
            {"inferno", {"#000004", "#57106e", "#bc3754", "#f98e09", "#fcffa4"}},
            {"plasma", {"#0d0887", "#7e03a8", "#cc4778", "#f89540", "#f0f921"}},
            {"cividis", {"#00204d", "#414d6b", "#7c7b78", "#bcaf6f", "#ffea46"}}};
        for (bool dark : {false, true}) {
            const std::vector<QColor> quarters = scale(dark, 5);
            for (const auto& [name, colours] : named) {
                double sum = 0;
                for (std::size_t i = 0; i < 5; ++i) sum += colourDifference2000(quarters[i], QColor(colours[i]));
                QVERIFY2(sum / 5 > 20, name);
            }
        }
    }

    // The contour ink rule reads the scale's lightness: dark at the low end, light at the top.
    void fieldScaleLightnessForInk() {
        for (bool dark : {false, true}) {
            QVERIFY(sw::widgets::fieldGradientLightness(0.0, dark) < 0.2);
            QVERIFY(sw::widgets::fieldGradientLightness(1.0, dark) > 0.8);
            QVERIFY(sw::widgets::fieldGradientLightness(0.3, dark) < sw::widgets::fieldGradientLightness(0.7, dark));
        }
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
