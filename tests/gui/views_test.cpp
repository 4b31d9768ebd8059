// The plot views draw what they are given: hand-made snapshots built from formula objectives
// and real solver runs. Checks count what is drawn (plottables, data sizes), follow the
// selection, exercise the mouse (drag the start, click to place it, click an iterate) and
// export every view to PNG, SVG and PDF. Set SW_VIEW_IMAGES=<dir> to also keep a PNG of
// each view for looking at.

#include "core/analyze/analyze.h"
#include "core/objective/formula_objective.h"
#include "core/solve/solver.h"
#include "widgets/curvature_view.h"
#include "widgets/landscape_view.h"
#include "widgets/local_model_view.h"
#include "widgets/progress_view.h"
#include "widgets/slice_view.h"

#include <QElapsedTimer>
#include <QFile>
#include <QLabel>
#include <QSignalSpy>
#include <QSvgRenderer>
#include <QTemporaryDir>
#include <QToolTip>
#include <QtTest>
#include <cmath>
#include <memory>

using namespace sw;
using namespace sw::widgets;

namespace {

// A curved valley (the banana-shaped valley of Rosenbrock's function, the trade's standard
// first test), a saddle and a function with a maximum: enough to see every end-point kind.
const char* kValley = "(1 - x)^2 + 100*(y - x^2)^2";
const char* kSaddle = "x^2 - y^2 + 0.1*x*y";

std::shared_ptr<const Objective> formula(const std::string& text) {
    return std::make_shared<FormulaObjective>(text, std::vector<std::string>{"x", "y"});
}

RunTrack track(const std::string& method, const Objective& objective, const Vector& start, QColor colour,
               Marker marker, int maxIterations = 60) {
    solve::StoppingRules rules;
    rules.maxIterations = maxIterations;
    auto run = std::make_shared<solve::Run>(solve::solve(method, objective, start, {}, rules));
    RunTrack t;
    t.label = QString::fromStdString(method);
    t.colour = colour;
    t.marker = marker;
    t.run = run;
    t.usesTrustRegion = method.rfind("trust-region", 0) == 0;
    return t;
}

std::shared_ptr<Snapshot> valleySnapshot() {
    auto snapshot = std::make_shared<Snapshot>();
    snapshot->objective = formula(kValley);
    snapshot->variableNames = {QStringLiteral("x"), QStringLiteral("y")};
    snapshot->held = Vector::Zero(2);
    const Vector start = (Vector(2) << -1.2, 1.0).finished();
    snapshot->tracks.push_back(track("gradient-descent", *snapshot->objective, start, QColor(0x1f, 0x6f, 0xb4),
                                     Marker::Circle, 40));
    snapshot->tracks.push_back(track("bfgs", *snapshot->objective, start, QColor(0xd9, 0x77, 0x1a), Marker::Square));
    snapshot->tracks.push_back(
        track("trust-region-dogleg", *snapshot->objective, start, QColor(0x2e, 0x9e, 0x7a), Marker::Triangle));
    return snapshot;
}

std::shared_ptr<Snapshot> saddleSnapshot() {
    auto snapshot = std::make_shared<Snapshot>();
    snapshot->objective = formula(kSaddle);
    snapshot->variableNames = {QStringLiteral("x"), QStringLiteral("y")};
    snapshot->held = Vector::Zero(2);
    // Pure Newton jumps to the saddle at the origin: negative curvature at every iterate.
    snapshot->tracks.push_back(track("newton", *snapshot->objective, (Vector(2) << 0.8, 0.6).finished(),
                                     QColor(0xc2, 0x4e, 0x8f), Marker::Diamond));
    return snapshot;
}

std::shared_ptr<FieldSnapshot> sampled(const Objective& objective, const analyze::Box& box, int cells,
                                       bool logColour = false) {
    auto field = std::make_shared<FieldSnapshot>();
    analyze::sampleField(objective, Vector::Zero(objective.dimension()), 0, 1, box, cells, cells, field->field);
    field->contours = analyze::contourLines(field->field, analyze::chooseLevels(field->field, 14));
    field->logColour = logColour;
    return field;
}

// A field whose cells we choose, with NaN and +-inf in it.
std::shared_ptr<FieldSnapshot> handMadeField(const std::vector<double>& values, int nx, int ny) {
    auto field = std::make_shared<FieldSnapshot>();
    field->field.box = analyze::Box{0, 1, 0, 1};
    field->field.nx = nx;
    field->field.ny = ny;
    field->field.values = values;
    for (double v : values)
        if (!std::isfinite(v)) ++field->field.nonFiniteCells;
    return field;
}

void show(PlotView& view) {
    view.resize(640, 520);
    view.show();
    QVERIFY(QTest::qWaitForWindowExposed(&view) || true);
    view.plot()->replot();
}

void keepImage(PlotView& view, const QString& name) {
    const QString dir = qEnvironmentVariable("SW_VIEW_IMAGES");
    if (dir.isEmpty()) return;
    QString error;
    QVERIFY2(exportPlot(view.plot(), dir + "/" + name + ".png", 720, 560, &error), qPrintable(error));
    const QPixmap shot = view.grab();
    shot.save(dir + "/" + name + "-widget.png");
}

void sendMouse(QWidget* target, QEvent::Type type, QPointF pos, Qt::MouseButtons buttons) {
    QMouseEvent event(type, pos, target->mapToGlobal(pos), type == QEvent::MouseMove ? Qt::NoButton : Qt::LeftButton,
                      buttons, Qt::NoModifier);
    QApplication::sendEvent(target, &event);
}

QPointF pixelOf(QCustomPlot* plot, double x, double y) {
    return QPointF(plot->xAxis->coordToPixel(x), plot->yAxis->coordToPixel(y));
}

}  // namespace

