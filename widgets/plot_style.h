#pragma once
// Shared look of the plot views and the base every view derives from: fonts and axis
// colours taken from the widget's QPalette (so light and dark themes both read well),
// marker shapes for widgets::Marker, the field's colour gradient, tick labelling for
// transformed axes (log colour, symmetric log), and export of a plot to PNG, SVG or PDF.
// Pens in the views go through scaleForScreen: cosmetic (the raster engine's fast path; a
// stroked pen cost several ms per redraw on contours and markers) with the width multiplied by
// the device pixel ratio, so lines keep their weight next to text and markers at ratio 2 (a
// plain cosmetic 1.8 px pen drew hair-thin there).

#include "widgets/snapshot.h"

#include <QWidget>
#include <functional>
#include <memory>
#include <qcustomplot.h>

class QVBoxLayout;

namespace sw::widgets {

// Makes `pen` cosmetic with its width multiplied by the screen's device pixel ratio.
void scaleForScreen(QPen& pen);

// QCustomPlot shape for one of our lineup markers.
QCPScatterStyle::ScatterShape scatterShape(Marker marker);
// Iterate marker: outline in the track colour, filled lighter so overlapping paths stay legible.
QCPScatterStyle iterateStyle(Marker marker, const QColor& colour, double size = 6.0);

// How an end point is marked, by its classification (shapes of our own choosing):
// minimum = filled disc with a ring, saddle = square with a cross, maximum = upward
// triangle, degenerate = hollow diamond, unknown (also: stopped before converging) = hollow circle.
QCPScatterStyle endPointStyle(solve::PointKind kind, const QColor& colour, double size = 13.0);
QString endPointLabel(solve::PointKind kind);
// What a step did, in words, when its kind says more than the method's name: "boundary",
// "steepest-descent fallback", a simplex move ("reflect"), "damped" or "undamped" for
// Levenberg-Marquardt. "" when the kind only restates the method (a BFGS step of bfgs).
QString stepDescription(const std::string& methodId, const solve::IterationRecord& record);
// Turns a graph into the ring that marks the selected iterate: markers only, in the palette's
// highlight colour, out of the legend and not selectable.
void styleAsSelectionRing(QCPGraph* graph, const QColor& highlight, double size = 16.0);

// Axis, grid and background colours from the palette of `plot`; call again when the palette changes.
void applyPlotStyle(QCustomPlot* plot);
void styleAxisRect(QCPAxisRect* rect, const QPalette& palette);
// True when the palette's window colour is dark.
bool isDarkPalette(const QPalette& palette);

// The landscape's colour scale (our own; see plot_style.cpp): sequential, CIE lightness rising
// evenly from a deep evergreen (low f) through teal, blue and lilac to a pale blush (high f).
// `dark`: the variant for a dark window, whose light end is dimmer.
QCPColorGradient fieldGradient(bool dark = false);
// CIE lightness L* / 100 (0 dark .. 1 light) of the scale at position t in [0,1]; used to pick
// contour-line colours that stay visible on the fill.
double fieldGradientLightness(double t, bool dark = false);

// Compact number for labels and readouts: 4 significant digits, exponent when needed.
QString formatNumber(double value, int significantDigits = 4);

// Ticks for an axis that shows transform(v) but should be labelled with v. `candidates`
// returns "nice" real values covering [lo, hi] (real units); the ticker keeps those that
// fall in the visible range, thinning them to about tickCount().
class TransformTicker : public QCPAxisTicker {
public:
    using Map = std::function<double(double)>;
    using Candidates = std::function<std::vector<double>(double lo, double hi)>;
    TransformTicker(Map forward, Map inverse, Candidates candidates);

protected:
    QVector<double> createTickVector(double tickStep, const QCPRange& range) override;
    QString getTickLabel(double tick, const QLocale& locale, QChar formatChar, int precision) override;
    int getSubTickCount(double tickStep) override;

private:
    Map forward_, inverse_;
    Candidates candidates_;
};

// Symmetric log transform sign(v) * log10(1 + |v|/c): keeps the sign of eigenvalues while
// compressing decades. `c` sets where the linear zone around zero ends.
double symmetricLog(double value, double c);
double symmetricLogInverse(double transformed, double c);
QSharedPointer<TransformTicker> symmetricLogTicker(double c);

// Writes the plot to `path` at w x h pixels; the format follows the suffix: .png, .svg
// (QSvgGenerator + toPainter, since QCustomPlot has no SVG export), or .pdf. Returns false
// with a sentence in *error when the suffix is unknown, the size is out of range
// (1..20000) or the file cannot be written.
bool exportPlot(QCustomPlot* plot, const QString& path, int w, int h, QString* error);

// A legend entry that elides its text to a width limit (0: no limit); PlotView shows the
// full name as a tooltip when the pointer rests on it.
class ElidedLegendItem : public QCPPlottableLegendItem {
public:
    ElidedLegendItem(QCPLegend* legend, QCPAbstractPlottable* plottable);
    void setTextWidthLimit(int pixels) { limit_ = pixels; }
    int textWidthLimit() const { return limit_; }
    QString fullName() const;
    bool isElided() const;

protected:
    void draw(QCPPainter* painter) override;
    QSize minimumOuterSizeHint() const override;

private:
    QString shownName() const;
    int limit_ = 0;
};

// Lays the legend of `plot` out in as many columns (up to maxColumns) as fit in
// `availableWidth` pixels, filled row by row; when even one column is too narrow, names are
// elided. Plain plottable entries are replaced by ElidedLegendItem on the way.
void fitLegendToWidth(QCustomPlot* plot, int availableWidth, int maxColumns = 3);

// Common base of the plot views: holds the snapshot and the selection, owns the plot,
// and re-applies the palette when the theme changes. Replots are queued.
class PlotView : public QWidget {
    Q_OBJECT
public:
    explicit PlotView(QWidget* parent = nullptr);

