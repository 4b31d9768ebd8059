#include "widgets/critical_overlay.h"

#include "widgets/plot_style.h"

#include <QMouseEvent>

namespace sw::widgets {

namespace {
constexpr double kPickPixels = 9.0;
// Larger than a run's end marker (13 px), which is drawn above: a run that ends on a critical
// point shows as its coloured end inside the point's white marker, and neither hides the other.
constexpr double kMarkerSize = 17.0;
const QColor kOutline(20, 20, 24);
}  // namespace

QCPScatterStyle criticalPointStyle(solve::PointKind kind, double size, const QColor& fill) {
    QPen outline(kOutline, 1.8);
    scaleForScreen(outline);
    switch (kind) {
        case solve::PointKind::Minimum:
            return QCPScatterStyle(QCPScatterStyle::ssCircle, outline, QBrush(fill), size);
        case solve::PointKind::Saddle:
            return QCPScatterStyle(QCPScatterStyle::ssCrossSquare, outline, QBrush(fill), size - 1);
        case solve::PointKind::Maximum:
            return QCPScatterStyle(QCPScatterStyle::ssTriangle, outline, QBrush(fill), size);
        default:
            return QCPScatterStyle(QCPScatterStyle::ssDiamond, outline, QBrush(fill), size);
    }
}

CriticalOverlay::CriticalOverlay(QCustomPlot* plot, QObject* parent) : QObject(parent), plot_(plot) {
    if (!plot_->layer(QStringLiteral("survey")))
        plot_->addLayer(QStringLiteral("survey"), plot_->layer(QStringLiteral("main")), QCustomPlot::limAbove);
    minima_ = makeCurve(tr("critical: local minimum"), true);
    minimumDots_ = makeCurve(QString(), false);
    saddles_ = makeCurve(tr("critical: saddle"), true);
    maxima_ = makeCurve(tr("critical: local maximum"), true);
    degenerate_ = makeCurve(tr("critical: degenerate"), true);
    continua_ = makeCurve(tr("critical: set of degenerate points"), true);
    highlight_ = makeCurve(QString(), false);
    QPen outline(kOutline, 1.8);
    scaleForScreen(outline);
    minima_->setScatterStyle(criticalPointStyle(solve::PointKind::Minimum, kMarkerSize));
    minimumDots_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssDisc, outline, QBrush(kOutline), 4));
    saddles_->setScatterStyle(criticalPointStyle(solve::PointKind::Saddle, kMarkerSize));
    maxima_->setScatterStyle(criticalPointStyle(solve::PointKind::Maximum, kMarkerSize));
    degenerate_->setScatterStyle(criticalPointStyle(solve::PointKind::Degenerate, kMarkerSize));
    QPen thin(kOutline, 1.0);
    scaleForScreen(thin);
    continua_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssDiamond, thin, QBrush(Qt::white), 6));
    QPen ring(QColor(255, 196, 0), 2.6);
    scaleForScreen(ring);
    highlight_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, ring, Qt::NoBrush, 26));
    plot_->installEventFilter(this);  // installed after the view's own filter, so asked first
    rebuild();
}

QCPCurve* CriticalOverlay::makeCurve(const QString& name, bool inLegend) {
    auto* curve = new QCPCurve(plot_->xAxis, plot_->yAxis);
    curve->setLayer(QStringLiteral("survey"));
    curve->setLineStyle(QCPCurve::lsNone);
    curve->setName(name);
    curve->setSelectable(QCP::stNone);
    curve->setProperty("surveyInLegend", inLegend);
    if (!inLegend) curve->removeFromLegend();
    return curve;
}

void CriticalOverlay::setMap(std::shared_ptr<const survey::CriticalMap> map, int plotX, int plotY) {
    map_ = std::move(map);
    plotX_ = plotX;
    plotY_ = plotY;
    if (map_ && (highlighted_ < 0 || highlighted_ >= static_cast<int>(map_->points.size()))) highlighted_ = -1;
    rebuild();
}

void CriticalOverlay::setHighlighted(int point) {
    highlighted_ = point;
    rebuild();
}

void CriticalOverlay::setVisible(bool on) {
    visible_ = on;
    rebuild();
}