class ViewsTest : public QObject {
    Q_OBJECT
private slots:
    void landscapeDrawsTheFieldContoursAndEveryPath();
    void landscapeColourRangeIgnoresNonFiniteCells();
    void landscapeLogColourHandlesNonPositiveValues();
    void landscapeConstantFieldStillGetsARange();
    void landscapeSelectionHighlightMoves();
    void landscapeHoverReadoutGivesValueGradientAndEigenvalues();
    void landscapeDraggingTheStartEmitsMovesAndAClickPlacesIt();
    void landscapeClickOnAnIterateRequestsItsSelection();
    void landscapeMarksEndPointsByKind();
    void localModelShowsModelTrueContoursNewtonPointAxesAndTrustRegion();
    void localModelCallsASaddleASaddle();
    void localModelLegendSitsOutsideThePlot();
    void localModelAtAConvergedIterateShowsDistinctTicksAndContoursAboveRoundOff();
    void curvatureAxisTitlesFitAlongAShortPanel();
    void sliceShowsEveryLineSearchTrial();
    void curvatureDrawsEigenvaluesOnSymmetricLogScale();
    void symmetricLogRoundTripsAndLabelsRealValues();
    void progressDrawsGapAndGradientForEveryTrack();
    void progressLegendFitsANarrowDockAndKeepsFullNamesInTooltips();
    void sliceShowsTrueModelArmijoTrialsAndStep();
    void sliceAlongAnEigenvector();
    void everyViewExportsValidPngSvgAndPdf();
    void exportRejectsUnknownFormatAndBadSize();
    void landscapeRedrawAt600CellsIsReported();
};

void ViewsTest::landscapeDrawsTheFieldContoursAndEveryPath() {
    auto snapshot = valleySnapshot();
    LandscapeView view;
    view.setSnapshot(snapshot);
    auto field = sampled(*snapshot->objective, analyze::Box{-2, 2, -1, 3}, 160, true);
    view.setField(field);
    show(view);
    QCOMPARE(view.pathCount(), 3);
    for (int t = 0; t < 3; ++t) {
        QVERIFY(view.pathCurve(t) != nullptr);
        QCOMPARE(view.pathCurve(t)->data()->size(), static_cast<int>(snapshot->tracks[t].run->trace.size()));
        QVERIFY(snapshot->tracks[t].run->trace.size() > 2);
    }
    int polylines = 0;
    for (const auto& set : field->contours) polylines += static_cast<int>(set.lines.size());
    QVERIFY(polylines > 0);
    QCOMPARE(view.contourCurveCount(), polylines);
    QVERIFY(view.colourMap()->visible());
    QCOMPARE(view.colourMap()->data()->keySize(), 160);
    // Reset returns to the field's box.
    view.plot()->xAxis->setRange(0, 0.5);
    view.resetView();
    QCOMPARE(view.viewBox().xMin, -2.0);
    QCOMPARE(view.viewBox().yMax, 3.0);
    keepImage(view, "landscape");
}

void ViewsTest::landscapeColourRangeIgnoresNonFiniteCells() {
    const double inf = std::numeric_limits<double>::infinity();
    // Cell (0,0) is NaN and others are +-inf: exactly the cases where QCPColorMap's own
    // rescaleDataRange keeps a stale range (PITFALLS.md).
    std::vector<double> values = {std::nan(""), 2, 3, inf, 5, -inf, 7, 8, 9};
    LandscapeView view;
    auto snapshot = valleySnapshot();
    view.setSnapshot(snapshot);
    view.setField(handMadeField(values, 3, 3));
    view.setLogColour(false);
    show(view);
    QCOMPARE(view.colourRange().lower, 2.0);
    QCOMPARE(view.colourRange().upper, 9.0);
    // Non-finite cells are drawn in the "not finite" colour, never as inf in the map.
    QVERIFY(std::isnan(view.colourMap()->data()->cell(0, 0)));
    QVERIFY(std::isnan(view.colourMap()->data()->cell(0, 1)));
}

