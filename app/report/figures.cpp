// The report's figures from the window's views (see figures.h).
#include "app/report/figures.h"

#include "core/report/report.h"
#include "core/solve/solver.h"
#include "widgets/basins_view.h"
#include "widgets/critical_overlay.h"
#include "widgets/curvature_view.h"
#include "widgets/landscape_view.h"
#include "widgets/progress_view.h"
#include "widgets/theme.h"

#include <QBuffer>
#include <QLayout>
#include <QStyle>
#include <QStyleFactory>
#include <QSvgGenerator>
#include <algorithm>
#include <memory>

namespace sw::reportgui {

namespace {

using nlohmann::json;

// Sizes in pixels (CSS pixels in the HTML, 1/96 inch): wide enough for three legend columns,
// small enough to sit on an A4 page with its caption.
constexpr int kWidth = 760;
constexpr int kLandscapeHeight = 600;
constexpr int kPanelHeight = 480;
constexpr int kCurvatureHeight = 560;  // two panels whose axis titles are long

// Fusion's light palette on a white page: the figures sit on paper, not in a window.
QPalette lightPalette() {
    std::unique_ptr<QStyle> fusion(QStyleFactory::create(QStringLiteral("Fusion")));
    QPalette palette = fusion ? fusion->standardPalette() : QPalette(Qt::white);
    for (QPalette::ColorRole role : {QPalette::Window, QPalette::Base}) palette.setColor(role, Qt::white);
    return palette;
}

std::shared_ptr<widgets::Snapshot> snapshotOf(const report::StudyRuns& runs, const LandscapePlan& plan) {
    auto snapshot = std::make_shared<widgets::Snapshot>();
    const study::Study& study = runs.study;
    snapshot->objective = runs.objective;
    for (const study::Variable& v : study.variables) snapshot->variableNames.push_back(QString::fromStdString(v.name));
    snapshot->plotX = plan.xVariable;
    snapshot->plotY = plan.yVariable;
    snapshot->held = plan.held;
    for (std::size_t k = 0; k < runs.runs.size(); ++k) {
        const std::size_t slot = runs.entries[k];
        const study::MethodEntry& entry = study.methods[slot];
        widgets::RunTrack track;
        track.label = QString::fromStdString(entry.label);
        // As the window draws a lineup entry (MainWindow::runRequest).
        track.colour = QColor(QString::fromStdString(entry.colour));
        if (!track.colour.isValid()) track.colour = widgets::lineupColour(static_cast<int>(slot));
        track.marker = widgets::markerFromName(QString::fromStdString(entry.marker));
        if (const solve::MethodInfo* info = solve::findMethod(entry.method))
            track.usesTrustRegion = info->family == "trust-region" || entry.method == "levenberg-marquardt";
        track.run = std::make_shared<const solve::Run>(runs.runs[k]);
        snapshot->tracks.push_back(track);
    }
    return snapshot;
}

// Legend names are for the window; a printed page has no pointer to drag with.
void dropInteractionHints(QCustomPlot* plot) {
    for (int i = 0; i < plot->plottableCount(); ++i) {
        QCPAbstractPlottable* p = plot->plottable(i);
        const QString name = p->name();
        const int open = name.indexOf(QStringLiteral(" ("));
        if (open > 0 && (name.contains(QStringLiteral("drag")) || name.contains(QStringLiteral("click"))))
            p->setName(name.left(open));
    }
}

// Lays the view out so its plot is exactly width x height, replots (the views adjust legends
// and ticks just before a replot) and writes the plot as SVG text.
std::string svgOf(widgets::PlotView& view, int width, int height) {
    view.setAttribute(Qt::WA_DontShowOnScreen);
    view.resize(width, height);
    view.show();
    if (view.layout()) view.layout()->activate();
    QCustomPlot* plot = view.plot();
    const int extra = view.height() - plot->height();
    view.resize(width, height + std::max(0, extra));
    if (view.layout()) view.layout()->activate();
    dropInteractionHints(plot);
    plot->replot(QCustomPlot::rpImmediateRefresh);

    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    QSvgGenerator generator;
    generator.setOutputDevice(&buffer);
    generator.setSize(QSize(width, height));
    generator.setViewBox(QRect(0, 0, width, height));
    generator.setResolution(96);
    generator.setTitle(QStringLiteral("Saddlewise plot"));
    QCPPainter painter;
    if (!painter.begin(&generator)) return {};
    plot->toPainter(&painter, width, height);
    painter.end();
    view.hide();
    return buffer.data().toStdString();
}

std::string heldText(const report::StudyRuns& runs, const LandscapePlan& plan, const json& results) {
    const auto& variables = runs.study.variables;
    std::string text;
    for (std::size_t i = 0; i < variables.size(); ++i) {
        if (static_cast<int>(i) == plan.xVariable || static_cast<int>(i) == plan.yVariable) continue;
        // The held numbers as the results print them (the end point's x, or the start).
        json value = json(variables[i].start);
        if (plan.heldRun >= 0) value = results["runs"][static_cast<std::size_t>(plan.heldRun)]["x"][i];
        text += (text.empty() ? "" : ", ") + variables[i].name + " = " + report::numberText(value, 8);
    }
    return text;
}

}  // namespace

LandscapePlan sampleLandscape(const report::StudyRuns& runs, const json& results, const analyze::Control& control) {
    LandscapePlan plan;
    const study::Study& study = runs.study;
    const int n = static_cast<int>(study.variables.size());
    if (n < 2 || !runs.objective) return plan;
    plan.xVariable = std::clamp(study.view.plotX, 0, n - 1);
    plan.yVariable = std::clamp(study.view.plotY, 0, n - 1);
    if (plan.xVariable == plan.yVariable) plan.yVariable = plan.xVariable == 0 ? 1 : 0;
    const study::Variable& x = study.variables[static_cast<std::size_t>(plan.xVariable)];
    const study::Variable& y = study.variables[static_cast<std::size_t>(plan.yVariable)];
    plan.box = analyze::Box{x.lower, x.upper, y.lower, y.upper};
    plan.held = study.start();
    if (n > 2) {
        // Hold the others where the best run ended: the slice through the answer.
        const int best = report::bestRun(results);
        if (best >= 0 && runs.runs[static_cast<std::size_t>(best)].x.size() == n) {
            plan.held = runs.runs[static_cast<std::size_t>(best)].x;
            plan.heldRun = best;
        }
    }
    auto field = std::make_shared<widgets::FieldSnapshot>();
    field->logColour = study.view.logColour;
    const int cells = std::clamp(study.view.gridCells, 20, 2000);
    try {
        if (!analyze::sampleField(*runs.objective, plan.held, plan.xVariable, plan.yVariable, plan.box, cells, cells,
                                  field->field, control))
            return plan;  // cancelled
    } catch (const std::invalid_argument&) {
        return plan;  // a box with no interior: drawFigures says so
    }
    field->contours = analyze::contourLines(field->field, analyze::chooseLevels(field->field, std::clamp(study.view.contourCount, 2, 100)));
    plan.field = field;
    return plan;
}

// One figure: the view drawn headless at the report's width and `height`, with its title and
// caption; nothing when the view could not be drawn.
static void addFigure(std::vector<report::Figure>& figures, widgets::PlotView& view, std::string id, std::string title,
                      std::string caption, int height) {
    report::Figure f;
    f.id = std::move(id);
    f.title = std::move(title);
    f.caption = std::move(caption);
    f.svg = svgOf(view, kWidth, height);
    f.width = kWidth;
    f.height = height;
    if (!f.svg.empty()) figures.push_back(std::move(f));
}

std::vector<report::Figure> drawFigures(const report::StudyRuns& runs, const json& results, const LandscapePlan& plan,
                                        std::string* note) {
    std::vector<report::Figure> figures;
    std::string missing;
    const QPalette palette = lightPalette();
    auto snapshot = snapshotOf(runs, plan);
    const study::Study& study = runs.study;
    const auto& variables = study.variables;

    if (plan.field && variables.size() >= 2) {
        widgets::LandscapeView view;
        view.setPalette(palette);
        view.setLogColour(study.view.logColour);
        view.setHomeBox(plan.box);
        view.setField(plan.field);
        view.setStart(study.start());
        view.setSnapshot(snapshot);
        const std::string xName = variables[static_cast<std::size_t>(plan.xVariable)].name;
        const std::string yName = variables[static_cast<std::size_t>(plan.yVariable)].name;
        const std::string title = "Landscape: f over " + xName + " and " + yName + ", with every method's path";
        std::string caption = "The objective over the study's box (" + xName + " from " + report::numberText(plan.box.xMin, 6) +
                    " to " + report::numberText(plan.box.xMax, 6) + ", " + yName + " from " +
                    report::numberText(plan.box.yMin, 6) + " to " + report::numberText(plan.box.yMax, 6) + "), " +
                    (study.view.logColour ? "coloured by log10 of f above its lowest sampled value" : "coloured by f") +
                    ", with contour lines. Each method's iterates are joined in its colour and marker; its end point "
                    "is marked by kind (filled disc: minimum; square with a cross: saddle; triangle: maximum; hollow "
                    "diamond: degenerate; hollow circle: stopped before converging).";
        if (variables.size() > 2) {
            const std::string held = heldText(runs, plan, results);
            caption += " The other " + std::string(variables.size() == 3 ? "variable is" : "variables are") + " held at " +
                         held +
                         (plan.heldRun >= 0 ? " (where " + runs.runs[static_cast<std::size_t>(plan.heldRun)].label +
                                                  " ended); paths are projected onto this plane, so a path may cross "
                                                  "contours it does not cross in the full space."
                                            : " (the start).");
        }
        addFigure(figures, view, "landscape", title, caption, kLandscapeHeight);
    } else {
        missing = variables.size() < 2 ? "The landscape needs two variables to plot; this study has one."
                                       : "The landscape could not be sampled over the study's box.";
    }

    {
        widgets::ProgressView view;
        view.setPalette(palette);
        view.setSnapshot(snapshot);
        addFigure(figures, view, "progress", "Progress: distance to the best value and gradient norm per iteration",
                  "Top: f − f_best per iteration on a log scale, f_best being the lowest final value of any method "
                    "(a method that reaches it drops to the floor of the scale). Bottom: the gradient norm |∇f|. A "
                    "straight slope is linear convergence; a curve bending down is faster than linear.",
                  kPanelHeight);
    }
    {
        widgets::CurvatureView view;
        view.setPalette(palette);
        view.setSnapshot(snapshot);
        addFigure(figures, view, "curvature", "Curvature: the Hessian's eigenvalues and condition number along each path",
                  "Top: every eigenvalue of the Hessian at each iterate, on a symmetric log scale so signs show; "
                    "iterates with negative curvature are filled markers on the shaded band below zero. Bottom: the "
                    "condition number (largest over smallest eigenvalue magnitude). Methods that use no derivatives "
                    "still show the curvature at their iterates.",
                  kCurvatureHeight);
    }
    // The surveys the study asks for (runStudySurveys), drawn by the window's own views.
    if (runs.critical && plan.field && variables.size() == 2) {
        widgets::LandscapeView view;
        view.setPalette(palette);
        view.setLogColour(study.view.logColour);
        view.setHomeBox(plan.box);
        view.setField(plan.field);
        widgets::CriticalOverlay overlay(view.plot());
        overlay.setMap(runs.critical, plan.xVariable, plan.yVariable);
        addFigure(figures, view, "critical-map", "Critical-point map over the landscape",
                  "Every critical point found in the box, marked by kind: ring with a dot: local minimum; square with "
                    "a cross: saddle; upward triangle: local maximum; diamond: degenerate. The table above lists them "
                    "with their values and Hessian eigenvalues.",
                  kLandscapeHeight);
    }
    if (runs.basins && !runs.basins->maps.empty()) {
        widgets::BasinsView view;
        view.setPalette(palette);
        view.setSurvey(runs.basins);
        addFigure(figures, view, "basins-maps", "Basins of attraction, one map per method",
                  "Each cell is coloured by the critical point its method's run from the cell's centre ends at, "
                  "darker for more iterations; cells whose run hit a limit, diverged or failed are shown apart (see "
                  "the legend). Critical points are marked as on the map above.",
                  runs.basins->maps.size() > 1 ? 420 : kPanelHeight);
    }
    if (note) *note = missing;
    return figures;
}

}  // namespace sw::reportgui
