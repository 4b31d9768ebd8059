#pragma once
// The toolbar's icons, drawn here as simple shapes in the palette's button-text colour, so they
// read on light and dark appearances alike (the style's stock pixmaps are dark grey and all but
// vanish on a dark toolbar). Redrawn when the palette changes.

#include <QIcon>
#include <QPalette>
#include <QString>

namespace sw::window {

// name: new, open, save, run-all, step-all, play, pause, reset, cancel, export-view.
// An unknown name gives a null icon.
QIcon toolIcon(const QString& name, const QPalette& palette);

}  // namespace sw::window