void ViewsTest::landscapeLogColourHandlesNonPositiveValues() {
    std::vector<double> values;
    for (int j = 0; j < 5; ++j)
        for (int i = 0; i < 5; ++i) values.push_back(-3.0 + i * j);  // from -3 to 13, zero inside
    LandscapeView view;
    view.setSnapshot(valleySnapshot());
    view.setField(handMadeField(values, 5, 5));
    view.setLogColour(true);
    show(view);
    const QCPRange range = view.colourRange();
    QVERIFY(std::isfinite(range.lower) && std::isfinite(range.upper));
    QVERIFY(range.upper > range.lower);
    // log10(f - f_min + offset): the top cell is log10(16 + tiny).
    QVERIFY(std::abs(range.upper - std::log10(16.0)) < 1e-4);
    for (int j = 0; j < 5; ++j)
        for (int i = 0; i < 5; ++i) QVERIFY(std::isfinite(view.colourMap()->data()->cell(i, j)));
}

void ViewsTest::landscapeConstantFieldStillGetsARange() {
    LandscapeView view;
    view.setSnapshot(valleySnapshot());
    view.setField(handMadeField(std::vector<double>(16, 4.0), 4, 4));
    view.setLogColour(false);
    show(view);
    QVERIFY(view.colourRange().upper > view.colourRange().lower);
    QVERIFY(view.colourRange().contains(4.0));
}

void ViewsTest::landscapeSelectionHighlightMoves() {
    auto snapshot = valleySnapshot();
    LandscapeView view;
    view.setSnapshot(snapshot);
    show(view);
    QVERIFY(std::isnan(view.highlightPosition().x()));
    const auto& trace = snapshot->tracks[1].run->trace;
    view.setSelection(Selection{1, 0});
    QCOMPARE(view.highlightPosition().x(), trace[0].x[0]);
    view.setSelection(Selection{1, 3});
    QCOMPARE(view.highlightPosition().x(), trace[3].x[0]);
    QCOMPARE(view.highlightPosition().y(), trace[3].x[1]);
    view.setSelection(Selection{});
    QVERIFY(std::isnan(view.highlightPosition().x()));
}

void ViewsTest::landscapeHoverReadoutGivesValueGradientAndEigenvalues() {
    LandscapeView view;
    view.setSnapshot(valleySnapshot());
    // At (1, 1): f = 0, gradient 0, Hessian [[802, -400], [-400, 200]] (by hand from the formula),
    // eigenvalues 501 -+ sqrt(301^2 + 400^2) = 501 -+ 500.6: 0.3994 and 1002.
    const QString text = view.readoutAt(1.0, 1.0);
    QVERIFY2(text.contains(QStringLiteral("f = 0")), qPrintable(text));
    QVERIFY2(text.contains(QStringLiteral("|∇f| = 0")), qPrintable(text));
    QVERIFY2(text.contains(QStringLiteral("0.3994")) && text.contains(QStringLiteral("1002")), qPrintable(text));
    show(view);
    view.plot()->xAxis->setRange(-2, 2);
    view.plot()->yAxis->setRange(-1, 3);
    view.plot()->replot();
    sendMouse(view.plot(), QEvent::MouseMove, pixelOf(view.plot(), 0.0, 0.0), Qt::NoButton);
    QVERIFY2(view.readoutText().contains(QStringLiteral("f = ")), qPrintable(view.readoutText()));
}

void ViewsTest::landscapeDraggingTheStartEmitsMovesAndAClickPlacesIt() {
    LandscapeView view;
    view.setSnapshot(valleySnapshot());
    view.setField(sampled(*view.snapshot()->objective, analyze::Box{-2, 2, -1, 3}, 60));
    view.setStart((Vector(2) << -1.2, 1.0).finished());
    show(view);
    QSignalSpy moved(&view, &LandscapeView::startMoved);
    QSignalSpy placed(&view, &LandscapeView::startPlaced);
    QSignalSpy box(&view, &LandscapeView::viewBoxChanged);
    QCustomPlot* plot = view.plot();
    const QCPRange before = plot->xAxis->range();
    sendMouse(plot, QEvent::MouseButtonPress, pixelOf(plot, -1.2, 1.0), Qt::LeftButton);
    sendMouse(plot, QEvent::MouseMove, pixelOf(plot, -1.0, 1.2), Qt::LeftButton);
    sendMouse(plot, QEvent::MouseMove, pixelOf(plot, -0.5, 1.5), Qt::LeftButton);
    sendMouse(plot, QEvent::MouseButtonRelease, pixelOf(plot, -0.5, 1.5), Qt::NoButton);
    QCOMPARE(moved.count(), 2);
    const Vector last = moved.last().at(0).value<Vector>();
    QVERIFY(std::abs(last[0] + 0.5) < 0.02 && std::abs(last[1] - 1.5) < 0.02);
    QCOMPARE(plot->xAxis->range().lower, before.lower);  // the drag moved the start, not the view
    QCOMPARE(placed.count(), 0);

    // A click away from every iterate places the start there.
    sendMouse(plot, QEvent::MouseButtonPress, pixelOf(plot, 1.5, -0.5), Qt::LeftButton);
    sendMouse(plot, QEvent::MouseButtonRelease, pixelOf(plot, 1.5, -0.5), Qt::NoButton);
    QCOMPARE(placed.count(), 1);
    const Vector at = placed.last().at(0).value<Vector>();
    QVERIFY(std::abs(at[0] - 1.5) < 0.02 && std::abs(at[1] + 0.5) < 0.02);

    // Zooming reports the new box once the wheel settles.
    QWheelEvent wheel(pixelOf(plot, 0, 1), plot->mapToGlobal(pixelOf(plot, 0, 1)), QPoint(), QPoint(0, 120),
                      Qt::NoButton, Qt::NoModifier, Qt::NoScrollPhase, false);
    QApplication::sendEvent(plot, &wheel);
    QVERIFY(box.wait(2000));
    QVERIFY(view.viewBox().xMax - view.viewBox().xMin < 4.0);
}

