#pragma once
// Colours and markers shared by every view and by the lineup editor.
#include "widgets/snapshot.h"

#include <QColor>
#include <QPalette>
#include <QString>
#include <vector>

namespace sw::widgets {

// Line colours for method lineup entries, in order of assignment (8 colours, then it
// repeats; markers differ as well, so colour is never the only cue). See theme.cpp for
// how they were chosen and checked under simulated colour-vision deficiency.
std::vector<QColor> lineupPalette();
// The i-th palette colour (wraps around).
QColor lineupColour(int index);

// Markers in order of assignment, and their names in study files.
std::vector<Marker> lineupMarkers();
Marker lineupMarker(int index);
QString markerName(Marker marker);
// Unknown names give Circle and set *ok = false.
Marker markerFromName(const QString& name, bool* ok = nullptr);

// Text colour for problem messages that reads on the palette's window colour: a deep red
// on light backgrounds, a light coral on dark ones (both above 4.5:1 contrast).
QColor problemTextColour(const QPalette& palette);
// A style sheet fragment "color: #rrggbb;" with problemTextColour.
QString problemTextStyle(const QPalette& palette);

// Colour-vision simulation used to check the palette (and pinned by a test).
enum class ColourVision { Normal, Protanopia, Deuteranopia, Tritanopia };
QColor simulateColourVision(const QColor& colour, ColourVision vision);
// Euclidean distance in CIELAB (CIE 1976 ΔE*ab), D65 white.
double colourDifference(const QColor& a, const QColor& b);

// CIELAB (D65) of an sRGB colour, and the CIEDE2000 colour difference (Sharma, Wu & Dalal,
// "The CIEDE2000 color-difference formula: implementation notes, supplementary test data, and
// mathematical observations", Color Res. Appl. 30(1), 2005).
struct Lab {
    double L = 0, a = 0, b = 0;
};
Lab cielab(const QColor& colour);
double ciede2000(const Lab& first, const Lab& second);
double colourDifference2000(const QColor& a, const QColor& b);

}  // namespace sw::widgets
