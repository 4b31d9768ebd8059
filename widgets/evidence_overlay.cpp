#include "widgets/evidence_overlay.h"

#include "widgets/landscape_view.h"
#include "widgets/plot_style.h"

#include <cmath>
#include <limits>

namespace sw::widgets {

namespace {
constexpr double kArrowPixels = 70.0;
constexpr int kMostArrows = 2;
}  // namespace

EvidenceOverlay::EvidenceOverlay(LandscapeView* landscape) : QObject(landscape), landscape_(landscape) {
    QCustomPlot* plot = landscape->plot();
    const bool hasMarks = plot->layer(QStringLiteral("marks")) != nullptr;
    ring_ = new QCPCurve(plot->xAxis, plot->yAxis);
    remedyPath_ = new QCPCurve(plot->xAxis, plot->yAxis);
    for (QCPCurve* c : {ring_, remedyPath_}) {
        if (hasMarks) c->setLayer(QStringLiteral("marks"));
        c->removeFromLegend();
        c->setSelectable(QCP::stNone);
        c->setVisible(false);
    }
    ring_->setLineStyle(QCPCurve::lsNone);
    ring_->setName(tr("finding"));
    remedyPath_->setName(tr("remedy rerun"));
    for (int i = 0; i < kMostArrows; ++i) {
        auto* arrow = new QCPItemLine(plot);
        if (hasMarks) arrow->setLayer(QStringLiteral("marks"));
        arrow->setSelectable(false);
        arrow->setVisible(false);
        arrows_.push_back(arrow);
    }
    label_ = new QCPItemText(plot);
    if (hasMarks) label_->setLayer(QStringLiteral("marks"));
    label_->setSelectable(false);
    label_->setVisible(false);
    label_->setPadding(QMargins(3, 1, 3, 1));
    // Arrows keep their length on screen: recompute them before every replot (zoom, pan, resize).
    connect(plot, &QCustomPlot::beforeReplot, this, [this] {
        if (shown_) layoutArrows();
    });
}

EvidenceOverlay::~EvidenceOverlay() = default;

void EvidenceOverlay::clear() {
    shown_ = false;
    content_ = {};
    if (!landscape_) return;
    ring_->setVisible(false);
    remedyPath_->setVisible(false);
    remedyPath_->removeFromLegend();
    for (QCPItemLine* a : arrows_) a->setVisible(false);
    label_->setVisible(false);
    landscape_->plot()->replot(QCustomPlot::rpQueuedReplot);
}

void EvidenceOverlay::show(const Content& content) {
    if (!landscape_) return;
    content_ = content;
    const int px = content.plotX, py = content.plotY;
    const bool hasPoint = content.point.size() > std::max(px, py);
    if (!hasPoint && !content.remedyRun) {
        clear();
        return;
    }
    shown_ = true;
    restyle();
    if (hasPoint) ring_->setData(QVector<double>{content.point[px]}, QVector<double>{content.point[py]});
    else ring_->data()->clear();
    ring_->setVisible(hasPoint);
    QVector<double> xs, ys;
    if (content.remedyRun)
        for (const solve::IterationRecord& r : content.remedyRun->trace) {
            if (r.x.size() <= std::max(px, py) || !r.x.allFinite()) continue;
            xs.push_back(r.x[px]);
            ys.push_back(r.x[py]);
        }
    remedyPath_->setData(xs, ys);
    remedyPath_->setVisible(!xs.isEmpty());
    // The rerun's path is named in the landscape's legend while it is shown.
    remedyPath_->setName(content.remedyLabel.isEmpty() ? tr("remedy rerun") : content.remedyLabel);
    if (!xs.isEmpty()) remedyPath_->addToLegend();
    else remedyPath_->removeFromLegend();
    layoutArrows();
    landscape_->plot()->replot(QCustomPlot::rpQueuedReplot);
}

void EvidenceOverlay::restyle() {
    const QPalette palette = landscape_->palette();
    const QColor ink = palette.color(QPalette::WindowText);
    const QColor colour = content_.colour.isValid() ? content_.colour : ink;
    QPen ringPen(palette.color(QPalette::Highlight), 2.4);
    scaleForScreen(ringPen);
    ring_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, ringPen, Qt::NoBrush, 26));
    // Dashed in the track's colour with hollow markers, so it reads apart from the track itself.
    QPen pathPen(colour, 2.4, Qt::DashLine);
    scaleForScreen(pathPen);
    remedyPath_->setPen(pathPen);
    QPen markerPen(colour, 1.6);
    scaleForScreen(markerPen);
    remedyPath_->setScatterStyle(QCPScatterStyle(QCPScatterStyle::ssCircle, markerPen, palette.color(QPalette::Base), 6));
    // Arrows in the palette's text colour over a halo of the base colour, so they read on
    // both ends of the field's gradient.
    QPen arrowPen(ink, 2.4);
    scaleForScreen(arrowPen);
    for (QCPItemLine* a : arrows_) {
        a->setPen(arrowPen);
        a->setHead(QCPLineEnding(QCPLineEnding::esSpikeArrow, 12, 14));
        a->setTail(content_.bothWays ? QCPLineEnding(QCPLineEnding::esSpikeArrow, 12, 14) : QCPLineEnding());
    }
    label_->setColor(ink);
    QColor fill = palette.color(QPalette::Base);
    fill.setAlpha(200);
    label_->setBrush(QBrush(fill));
    label_->setPen(Qt::NoPen);
    label_->setFont(landscape_->font());
}

