#pragma once
// The review report's figures: the window's own views (landscape with every path, progress,
// curvature) fed with a study's runs, drawn without being shown and written as SVG
// (QSvgGenerator + QCustomPlot::toPainter, as widgets::exportPlot does). Always in the light
// palette, whatever the window's appearance, because a report is read on paper as often as on
// screen.
//
// Needs a QApplication and the GUI thread (the views are widgets). The landscape's field is
// sampled by sampleLandscape(), which is Qt-free work and may run on a worker thread first.

#include "core/analyze/analyze.h"
#include "core/report/document.h"
#include "core/report/study_run.h"

#include <nlohmann/json.hpp>

#include <memory>
#include <string>
#include <vector>

namespace sw::widgets {
struct FieldSnapshot;
}

namespace sw::reportgui {

// What the landscape figure shows: the plotted box, the values the other variables are held
// at (the best run's end point, when there are more than two variables), and its field.
struct LandscapePlan {
    int xVariable = 0, yVariable = 1;
    analyze::Box box;
    Vector held;
    int heldRun = -1;  // index of the run whose end point the held values come from (-1: the start)
    std::shared_ptr<const widgets::FieldSnapshot> field;
};

// Samples the landscape as the window does (the study's grid cells, contour count and colour
// scale). Qt-free work; `control` can cancel it (then the plan has no field).
LandscapePlan sampleLandscape(const report::StudyRuns& runs, const nlohmann::json& results,
                              const analyze::Control& control = {});

// The figures, in report order. Sets *note when a figure is missing and why.
std::vector<report::Figure> drawFigures(const report::StudyRuns& runs, const nlohmann::json& results,
                                        const LandscapePlan& plan, std::string* note);

}  // namespace sw::reportgui