void ViewsTest::landscapeClickOnAnIterateRequestsItsSelection() {
    auto snapshot = valleySnapshot();
    LandscapeView view;
    view.setSnapshot(snapshot);
    view.setField(sampled(*snapshot->objective, analyze::Box{-2, 2, -1, 3}, 60));
    show(view);
    QSignalSpy requested(&view, &LandscapeView::selectionRequested);
    const auto& trace = snapshot->tracks[2].run->trace;
    const Vector x = trace[trace.size() / 2].x;
    sendMouse(view.plot(), QEvent::MouseButtonPress, pixelOf(view.plot(), x[0], x[1]), Qt::LeftButton);
    sendMouse(view.plot(), QEvent::MouseButtonRelease, pixelOf(view.plot(), x[0], x[1]), Qt::NoButton);
    QCOMPARE(requested.count(), 1);
    const auto selection = requested.last().at(0).value<Selection>();
    QVERIFY(selection.valid());
    const Vector& picked = snapshot->tracks[selection.track].run->trace[selection.iteration].x;
    QVERIFY((picked - x).norm() < 0.05);
}

void ViewsTest::landscapeMarksEndPointsByKind() {
    const auto valley = valleySnapshot();
    for (const auto& t : valley->tracks)
        qInfo("%s: %s, %s after %d iterations", qPrintable(t.label), solve::toString(t.run->termination),
              t.run->endPoint.description.c_str(), t.run->iterations());
    auto snapshot = saddleSnapshot();
    QCOMPARE(snapshot->tracks[0].run->endPoint.kind, solve::PointKind::Saddle);
    LandscapeView view;
    view.setSnapshot(snapshot);
    show(view);
    bool legendNamesSaddle = false;
    for (int i = 0; i < view.plot()->legend->itemCount(); ++i) {
        auto* item = qobject_cast<QCPPlottableLegendItem*>(view.plot()->legend->item(i));
        if (item && item->plottable()->name() == endPointLabel(solve::PointKind::Saddle)) legendNamesSaddle = true;
    }
    QVERIFY(legendNamesSaddle);
}

void ViewsTest::localModelShowsModelTrueContoursNewtonPointAxesAndTrustRegion() {
    auto snapshot = valleySnapshot();
    LocalModelView view;
    view.setSnapshot(snapshot);
    QVERIFY(view.verdict().contains(QStringLiteral("Select")));
    view.setSelection(Selection{2, 1});  // trust-region-dogleg, second iterate
    show(view);
    QVERIFY(view.trueContourCount() > 0);
    QVERIFY(view.modelContourCount() > 0);
    QVERIFY(view.showsNewtonPoint());
    QVERIFY(view.showsTrustRegion());
    QCOMPARE(view.eigenAxisCount(), 2);
    QVERIFY(!view.verdict().isEmpty());
    qInfo("local model: 80x80 true field sampled in %.2f ms", view.lastSampleMilliseconds());
    keepImage(view, "local-model");
    // BFGS has no trust region.
    view.setSelection(Selection{1, 2});
    QVERIFY(!view.showsTrustRegion());
}

void ViewsTest::localModelCallsASaddleASaddle() {
    auto snapshot = saddleSnapshot();
    LocalModelView view;
    view.setSnapshot(snapshot);
    view.setSelection(Selection{0, 0});
    show(view);
    QVERIFY2(view.verdict().contains(QStringLiteral("saddle"), Qt::CaseInsensitive), qPrintable(view.verdict()));
    QVERIFY(view.showsNewtonPoint());
    keepImage(view, "local-model-saddle");
}