    QCustomPlot* plot() const { return plot_; }
    void setSnapshot(std::shared_ptr<const Snapshot> snapshot);
    void setSelection(Selection selection);
    const std::shared_ptr<const Snapshot>& snapshot() const { return snapshot_; }
    Selection selection() const { return selection_; }
    // The selected record, or nullptr when the selection does not name one.
    const solve::IterationRecord* selectedRecord() const;

signals:
    // The user picked an iterate on this plot (click near its marker).
    void selectionRequested(sw::widgets::Selection selection);

protected:
    // Redraw everything from the snapshot (called on a new snapshot and on theme change).
    virtual void rebuild() = 0;
    // Move only the selection-dependent items; the default rebuilds.
    virtual void selectionChanged() { rebuild(); }
    void changeEvent(QEvent* event) override;
    bool eventFilter(QObject* watched, QEvent* event) override;
    void queueReplot();
    // For views whose legend sits in its own row under the plot: before each replot the
    // legend takes as many columns as the width allows, and elides names when one is too many.
    // besideLegend: pixels of the plot's width not under the legend (e.g. a colour scale).
    void enableLegendReflow(int maxColumns = 3, std::function<int()> besideLegend = {});
    // Before each replot, every left axis asks for about one tick per `pixelsPerTick` of its
    // rect's height (2..6), so a short panel does not pile its tick labels on each other.
    void enableTickThinning(int pixelsPerTick = 34);

    // Click-to-select: views list their clickable iterates here (plot coordinates on the
    // given axes); a click within a few pixels of one emits selectionRequested.
    struct PickPoint {
        QCPAxis* xAxis = nullptr;
        QCPAxis* yAxis = nullptr;
        double x = 0, y = 0;
        Selection selection;
    };
    std::vector<PickPoint> pickPoints_;
    Selection pickAt(const QPointF& pixel) const;

    QVBoxLayout* layout_ = nullptr;
    QCustomPlot* plot_ = nullptr;
    std::shared_ptr<const Snapshot> snapshot_;
    Selection selection_;

private:
    QPointF clickPressPixel_;
};

}  // namespace sw::widgets
