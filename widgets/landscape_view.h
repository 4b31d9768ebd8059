#pragma once
// The landscape: f over the two plotted variables as a filled field with its contour lines,
// every track's path with iterate markers, end points marked by kind, the start point
// (drag to move it, click elsewhere to place it), zoom and pan, and a hover readout of
// x, f, |grad f| and the Hessian eigenvalues under the cursor.

#include "widgets/plot_style.h"

#include <QTimer>

class QCheckBox;
class QLabel;
class QToolButton;

namespace sw::widgets {

class LandscapeView : public PlotView {
    Q_OBJECT
public:
    explicit LandscapeView(QWidget* parent = nullptr);

    void setField(std::shared_ptr<const FieldSnapshot> field);
    // The start point (full n-vector); drawn at its two plotted coordinates.
    void setStart(const Vector& start);
    // The box "Reset view" returns to; without one the first field's box is used.
    void setHomeBox(const analyze::Box& box);
    analyze::Box viewBox() const;
    void resetView();
    // Forgets everything shown (field, runs, start, home box, readout): a new study starts clean.
    void clear();
    // Colour by log10(f - fmin + offset) instead of f (also a check box under the plot).
    void setLogColour(bool on);
    bool logColour() const;

    // For tests and the shell: the readout text, and what the hover would show at a point.
    QString readoutText() const;
    QString readoutAt(double x, double y) const;
    // Colour range actually used (in colour units: f, or log10 of the shifted f).
    QCPRange colourRange() const;
    // Counts of what is drawn, for tests.
    int contourCurveCount() const { return static_cast<int>(contourCurves_.size()); }
    int pathCount() const { return static_cast<int>(pathCurves_.size()); }
    QCPCurve* pathCurve(int track) const;
    QCPColorMap* colourMap() const { return colourMap_; }
    // Position of the selection highlight (NaN when hidden).
    QPointF highlightPosition() const;
    // True while the start marker is being dragged (its moves are not separate edits).
    bool draggingStart() const { return dragging_; }

signals:
    void startMoved(sw::Vector start);      // continuously while the start marker is dragged
    void startDragFinished();               // the drag's button released: one edit ends here
    void startPlaced(sw::Vector start);     // a click on the plot away from any iterate
    void viewBoxChanged(sw::analyze::Box box);  // after zoom, pan or reset (debounced)
    void logColourChanged(bool on);

protected:
    void rebuild() override;
    void selectionChanged() override;
    bool eventFilter(QObject* watched, QEvent* event) override;

private:
    void rebuildField();
    QString readoutHint() const;
    void rebuildPaths();
    void updateStartMarker();
    void updateHighlight();
    Vector pointAt(double x, double y) const;
    bool nearStart(const QPointF& pixel) const;
    Selection iterateNear(const QPointF& pixel) const;
    void onMousePress(QMouseEvent* event);
    void onMouseMove(QMouseEvent* event);
    void onMouseRelease(QMouseEvent* event);

    std::shared_ptr<const FieldSnapshot> field_;
    const FieldSnapshot* builtField_ = nullptr;  // what the colour map and contours show now
    bool builtLogColour_ = false;
    bool builtDark_ = false;       // the colour scale's variant for a dark window
    Vector start_;
    bool hasStart_ = false;
    bool hasHome_ = false;
    analyze::Box home_;
    bool logColour_ = false;
    bool logColourSetByUser_ = false;

    QCPColorMap* colourMap_ = nullptr;
    QCPColorScale* colourScale_ = nullptr;
    // The colour scale's title, longest first; the longest that fits the bar's height is shown
    // (chosen after each layout, so it follows the view's size).
    QStringList scaleLabels_;
    void fitScaleLabel();
    QCPMarginGroup* marginGroup_ = nullptr;
    std::vector<QCPCurve*> contourCurves_;
    std::vector<QCPCurve*> pathCurves_;
    std::vector<QCPCurve*> endCurves_;
    QCPCurve* startCurve_ = nullptr;
    QCPCurve* highlightCurve_ = nullptr;

    QLabel* readout_ = nullptr;
    QCheckBox* logBox_ = nullptr;
    QToolButton* resetButton_ = nullptr;
    QTimer boxTimer_;

    bool dragging_ = false;
    bool pressed_ = false;
    QPointF pressPixel_;
    bool settingRange_ = false;
};

}  // namespace sw::widgets