int CriticalOverlay::markerCount(solve::PointKind kind) const {
    switch (kind) {
        case solve::PointKind::Minimum:
            return minima_->dataCount();
        case solve::PointKind::Saddle:
            return saddles_->dataCount();
        case solve::PointKind::Maximum:
            return maxima_->dataCount();
        case solve::PointKind::Degenerate:
            return degenerate_->dataCount();
        default:
            return 0;
    }
}

void CriticalOverlay::rebuild() {
    if (!plot_) return;
    QVector<double> x[6], y[6];  // minima, saddles, maxima, degenerate, continuum members, highlight
    const bool usable = map_ && visible_ && plotX_ >= 0 && plotY_ >= 0 &&
                        static_cast<std::size_t>(std::max(plotX_, plotY_)) < map_->variables.size();
    if (usable) {
        for (std::size_t k = 0; k < map_->points.size(); ++k) {
            const survey::CriticalPoint& p = map_->points[k];
            int slot = 3;
            if (p.kind == solve::PointKind::Minimum) slot = 0;
            if (p.kind == solve::PointKind::Saddle) slot = 1;
            if (p.kind == solve::PointKind::Maximum) slot = 2;
            x[slot] << p.x[plotX_];
            y[slot] << p.x[plotY_];
            for (const Vector& member : p.memberPoints) {
                x[4] << member[plotX_];
                y[4] << member[plotY_];
            }
            if (static_cast<int>(k) == highlighted_) {
                x[5] << p.x[plotX_];
                y[5] << p.x[plotY_];
            }
        }
    }
    minima_->setData(x[0], y[0]);
    minimumDots_->setData(x[0], y[0]);
    saddles_->setData(x[1], y[1]);
    maxima_->setData(x[2], y[2]);
    degenerate_->setData(x[3], y[3]);
    continua_->setData(x[4], y[4]);
    highlight_->setData(x[5], y[5]);
    // Legend entries only for the kinds on show.
    for (QCPCurve* curve : {minima_, saddles_, maxima_, degenerate_, continua_}) {
        const bool wanted = curve->dataCount() > 0;
        if (wanted && !plot_->legend->hasItemWithPlottable(curve)) curve->addToLegend();
        if (!wanted && plot_->legend->hasItemWithPlottable(curve)) curve->removeFromLegend();
    }
    plot_->replot(QCustomPlot::rpQueuedReplot);
}

int CriticalOverlay::pointAt(const QPointF& pixel) const {
    if (!map_ || !visible_ || !plot_) return -1;
    int best = -1;
    double bestDistance = kPickPixels;
    for (std::size_t k = 0; k < map_->points.size(); ++k) {
        const Vector& x = map_->points[k].x;
        if (plotX_ >= x.size() || plotY_ >= x.size()) continue;
        const QPointF p(plot_->xAxis->coordToPixel(x[plotX_]), plot_->yAxis->coordToPixel(x[plotY_]));
        const double d = QLineF(p, pixel).length();
        if (d <= bestDistance) {
            bestDistance = d;
            best = static_cast<int>(k);
        }
    }
    return best;
}

bool CriticalOverlay::eventFilter(QObject* watched, QEvent* event) {
    if (watched == plot_) {
        if (event->type() == QEvent::MouseButtonDblClick) {
            auto* mouse = static_cast<QMouseEvent*>(event);
            const int point = mouse->button() == Qt::LeftButton ? pointAt(mouse->position()) : -1;
            if (point >= 0) {
                emit pointActivated(point);
                return true;
            }
        } else if (event->type() == QEvent::MouseButtonPress) {
            pressPixel_ = static_cast<QMouseEvent*>(event)->position();
        } else if (event->type() == QEvent::MouseButtonRelease) {
            auto* mouse = static_cast<QMouseEvent*>(event);
            if (mouse->button() == Qt::LeftButton && QLineF(pressPixel_, mouse->position()).length() <= 4.0) {
                const int point = pointAt(mouse->position());
                if (point >= 0) emit pointClicked(point);
            }
        }
    }
    return QObject::eventFilter(watched, event);
}

}  // namespace sw::widgets