void ViewsTest::localModelLegendSitsOutsideThePlot() {
    // At the size of a right-hand panel on a 1280 x 800 screen the legend took a third of the
    // plot and hid the accepted step; it now has a row of its own under the plot.
    auto snapshot = valleySnapshot();
    LocalModelView view;
    view.setSnapshot(snapshot);
    view.setSelection(Selection{2, 1});
    view.resize(420, 330);
    view.show();
    QCustomPlot* plot = view.plot();
    plot->replot();
    plot->replot();
    const QRect legend = plot->legend->outerRect();
    QVERIFY(legend.isValid());
    QVERIFY2(!legend.intersects(plot->axisRect()->rect()), "the legend covers the plot");
    QVERIFY(plot->viewport().contains(legend));
}

void ViewsTest::localModelAtAConvergedIterateShowsDistinctTicksAndContoursAboveRoundOff() {
    // At BFGS's last iterate the step and the Newton point are ~1e-9 away: a window that small
    // printed "1" (or "0.99203") at every tick and drew rounding noise as contours.
    auto snapshot = valleySnapshot();
    const solve::Run& run = *snapshot->tracks[1].run;
    QVERIFY(solve::isConvergence(run.termination));
    const int last = static_cast<int>(run.trace.size()) - 1;
    LocalModelView view;
    view.setSnapshot(snapshot);
    view.setSelection(Selection{1, last});
    show(view);
    view.plot()->replot();
    view.plot()->replot();
    for (QCPAxis* axis : {view.plot()->xAxis, view.plot()->yAxis}) {
        const QVector<QString> labels = axis->tickVectorLabels();
        QVERIFY(labels.size() >= 2);
        const QSet<QString> distinct(labels.begin(), labels.end());
        QVERIFY2(distinct.size() == labels.size(), qPrintable(QStringList(labels.begin(), labels.end()).join(" | ")));
    }
    // Across the window f changes far more than its rounding error (about 1e-16 here).
    const Vector& x = run.trace.back().x;
    const Objective& f = *snapshot->objective;
    const double halfX = view.plot()->xAxis->range().size() / 2, halfY = view.plot()->yAxis->range().size() / 2;
    const double centre = f.value(x);
    double spread = 0;
    for (double dx : {-1.0, 1.0})
        for (double dy : {-1.0, 1.0})
            spread = std::max(spread, std::abs(f.value(x + (Vector(2) << dx * halfX, dy * halfY).finished()) - centre));
    QVERIFY2(spread > 1e-8 * (1 + std::abs(centre)), qPrintable(QStringLiteral("f spreads %1 over a half-width of %2")
                                                                     .arg(spread)
                                                                     .arg(halfX)));
    QVERIFY(view.trueContourCount() >= 4);
    QVERIFY(view.modelContourCount() >= 4);
    keepImage(view, "local-model-converged");
}

void ViewsTest::curvatureAxisTitlesFitAlongAShortPanel() {
    // A tabbed right-hand panel at 1280 x 800 is about 430 x 300: the axis titles must fit
    // along their own panel (a longer rotated title is cut off and runs into the other one).
    auto snapshot = valleySnapshot();
    CurvatureView view;
    view.setSnapshot(snapshot);
    view.resize(430, 300);
    view.show();
    view.plot()->replot();
    view.plot()->replot();
    for (QCPAxisRect* rect : {view.eigenvalueRect(), view.conditionRect()}) {
        QCPAxis* axis = rect->axis(QCPAxis::atLeft);
        const QFontMetrics metrics(axis->labelFont());
        int longest = 0;
        for (const QString& line : axis->label().split('\n')) longest = std::max(longest, metrics.horizontalAdvance(line));
        QVERIFY2(longest <= rect->rect().height(),
                 qPrintable(QStringLiteral("'%1' is %2 px along a %3 px panel")
                                .arg(axis->label())
                                .arg(longest)
                                .arg(rect->rect().height())));
    }
}

void ViewsTest::sliceShowsEveryLineSearchTrial() {
    // Gradient descent's first step from (-1.2, 1) backtracks from a long first trial to a
    // short accepted step: every trial must be on the plot, not only the accepted one.
    auto snapshot = valleySnapshot();
    const auto& record = snapshot->tracks[0].run->trace[0];
    QVERIFY(record.trials.size() >= 3);
    SliceView view;
    view.setSnapshot(snapshot);
    view.setSelection(Selection{0, 0});
    show(view);
    view.plot()->replot();
    const QCPRange shown = view.plot()->xAxis->range();
    for (const auto& trial : record.trials)
        QVERIFY2(shown.contains(trial.alpha), qPrintable(QStringLiteral("trial at %1 is outside %2 .. %3")
                                                             .arg(trial.alpha)
                                                             .arg(shown.lower)
                                                             .arg(shown.upper)));
    QVERIFY(shown.contains(record.stepLength));
    // Their values are on the plot too, or (a trial far uphill that would flatten the rest)
    // marked at the top edge above its step length.
    const QCPRange vertical = view.plot()->yAxis->range();
    QCPGraph* pinned = nullptr;
    for (int i = 0; i < view.plot()->graphCount(); ++i)
        if (view.plot()->graph(i)->name().contains("far above")) pinned = view.plot()->graph(i);
    for (const auto& trial : record.trials) {
        if (!std::isfinite(trial.value) || vertical.contains(trial.value)) continue;
        QVERIFY2(trial.value > vertical.upper && pinned, qPrintable(QStringLiteral("trial f = %1").arg(trial.value)));
        bool marked = false;
        for (const auto& point : *pinned->data()) marked = marked || (point.key == trial.alpha && vertical.contains(point.value));
        QVERIFY(marked);
    }
    // The accepted step is not squeezed into the bottom of the plot by those far trials.
    QVERIFY(vertical.size() < 10 * std::max(1.0, std::abs(record.value)));
    keepImage(view, "slice-trials");
}

