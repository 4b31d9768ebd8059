#pragma once
// Colours and markers shared by every view (owned by the widgets; filled in by the workbench work).
#include <QColor>
#include <vector>

namespace sw::widgets {
// Line colours for method lineup entries, in order of assignment.
std::vector<QColor> lineupPalette();
}
