#pragma once
// Hands the `report` verb its Qt half (app/cli/report_graphics.h): the figures from the
// window's views and the PDF layout. main.cpp calls it in a build with the window.
//
// The verb runs without a display: the first call that needs Qt starts a QApplication on the
// offscreen platform ("-platform offscreen", whatever QT_QPA_PLATFORM says), after checking
// that the platform plugin is there, because Qt aborts the process when it is not. Qt's own
// warnings are kept off the terminal while it draws.

namespace sw::reportgui {

void installReportGraphics();

}  // namespace sw::reportgui