void ViewsTest::curvatureDrawsEigenvaluesOnSymmetricLogScale() {
    auto snapshot = valleySnapshot();
    CurvatureView view;
    view.setSnapshot(snapshot);
    show(view);
    for (int t = 0; t < 3; ++t) {
        const auto graphs = view.eigenvalueGraphs(t);
        QCOMPARE(static_cast<int>(graphs.size()), 2);
        QCOMPARE(graphs[0]->data()->size(), static_cast<int>(snapshot->tracks[t].run->trace.size()));
        QVERIFY(view.conditionGraph(t) != nullptr);
    }
    // Plotted values are the transform of the record's eigenvalues.
    const auto& first = snapshot->tracks[1].run->trace[0];
    Vector g;
    Matrix h;
    snapshot->objective->valueGradientHessian(first.x, g, h);
    const Eigen::SelfAdjointEigenSolver<Matrix> eig(h);
    const double plotted = view.eigenvalueGraphs(1)[0]->data()->at(0)->value;
    QVERIFY(std::abs(symmetricLogInverse(plotted, view.linearZone()) - eig.eigenvalues()[0]) <
            1e-6 * std::max(1.0, std::abs(eig.eigenvalues()[0])));
    view.setSelection(Selection{1, 2});
    QCOMPARE(view.highlightPosition().x(), 2.0);
    keepImage(view, "curvature");

    CurvatureView saddle;
    saddle.setSnapshot(saddleSnapshot());
    show(saddle);
    QVERIFY(saddle.negativeCurvatureCount() > 0);
    keepImage(saddle, "curvature-saddle");
}

void ViewsTest::symmetricLogRoundTripsAndLabelsRealValues() {
    for (double c : {1e-3, 1.0, 50.0})
        for (double v : {-1e6, -3.5, -1e-4, 0.0, 2e-5, 0.7, 1234.0})
            QVERIFY(std::abs(symmetricLogInverse(symmetricLog(v, c), c) - v) <= 1e-9 * std::max(1.0, std::abs(v)));
    QCOMPARE(symmetricLog(-5.0, 1.0), -symmetricLog(5.0, 1.0));
    // The ticker's labels are real eigenvalues (powers of ten and zero), not transformed values.
    CurvatureView view;
    view.setSnapshot(saddleSnapshot());
    show(view);
    QCPAxis* axis = view.eigenvalueRect()->axis(QCPAxis::atLeft);
    const QVector<QString> labels = axis->tickVectorLabels();
    QVERIFY(!labels.isEmpty());
    QVERIFY(labels.contains(QStringLiteral("0")));
    bool negative = false;
    for (const QString& label : labels) negative = negative || label.startsWith('-');
    QVERIFY(negative);
}

void ViewsTest::progressDrawsGapAndGradientForEveryTrack() {
    auto snapshot = valleySnapshot();
    ProgressView view;
    view.setSnapshot(snapshot);
    show(view);
    double best = std::numeric_limits<double>::infinity();
    for (const auto& t : snapshot->tracks)
        for (const auto& r : t.run->trace) best = std::min(best, r.value);
    QCOMPARE(view.bestValue(), best);
    for (int t = 0; t < 3; ++t) {
        const int records = static_cast<int>(snapshot->tracks[t].run->trace.size());
        QCOMPARE(view.gapGraph(t)->data()->size(), records);
        QCOMPARE(view.gradientGraph(t)->data()->size(), records);
        for (const auto& point : *view.gapGraph(t)->data()) QVERIFY(point.value > 0);  // log axis safe
    }
    view.setAgainstEvaluations(true);
    const auto& last = snapshot->tracks[1].run->trace.back();
    QCOMPARE((view.gapGraph(1)->data()->constEnd() - 1)->key, static_cast<double>(last.evaluations.total()));
    view.setSelection(Selection{1, 3});
    QCOMPARE(view.highlightPosition().x(), static_cast<double>(snapshot->tracks[1].run->trace[3].evaluations.total()));
    view.setAgainstEvaluations(false);
    keepImage(view, "progress");
}