void EvidenceOverlay::layoutArrows() {
    if (!landscape_) return;
    QCustomPlot* plot = landscape_->plot();
    const int px = content_.plotX, py = content_.plotY;
    if (content_.point.size() <= std::max(px, py)) {
        for (QCPItemLine* a : arrows_) a->setVisible(false);
        label_->setVisible(false);
        return;
    }
    const double x0 = content_.point[px], y0 = content_.point[py];
    const QRect rect = plot->axisRect()->rect();
    const double sx = rect.width() / std::max(1e-300, plot->xAxis->range().size());
    const double sy = rect.height() / std::max(1e-300, plot->yAxis->range().size());
    std::size_t drawn = 0;
    for (std::size_t i = 0; i < arrows_.size(); ++i) {
        QCPItemLine* arrow = arrows_[i];
        if (i >= content_.directions.size() || content_.directions[i].size() <= std::max(px, py)) {
            arrow->setVisible(false);
            continue;
        }
        const double dx = content_.directions[i][px], dy = content_.directions[i][py];
        const double pixels = std::hypot(dx * sx, dy * sy);
        // A direction almost out of the plotted plane has no arrow worth drawing.
        if (!(pixels > 0) || std::hypot(dx, dy) < 0.05) {
            arrow->setVisible(false);
            continue;
        }
        const double t = kArrowPixels / pixels;
        if (content_.bothWays) arrow->start->setCoords(x0 - t * dx, y0 - t * dy);
        else arrow->start->setCoords(x0, y0);
        arrow->end->setCoords(x0 + t * dx, y0 + t * dy);
        arrow->setVisible(true);
        if (drawn++ == 0 && !content_.label.isEmpty()) {
            // Beyond the arrow's head, on the side it points to, so it never covers the point.
            label_->setText(content_.label);
            label_->position->setCoords(x0 + t * dx, y0 + t * dy);
            const double screenX = dx * sx, screenY = dy * sy;  // on screen (y up)
            Qt::Alignment align;
            if (std::abs(screenX) >= std::abs(screenY)) align = (screenX >= 0 ? Qt::AlignLeft : Qt::AlignRight) | Qt::AlignVCenter;
            else align = (screenY >= 0 ? Qt::AlignBottom : Qt::AlignTop) | Qt::AlignHCenter;
            label_->setPositionAlignment(align);
            label_->setPadding(QMargins(6, 2, 6, 2));
        }
    }
    label_->setVisible(drawn > 0 && !content_.label.isEmpty());
}

int EvidenceOverlay::arrowCount() const {
    int n = 0;
    for (const QCPItemLine* a : arrows_)
        if (a->visible()) ++n;
    return n;
}

QPointF EvidenceOverlay::markedPoint() const {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    if (!shown_ || ring_->data()->isEmpty()) return {nan, nan};
    return {ring_->data()->begin()->key, ring_->data()->begin()->value};
}

int EvidenceOverlay::remedyPathPoints() const { return remedyPath_->visible() ? remedyPath_->data()->size() : 0; }

}  // namespace sw::widgets
