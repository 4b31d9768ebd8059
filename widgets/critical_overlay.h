#pragma once
// The critical-point map drawn over a landscape plot: one marker per kind, white inside a dark
// outline so it reads on the dark and the light end of the field and in either palette, and
// distinct from the runs' end-point markers (which are filled in the track's colour):
//   minimum: ring with a dark centre dot   saddle: square with a cross
//   maximum: upward triangle               degenerate: diamond (a continuum: every member, small)
// A double click on a marker asks for a run from near that point (pointActivated). The overlay
// owns only its own plottables; the landscape's redraws leave them alone.

#include "core/survey/survey.h"

#include <QObject>
#include <QPointer>
#include <memory>
#include <qcustomplot.h>

namespace sw::widgets {

// The marker of a critical point of this kind: white inside a dark outline (fill replaces the
// white when given, e.g. a basin's colour in a legend).
QCPScatterStyle criticalPointStyle(solve::PointKind kind, double size = 12, const QColor& fill = Qt::white);

class CriticalOverlay : public QObject {
    Q_OBJECT
public:
    explicit CriticalOverlay(QCustomPlot* plot, QObject* parent = nullptr);

    // The map and which variables the plot shows (nullptr clears).
    void setMap(std::shared_ptr<const survey::CriticalMap> map, int plotX, int plotY);
    std::shared_ptr<const survey::CriticalMap> map() const { return map_; }
    void setHighlighted(int point);  // a ring around one point (-1: none)
    int highlighted() const { return highlighted_; }
    void setVisible(bool on);
    bool visible() const { return visible_; }
    // The map's point whose marker is within a few pixels of `pixel`, or -1.
    int pointAt(const QPointF& pixel) const;
    // Number of markers drawn per kind (for tests).
    int markerCount(solve::PointKind kind) const;

signals:
    void pointActivated(int point);  // a double click on its marker
    void pointClicked(int point);    // a single click on its marker

protected:
    bool eventFilter(QObject* watched, QEvent* event) override;

private:
    void rebuild();
    QCPCurve* makeCurve(const QString& name, bool inLegend);

    QPointer<QCustomPlot> plot_;
    std::shared_ptr<const survey::CriticalMap> map_;
    int plotX_ = 0, plotY_ = 1;
    int highlighted_ = -1;
    bool visible_ = true;
    QCPCurve* minima_ = nullptr;
    QCPCurve* minimumDots_ = nullptr;
    QCPCurve* saddles_ = nullptr;
    QCPCurve* maxima_ = nullptr;
    QCPCurve* degenerate_ = nullptr;
    QCPCurve* continua_ = nullptr;
    QCPCurve* highlight_ = nullptr;
    QPointF pressPixel_;
};

}  // namespace sw::widgets