void ViewsTest::progressLegendFitsANarrowDockAndKeepsFullNamesInTooltips() {
    auto snapshot = valleySnapshot();
    const QStringList labels = {"steepest descent with a strong Wolfe line search", "BFGS from H0 = I",
                                "dogleg trust region, initial radius 0.1"};
    for (int t = 0; t < 3; ++t) snapshot->tracks[static_cast<std::size_t>(t)].label = labels[t];
    ProgressView view;
    view.setSnapshot(snapshot);
    QCPLegend* legend = view.plot()->legend;
    auto everyEntryInside = [&](int width) {
        for (int i = 0; i < legend->itemCount(); ++i) {
            const QRect r = legend->item(i)->outerRect();
            if (r.left() < 0 || r.right() > width) return false;
        }
        return true;
    };
    // Wide: the names fit side by side, none shortened.
    view.resize(1100, 420);
    view.show();
    view.plot()->replot();
    view.plot()->replot();  // the second layout sees the first one's column width
    QVERIFY(legend->wrap() > 1);
    QVERIFY(everyEntryInside(view.plot()->width()));
    for (int i = 0; i < legend->itemCount(); ++i)
        if (auto* item = dynamic_cast<ElidedLegendItem*>(legend->item(i))) QVERIFY(!item->isElided());
    // Narrow, as in a slim dock: one column, names shortened to fit, full names kept.
    for (int width : {360, 220}) {
        view.resize(width, 420);
        view.plot()->replot();
        view.plot()->replot();
        QCOMPARE(legend->wrap(), 1);
        QVERIFY2(everyEntryInside(view.plot()->width()), qPrintable(QString::number(width)));
        QStringList shown;
        for (int i = 0; i < legend->itemCount(); ++i)
            if (auto* item = dynamic_cast<ElidedLegendItem*>(legend->item(i))) shown << item->fullName();
        for (const QString& label : labels) QVERIFY(shown.contains(label));
    }
    keepImage(view, "progress-narrow");
    bool anyElided = false;
    for (int i = 0; i < legend->itemCount(); ++i)
        if (auto* item = dynamic_cast<ElidedLegendItem*>(legend->item(i))) anyElided = anyElided || item->isElided();
    qInfo("narrow plot: %d px wide", view.plot()->width());
    QVERIFY(anyElided);
    // Resting the pointer on a shortened entry shows its full name.
    for (int i = 0; i < legend->itemCount(); ++i) {
        auto* item = dynamic_cast<ElidedLegendItem*>(legend->item(i));
        if (!item || !item->isElided()) continue;
        const QPoint at = item->rect().center();
        QHelpEvent help(QEvent::ToolTip, at, view.plot()->mapToGlobal(at));
        QApplication::sendEvent(view.plot(), &help);
        QTRY_COMPARE_WITH_TIMEOUT(QToolTip::text(), item->fullName(), 2000);
        QToolTip::hideText();
        break;
    }
}

void ViewsTest::sliceShowsTrueModelArmijoTrialsAndStep() {
    auto snapshot = valleySnapshot();
    SliceView view;
    view.setSnapshot(snapshot);
    // Gradient descent's first step from (-1.2, 1) backtracks: several trials.
    view.setSelection(Selection{0, 0});
    show(view);
    const auto& record = snapshot->tracks[0].run->trace[0];
    QVERIFY(!record.trials.empty());
    QCOMPARE(view.trialGraph()->data()->size(), static_cast<int>(record.trials.size()));
    QCOMPARE(view.acceptedGraph()->data()->size(), 1);
    // The accepted point is f(x_1); the true curve, model and Armijo line all start at f(x_0).
    const double f1 = snapshot->tracks[0].run->trace[1].value;
    QVERIFY(std::abs(view.acceptedGraph()->data()->at(0)->value - f1) <= 1e-9 * std::max(1.0, std::abs(f1)));
    QCOMPARE(view.acceptedGraph()->data()->at(0)->key, record.stepLength);
    auto valueAtZero = [](QCPGraph* graph) {
        double best = 1e300, value = std::nan("");
        for (const auto& p : *graph->data())
            if (std::abs(p.key) < best) best = std::abs(p.key), value = p.value;
        return std::pair{best, value};
    };
    for (QCPGraph* graph : {view.trueGraph(), view.modelGraph(), view.armijoGraph()}) {
        const auto [distance, value] = valueAtZero(graph);
        if (distance < 1e-12) QVERIFY(std::abs(value - record.value) < 1e-9 * std::max(1.0, std::abs(record.value)));
    }
    QVERIFY(view.trueGraph()->data()->size() >= 241);
    QVERIFY(view.caption().contains(QStringLiteral("trial")));
    keepImage(view, "slice");
}

void ViewsTest::sliceAlongAnEigenvector() {
    auto snapshot = saddleSnapshot();
    SliceView view;
    view.setSnapshot(snapshot);
    view.setSelection(Selection{0, 0});
    view.setDirection(0);  // smallest eigenvalue: the downhill direction of the saddle
    show(view);
    QVERIFY(view.caption().contains(QStringLiteral("eigenvector 1")));
    // f along a negative-curvature eigenvector is a downward parabola: the middle is above the ends
    // once past the linear term, and the model matches f exactly (f is quadratic).
    const auto truth = view.trueGraph()->data();
    const auto model = view.modelGraph()->data();
    for (int i = 0; i < truth->size(); i += 40)
        QVERIFY(std::abs(truth->at(i)->value - model->at(i)->value) < 1e-9 * std::max(1.0, std::abs(truth->at(i)->value)));
    keepImage(view, "slice-eigenvector");
}

void ViewsTest::everyViewExportsValidPngSvgAndPdf() {
    auto snapshot = valleySnapshot();
    LandscapeView landscape;
    landscape.setSnapshot(snapshot);
    landscape.setField(sampled(*snapshot->objective, analyze::Box{-2, 2, -1, 3}, 80));
    LocalModelView local;
    local.setSnapshot(snapshot);
    local.setSelection(Selection{2, 1});
    CurvatureView curvature;
    curvature.setSnapshot(snapshot);
    ProgressView progress;
    progress.setSnapshot(snapshot);
    SliceView slice;
    slice.setSnapshot(snapshot);
    slice.setSelection(Selection{0, 0});
    QTemporaryDir dir;
    QVERIFY(dir.isValid());
    const std::vector<std::pair<PlotView*, QString>> views = {
        {&landscape, "landscape"}, {&local, "local"}, {&curvature, "curvature"}, {&progress, "progress"}, {&slice, "slice"}};
    for (const auto& [view, name] : views) {
        show(*view);
        for (const QString& suffix : {QStringLiteral("png"), QStringLiteral("svg"), QStringLiteral("pdf")}) {
            const QString path = dir.filePath(name + "." + suffix);
            QString error;
            QVERIFY2(exportPlot(view->plot(), path, 800, 600, &error), qPrintable(error));
            QFile file(path);
            QVERIFY(file.open(QIODevice::ReadOnly));
            const QByteArray bytes = file.readAll();
            QVERIFY2(bytes.size() > 1000, qPrintable(path));
            if (suffix == "png") QVERIFY(bytes.startsWith("\x89PNG\r\n\x1a\n"));
            if (suffix == "pdf") QVERIFY(bytes.startsWith("%PDF-"));
            if (suffix == "svg") {
                QVERIFY(bytes.contains("<svg"));
                QSvgRenderer renderer(path);
                QVERIFY2(renderer.isValid(), qPrintable(path));
            }
        }
        QImage image(dir.filePath(name + ".png"));
        QCOMPARE(image.size(), QSize(800, 600));
    }
}

void ViewsTest::exportRejectsUnknownFormatAndBadSize() {
    ProgressView view;
    QTemporaryDir dir;
    QString error;
    QVERIFY(!exportPlot(view.plot(), dir.filePath("plot.bmp"), 100, 100, &error));
    QVERIFY2(error.contains(QStringLiteral(".png, .svg or .pdf")), qPrintable(error));
    QVERIFY(!exportPlot(view.plot(), dir.filePath("plot.png"), 0, 100, &error));
    QVERIFY2(error.contains(QStringLiteral("1..20000")), qPrintable(error));
    QVERIFY(!exportPlot(view.plot(), dir.filePath("missing-folder/plot.png"), 100, 100, &error));
    QVERIFY(error.contains(QStringLiteral("cannot write")));
}

// Not a timed test (speed lives in benchmarks): it draws a 600 x 600 field with its contour
// lines and reports how long sampling, contouring and the redraw took, for docs/BENCHMARKS.md.
void ViewsTest::landscapeRedrawAt600CellsIsReported() {
    auto snapshot = valleySnapshot();
    LandscapeView view;
    view.setSnapshot(snapshot);
    show(view);
    QElapsedTimer timer;
    timer.start();
    auto field = sampled(*snapshot->objective, analyze::Box{-2, 2, -1, 3}, 600, true);
    const double sampleMs = timer.nsecsElapsed() * 1e-6;
    timer.restart();
    view.setField(field);
    view.plot()->replot();
    const double drawMs = timer.nsecsElapsed() * 1e-6;
    QVERIFY(view.contourCurveCount() > 0);
    QCOMPARE(view.colourMap()->data()->keySize(), 600);
    qInfo("landscape 600x600: sample + contours %.1f ms, set field + replot %.1f ms (%d contour polylines)", sampleMs,
          drawMs, view.contourCurveCount());
}

QTEST_MAIN(ViewsTest)
#include "views_test.moc"
